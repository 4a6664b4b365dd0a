import type { PresenceEntry } from '../board/types.js';
import type { BoardCommand } from '../schemas/commands.js';
import type { JobState } from '../schemas/jobs.js';
import type { JobEventDto } from './log.js';

/** Acknowledgment of every client-to-server event: success with data, or a readable refusal. */
export type Ack<T = Record<string, never>> =
  | ({ ok: true } & T)
  | { ok: false; error: { code: string; message: string; fields?: { path: string; message: string }[] } };

/** Events the server sends. */
export interface ServerToClientEvents extends BoardServerEvents {
  /** The session behind this socket ended (deactivated, signed out); the socket is closed next. */
  'session:ended': (payload: { reason: string }) => void;
  /**
   * The server is shutting down to restart (SIGTERM): it refuses new commands (`server_restarting`),
   * finishes those already queued, then closes. The board shows "Server restarting" and reconnects
   * and catches up by itself.
   */
  'server:restarting': (payload: { at: string }) => void;
}

/** Events the client sends. */
export interface ClientToServerEvents extends BoardClientEvents {
  /** Hands a refreshed access token to a live socket so it keeps its right to send commands. */
  'session:renew': (payload: { token: string }, ack: (answer: Ack<{ expiresAt: string }>) => void) => void;
}

/** Refusal messages of the Socket.IO handshake (Error.message on the client's connect_error). */
export const handshakeErrors = {
  unauthenticated: 'unauthenticated',
  inactive: 'account_inactive',
} as const;

/** A job's list line after each committed event, for screens that show jobs without opening their boards. */
export interface JobSummaryUpdate {
  jobId: string;
  name: string;
  site: string;
  state: JobState;
  /** The site's IANA time zone. */
  timeZone: string;
  planVersion: number;
  lastSeq: number;
  updatedAt: string;
}

/** At most this many jobs are followed by one connection (a list page's worth). */
export const FOLLOW_LIMIT = 200;

/** Answer to a board command. */
export type CommandAnswer = Ack<{ seq: number; event: JobEventDto }>;

/**
 * Answer to `board:join`: the missed events, or a snapshot when too many were missed. A snapshot's
 * board (`BoardState`, tens of kilobytes) comes as its JSON text: the server writes it once per
 * seq and audience and hands each of a crowd of joining screens the same text, instead of
 * encoding the board again for every one of them.
 */
export type JoinAnswer = Ack<{ mode: 'events'; events: JobEventDto[]; seq: number } | { mode: 'snapshot'; board: string; presence: PresenceEntry[]; seq: number }>;

/** Board events from the server. */
export interface BoardServerEvents {
  'board:event': (event: JobEventDto) => void;
  'board:tick': (payload: { jobId: string; seq: number; at: string }) => void;
  'board:presence': (payload: { jobId: string; joined: PresenceEntry[]; left: string[] }) => void;
  /**
   * This socket no longer receives the job's board: the person was taken off its crew (or lost the
   * right to watch it). `reason` says why, in words for them; rejoining is refused.
   */
  'board:removed': (payload: { jobId: string; reason: string }) => void;
  /** A followed job changed (see `jobs:follow`). */
  'jobs:summary': (payload: JobSummaryUpdate) => void;
}

/** Board events from clients. */
export interface BoardClientEvents {
  'board:join': (payload: { jobId: string; afterSeq?: number }, ack: (answer: JoinAnswer) => void) => void;
  'board:leave': (payload: { jobId: string }) => void;
  'board:command': (payload: { jobId: string; command: BoardCommand }, ack: (answer: CommandAnswer) => void) => void;
  /** Follows the list lines of these jobs (replacing the last list): those the person may read are followed. */
  'jobs:follow': (payload: { jobIds: string[] }, ack: (answer: Ack<{ following: string[] }>) => void) => void;
}
