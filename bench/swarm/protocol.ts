/**
 * What the benchmark's parent process and its swarm processes (bench/swarm/viewers.ts,
 * bench/swarm/sender.ts) say to each other over Node's IPC channel. Every request carries an id;
 * the child answers it once with the same id. Times are milliseconds on one clock shared by every
 * process of the machine: `performance.timeOrigin + performance.now()`.
 */
import type { CommandPayload } from '../lib/types.js';

/** The time on the clock every process of the machine shares, in ms. */
export function now(): number {
  return performance.timeOrigin + performance.now();
}

/** Which server the sockets talk to and which board they watch. */
export interface Target {
  url: string;
  jobId: string;
  tokens: string[];
}

export type ViewerRequest =
  /** Closes every socket and points the process at another server. */
  | { op: 'attach'; target: Target }
  /** Opens `count` more sockets at once, each joining the board; `firstIndex` picks their tokens round-robin. */
  | { op: 'connect'; count: number; firstIndex: number; timeoutMs: number }
  /** Closes the last `count` sockets for good (not dropped: they are no longer counted). */
  | { op: 'shrink'; count: number }
  /** Per seq in [from, to], the first and last moment a counted socket held it, and gaps. */
  | { op: 'arrivals'; from: number; to: number }
  /** Disconnects `count` sockets that come back later with `rejoin`. */
  | { op: 'drop'; count: number }
  /** Reconnects the dropped sockets, each joining with the last seq it holds; answers once all hold `target` or the time is up. */
  | { op: 'rejoin'; target: number; timeoutMs: number }
  /** Waits until every socket has joined again after `since` (its own reconnection) and holds `target`. */
  | { op: 'awaitSync'; target: number; since: number; timeoutMs: number }
  /** The counters since the last attach. */
  | { op: 'counters' }
  | { op: 'close' };

export interface ConnectResult {
  /** When each new socket's join was answered ok. */
  joinedAt: number[];
  /** Sockets whose connection or join failed (with the reasons seen). */
  failed: number;
  reasons: string[];
}

export interface ArrivalsResult {
  /** Indexed by seq - from: first and last arrival (NaN when none) and how many counted sockets hold it. */
  first: number[];
  last: number[];
  holders: number[];
  /** Counted sockets (not dropped, not shrunk away). */
  sockets: number;
  /** Seqs in [from, to] a counted socket does not hold, summed over the sockets. */
  gaps: number;
}

export interface RejoinResult {
  /** Per returning socket: when it held `target` (NaN if it never did), bytes of its join answer, bytes of live events until then, the answer's mode. */
  syncedAt: number[];
  answerBytes: number[];
  liveBytes: number[];
  modes: string[];
  /** Missed seqs the socket was still missing when the time was up. */
  gaps: number;
}

export interface SyncResult {
  /** Per socket: when it had joined again after `since` and held `target` (NaN if not in time). */
  syncedAt: number[];
  /** How many sockets had not joined again after `since` in time. */
  notRejoined: number;
  gaps: number;
}

export interface Counters {
  /** A seq already held, delivered again (live or in a join answer): the client drops it. */
  redeliveries: number;
  /** A seq delivered again with another event than the first time: the client's de-duplication by seq would keep the wrong one. */
  duplicates: number;
  /** Disconnections the bench did not ask for (a server that closed or lost sockets). */
  unexpectedDisconnects: number;
  /** Join answers that were refusals, with their codes. */
  refusedJoins: number;
  refusalCodes: string[];
}

export type SenderRequest =
  | { op: 'attach'; url: string; token: string }
  /** Sends the commands at a fixed rate, not waiting for answers; answers when every acknowledgment came or the time is up. */
  | { op: 'run'; commands: CommandPayload[]; ratePerSecond: number; ackTimeoutMs: number }
  | { op: 'close' };

export interface SentCommand {
  sentAt: number;
  /** NaN when no acknowledgment came in time. */
  ackAt: number;
  ok: boolean;
  /** The committed seq (NaN if refused or lost). */
  seq: number;
  /** Refusal code, `timeout` or `disconnected`, or '' when ok. */
  code: string;
  /** Bytes of the acknowledged event's JSON: what a viewer that missed it needs at least. */
  eventBytes: number;
}

export interface RunResult {
  sent: SentCommand[];
}

export type Reply<T = unknown> = { id: number; ok: true; result: T } | { id: number; ok: false; error: string };
