import { Router } from 'express';
import { boardCommandSchema } from '../../shared/schemas/commands.js';
import { runBoardCommand } from '../commands/board.js';
import type { AppContext } from '../context.js';
import { HttpError, notFound, parseOrThrow } from '../errors.js';
import { isStopCommand, PersonCommandRates } from '../middlewares/input-guard.js';
import { can } from '../policies/index.js';
import { redactBoardFor } from '../presenters/board.js';
import { loadJobFor } from './job-access.js';
import { committedJobs } from '../db/committed-jobs.js';

/** The board over HTTP: the same command path as the socket, and the snapshot. */
export function boardRouter(context: AppContext): Router {
  const router = Router();
  // The same rate as one socket's, per person (input-guard.ts): 429 too_many_commands with Retry-After.
  const rates = new PersonCommandRates(undefined, context.config.commandRate);

  // `board.command` is asked before the body is read, so someone outside the crew learns nothing
  // from a validation answer; runBoardCommand then asks the policy again with the command's type.
  router.post('/jobs/:jobId/commands', async (req, res) => {
    // Before the job is read: a flood costs no database read. Without sign-in, loadJobFor answers 401.
    const refused = req.actor ? rates.take(req.actor.id, isStopCommand(req.body)) : null;
    if (refused) {
      res.set('Retry-After', String(Math.max(1, Math.ceil(refused.waitMs / 1000))));
      throw refused.error;
    }
    const { job, actor } = await loadJobFor(context, req, 'board.command');
    const command = parseOrThrow(boardCommandSchema, req.body, 'command');
    const { event } = await runBoardCommand(context, actor, job.id, command);
    res.json({ ok: true, seq: event.seq, event });
  });

  // Read through the queue so the snapshot never shows a half-applied command.
  router.get('/jobs/:jobId/board', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'board.watch');
    const current = await context.queue.run(async () => committedJobs(context.dataSource).read(job.id));
    if (!current) throw notFound('That job');
    if (!current.board) throw new HttpError(409, 'invalid_state', 'This job has no board yet.');
    res.json({ ...redactBoardFor(current.board, can(actor, 'jobs.plan', { crewRoles })), presence: context.publisher.presenceOf(job.id) });
  });

  return router;
}
