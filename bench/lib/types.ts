/**
 * The shapes every benchmark scenario shares. A scenario measures Holdline and its baselines with
 * the same client swarm, in the same run, alternating them (at least three rounds in a full run),
 * and reports each figure as the median of its rounds with the spread.
 */

/** The systems a figure can be measured on. */
export type System =
  /** The real server (`server/index.ts` in a child process). */
  | 'holdline'
  /** A bare Socket.IO relay: no auth, no database (bench/servers/relay.ts). */
  | 'relay'
  /** The same relay committing each command as one row to SQLite (WAL, synchronous=FULL) before broadcasting it. */
  | 'sqlite-relay'
  /** better-sqlite3 inserting the same rows with the same pragmas, no network at all. */
  | 'raw-sqlite'
  /** Holdline itself in a reference state (e.g. a command answered with no PDF rendering). */
  | 'holdline-at-rest'
  /** An empty Quasar page built with the same Vite setup. */
  | 'empty-page';

/** One figure's rounds: the median and the spread (min and max) over the rounds. */
export interface Spread {
  median: number;
  min: number;
  max: number;
  /** Every round's value, in the order measured. */
  runs: number[];
}

/** A row of the table. */
export interface Figure {
  /** Stable id, e.g. `latency.1000v.20hz.last.p50`; the README's before/after refers to it. */
  id: string;
  /** What it is, in words: "send → last viewer, p50 (1,000 viewers, 20/s)". */
  label: string;
  /** ms, cmd/s, KiB, MiB, B, s, ... */
  unit: string;
  /** Whether a larger value is better (throughput) or worse (time, memory). */
  better: 'higher' | 'lower';
  values: Partial<Record<System, Spread>>;
  /** Holdline's median over a baseline's median, when the figure has a target against it. */
  ratio?: { against: System; value: number };
  /** The target from the issue, in words, and whether this run met it (null: no target). */
  target?: { text: string; met: boolean | null };
}

/** Counted for every scenario on every system; all must be zero. */
export interface Correctness {
  /** A viewer missing a sequence number it should hold. */
  gaps: number;
  /** A viewer receiving the same sequence number twice (after the client's own de-duplication by seq, as the board store does). */
  duplicates: number;
  /** A command whose acknowledgment never came, or came ok but the event is not in the log. */
  lostAcks: number;
  /** A legal command answered with a refusal. */
  rejected: number;
}

export interface ScenarioResult {
  id: string;
  title: string;
  figures: Figure[];
  correctness: Correctness;
  /** Facts worth a line under the table (e.g. "the SQLite relay fell behind at 100/s too"). */
  notes: string[];
}

export interface ScenarioOptions {
  /** The short run (`npm run bench -- --quick`, the whole suite under two minutes). */
  quick: boolean;
  /** Progress lines for the terminal. */
  log: (line: string) => void;
}

export type Scenario = (options: ScenarioOptions) => Promise<ScenarioResult>;

/** A legal board command for one job, ready to send as the payload of `board:command`. */
export interface CommandPayload {
  jobId: string;
  command: Record<string, unknown> & { type: string; commandId: string };
}

/**
 * One system under test, running in its own process, as every scenario sees it: Holdline
 * (bench/lib/holdline.ts) or a relay (bench/lib/servers.ts). The swarm talks to each with the
 * same Socket.IO calls: handshake `auth: { token }`, `board:join` `{ jobId, afterSeq? }` →
 * ack `{ ok, mode: 'events' | 'snapshot', seq, ... }`, `board:command` `{ jobId, command }` → ack
 * `{ ok, seq, event }`, and `board:event` `{ jobId, seq, ... }` to everyone on the job.
 */
export interface BenchServer {
  system: System;
  url: string;
  /** The server process (for CPU time and resident memory from /proc). */
  pid(): number;
  /** The board every scenario drives, and the nine idle ones beside it. */
  boardJobId: string;
  idleJobIds: string[];
  /** Tokens for sockets that send commands (each may send from several sockets). */
  commanderTokens: string[];
  /** Tokens for viewer sockets; many sockets may share one token. */
  viewerTokens: string[];
  /** The i-th legal command for the board (each with a fresh command id). */
  command(i: number): CommandPayload;
  /** SIGKILL and start again on the same data and port (tokens stay valid). */
  restart(): Promise<void>;
  /** Kills the process and removes its data. */
  stop(): Promise<void>;
}
