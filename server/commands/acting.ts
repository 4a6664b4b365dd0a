import type { z } from 'zod';
import type { actingTransferSchema } from '../../shared/schemas/commands.js';
import type { AppContext } from '../context.js';
import { JobCrew } from '../entities/JobCrew.js';
import { User } from '../entities/User.js';
import { badRequest, conflict, HttpError } from '../errors.js';
import { runJobCommand, type CommandOutcome } from './job-writer.js';

/**
 * An administrator makes another supervisor of the job's crew the acting supervisor, with a
 * reason, when the outgoing one cannot be reached to hand over (the usual way is the handover
 * note, acknowledged by the supervisor taking over). One job command, one `acting.transferred`
 * event in the chain, published to the board like every other.
 *
 * The job must have a board under way (ready, live, stopped or made safe); the person must be an
 * active supervisor in its crew and not already the acting supervisor.
 */
export async function transferActingSupervisor(context: AppContext, actor: User, jobId: string, body: z.output<typeof actingTransferSchema>, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body, actor }, async (manager, job) => {
    const board = job.board;
    if (job.state === 'complete' || job.state === 'cancelled') {
      throw new HttpError(409, 'job_closed', `The job is ${job.state}: its record is closed and nobody acts for it any more.`);
    }
    if (!board || job.state === 'planning') {
      throw new HttpError(409, 'invalid_state', 'The job is still being planned: there is no board and no acting supervisor yet. The supervisor who starts the job becomes the acting supervisor.');
    }
    const inCrew = await manager.existsBy(JobCrew, { jobId: job.id, userId: body.userId, role: 'supervisor' });
    const person = await manager.findOneBy(User, { id: body.userId });
    if (!inCrew || !person) {
      throw badRequest('Choose a supervisor of this job’s crew.', [{ path: 'userId', message: 'Not a supervisor in this job’s crew: add them to the crew as supervisor first' }]);
    }
    if (!person.active) throw badRequest(`${person.displayName}’s account is deactivated.`, [{ path: 'userId', message: `${person.displayName} is deactivated` }]);
    const acting = board.actingSupervisor ?? null;
    if (acting?.userId === person.id) throw conflict('already_acting', `${person.displayName} is already the acting supervisor of this job.`);
    return {
      type: 'acting.transferred',
      role: 'admin',
      data: { from: acting ? { userId: acting.userId, name: acting.name } : null, to: { userId: person.id, name: person.displayName }, reason: body.reason },
    };
  });
}
