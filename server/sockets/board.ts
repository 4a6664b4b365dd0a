import { z } from 'zod';
import type { BoardSnapshot } from '../../shared/board/types.js';
import type { JoinAnswer, CommandAnswer } from '../../shared/events/socket.js';
import { boardCommandSchema } from '../../shared/schemas/commands.js';
import { runBoardCommand } from '../commands/board.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import { User } from '../entities/User.js';
import { badRequest, fieldsFromZod, HttpError, notFound, refusalOf } from '../errors.js';
import { can } from '../policies/index.js';
import { redactBoardFor, redactEventFor } from '../presenters/board.js';
import { presentJobEvent } from '../presenters/job-event.js';
import { crewRolesOf } from '../queries/crew.js';
import { socketTokenValid, type HoldlineSocket } from './auth.js';
import { jobRoom, plannerRoom, type BoardPublisher } from './publisher.js';

/** A rejoining client gets at most this many missed events; beyond it, a fresh snapshot. */
export const JOIN_REPLAY_LIMIT = 500;
/** Ticks and presence deltas go out once a second. */
export const TICK_MS = 1000;

const joinSchema = z.object({ jobId: z.uuid(), afterSeq: z.number().int().min(0).optional() });
const commandPayloadSchema = z.object({ jobId: z.uuid(), command: boardCommandSchema });

/**
 * The board's per-socket handlers (join with resync, leave, commands with acknowledgments) and
 * the ticks. Everything sent on the server's own initiative goes through the publisher made in
 * `createApp`; a handler test can hand in a publisher over a fake server.
 */
export function createBoardHub(context: AppContext, publisher: BoardPublisher): { register(socket: HoldlineSocket): void; stop(): void } {
  const { manager } = context.dataSource;
  const { presence } = publisher;

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
      const answer = await (async (): Promise<JoinAnswer> => {
        try {
          const parsed = joinSchema.safeParse(payload);
          if (!parsed.success) throw badRequest('Say which job to join.', fieldsFromZod(parsed.error));
          const { jobId, afterSeq } = parsed.data;
          const user = await manager.findOneBy(User, { id: socket.data.userId });
          const job = await manager.findOneBy(Job, { id: jobId });
          if (!user || !job) throw notFound('That job');
          const roles = await crewRolesOf(manager, jobId, user.id);
          if (!can(user, 'board.watch', { crewRoles: roles })) throw new HttpError(403, 'not_crew', 'Only the job’s crew can open its board.');
          // Join the room before reading, so nothing committed in between is missed: the client drops duplicates by seq.
          const planner = can(user, 'jobs.plan', { crewRoles: roles });
          await socket.join(planner ? [jobRoom(jobId), plannerRoom(jobId)] : jobRoom(jobId));
          joined.add(jobId);
          presence.join(jobId, socket.id, { userId: user.id, name: user.displayName, roles });
          return await context.queue.run(async (): Promise<JoinAnswer> => {
            const current = await manager.findOneByOrFail(Job, { id: jobId });
            publisher.noteSeq(jobId, current.lastSeq);
            if (afterSeq !== undefined && afterSeq <= current.lastSeq && current.lastSeq - afterSeq <= JOIN_REPLAY_LIMIT) {
              const events = await manager.createQueryBuilder(JobEvent, 'e').where('e.job_id = :jobId AND e.seq > :afterSeq', { jobId, afterSeq }).orderBy('e.seq', 'ASC').getMany();
              return { ok: true, mode: 'events', events: events.map((e) => redactEventFor(presentJobEvent(e), planner)), seq: current.lastSeq };
            }
            const snapshot = await snapshotOf(jobId, planner);
            if (!snapshot) throw new HttpError(409, 'invalid_state', 'This job has no board yet.');
            return { ok: true, mode: 'snapshot', snapshot, seq: current.lastSeq };
          });
        } catch (error) {
          return refusalOf(error, context.logger, { event: 'board:join', userId: socket.data.userId });
        }
      })();
      ack(answer);
    });

    socket.on('board:leave', (payload) => {
      const jobId = typeof payload?.jobId === 'string' ? payload.jobId : '';
      if (!joined.delete(jobId)) return;
      presence.leave(jobId, socket.id);
      void socket.leave(jobRoom(jobId));
      void socket.leave(plannerRoom(jobId));
    });

    // The same way in as POST /api/jobs/:jobId/commands: runBoardCommand asks the policy.
    socket.on('board:command', async (payload, ack) => {
      if (typeof ack !== 'function') return;
      const answer = await (async (): Promise<CommandAnswer> => {
        try {
          if (!socketTokenValid(socket, context.now())) throw new HttpError(401, 'token_expired', 'Your session needs renewing before you can act. Reconnecting…');
          const parsed = commandPayloadSchema.safeParse(payload);
          if (!parsed.success) throw badRequest('The command is not valid.', fieldsFromZod(parsed.error));
          const user = await manager.findOneBy(User, { id: socket.data.userId });
          if (!user?.active) throw new HttpError(403, 'account_inactive', 'This account is deactivated.');
          const outcome = await runBoardCommand(context, user, parsed.data.jobId, parsed.data.command);
          return { ok: true, seq: outcome.event.seq, event: outcome.event };
        } catch (error) {
          return refusalOf(error, context.logger, { event: 'board:command', userId: socket.data.userId });
        }
      })();
      ack(answer);
    });

    socket.on('disconnect', () => {
      for (const jobId of joined) presence.leave(jobId, socket.id);
      joined.clear();
    });
  }

  const timer = setInterval(() => publisher.tick(new Date().toISOString()), TICK_MS);
  timer.unref();
  return { register, stop: () => clearInterval(timer) };
}
