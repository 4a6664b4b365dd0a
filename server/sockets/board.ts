import { z } from 'zod';
import { FOLLOW_LIMIT, type CommandAnswer, type JoinAnswer } from '../../shared/events/socket.js';
import { boardCommandSchema } from '../../shared/schemas/commands.js';
import { runBoardCommand } from '../commands/board.js';
import type { AppContext } from '../context.js';
import { fieldsFromZod } from '../../shared/schemas/errors.js';
import type { User } from '../entities/User.js';
import { userById } from '../queries/users.js';
import { accountInactive, badRequest, HttpError, notFound, refusalOf } from '../errors.js';
import { authorize, can } from '../policies/index.js';
import { redactBoardFor, redactEventFor } from '../presenters/board.js';
import { crewRolesByJob, crewRolesOf } from '../queries/crew.js';
import { eventsAfter } from '../queries/events.js';
import { checkSocketSession, type HoldlineSocket } from './auth.js';
import { jobRoom, plannerRoom, summaryRoom, type BoardPublisher } from './publisher.js';
import { committedJobs } from '../db/committed-jobs.js';

/** A rejoining client gets at most this many missed events; beyond it, a fresh snapshot. */
export const JOIN_REPLAY_LIMIT = 500;
/** Ticks and presence deltas go out once a second. */
export const TICK_MS = 1000;

const joinSchema = z.object({ jobId: z.uuid(), afterSeq: z.number().int().min(0).optional() });
const commandPayloadSchema = z.object({ jobId: z.uuid(), command: boardCommandSchema });
const followSchema = z.object({ jobIds: z.array(z.uuid()).max(FOLLOW_LIMIT) });

/**
 * The board's per-socket handlers (join with resync, leave, commands with acknowledgments) and
 * the ticks. Everything sent on the server's own initiative goes through the publisher made in
 * `createApp`; a handler test can hand in a publisher over a fake server.
 */
export function createBoardHub(context: AppContext, publisher: BoardPublisher): { register(socket: HoldlineSocket): void; stop(): void } {
  const { manager } = context.dataSource;
  const { presence } = publisher;

  /**
   * The board's JSON text as one audience may see it, written once per seq: a crowd of screens
   * joining after a restart all get the same text (server/sockets/board.ts answers with it as it is).
   */
  const boardTexts = new Map<string, { seq: number; planner?: string; crew?: string }>();
  function boardTextOf(jobId: string, planner: boolean): string | null {
    const job = committedJobs(context.dataSource).read(jobId);
    if (!job?.board) return null;
    let texts = boardTexts.get(jobId);
    if (texts?.seq !== job.lastSeq) boardTexts.set(jobId, (texts = { seq: job.lastSeq }));
    const audience = planner ? 'planner' : 'crew';
    return (texts[audience] ??= JSON.stringify(redactBoardFor(job.board, planner)));
  }

  /**
   * What a rejoining screen missed, under the queue right after the job's row was read: from the
   * events kept in memory when they reach back far enough, else from the log (and then kept, so a
   * crowd rejoining after a restart reads the log once).
   */
  async function missedEvents(jobId: string, afterSeq: number, planner: boolean) {
    const jobs = committedJobs(context.dataSource);
    let events = jobs.recentAfter(jobId, afterSeq);
    if (!events) {
      events = await eventsAfter(manager, jobId, afterSeq, { planner: true });
      jobs.remember(jobId, events);
    }
    return planner ? events : events.map((event) => redactEventFor(event, false));
  }

  /** The person behind a socket, read fresh each time: a deactivated account gets the same answer as over HTTP. */
  function actorOf(socket: HoldlineSocket): User {
    const user = userById(context.dataSource, socket.data.userId);
    if (!user?.active) throw accountInactive();
    return user;
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
          await checkSocketSession(context, socket);
          const user = actorOf(socket);
          if (!committedJobs(context.dataSource).exists(jobId)) throw notFound('That job');
          const roles = await crewRolesOf(manager, jobId, user.id);
          authorize(user, 'board.watch', { crewRoles: roles });
          // Join the room before reading, so nothing committed in between is missed: the client drops duplicates by seq.
          let planner = can(user, 'jobs.plan', { crewRoles: roles });
          await socket.join(planner ? [jobRoom(jobId), plannerRoom(jobId)] : jobRoom(jobId));
          joined.add(jobId);
          presence.join(jobId, socket.id, { userId: user.id, name: user.displayName, roles });
          return await context.queue.run(async (): Promise<JoinAnswer> => {
            // Asked again under the queue: a crew change that committed since the check above has
            // either found this socket in the room (and taken it out) or is seen here.
            const rolesNow = await crewRolesOf(manager, jobId, user.id);
            if (!can(user, 'board.watch', { crewRoles: rolesNow })) {
              joined.delete(jobId);
              presence.leave(jobId, socket.id);
              await socket.leave(jobRoom(jobId));
              await socket.leave(plannerRoom(jobId));
              authorize(user, 'board.watch', { crewRoles: rolesNow });
            }
            if (planner && !can(user, 'jobs.plan', { crewRoles: rolesNow })) {
              planner = false;
              await socket.leave(plannerRoom(jobId));
            }
            const current = committedJobs(context.dataSource).read(jobId);
            if (!current) throw notFound('That job');
            publisher.noteSeq(jobId, current.lastSeq);
            if (afterSeq !== undefined && afterSeq <= current.lastSeq && current.lastSeq - afterSeq <= JOIN_REPLAY_LIMIT) {
              return { ok: true, mode: 'events', events: await missedEvents(jobId, afterSeq, planner), seq: current.lastSeq };
            }
            const board = boardTextOf(jobId, planner);
            if (!board) throw new HttpError(409, 'invalid_state', 'This job has no board yet.');
            return { ok: true, mode: 'snapshot', board, presence: presence.list(jobId), seq: current.lastSeq };
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
          await checkSocketSession(context, socket);
          const parsed = commandPayloadSchema.safeParse(payload);
          if (!parsed.success) throw badRequest('The command is not valid.', fieldsFromZod(parsed.error));
          const user = actorOf(socket);
          const outcome = await runBoardCommand(context, user, parsed.data.jobId, parsed.data.command);
          return { ok: true, seq: outcome.event.seq, event: outcome.event };
        } catch (error) {
          return refusalOf(error, context.logger, { event: 'board:command', userId: socket.data.userId });
        }
      })();
      ack(answer);
    });

    // List lines follow the jobs a person may read, without putting them on any board's presence.
    const followed = new Set<string>();
    socket.on('jobs:follow', async (payload, ack) => {
      if (typeof ack !== 'function') return;
      try {
        const parsed = followSchema.safeParse(payload);
        if (!parsed.success) throw badRequest(`Follow at most ${FOLLOW_LIMIT} jobs by their ids.`, fieldsFromZod(parsed.error));
        await checkSocketSession(context, socket);
        const user = actorOf(socket);
        const ids = [...new Set(parsed.data.jobIds)];
        const rolesByJob = await crewRolesByJob(manager, user.id, ids);
        const readable = ids.filter((jobId) => committedJobs(context.dataSource).exists(jobId)).filter((jobId) => can(user, 'jobs.read', { crewRoles: rolesByJob.get(jobId) ?? [] }));
        for (const jobId of followed) if (!readable.includes(jobId)) void socket.leave(summaryRoom(jobId));
        followed.clear();
        for (const jobId of readable) followed.add(jobId);
        await socket.join(readable.map(summaryRoom));
        ack({ ok: true, following: readable });
      } catch (error) {
        ack(refusalOf(error, context.logger, { event: 'jobs:follow', userId: socket.data.userId }));
      }
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
