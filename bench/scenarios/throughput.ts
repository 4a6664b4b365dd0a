/**
 * Scenario 2, the command path: no viewers, one client and then four (each its own process, each
 * sending its next command the moment the previous one is answered) for a fixed time, on Holdline,
 * the SQLite relay and the bare relay, alternating, plus better-sqlite3 alone inserting the same
 * rows with the same pragmas in this process. Every answered seq is then looked up in the
 * system's log (`GET /api/jobs/:id/events`): an ok answer whose event is not there is a lost ack.
 *
 * This file is also the sender process: `node --import tsx bench/scenarios/throughput.ts --throughput-sender`.
 */
import { fork, type ChildProcess } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import Database from 'better-sqlite3';
import { io } from 'socket.io-client';
import { cpuMs, track } from '../lib/proc.js';
import { startRelay, weatherCommand } from '../lib/servers.js';
import { ratioOf, spreadOf } from '../lib/stats.js';
import type { BenchServer, CommandPayload, Correctness, Figure, Scenario, ScenarioOptions, System } from '../lib/types.js';

const SENDER_FLAG = '--throughput-sender';
/** An answer slower than this is counted lost (a healthy one takes milliseconds). */
const ACK_TIMEOUT_MS = 10_000;
/** Commands handed to a sender at a time; it asks for more when it has fewer than half left. */
const BATCH = 400;

type ParentMessage =
  | { kind: 'run'; run: number; url: string; token: string }
  | { kind: 'commands'; run: number; payloads: CommandPayload[] }
  | { kind: 'go'; warmupMs: number; durationMs: number }
  | { kind: 'exit' };

interface SenderResult {
  /** Answered ok inside the timed window. */
  counted: number;
  acked: number;
  rejected: number;
  lost: number;
  seqs: number[];
  firstRefusal: string | null;
}

type SenderMessage = { kind: 'connected' } | { kind: 'need' } | { kind: 'done'; result: SenderResult } | { kind: 'failed'; message: string };

// ---------------------------------------------------------------- the sender process

function senderMain(): void {
  const send = (message: SenderMessage) => process.send?.(message);
  const queue: CommandPayload[] = [];
  let asked = false;
  let waiting: (() => void) | null = null;
  let socket: ReturnType<typeof io> | null = null;
  let current = -1;

  const next = async (): Promise<CommandPayload> => {
    if (queue.length < BATCH / 2 && !asked) {
      asked = true;
      send({ kind: 'need' });
    }
    while (queue.length === 0) await new Promise<void>((resolve) => (waiting = resolve));
    return queue.shift() as CommandPayload;
  };

  const run = async (warmupMs: number, durationMs: number, live: ReturnType<typeof io>): Promise<SenderResult> => {
    const result: SenderResult = { counted: 0, acked: 0, rejected: 0, lost: 0, seqs: [], firstRefusal: null };
    const windowStart = performance.now() + warmupMs;
    const windowEnd = windowStart + durationMs;
    while (performance.now() < windowEnd) {
      const payload = await next();
      try {
        const answer = (await live.timeout(ACK_TIMEOUT_MS).emitWithAck('board:command', payload)) as { ok: boolean; seq?: number; error?: { code: string; message: string } };
        const at = performance.now();
        if (answer.ok && typeof answer.seq === 'number') {
          result.acked += 1;
          result.seqs.push(answer.seq);
          if (at >= windowStart && at <= windowEnd) result.counted += 1;
        } else {
          result.rejected += 1;
          result.firstRefusal ??= `${answer.error?.code}: ${answer.error?.message}`;
        }
      } catch {
        result.lost += 1;
      }
    }
    return result;
  };

  process.on('message', (message: ParentMessage) => {
    if (message.kind === 'commands') {
      // A batch asked for during an earlier run carries that system's job: never send it here.
      if (message.run !== current) return;
      queue.push(...message.payloads);
      asked = false;
      waiting?.();
      waiting = null;
    } else if (message.kind === 'run') {
      socket?.close();
      current = message.run;
      queue.length = 0;
      asked = false;
      const live = io(message.url, { transports: ['websocket'], auth: { token: message.token }, reconnection: false, forceNew: true });
      socket = live;
      live.once('connect', () => send({ kind: 'connected' }));
      live.once('connect_error', (error) => send({ kind: 'failed', message: `connect: ${error.message}` }));
    } else if (message.kind === 'go') {
      const live = socket;
      if (!live) return send({ kind: 'failed', message: 'go before run' });
      run(message.warmupMs, message.durationMs, live).then(
        (result) => {
          live.close();
          socket = null;
          send({ kind: 'done', result });
        },
        (error: unknown) => send({ kind: 'failed', message: String(error) }),
      );
    } else if (message.kind === 'exit') {
      socket?.close();
      process.exit(0);
    }
  });
}

// ---------------------------------------------------------------- the scenario

class Sender {
  private listeners = new Set<(message: SenderMessage) => void>();
  constructor(readonly child: ChildProcess) {
    child.on('message', (message: SenderMessage) => {
      for (const listener of [...this.listeners]) listener(message);
    });
  }

  static start(): Sender {
    const child = track(fork(import.meta.filename, [SENDER_FLAG], { execArgv: ['--import', 'tsx'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] }));
    return new Sender(child);
  }

  post(message: ParentMessage): void {
    this.child.send(message);
  }

  on(listener: (message: SenderMessage) => void): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  /** Resolves with the first message the test accepts; a 'failed' message or the process ending rejects. */
  waitFor<T extends SenderMessage['kind']>(kind: T, timeoutMs: number): Promise<Extract<SenderMessage, { kind: T }>> {
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => finish(new Error(`a sender sent no '${kind}' within ${timeoutMs} ms`)), timeoutMs);
      const finish = (error: Error | null, message?: Extract<SenderMessage, { kind: T }>) => {
        clearTimeout(timer);
        off();
        this.child.off('exit', onExit);
        if (error) reject(error);
        else resolve(message as Extract<SenderMessage, { kind: T }>);
      };
      const onExit = () => finish(new Error('a sender process ended'));
      const off = this.on((message) => {
        if (message.kind === kind) finish(null, message as Extract<SenderMessage, { kind: T }>);
        else if (message.kind === 'failed') finish(new Error(`a sender failed: ${message.message}`));
      });
      this.child.once('exit', onExit);
    });
  }
}

interface Measurement {
  perSecond: number;
  cpuMsPerCommand: number;
  correctness: Correctness;
  firstRefusal: string | null;
}

/** Every seq in the system's log after `afterSeq`, read page by page as a crew member. */
async function loggedSeqs(server: BenchServer, afterSeq: number, untilSeq: number): Promise<Set<number>> {
  const seqs = new Set<number>();
  let after = afterSeq;
  while (after < untilSeq) {
    const res = await fetch(`${server.url}/api/jobs/${server.boardJobId}/events?after=${after}`, {
      headers: { authorization: `Bearer ${server.commanderTokens[0]}`, origin: server.url },
    });
    if (!res.ok) throw new Error(`${server.system}: reading the log answered ${res.status}`);
    const page = (await res.json()) as { items: { seq: number }[]; lastSeq: number };
    if (page.items.length === 0) break;
    for (const item of page.items) seqs.add(item.seq);
    after = page.items[page.items.length - 1].seq;
  }
  return seqs;
}

/** One timed run of `clients` senders against one server. */
async function measure(server: BenchServer, senders: Sender[], warmupMs: number, durationMs: number, counter: { i: number; run: number }): Promise<Measurement> {
  const feeders: (() => void)[] = [];
  const run = ++counter.run;
  const feed = (sender: Sender) => sender.post({ kind: 'commands', run, payloads: Array.from({ length: BATCH }, () => server.command(counter.i++)) });
  for (const [k, sender] of senders.entries()) {
    feeders.push(sender.on((message) => message.kind === 'need' && feed(sender)));
    sender.post({ kind: 'run', run, url: server.url, token: server.commanderTokens[k % server.commanderTokens.length] });
    feed(sender);
  }
  try {
    await Promise.all(senders.map((s) => s.waitFor('connected', 15_000)));
    const done = senders.map((s) => s.waitFor('done', warmupMs + durationMs + ACK_TIMEOUT_MS + 15_000));
    for (const sender of senders) sender.post({ kind: 'go', warmupMs, durationMs });
    await new Promise((resolve) => setTimeout(resolve, warmupMs));
    const cpuBefore = cpuMs(server.pid());
    await new Promise((resolve) => setTimeout(resolve, durationMs));
    const cpuAfter = cpuMs(server.pid());
    const results = (await Promise.all(done)).map((m) => m.result);

    const counted = results.reduce((sum, r) => sum + r.counted, 0);
    const acked = results.flatMap((r) => r.seqs);
    const correctness: Correctness = {
      gaps: 0,
      duplicates: acked.length - new Set(acked).size,
      lostAcks: results.reduce((sum, r) => sum + r.lost, 0),
      rejected: results.reduce((sum, r) => sum + r.rejected, 0),
    };
    if (acked.length > 0) {
      const low = Math.min(...acked);
      const high = Math.max(...acked);
      const inLog = await loggedSeqs(server, low - 1, high);
      for (const seq of new Set(acked)) if (!inLog.has(seq)) correctness.lostAcks += 1;
      // Nothing else writes to the board meanwhile, so the log between our first and last seq is whole.
      for (let seq = low; seq <= high; seq++) if (!inLog.has(seq)) correctness.gaps += 1;
    }
    return {
      perSecond: counted / (durationMs / 1000),
      cpuMsPerCommand: counted > 0 ? (cpuAfter - cpuBefore) / counted : Number.NaN,
      correctness,
      firstRefusal: results.find((r) => r.firstRefusal)?.firstRefusal ?? null,
    };
  } finally {
    for (const off of feeders) off();
  }
}

/** better-sqlite3 alone: the sqlite-relay's row, one transaction each, the same pragmas, no network. */
function rawInserts(warmupMs: number, durationMs: number): number {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-bench-raw-'));
  const db = new Database(path.join(dir, 'raw.sqlite'));
  try {
    db.pragma('journal_mode = WAL');
    db.pragma('synchronous = FULL');
    db.pragma('foreign_keys = ON');
    db.pragma('busy_timeout = 5000');
    db.exec(`CREATE TABLE event (job_id TEXT NOT NULL, seq INTEGER NOT NULL, command_id TEXT NOT NULL, body TEXT NOT NULL, at TEXT NOT NULL,
      PRIMARY KEY (job_id, seq), UNIQUE (job_id, command_id))`);
    const insert = db.prepare<[string, number, string, string, string]>('INSERT INTO event (job_id, seq, command_id, body, at) VALUES (?, ?, ?, ?, ?)');
    const one = db.transaction((jobId: string, seq: number, commandId: string, body: string, at: string) => insert.run(jobId, seq, commandId, body, at));
    const jobId = 'raw-board';
    let seq = 0;
    let counted = 0;
    const windowStart = performance.now() + warmupMs;
    const windowEnd = windowStart + durationMs;
    for (let now = performance.now(); now < windowEnd; now = performance.now()) {
      const { command } = weatherCommand(jobId, seq);
      const { commandId, type, ...data } = command;
      seq += 1;
      const at = new Date().toISOString();
      one(jobId, seq, commandId, JSON.stringify({ jobId, seq, commandId, type, data, at }), at);
      const done = performance.now();
      if (done >= windowStart && done <= windowEnd) counted += 1;
    }
    return counted / (durationMs / 1000);
  } finally {
    db.close();
    rmSync(dir, { recursive: true, force: true });
  }
}

type Starter = () => Promise<BenchServer>;

/** Holdline's starter, or null while bench/lib/holdline.ts is not there. */
async function holdlineStarter(): Promise<Starter | null> {
  try {
    const module = (await import('../lib/holdline.js')) as { startHoldline?: () => Promise<BenchServer> };
    return module.startHoldline ?? null;
  } catch (error) {
    if ((error as { code?: string }).code === 'ERR_MODULE_NOT_FOUND') return null;
    throw error;
  }
}

const fmt = (n: number) => (Number.isFinite(n) ? Math.round(n).toLocaleString('en-US') : 'n/a');

/** Scenario 2: commands committed per second with no viewers, one client and four. */
export const throughput: Scenario = async ({ quick, log }: ScenarioOptions) => {
  const rounds = quick ? 1 : 3;
  // Windows sized so the whole suite fits its time (quick: two minutes, full: ten).
  const warmupMs = quick ? 300 : 500;
  const durationMs = quick ? 1000 : 2000;
  const clientCounts = [1, 4];
  const notes: string[] = [];
  const correctness: Correctness = { gaps: 0, duplicates: 0, lostAcks: 0, rejected: 0 };

  const starters: [System, Starter][] = [];
  const startHoldline = await holdlineStarter();
  if (startHoldline) starters.push(['holdline', startHoldline]);
  else notes.push('Holdline was not measured: bench/lib/holdline.ts is missing.');
  starters.push(['relay', () => startRelay('relay')], ['sqlite-relay', () => startRelay('sqlite-relay')]);

  const servers: BenchServer[] = [];
  const senders = Array.from({ length: Math.max(...clientCounts) }, () => Sender.start());
  try {
    log(`throughput: starting ${starters.map(([system]) => system).join(', ')}`);
    // Started side by side (nothing is measured yet); if one fails, those that did start are stopped below.
    const started = await Promise.allSettled(starters.map(([, start]) => start()));
    for (const outcome of started) if (outcome.status === 'fulfilled') servers.push(outcome.value);
    for (const [k, outcome] of started.entries()) {
      if (outcome.status === 'fulfilled') continue;
      const message = outcome.reason instanceof Error ? outcome.reason.message : String(outcome.reason);
      // The baselines still say what this machine does; the runner fails a run that measured no Holdline.
      if (starters[k][0] !== 'holdline') throw outcome.reason;
      notes.push(`Holdline FAILED to start, not measured: ${message.split('\n').slice(0, 2).join(' ')}`);
      log(`throughput: Holdline failed to start: ${message}`);
    }
    const rates = new Map<string, number[]>();
    const cpu = new Map<string, number[]>();
    const push = (map: Map<string, number[]>, key: string, value: number) => map.set(key, [...(map.get(key) ?? []), value]);
    const counter = { i: 0, run: 0 };
    for (let round = 1; round <= rounds; round++) {
      for (const clients of clientCounts) {
        for (const server of servers) {
          const m = await measure(server, senders.slice(0, clients), warmupMs, durationMs, counter);
          push(rates, `${clients}:${server.system}`, m.perSecond);
          push(cpu, `${clients}:${server.system}`, m.cpuMsPerCommand);
          for (const key of Object.keys(correctness) as (keyof Correctness)[]) correctness[key] += m.correctness[key];
          const bad = Object.entries(m.correctness).filter(([, n]) => n > 0);
          if (bad.length > 0) notes.push(`round ${round}, ${clients} client(s), ${server.system}: ${bad.map(([k, n]) => `${k} ${n}`).join(', ')}${m.firstRefusal ? ` (first refusal ${m.firstRefusal})` : ''}`);
          log(`throughput: round ${round}/${rounds}, ${clients} client(s), ${server.system}: ${fmt(m.perSecond)} cmd/s, ${m.cpuMsPerCommand.toFixed(2)} ms CPU per command`);
        }
        if (clients === 1) {
          const raw = rawInserts(warmupMs, durationMs);
          push(rates, '1:raw-sqlite', raw);
          log(`throughput: round ${round}/${rounds}, raw better-sqlite3: ${fmt(raw)} rows/s`);
        }
      }
    }

    const figures: Figure[] = [];
    for (const clients of clientCounts) {
      const values: Figure['values'] = {};
      for (const system of ['holdline', 'relay', 'sqlite-relay', 'raw-sqlite'] as System[]) {
        const runs = rates.get(`${clients}:${system}`);
        if (runs) values[system] = spreadOf(runs);
      }
      const ratio = ratioOf(values.holdline, values['sqlite-relay']);
      figures.push({
        id: `throughput.${clients}c`,
        label: `commands committed per second, ${clients === 1 ? 'one client' : `${clients} clients`}, no viewers`,
        unit: 'cmd/s',
        better: 'higher',
        values,
        ...(ratio !== undefined ? { ratio: { against: 'sqlite-relay' as const, value: ratio } } : {}),
        ...(clients === 1 ? { target: { text: '≥ 0.25× the SQLite relay', met: ratio === undefined ? null : ratio >= 0.25 } } : {}),
      });
    }
    for (const clients of clientCounts) {
      const values: Figure['values'] = {};
      for (const system of ['holdline', 'relay', 'sqlite-relay'] as System[]) {
        const runs = cpu.get(`${clients}:${system}`);
        if (runs) values[system] = spreadOf(runs);
      }
      const ratio = ratioOf(values.holdline, values['sqlite-relay']);
      figures.push({
        id: `throughput.${clients}c.cpu`,
        label: `server CPU per command, ${clients === 1 ? 'one client' : `${clients} clients`}, no viewers`,
        unit: 'ms',
        better: 'lower',
        values,
        ...(ratio !== undefined ? { ratio: { against: 'sqlite-relay' as const, value: ratio } } : {}),
      });
    }
    const raw = figures[0].values['raw-sqlite'];
    if (raw && raw.median > 0) {
      notes.push(
        `raw better-sqlite3 commits ${fmt(raw.median)} rows/s: one fsync'd commit takes about ${(1000 / raw.median).toFixed(2)} ms on this disk, a floor under both SQLite systems' time per command.`,
      );
    }
    notes.push(
      `${rounds} round(s) of ${durationMs / 1000} s after ${warmupMs / 1000} s of warm-up per system and client count; each client is its own process sending its next command when the last is answered; raw-sqlite inserts in the bench process, one transaction per row, no network.`,
    );
    if (quick) notes.push('quick: one round of 1 s windows (full: three rounds of 2 s)');
    return { id: 'throughput', title: 'Command path throughput, no viewers', figures, correctness, notes };
  } finally {
    for (const sender of senders) if (sender.child.connected) sender.post({ kind: 'exit' });
    await Promise.allSettled(servers.map((s) => s.stop()));
  }
};

export default throughput;

if (process.argv.includes(SENDER_FLAG)) senderMain();
