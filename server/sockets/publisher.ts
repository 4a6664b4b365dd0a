import type { PresenceEntry } from '../../shared/board/types.js';
import type { JobEventDto } from '../../shared/events/log.js';
import type { Publisher } from '../context.js';
import { eventNeedsRedaction, redactEventFor } from '../presenters/board.js';
import type { LiveJobAccess } from '../policies/index.js';
import { sessionRoom, userRoom, type HoldlineServer, type HoldlineSocket } from './auth.js';

export const jobRoom = (jobId: string) => `job:${jobId}`;
/** The job's planners (its supervisors, admins): they get events unredacted (server/presenters/board.ts). */
export const plannerRoom = (jobId: string) => `job:${jobId}:planners`;
/** Whoever follows a job's list line (the jobs list, a job's page) without being on its board. */
export const summaryRoom = (jobId: string) => `summary:${jobId}`;

type PresenceDelta = { joined: PresenceEntry[]; left: string[] };

/** Who is on which board, and what changed since the last tick. */
export class PresenceBook {
  private readonly sockets = new Map<string, Map<string, PresenceEntry>>();
  private readonly pending = new Map<string, { joined: Map<string, PresenceEntry>; left: Set<string> }>();

  jobs(): string[] {
    return [...this.sockets.keys()];
  }

  list(jobId: string): PresenceEntry[] {
    const unique = new Map<string, PresenceEntry>();
    for (const entry of this.sockets.get(jobId)?.values() ?? []) unique.set(entry.userId, entry);
    return [...unique.values()];
  }

  private delta(jobId: string) {
    let d = this.pending.get(jobId);
    if (!d) this.pending.set(jobId, (d = { joined: new Map(), left: new Set() }));
    return d;
  }

  join(jobId: string, socketId: string, entry: PresenceEntry): void {
    const room = this.sockets.get(jobId) ?? new Map<string, PresenceEntry>();
    const wasThere = [...room.values()].some((e) => e.userId === entry.userId);
    room.set(socketId, entry);
    this.sockets.set(jobId, room);
    if (!wasThere) {
      const d = this.delta(jobId);
      d.left.delete(entry.userId);
      d.joined.set(entry.userId, entry);
    }
  }

  leave(jobId: string, socketId: string): void {
    const room = this.sockets.get(jobId);
    const entry = room?.get(socketId);
    if (!room || !entry) return;
    room.delete(socketId);
    if (room.size === 0) this.sockets.delete(jobId);
    if (![...room.values()].some((e) => e.userId === entry.userId)) {
      const d = this.delta(jobId);
      if (!d.joined.delete(entry.userId)) d.left.add(entry.userId);
    }
  }

  /** The deltas to send now, cleared. */
  flush(): [string, PresenceDelta][] {
    const out = [...this.pending.entries()]
      .filter(([, d]) => d.joined.size || d.left.size)
      .map(([jobId, d]): [string, PresenceDelta] => [jobId, { joined: [...d.joined.values()], left: [...d.left] }]);
    this.pending.clear();
    return out;
  }
}

/**
 * Everything the server sends to live connections on its own initiative: job events, ended
 * sessions, presence and ticks. Made once in `createApp` and handed to the context (commands,
 * routes) and to the board hub, so no one fills in a slot later.
 */
export class BoardPublisher implements Publisher {
  // Presence lives here rather than in the hub: the hub changes it, and the HTTP board snapshot
  // reads it through the context, which knows the publisher and not the hub.
  readonly presence = new PresenceBook();
  /** The last sequence number each board's room has been told about, for the ticks. */
  private readonly lastSeq = new Map<string, number>();

  constructor(private readonly io: HoldlineServer) {}

  publishJobEvent(event: JobEventDto, job: Parameters<Publisher['publishJobEvent']>[1]): void {
    this.noteSeq(event.jobId, event.seq);
    const { id: jobId, name, site, state, timeZone, planVersion, lastSeq, updatedAt } = job;
    this.io.to(summaryRoom(jobId)).emit('jobs:summary', { jobId, name, site, state, timeZone, planVersion, lastSeq, updatedAt });
    if (eventNeedsRedaction(event)) {
      this.io.to(jobRoom(event.jobId)).except(plannerRoom(event.jobId)).emit('board:event', redactEventFor(event, false));
      this.io.to(plannerRoom(event.jobId)).emit('board:event', event);
    } else {
      this.io.to(jobRoom(event.jobId)).emit('board:event', event);
    }
  }

  endSessions(userId: string, reason: string): void {
    this.io.to(userRoom(userId)).emit('session:ended', { reason });
    this.io.in(userRoom(userId)).disconnectSockets(true);
  }

  endSession(sessionId: string, reason: string): void {
    this.io.to(sessionRoom(sessionId)).emit('session:ended', { reason });
    this.io.in(sessionRoom(sessionId)).disconnectSockets(true);
  }

  endSessionsExcept(userId: string, keepSessionId: string, reason: string): void {
    this.io.to(userRoom(userId)).except(sessionRoom(keepSessionId)).emit('session:ended', { reason });
    this.io.in(userRoom(userId)).except(sessionRoom(keepSessionId)).disconnectSockets(true);
  }

  presenceOf(jobId: string): PresenceEntry[] {
    return this.presence.list(jobId);
  }

  /** This process's sockets of one person (one Node process, Socket.IO's in-memory adapter). */
  private socketsOf(userId: string): HoldlineSocket[] {
    const ids = this.io.of('/').adapter.rooms.get(userRoom(userId)) ?? new Set<string>();
    return [...ids].flatMap((id) => this.io.of('/').sockets.get(id) ?? []);
  }

  jobsReachedBy(userId: string): string[] {
    const jobs = new Set<string>();
    for (const socket of this.socketsOf(userId)) {
      for (const room of socket.rooms) {
        const match = /^(?:job|summary):([^:]+)$/.exec(room);
        if (match) jobs.add(match[1]);
      }
    }
    return [...jobs];
  }

  // Synchronous, so it runs before any later event of the job is published.
  limitJobAccess(jobId: string, userId: string, access: LiveJobAccess, reason: string): void {
    for (const socket of this.socketsOf(userId)) {
      if (!access.watch && socket.rooms.has(jobRoom(jobId))) {
        void socket.leave(jobRoom(jobId));
        void socket.leave(plannerRoom(jobId));
        this.presence.leave(jobId, socket.id);
        socket.emit('board:removed', { jobId, reason });
      } else if (!access.planner) {
        void socket.leave(plannerRoom(jobId));
      }
      if (!access.read) void socket.leave(summaryRoom(jobId));
    }
  }

  /** Records a board's sequence number as read under the write queue (a join), never moving it back. */
  noteSeq(jobId: string, seq: number): void {
    this.lastSeq.set(jobId, Math.max(this.lastSeq.get(jobId) ?? 0, seq));
  }

  /** Presence deltas, then a tick with the last sequence number, to every board someone is on. */
  tick(at: string): void {
    for (const [jobId, delta] of this.presence.flush()) this.io.to(jobRoom(jobId)).emit('board:presence', { jobId, ...delta });
    for (const jobId of this.presence.jobs()) this.io.to(jobRoom(jobId)).emit('board:tick', { jobId, seq: this.lastSeq.get(jobId) ?? 0, at });
  }
}
