import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import { checkNewEventData, type EventDraft, type JobEventDto } from '../../shared/events/log.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import type { User } from '../entities/User.js';
import { conflict, notFound } from '../errors.js';
import { commandHash, eventHash, GENESIS_HASH } from '../../shared/events/chain.js';
import { presentJobEvent } from '../presenters/job-event.js';
import { applyEvent } from '../../shared/board/apply.js';
import { boardEffects } from '../../shared/board/effects.js';
import { loadOne, statement } from '../db/statements.js';
import { committedJobs } from '../db/committed-jobs.js';


export interface CommandOutcome {
  event: JobEventDto;
  job: Job;
  /** True when this command id was seen before with the same body: nothing was applied again. */
  replayed: boolean;
}

export interface JobCommand {
  /** Client-generated (or server-generated for plain HTTP edits) id of the command. */
  commandId?: string;
  /** The command as received, for idempotency; defaults to the data. */
  body: unknown;
  actor: User;
}

/**
 * The one writer of every job change. In one queued transaction it checks the command id, runs
 * the handler (which validates against the current state and changes the job row), appends the
 * single event with the next sequence number and the chained hash, and saves the job. After the
 * commit it publishes the event to the job's live board.
 */
export async function runJobCommand(
  context: AppContext,
  jobId: string,
  command: JobCommand,
  handler: (manager: EntityManager, job: Job) => Promise<EventDraft>,
): Promise<CommandOutcome> {
  return context.queue.transaction(
    async (manager) => {
      const job = committedJobs(context.dataSource).read(jobId);
      if (!job) throw notFound('That job');
      const replay = findReplay(context, jobId, command);
      if (replay) return { event: presentJobEvent(replay), job, replayed: true };
      const draft = await handler(manager, job);
      const event = appendEvent(context, job, command, draft, context.now());
      return { event: presentJobEvent(event), job, replayed: false };
    },
    (outcome) => committed(context, outcome),
  );
}

/**
 * After the commit, in commit order: the job's row is kept as committed, the event goes to the
 * job's live board, and e-mail for the record is queued (it can never hold up or fail the command).
 */
function committed(context: AppContext, outcome: CommandOutcome): void {
  if (outcome.replayed) return;
  committedJobs(context.dataSource).committed(outcome.job, outcome.event);
  try {
    context.publisher.publishJobEvent(outcome.event, outcome.job);
    context.outbox.jobEventCommitted(outcome.event);
  } catch (error) {
    // Committed all the same: clients that missed the broadcast get the event on their next tick's resync.
    context.logger.error({ err: error, jobId: outcome.job.id, seq: outcome.event.seq }, 'could not announce a committed event');
  }
}

/** Creates a job and its first event in one transaction. */
export async function createJobWithEvent(
  context: AppContext,
  command: JobCommand,
  build: (manager: EntityManager) => Promise<{ job: Job; draft: EventDraft; after?: (manager: EntityManager) => Promise<void> }>,
): Promise<CommandOutcome> {
  return context.queue.transaction(
    async (manager) => {
      const { job, draft, after } = await build(manager);
      job.lastSeq = 0;
      job.headHash = GENESIS_HASH;
      await manager.save(Job, job);
      // Rows that refer to the job (its first crew member) go in after it, before the event.
      if (after) await after(manager);
      const event = appendEvent(context, job, command, draft, context.now());
      return { event: presentJobEvent(event), job, replayed: false };
    },
    (outcome) => committedJobs(context.dataSource).committed(outcome.job, outcome.event),
  );
}

function findReplay(context: AppContext, jobId: string, command: JobCommand): JobEvent | null {
  if (!command.commandId) return null;
  const earlier = loadOne(context.dataSource, JobEvent, 'SELECT * FROM job_event WHERE job_id = ? AND command_id = ?', jobId, command.commandId);
  if (!earlier) return null;
  // A command id is in every export of the log: someone else's id answers nothing of theirs, so a
  // replay can never carry a person past the policy that would refuse them.
  if (earlier.commandHash !== commandHash(command.body) || earlier.byUserId !== command.actor.id) {
    throw conflict('command_id_reused', 'This command id was already used for a different command. Send it again with a new id.');
  }
  return earlier;
}

function appendEvent(context: AppContext, job: Job, command: JobCommand, draft: EventDraft, now: Date): JobEvent {
  // A handler that writes what the log's schema does not declare is a bug: refuse it before anything is hashed.
  checkNewEventData(draft);
  const base = {
    jobId: job.id,
    seq: job.lastSeq + 1,
    commandId: command.commandId ?? randomUUID(),
    type: draft.type,
    byUserId: command.actor.id,
    byName: command.actor.displayName,
    role: draft.role,
    at: now.toISOString(),
    // A JSON round trip drops undefined fields, so the stored data hashes the same when read back.
    data: JSON.parse(JSON.stringify(draft.data)) as Record<string, unknown>,
  };
  // The board moves with the event: the same reducer the clients run. The stage and hold states it
  // changes go into the event as `effects`, so the record says what each command set in motion.
  const board = applyEvent(job.board, presentJobEvent(base));
  const effects = boardEffects(job.board, board);
  const fields = { ...base, data: effects ? { ...base.data, effects } : base.data };
  const hash = eventHash(job.headHash, fields);
  const event = Object.assign(new JobEvent(), { ...fields, commandHash: commandHash(command.body), prevHash: job.headHash, hash });
  const { lastInsertRowid } = statement(
    context.dataSource,
    'INSERT INTO job_event (job_id, seq, command_id, command_hash, type, by_user_id, by_name, role, at, data, prev_hash, hash) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?)',
  ).run(event.jobId, event.seq, event.commandId, event.commandHash, event.type, event.byUserId, event.byName, event.role, event.at, JSON.stringify(event.data), event.prevHash, event.hash);
  event.id = Number(lastInsertRowid);
  job.lastSeq = fields.seq;
  job.headHash = hash;
  job.board = board;
  job.state = board.job.state;
  job.updatedAt = fields.at;
  committedJobs(context.dataSource).write(job);
  return event;
}
