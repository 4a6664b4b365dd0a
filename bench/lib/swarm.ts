/**
 * The client swarm as a scenario drives it: viewer processes (bench/swarm/viewers.ts, 250 sockets
 * each for 1,000 viewers) and one sender process (bench/swarm/sender.ts), all outside the
 * server's process and the scenario's, talking to the system under test with the board's own
 * Socket.IO calls. Also the pieces every swarm scenario shares: starting each system, alternating
 * them over rounds, figures with their targets, and the checks behind the correctness counts.
 */
import { fork, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import type {
  ArrivalsResult,
  ConnectResult,
  Counters,
  RejoinResult,
  Reply,
  RunResult,
  SenderRequest,
  SentCommand,
  SyncResult,
  ViewerRequest,
} from '../swarm/protocol.js';
import { now } from '../swarm/protocol.js';
import { startHoldline } from './holdline.js';
import { cpuMs, track } from './proc.js';
import { startRelay } from './servers.js';
import { percentile, ratioOf, spreadOf } from './stats.js';
import type { BenchServer, CommandPayload, Correctness, Figure, ScenarioOptions, System } from './types.js';

export { now };

const root = path.resolve(import.meta.dirname, '..', '..');
/** Sockets per viewer process: 1,000 viewers are four processes. */
export const VIEWERS_PER_PROCESS = 250;

/** One forked swarm process and its request/answer channel. */
class SwarmProcess<Request> {
  private next = 1;
  private readonly waiting = new Map<number, { resolve: (value: unknown) => void; reject: (error: Error) => void }>();
  private exited = false;

  constructor(private readonly child: ChildProcess) {
    child.on('message', (reply: Reply) => {
      const waiter = this.waiting.get(reply.id);
      if (!waiter) return;
      this.waiting.delete(reply.id);
      if (reply.ok) waiter.resolve(reply.result);
      else waiter.reject(new Error(reply.error));
    });
    child.once('exit', (code, signal) => {
      this.exited = true;
      for (const waiter of this.waiting.values()) waiter.reject(new Error(`a swarm process ended (${signal ?? code})`));
      this.waiting.clear();
    });
  }

  static fork<R>(script: string): SwarmProcess<R> {
    const child = fork(path.join(root, 'bench', 'swarm', script), [], { cwd: root, execArgv: ['--import', 'tsx'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'] });
    return new SwarmProcess<R>(track(child));
  }

  request<T>(request: Request): Promise<T> {
    if (this.exited) return Promise.reject(new Error('the swarm process has ended'));
    const id = this.next++;
    return new Promise<T>((resolve, reject) => {
      this.waiting.set(id, { resolve: resolve as (value: unknown) => void, reject });
      this.child.send({ id, request });
    });
  }

  async close(): Promise<void> {
    if (this.exited) return;
    const gone = new Promise<void>((resolve) => this.child.once('exit', () => resolve()));
    await this.request({ op: 'close' } as Request).catch(() => undefined);
    await Promise.race([gone, new Promise((r) => setTimeout(r, 2000))]);
    if (!this.exited) this.child.kill('SIGKILL');
  }
}

/** Viewers joined, measured from the request to the last join answered. */
export interface JoinOutcome {
  joined: number;
  failed: number;
  reasons: string[];
  /** From the moment the connections were asked for to the last join answered, ms. */
  allJoinedMs: number;
}

/** Per command with an ok acknowledgment: the time from its send to its first and last viewer. */
export interface Latencies {
  toFirst: number[];
  toLast: number[];
  /** Acknowledged commands whose event no counted viewer ever held. */
  undelivered: number;
}

export interface ResyncOutcome {
  /** From the rejoin request to the last returning viewer holding every event, ms. */
  allSyncedMs: number;
  returned: number;
  notSynced: number;
  answerBytes: number[];
  liveBytes: number[];
  modes: Record<string, number>;
  gaps: number;
}

/** The swarm: viewer processes plus one sender, re-pointed at each system in turn. */
export class Swarm {
  private server: BenchServer | null = null;
  private size = 0;

  private constructor(
    private readonly viewers: SwarmProcess<ViewerRequest>[],
    private readonly sender: SwarmProcess<SenderRequest>,
  ) {}

  /** Forks the processes (enough for `maxViewers` at 250 each). */
  static start(maxViewers: number): Swarm {
    const count = Math.max(1, Math.ceil(maxViewers / VIEWERS_PER_PROCESS));
    return new Swarm(
      Array.from({ length: count }, () => SwarmProcess.fork<ViewerRequest>('viewers.ts')),
      SwarmProcess.fork<SenderRequest>('sender.ts'),
    );
  }

  /** Closes every socket and points the swarm at this server (the sender signs in as its first commander). */
  async attach(server: BenchServer): Promise<void> {
    this.server = server;
    this.size = 0;
    const target = { url: server.url, jobId: server.boardJobId, tokens: server.viewerTokens };
    await Promise.all(this.viewers.map((v) => v.request({ op: 'attach', target })));
    await this.sender.request({ op: 'attach', url: server.url, token: server.commanderTokens[0] });
  }

  /** How many viewers are open now. */
  get viewerCount(): number {
    return this.size;
  }

  /** Splits `count` over the processes, fewest first, so each holds about as many. */
  private split(count: number): number[] {
    const n = this.viewers.length;
    return Array.from({ length: n }, (_, i) => Math.floor(count / n) + (i < count % n ? 1 : 0));
  }

  /** Opens `count` more viewers at once, each joining the board. */
  async connect(count: number, timeoutMs = 60_000): Promise<JoinOutcome> {
    const started = now();
    const parts = this.split(count);
    let firstIndex = this.size;
    const results = await Promise.all(
      this.viewers.map((v, i) => {
        const request: ViewerRequest = { op: 'connect', count: parts[i], firstIndex, timeoutMs };
        firstIndex += parts[i];
        return v.request<ConnectResult>(request);
      }),
    );
    this.size += count;
    const joinedAt = results.flatMap((r) => r.joinedAt);
    return {
      joined: joinedAt.length,
      failed: results.reduce((sum, r) => sum + r.failed, 0),
      reasons: [...new Set(results.flatMap((r) => r.reasons))],
      allJoinedMs: joinedAt.length ? Math.max(...joinedAt) - started : Number.NaN,
    };
  }

  /** Closes viewers (for good) until `count` are left. */
  async shrinkTo(count: number): Promise<void> {
    const keep = this.split(count);
    const have = this.split(this.size);
    await Promise.all(this.viewers.map((v, i) => v.request({ op: 'shrink', count: have[i] - keep[i] })));
    this.size = count;
  }

  /** First and last arrival of each seq in [from, to] over every viewer, and the gaps. */
  async arrivals(from: number, to: number): Promise<ArrivalsResult> {
    const parts = await Promise.all(this.viewers.map((v) => v.request<ArrivalsResult>({ op: 'arrivals', from, to })));
    const merged: ArrivalsResult = { first: [], last: [], holders: [], sockets: 0, gaps: 0 };
    for (let i = 0; i <= to - from; i++) {
      const firsts = parts.map((p) => p.first[i]).filter((x) => !Number.isNaN(x));
      const lasts = parts.map((p) => p.last[i]).filter((x) => !Number.isNaN(x));
      merged.first.push(firsts.length ? Math.min(...firsts) : Number.NaN);
      merged.last.push(lasts.length ? Math.max(...lasts) : Number.NaN);
      merged.holders.push(parts.reduce((sum, p) => sum + p.holders[i], 0));
    }
    for (const p of parts) {
      merged.sockets += p.sockets;
      merged.gaps += p.gaps;
    }
    return merged;
  }

  /** Disconnects `count` viewers, spread over the processes; `rejoin` brings them back. */
  async drop(count: number): Promise<void> {
    const parts = this.split(count);
    await Promise.all(this.viewers.map((v, i) => v.request({ op: 'drop', count: parts[i] })));
  }

  /** Brings the dropped viewers back (each joining after the last seq it holds) and waits until they hold `target`. */
  async rejoin(target: number, timeoutMs = 60_000): Promise<ResyncOutcome> {
    const started = now();
    const parts = await Promise.all(this.viewers.map((v) => v.request<RejoinResult>({ op: 'rejoin', target, timeoutMs })));
    const synced = parts.flatMap((p) => p.syncedAt);
    const modes: Record<string, number> = {};
    for (const m of parts.flatMap((p) => p.modes)) modes[m || 'none'] = (modes[m || 'none'] ?? 0) + 1;
    const done = synced.filter((t) => !Number.isNaN(t));
    return {
      allSyncedMs: done.length === synced.length && done.length > 0 ? Math.max(...done) - started : Number.NaN,
      returned: synced.length,
      notSynced: synced.length - done.length,
      answerBytes: parts.flatMap((p) => p.answerBytes),
      liveBytes: parts.flatMap((p) => p.liveBytes),
      modes,
      gaps: parts.reduce((sum, p) => sum + p.gaps, 0),
    };
  }

  /** Waits until every viewer has joined again after `since` and holds `target`; the moment the last one did, or NaN. */
  async awaitSync(target: number, since: number, timeoutMs = 60_000): Promise<{ lastSyncedAt: number; notSynced: number; notRejoined: number; gaps: number }> {
    const parts = await Promise.all(this.viewers.map((v) => v.request<SyncResult>({ op: 'awaitSync', target, since, timeoutMs })));
    const synced = parts.flatMap((p) => p.syncedAt);
    const done = synced.filter((t) => !Number.isNaN(t));
    return {
      lastSyncedAt: done.length === synced.length && done.length > 0 ? Math.max(...done) : Number.NaN,
      notSynced: synced.length - done.length,
      notRejoined: parts.reduce((sum, p) => sum + p.notRejoined, 0),
      gaps: parts.reduce((sum, p) => sum + p.gaps, 0),
    };
  }

  /** Re-deliveries, duplicates, unexpected disconnections and refused joins since the last attach. */
  async counters(): Promise<Counters> {
    const parts = await Promise.all(this.viewers.map((v) => v.request<Counters>({ op: 'counters' })));
    return {
      redeliveries: parts.reduce((s, p) => s + p.redeliveries, 0),
      duplicates: parts.reduce((s, p) => s + p.duplicates, 0),
      unexpectedDisconnects: parts.reduce((s, p) => s + p.unexpectedDisconnects, 0),
      refusedJoins: parts.reduce((s, p) => s + p.refusedJoins, 0),
      refusalCodes: [...new Set(parts.flatMap((p) => p.refusalCodes))],
    };
  }

  /** Sends `count` fresh legal commands at `ratePerSecond` from the sender process and waits for their acknowledgments. */
  async send(count: number, ratePerSecond: number, ackTimeoutMs = 30_000): Promise<SentCommand[]> {
    const server = this.server;
    if (!server) throw new Error('the swarm is not attached');
    const commands: CommandPayload[] = Array.from({ length: count }, (_, i) => server.command(i));
    const result = await this.sender.request<RunResult>({ op: 'run', commands, ratePerSecond, ackTimeoutMs });
    return result.sent;
  }

  async close(): Promise<void> {
    await Promise.all([...this.viewers.map((v) => v.close()), this.sender.close()]);
  }
}

/** The systems every swarm scenario measures, in the order they alternate. */
export const SWARM_SYSTEMS = ['holdline', 'relay', 'sqlite-relay'] as const satisfies readonly System[];
export type SwarmSystem = (typeof SWARM_SYSTEMS)[number];

/** Starts one system under test in its own process. */
export function startSystem(system: SwarmSystem): Promise<BenchServer> {
  return system === 'holdline' ? startHoldline() : startRelay(system);
}

/** Rounds of a scenario: one in quick mode, three in a full run. */
export function roundsOf(options: ScenarioOptions): number {
  return options.quick ? 1 : 3;
}

/** The crowd of viewers on the board: 1,000 in a full run, 300 in a quick one (connecting 1,000 five times over would not fit in two minutes). */
export function crowdOf(options: ScenarioOptions): number {
  return options.quick ? 300 : 1000;
}

/** Numbers one run of one system measured, by figure id. */
export type RunValues = Record<string, number>;

/** Every run's values per system, in the order measured, and what went wrong on the way. */
export interface Rounds {
  values: Partial<Record<SwarmSystem, RunValues[]>>;
  correctness: Partial<Record<SwarmSystem, Correctness>>;
  notes: string[];
}

export const zeroCorrectness = (): Correctness => ({ gaps: 0, duplicates: 0, lostAcks: 0, rejected: 0 });

/** Adds one run's counts to a total. */
export function addCorrectness(into: Correctness, more: Correctness): void {
  into.gaps += more.gaps;
  into.duplicates += more.duplicates;
  into.lostAcks += more.lostAcks;
  into.rejected += more.rejected;
}

/** The first lines of an error, for a note (a server that would not start prints its own reason after the first). */
function reasonOf(error: unknown): string {
  return (error instanceof Error ? error.message : String(error)).split('\n').filter((l) => l.trim()).slice(0, 3).join(' / ').slice(0, 400);
}

/**
 * Runs `run` on holdline, relay, sqlite-relay, holdline, ... for the scenario's rounds, each on a
 * fresh server and the same swarm. The three servers of a round are started side by side before
 * its first run (each boots while nothing is measured; the ones waiting sit idle) and each is
 * stopped as soon as its run is over. A run that fails is noted and the next goes on.
 */
export async function alternate(
  options: ScenarioOptions,
  swarm: Swarm,
  run: (server: BenchServer, round: number) => Promise<{ values: RunValues; correctness: Correctness; notes?: string[] }>,
  /** `attach: false`: the run points the swarm at the server itself (to measure the server before any socket). */
  how: { attach?: boolean } = {},
): Promise<Rounds> {
  const rounds: Rounds = { values: {}, correctness: {}, notes: [] };
  for (let round = 1; round <= roundsOf(options); round++) {
    const booting = now();
    const starting = SWARM_SYSTEMS.map((system) => startSystem(system));
    // Every start is awaited below; a failed one must not surface as an unhandled rejection meanwhile.
    for (const start of starting) start.catch(() => undefined);
    await Promise.allSettled(starting);
    options.log(`  round ${round}: the three systems started in ${secs(now() - booting)}`);
    for (const [k, system] of SWARM_SYSTEMS.entries()) {
      const started = now();
      let server: BenchServer | null = null;
      try {
        server = await starting[k];
        if (how.attach !== false) await swarm.attach(server);
        const result = await run(server, round);
        (rounds.values[system] ??= []).push(result.values);
        addCorrectness((rounds.correctness[system] ??= zeroCorrectness()), result.correctness);
        for (const note of result.notes ?? []) rounds.notes.push(`${system}, round ${round}: ${note}`);
        options.log(`  ${system} round ${round} done in ${((now() - started) / 1000).toFixed(1)} s`);
      } catch (error) {
        const message = reasonOf(error);
        rounds.notes.push(`${system}, round ${round} failed: ${message}`);
        options.log(`  ${system} round ${round} FAILED: ${message}`);
      } finally {
        await server?.stop().catch(() => undefined);
      }
    }
  }
  return rounds;
}

/** The scenario's correctness: every system's counts added up (a non-zero one is also named in the notes). */
export function totalCorrectness(rounds: Rounds): Correctness {
  const total = zeroCorrectness();
  for (const [system, counts] of Object.entries(rounds.correctness)) {
    addCorrectness(total, counts);
    const bad = Object.entries(counts).filter(([, n]) => n > 0);
    if (bad.length) rounds.notes.push(`${system}: ${bad.map(([k, n]) => `${n} ${k}`).join(', ')}`);
  }
  return total;
}

export interface FigureSpec {
  id: string;
  label: string;
  unit: string;
  better: 'higher' | 'lower';
  /** The run value's key (default: the figure's id). */
  key?: string;
  /** Compare Holdline's median with this system's. */
  against?: System;
  /** The target in words and when it is met, given the ratio against `against` (or Holdline's median when there is no baseline) and every system's spread. */
  target?: { text: string; met: (value: number, values: Figure['values']) => boolean };
}

/** A figure from the rounds: each system's spread, the ratio and whether the target was met. */
export function figureOf(rounds: Rounds, spec: FigureSpec): Figure {
  const key = spec.key ?? spec.id;
  const values: Figure['values'] = {};
  for (const system of SWARM_SYSTEMS) {
    const runs = (rounds.values[system] ?? []).map((v) => v[key]).filter((x): x is number => typeof x === 'number' && !Number.isNaN(x));
    if (runs.length) values[system] = spreadOf(runs);
  }
  const figure: Figure = { id: spec.id, label: spec.label, unit: spec.unit, better: spec.better, values };
  if (spec.against) {
    const ratio = ratioOf(values.holdline, values[spec.against]);
    if (ratio !== undefined) figure.ratio = { against: spec.against, value: ratio };
    if (spec.target) figure.target = { text: spec.target.text, met: ratio === undefined ? null : spec.target.met(ratio, values) };
  } else if (spec.target) {
    const holdline = values.holdline?.median;
    figure.target = { text: spec.target.text, met: holdline === undefined ? null : spec.target.met(holdline, values) };
  }
  return figure;
}

/** Send → first and send → last viewer for every acknowledged command, from the swarm's arrivals. */
export function latenciesOf(sent: SentCommand[], arrivals: ArrivalsResult, from: number): Latencies {
  const out: Latencies = { toFirst: [], toLast: [], undelivered: 0 };
  for (const c of sent) {
    if (!c.ok) continue;
    const i = c.seq - from;
    const first = arrivals.first[i];
    const last = arrivals.last[i];
    if (first === undefined || Number.isNaN(first)) {
      out.undelivered += 1;
      continue;
    }
    out.toFirst.push(first - c.sentAt);
    out.toLast.push(last - c.sentAt);
  }
  return out;
}

/** The seqs the acknowledgments named: the lowest and the highest (NaN when none was ok). */
export function seqRange(sent: SentCommand[]): { from: number; to: number } {
  const seqs = sent.filter((c) => c.ok).map((c) => c.seq);
  return seqs.length ? { from: Math.min(...seqs), to: Math.max(...seqs) } : { from: Number.NaN, to: Number.NaN };
}

/** Commands acknowledged ok per second, from the first send to the last acknowledgment. */
export function committedPerSecond(sent: SentCommand[]): number {
  const ok = sent.filter((c) => c.ok);
  if (ok.length === 0 || sent.length === 0) return 0;
  const span = Math.max(...ok.map((c) => c.ackAt)) - sent[0].sentAt;
  return span > 0 ? (ok.length * 1000) / span : Number.NaN;
}

/** p50, p99 and max of a list of times. */
export function percentiles(values: number[]): { p50: number; p99: number; max: number } {
  return { p50: percentile(values, 50), p99: percentile(values, 99), max: percentile(values, 100) };
}

/**
 * Lost acknowledgments and refusals of a run of legal commands: a command never answered, or
 * answered ok with a seq that the server's log (`GET /api/jobs/:id/events`) does not hold, or a
 * seq answered to two commands, is lost; any refusal is a rejection.
 */
export async function checkAcks(server: BenchServer, sent: SentCommand[]): Promise<{ lostAcks: number; rejected: number; codes: string[] }> {
  const codes = new Set<string>();
  let lostAcks = 0;
  let rejected = 0;
  for (const c of sent) {
    if (c.ok) continue;
    if (c.code === 'timeout') lostAcks += 1;
    else rejected += 1;
    codes.add(c.code);
  }
  const ok = sent.filter((c) => c.ok).map((c) => c.seq);
  lostAcks += ok.length - new Set(ok).size;
  if (ok.length) {
    const inLog = await loggedSeqs(server, Math.min(...ok) - 1, Math.max(...ok));
    for (const seq of new Set(ok)) if (!inLog.has(seq)) lostAcks += 1;
  }
  return { lostAcks, rejected, codes: [...codes] };
}

/** The seqs in (after, upTo] of the board's log, read page by page as a client fills a gap. */
async function loggedSeqs(server: BenchServer, after: number, upTo: number): Promise<Set<number>> {
  const seqs = new Set<number>();
  let cursor = after;
  while (cursor < upTo) {
    const res = await fetch(`${server.url}/api/jobs/${server.boardJobId}/events?after=${cursor}`, {
      headers: { authorization: `Bearer ${server.commanderTokens[0]}`, origin: server.url },
    });
    if (res.status !== 200) throw new Error(`reading the log answered ${res.status}`);
    const page = (await res.json()) as { items: { seq: number }[] };
    if (page.items.length === 0) break;
    for (const e of page.items) seqs.add(e.seq);
    cursor = page.items[page.items.length - 1].seq;
  }
  return seqs;
}

/** Milliseconds as seconds with one decimal, for progress lines. */
export const secs = (ms: number) => `${(ms / 1000).toFixed(1)} s`;

/** What one burst of commands measured, and what went wrong in it. */
export interface Burst {
  sent: SentCommand[];
  from: number;
  to: number;
  latencies: Latencies;
  committedPerSecond: number;
  /** Server CPU (user + system) from just before the first send until every viewer held the last event, per acknowledged command. */
  cpuMsPerCommand: number;
  /** From the first send until every viewer held the last event, ms. */
  settledMs: number;
  correctness: Correctness;
  notes: string[];
}

/**
 * Sends `count` legal commands at `ratePerSecond`, waits until every viewer holds the last one
 * acknowledged (at most `settleTimeoutMs` after the last answer), then reads the arrivals, the
 * server's CPU time and the log: latency, throughput, CPU per command and the correctness counts.
 */
export async function burst(server: BenchServer, swarm: Swarm, count: number, ratePerSecond: number, settleTimeoutMs = 30_000): Promise<Burst> {
  const cpuBefore = cpuMs(server.pid());
  const started = now();
  const sent = await swarm.send(count, ratePerSecond);
  const { from, to } = seqRange(sent);
  const correctness = zeroCorrectness();
  const notes: string[] = [];
  const empty: Latencies = { toFirst: [], toLast: [], undelivered: 0 };
  if (Number.isNaN(from)) {
    const acks = await checkAcks(server, sent);
    return {
      sent,
      from,
      to,
      latencies: empty,
      committedPerSecond: 0,
      cpuMsPerCommand: Number.NaN,
      settledMs: Number.NaN,
      correctness: { ...correctness, lostAcks: acks.lostAcks, rejected: acks.rejected },
      notes: [`no command was acknowledged ok (${acks.codes.join(', ')})`],
    };
  }
  const sync = await swarm.awaitSync(to, 0, settleTimeoutMs);
  const settledAt = Number.isNaN(sync.lastSyncedAt) ? now() : sync.lastSyncedAt;
  const cpuAfter = cpuMs(server.pid());
  const arrivals = await swarm.arrivals(from, to);
  const latencies = latenciesOf(sent, arrivals, from);
  const acks = await checkAcks(server, sent);
  const ok = sent.filter((c) => c.ok).length;
  correctness.gaps += arrivals.gaps;
  correctness.lostAcks += acks.lostAcks + latencies.undelivered;
  correctness.rejected += acks.rejected;
  if (acks.codes.length) notes.push(`refusals and losses: ${acks.codes.join(', ')}`);
  if (sync.notSynced) notes.push(`${sync.notSynced} viewers did not hold seq ${to} within ${secs(settleTimeoutMs)}`);
  // Other events than the bench's (none expected) would show as seqs nobody sent.
  if (to - from + 1 !== ok) notes.push(`acknowledged seqs ${from}-${to} span ${to - from + 1} for ${ok} commands`);
  return {
    sent,
    from,
    to,
    latencies,
    committedPerSecond: committedPerSecond(sent),
    cpuMsPerCommand: ok ? (cpuAfter - cpuBefore) / ok : Number.NaN,
    settledMs: settledAt - started,
    correctness,
    notes,
  };
}
