import { spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { GC_NODE_ARGS } from './crowd-memory.js';
import { track } from './proc.js';
import type { BenchServer, CommandPayload } from './types.js';

const root = path.resolve(import.meta.dirname, '..', '..');

/** Data folders of relays still running: removed on the way out even after Ctrl-C or a failed scenario. */
const liveDirs = new Set<string>();
process.once('exit', () => {
  for (const dir of liveDirs) rmSync(dir, { recursive: true, force: true });
});

/**
 * A wind reading as a crew member records it (`weather.record`): legal for Holdline (speeds and
 * height to one decimal, under every demo wind limit, so no reading stops the job) and the same
 * size for the relays, which store whatever they are sent.
 */
export function weatherCommand(jobId: string, i: number): CommandPayload {
  const meanMs = Math.round((2 + (i % 30) / 10) * 10) / 10;
  return { jobId, command: { commandId: randomUUID(), type: 'weather.record', meanMs, gustMs: Math.round((meanMs + 1.5) * 10) / 10, heightM: 10 } };
}

/** Starts `bench/servers/relay.ts` and resolves with the port it printed. */
function spawnRelay(system: 'relay' | 'sqlite-relay', port: number, db: string): Promise<{ child: ChildProcess; port: number }> {
  const args = [...GC_NODE_ARGS, '--import', 'tsx', 'bench/servers/relay.ts', '--mode', system, '--port', String(port)];
  if (system === 'sqlite-relay') args.push('--db', db);
  const child = track(spawn(process.execPath, args, { cwd: root, stdio: ['ignore', 'pipe', 'pipe'] }));
  return new Promise((resolve, reject) => {
    let out = '';
    const onData = (chunk: Buffer) => {
      out += chunk.toString();
      const match = /relay listening (\d+)/.exec(out);
      if (match) {
        child.stdout?.off('data', onData);
        child.off('exit', onExit);
        resolve({ child, port: Number(match[1]) });
      }
    };
    const onExit = (code: number | null, signal: string | null) => reject(new Error(`the ${system} exited while starting (${signal ?? code}):\n${out.slice(-2000)}`));
    child.stdout?.on('data', onData);
    child.stderr?.on('data', (chunk: Buffer) => (out += chunk.toString()));
    child.once('exit', onExit);
  });
}

function killAndWait(child: ChildProcess): Promise<void> {
  if (child.exitCode !== null || child.signalCode !== null) return Promise.resolve();
  return new Promise((resolve) => {
    child.once('exit', () => resolve());
    child.kill('SIGKILL');
  });
}

/** A baseline (the bare relay or the SQLite relay) in its own process, as a `BenchServer`. */
export async function startRelay(system: 'relay' | 'sqlite-relay'): Promise<BenchServer> {
  const dir = mkdtempSync(path.join(os.tmpdir(), `holdline-bench-${system}-`));
  liveDirs.add(dir);
  const db = path.join(dir, 'relay.sqlite');
  let { child, port } = await spawnRelay(system, 0, db);
  const boardJobId = randomUUID();
  return {
    system,
    url: `http://127.0.0.1:${port}`,
    pid: () => {
      if (child.pid === undefined) throw new Error(`the ${system} has no process`);
      return child.pid;
    },
    boardJobId,
    idleJobIds: Array.from({ length: 9 }, () => randomUUID()),
    // The relays take any token; several tell senders apart in a log, nothing more.
    commanderTokens: ['relay-commander-1', 'relay-commander-2', 'relay-commander-3', 'relay-commander-4'],
    viewerTokens: ['relay-viewer-1', 'relay-viewer-2', 'relay-viewer-3', 'relay-viewer-4'],
    command: (i) => weatherCommand(boardJobId, i),
    async restart() {
      await killAndWait(child);
      ({ child, port } = await spawnRelay(system, port, db));
    },
    async stop() {
      await killAndWait(child);
      rmSync(dir, { recursive: true, force: true });
      liveDirs.delete(dir);
    },
  };
}
