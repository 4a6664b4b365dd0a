import { z } from 'zod';
import type { BoardSnapshot, PresenceEntry } from '../../shared/board/types.js';
import type { JoinAnswer, CommandAnswer } from '../../shared/events.js';
import { boardCommandSchema } from '../../shared/schemas/commands.js';
import type { JobEventDto } from '../../shared/schemas/jobs.js';
import { runBoardCommand } from '../commands/board.js';
import { crewRolesOf } from '../commands/jobs.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import { User } from '../entities/User.js';
import { fieldsFromZod, HttpError } from '../errors.js';
import { can } from '../policies/index.js';
import { eventNeedsRedaction, redactBoardFor, redactEventFor } from '../presenters/board.js';
import { presentJobEvent } from '../presenters/job-event.js';
import { socketTokenValid, type HoldlineServer, type HoldlineSocket } from './auth.js';

/** A rejoining client gets at most this many missed events; beyond it, a fresh snapshot. */
export const JOIN_REPLAY_LIMIT = 500;
/** Ticks and presence deltas go out once a second. */
export const TICK_MS = 1000;

export const jobRoom = (jobId: string) => `job:${jobId}`;
/** The job's planners (its supervisors, admins): they get events unredacted (server/presenters/board.ts). */
export const plannerRoom = (jobId: string) => `job:${jobId}:planners`;

/** Who is on which board, and what changed since the last tick. */
class PresenceBook {
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
    if (![...(room.values() ?? [])].some((e) => e.userId === entry.userId)) {
      const d = this.delta(jobId);
      if (!d.joined.delete(entry.userId)) d.left.add(entry.userId);
    }
  }

  /** The deltas to send now, cleared. */
  flush(): [string, { joined: PresenceEntry[]; left: string[] }][] {
    const out = [...this.pending.entries()]
      .filter(([, d]) => d.joined.size || d.left.size)
      .map(([jobId, d]): [string, { joined: PresenceEntry[]; left: string[] }] => [jobId, { joined: [...d.joined.values()], left: [...d.left] }]);
    this.pending.clear();
    return out;
  }
}

function refusal(error: unknown, context: AppContext): { ok: false; error: { code: string; message: string; fields?: { path: string; message: string }[] } } {
  if (error instanceof HttpError) return { ok: false, error: error.toBody().error };
  context.logger.error({ err: error }, 'board handler failed');
  return { ok: false, error: { code: 'internal', message: 'Something went wrong on the server. Try again; if it keeps happening, tell your administrator.' } };
}

/** The live board over Socket.IO: join with resync, commands with acknowledgments, ticks and presence. */
export function attachBoard(io: HoldlineServer, context: AppContext): () => void {
  const hub = createBoardHub(io, context);
  io.on('connection', (socket: HoldlineSocket) => hub.register(socket));
  return hub.stop;
}

/**
 * The board's shared state (presence, last sequence numbers, ticks) and the per-socket handlers,
 * apart from the server so that handler tests can drive a mocked socket.
 */
export function createBoardHub(io: HoldlineServer, context: AppContext): { register(socket: HoldlineSocket): void; stop(): void } {
  const presence = new PresenceBook();
  context.realtime.presenceOf = (jobId) => presence.list(jobId);
  const lastSeq = new Map<string, number>();
  const { manager } = context.dataSource;

  context.realtime.publishJobEvent = (event: JobEventDto) => {
    lastSeq.set(event.jobId, Math.max(lastSeq.get(event.jobId) ?? 0, event.seq));
    if (eventNeedsRedaction(event)) {
      io.to(jobRoom(event.jobId)).except(plannerRoom(event.jobId)).emit('board:event', redactEventFor(event, false));
      io.to(plannerRoom(event.jobId)).emit('board:event', event);
    } else {
      io.to(jobRoom(event.jobId)).emit('board:event', event);
    }
  };

  /** The snapshot: the projection the reducer keeps on the job row, plus who is connected. */
  async function snapshotOf(jobId: string, planner: boolean): Promise<BoardSnapshot | null> {
    const job = await manager.findOneBy(Job, { id: jobId });
    if (!job?.board) return null;
    return { ...redactBoardFor(job.board, planner), presence: presence.list(jobId) };
  }

  function register(socket: HoldlineSocket): void {
    const joined = new Set<string>();

    socket.on('board:join', async (payload, ack) => {
      if (typeof ack !== 'function') return;
      try {
        const parsed = z.object({ jobId: z.uuid(), afterSeq: z.number().int().min(0).optional() }).safeParse(payload);
        if (!parsed.success) return ack({ ok: false, error: { code: 'validation', message: 'Say which job to join.', fields: fieldsFromZod(parsed.error) } });
        const { jobId, afterSeq } = parsed.data;
        const user = await manager.findOneBy(User, { id: socket.data.userId });
        const job = await manager.findOneBy(Job, { id: jobId });
        if (!user || !job) return ack({ ok: false, error: { code: 'not_found', message: 'That job was not found.' } });
        const roles = await crewRolesOf(manager, jobId, user.id);
        if (!can(user, 'board.watch', { crewRoles: roles })) return ack({ ok: false, error: { code: 'not_crew', message: 'Only the job’s crew can open its board.' } });
        // Join the room before reading, so nothing committed in between is missed: the client drops duplicates by seq.
        const planner = can(user, 'jobs.plan', { crewRoles: roles });
        await socket.join(planner ? [jobRoom(jobId), plannerRoom(jobId)] : jobRoom(jobId));
        joined.add(jobId);
        presence.join(jobId, socket.id, { userId: user.id, name: user.displayName, roles });
        const answer = await context.queue.run(async (): Promise<JoinAnswer> => {
          const current = await manager.findOneByOrFail(Job, { id: jobId });
          lastSeq.set(jobId, current.lastSeq);
          if (afterSeq !== undefined && afterSeq <= current.lastSeq && current.lastSeq - afterSeq <= JOIN_REPLAY_LIMIT) {
            const events = await manager.createQueryBuilder(JobEvent, 'e').where('e.job_id = :jobId AND e.seq > :afterSeq', { jobId, afterSeq }).orderBy('e.seq', 'ASC').getMany();
            return { ok: true, mode: 'events', events: events.map((e) => redactEventFor(presentJobEvent(e), planner)), seq: current.lastSeq };
          }
          const snapshot = await snapshotOf(jobId, planner);
          if (!snapshot) return { ok: false, error: { code: 'invalid_state', message: 'This job has no board yet.' } };
          return { ok: true, mode: 'snapshot', snapshot, seq: current.lastSeq };
        });
        ack(answer);
      } catch (error) {
        ack(refusal(error, context));
      }
    });

    socket.on('board:leave', (payload) => {
      const jobId = typeof payload?.jobId === 'string' ? payload.jobId : '';
      if (!joined.delete(jobId)) return;
      presence.leave(jobId, socket.id);
      void socket.leave(jobRoom(jobId));
      void socket.leave(plannerRoom(jobId));
    });

    socket.on('board:command', async (payload, ack) => {
      if (typeof ack !== 'function') return;
      const answer = await (async (): Promise<CommandAnswer> => {
        try {
          if (!socketTokenValid(socket, context.now())) {
            return { ok: false, error: { code: 'token_expired', message: 'Your session needs renewing before you can act. Reconnecting…' } };
          }
          const parsed = z.object({ jobId: z.uuid(), command: boardCommandSchema }).safeParse(payload);
          if (!parsed.success) return { ok: false, error: { code: 'validation', message: 'The command is not valid.', fields: fieldsFromZod(parsed.error) } };
          const user = await manager.findOneBy(User, { id: socket.data.userId });
          if (!user?.active) return { ok: false, error: { code: 'account_inactive', message: 'This account is deactivated.' } };
          const outcome = await runBoardCommand(context, user, parsed.data.jobId, parsed.data.command);
          return { ok: true, seq: outcome.event.seq, event: outcome.event };
        } catch (error) {
          return refusal(error, context);
        }
      })();
      ack(answer);
    });

    socket.on('disconnect', () => {
      for (const jobId of joined) presence.leave(jobId, socket.id);
      joined.clear();
    });
  }

  const timer = setInterval(() => {
    const at = new Date().toISOString();
    for (const [jobId, delta] of presence.flush()) io.to(jobRoom(jobId)).emit('board:presence', { jobId, ...delta });
    for (const jobId of presence.jobs()) io.to(jobRoom(jobId)).emit('board:tick', { jobId, seq: lastSeq.get(jobId) ?? 0, at });
  }, TICK_MS);
  timer.unref();
  return { register, stop: () => clearInterval(timer) };
}
