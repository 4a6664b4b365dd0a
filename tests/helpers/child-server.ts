import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import os from 'node:os';
import path from 'node:path';

const root = path.resolve(import.meta.dirname, '..', '..');

/** The secret every child server of a test shares, so a token signed before a restart is still good after it. */
export const CHILD_SECRET = 'child-secret-child-secret-child-secret-0123456789';

/** A port nobody listens on now; the same port is used again for every restart, as a real server's is. */
export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const probe = createServer();
    probe.once('error', reject);
    probe.listen(0, '127.0.0.1', () => {
      const { port } = probe.address() as { port: number };
      probe.close(() => resolve(port));
    });
  });
}

export interface ChildServerOptions {
  /** Data folder holding `holdline.sqlite` (made when missing): pass an earlier one to start on the same file. */
  dataDir?: string;
  /** Extra environment (LOG_LEVEL, ...). */
  env?: Record<string, string>;
  /** Extra node flags before the entry (e.g. `--cpu-prof` to see where a slow run spends its time). */
  nodeArgs?: string[];
  /** How long to wait for /api/health to answer after a start. */
  bootTimeoutMs?: number;
  /** Checkout to run `server/index.ts` from (default: this repository), e.g. an older one for before/after numbers. */
  root?: string;
}

/**
 * The real server (`node --import tsx server/index.ts`, the same entry as `npm run server`) as a
 * child process on a temporary database, with demo seeding off. It can be killed with SIGKILL
 * (nothing runs on the way down: no queue drain, no close) and started again on the same file and
 * port, as after a power cut.
 */
export class ChildServer {
  readonly dataDir: string;
  readonly databasePath: string;
  readonly url: string;
  private child: ChildProcess | null = null;
  private exited: Promise<void> = Promise.resolve();
  private log = '';
  /** How many times the process was started. */
  starts = 0;

  private constructor(
    readonly port: number,
    private readonly options: ChildServerOptions,
  ) {
    this.dataDir = options.dataDir ?? mkdtempSync(path.join(os.tmpdir(), 'holdline-child-'));
    this.databasePath = path.join(this.dataDir, 'holdline.sqlite');
    this.url = `http://127.0.0.1:${port}`;
  }

  /** Picks a free port and starts the first process; resolves once /api/health answers. */
  static async start(options: ChildServerOptions = {}): Promise<ChildServer> {
    const server = new ChildServer(await freePort(), options);
    await server.boot();
    return server;
  }

  /** Everything the processes printed so far (stdout and stderr), for a failing test's message. */
  output(): string {
    return this.log;
  }

  get running(): boolean {
    return this.child !== null;
  }

  get pid(): number | undefined {
    return this.child?.pid;
  }

  /** Starts a process on the same file and port and waits for /api/health to answer 200. */
  async boot(): Promise<void> {
    if (this.child) throw new Error('the child server is already running');
    // `node --import tsx`, not the tsx binary: tsx's launcher would leave the server alive as a
    // grandchild when the launcher alone is killed.
    const child = spawn(process.execPath, [...(this.options.nodeArgs ?? []), '--import', 'tsx', 'server/index.ts'], {
      cwd: this.options.root ?? root,
      env: {
        ...process.env,
        PORT: String(this.port),
        HOLDLINE_DB: this.databasePath,
        HOLDLINE_DEMO: '0',
        HOLDLINE_SECRET: CHILD_SECRET,
        HOLDLINE_PUBLIC_URL: this.url,
        LOG_LEVEL: 'warn',
        ...this.options.env,
      },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    this.child = child;
    this.starts += 1;
    const start = this.starts;
    child.stdout?.on('data', (d: Buffer) => (this.log += d.toString()));
    child.stderr?.on('data', (d: Buffer) => (this.log += d.toString()));
    this.exited = new Promise((resolve) => child.once('exit', () => resolve()));
    let gone = false;
    child.once('exit', (code, signal) => {
      gone = true;
      this.log += `\n[start ${start} ended: ${signal ?? `exit ${code}`}]\n`;
      if (this.child === child) this.child = null;
    });
    const until = Date.now() + (this.options.bootTimeoutMs ?? 45_000);
    let last: string;
    for (;;) {
      if (gone) throw new Error(`the server exited while starting:\n${this.log.slice(-4000)}`);
      try {
        const res = await fetch(`${this.url}/api/health`, { signal: AbortSignal.timeout(5000) });
        if (res.status === 200) return;
        last = `${res.status} ${await res.text()}`;
      } catch (error) {
        // not listening yet
        last = error instanceof Error ? error.message : String(error);
      }
      if (Date.now() > until) {
        await this.kill();
        throw new Error(`the server did not answer /api/health with 200 in time (last: ${last}):\n${this.log.slice(-4000)}`);
      }
      await new Promise((r) => setTimeout(r, 100));
    }
  }

  /** SIGKILL: the process dies at once, mid-transaction or not. Resolves once it has exited. */
  async kill(): Promise<void> {
    const child = this.child;
    if (!child) return;
    child.kill('SIGKILL');
    await this.exited;
  }

  /** SIGTERM: the server's own shutdown (finish the queue, close the database). Resolves once it has exited. */
  async terminate(): Promise<void> {
    const child = this.child;
    if (!child) return;
    child.kill('SIGTERM');
    await this.exited;
  }

  /** Kills the process (SIGKILL) and starts it again on the same file and port. */
  async restart(): Promise<void> {
    await this.kill();
    await this.boot();
  }

  /** Kills the process and removes the data folder. */
  async stop(): Promise<void> {
    await this.kill();
    rmSync(this.dataDir, { recursive: true, force: true });
  }
}
