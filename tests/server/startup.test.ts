import { spawn, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer } from 'node:net';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { afterAll, describe, expect, it } from 'vitest';

const root = path.resolve(import.meta.dirname, '..', '..');
const tsx = path.join(root, 'node_modules', '.bin', 'tsx');

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as { port: number };
      s.close(() => resolve(port));
    });
  });
}

interface Run { child: ChildProcess; output: () => string; exited: Promise<number | null> }

function boot(env: Record<string, string>): Run {
  const child = spawn(tsx, ['server/index.ts'], { cwd: root, env: { ...process.env, LOG_LEVEL: 'warn', ...env }, stdio: ['ignore', 'pipe', 'pipe'] });
  let out = '';
  child.stdout?.on('data', (d: Buffer) => (out += d.toString()));
  child.stderr?.on('data', (d: Buffer) => (out += d.toString()));
  const exited = new Promise<number | null>((resolve) => child.on('exit', (code) => resolve(code)));
  return { child, output: () => out, exited };
}

async function waitFor(check: () => boolean, ms = 45_000): Promise<void> {
  const until = Date.now() + ms;
  while (!check()) {
    if (Date.now() > until) throw new Error('timed out');
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('the server process', () => {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-boot-'));
  afterAll(() => rmSync(dir, { recursive: true, force: true }));

  it('starts on PORT, seeds the demo once, prints the sign-ins and stops cleanly on SIGTERM', { timeout: 240_000 }, async () => {
    const port = await freePort();
    const env = { PORT: String(port), HOLDLINE_DB: path.join(dir, 'h.sqlite'), HOLDLINE_DEMO: '1' };

    const first = boot(env);
    // The seed works four jobs through real commands, one of them over two shifts.
    await waitFor(() => first.output().includes('Holdline is serving'), 150_000);
    expect(first.output()).toContain(`http://localhost:${port}`);
    expect(first.output()).toContain('supervisor@holdline.test');
    expect(first.output()).toContain('holdline-demo');
    const health = await fetch(`http://127.0.0.1:${port}/api/health`).then((r) => r.json());
    expect(health).toMatchObject({ status: 'ok', database: 'ok' });
    first.child.kill('SIGTERM');
    expect(await first.exited).toBe(0);

    const db = new Database(env.HOLDLINE_DB, { readonly: true });
    const count = () => (db.prepare('SELECT COUNT(*) AS n FROM user').get() as { n: number }).n;
    expect(count()).toBe(8);
    // The invented fleet arrives through the same commands: three parts quarantined after inspections with photos.
    const quarantined = db.prepare("SELECT serial FROM component WHERE status = 'quarantined' ORDER BY serial").all() as { serial: string }[];
    expect(quarantined.map((r) => r.serial)).toEqual(['F07-BALL12-01', 'F07-G12-12', 'F07-INS12-06']);
    expect((db.prepare('SELECT COUNT(*) AS n FROM upload WHERE owner_kind = ?').get('inspection') as { n: number }).n).toBe(3);
    // The jobs too: one complete, one live at a hold, one live in its second shift (issue 17), one being planned.
    const jobs = db.prepare('SELECT state FROM job ORDER BY state').all() as { state: string }[];
    expect(jobs.map((j) => j.state)).toEqual(['complete', 'live', 'live', 'planning']);

    const second = boot(env);
    await waitFor(() => second.output().includes('Holdline is serving'));
    expect(count()).toBe(8);
    expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
    db.close();
    second.child.kill('SIGINT');
    expect(await second.exited).toBe(0);
  });

  it('refuses a bad setting with a message naming it', { timeout: 30_000 }, async () => {
    const run = boot({ PORT: 'harbour', HOLDLINE_DB: path.join(dir, 'bad.sqlite') });
    expect(await run.exited).toBe(2);
    expect(run.output()).toMatch(/Invalid configuration[\s\S]*PORT/);
  });
});
