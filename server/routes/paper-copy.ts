import { Router } from 'express';
import type { AppContext } from '../context.js';
import { committedJobs } from '../db/committed-jobs.js';
import { JobPlan } from '../entities/JobPlan.js';
import { conflict, notFound } from '../errors.js';
import type { PaperCopyInput } from '../pdf/paper-copy.js';
import { renderPdf } from '../pdf/pool.js';
import { can } from '../policies/index.js';
import { redactBoardFor } from '../presenters/board.js';
import { redactPlan } from '../presenters/plan.js';
import { loadJobFor } from './job-access.js';

/**
 * What the paper copy is drawn from, read in one turn of the queue: the board as committed and the
 * plan of the version it runs, both as this reader may see them (blind value-check figures only for
 * the job's planners, as GET /plan.pdf).
 */
export async function paperCopyTaskFor(context: AppContext, jobId: string, planner: boolean): Promise<{ kind: 'paper' } & PaperCopyInput> {
  const { dataSource } = context;
  const { job, board, plan } = await context.queue.run(async () => {
    const current = committedJobs(dataSource).read(jobId);
    if (!current) throw notFound('That job');
    const row = current.board && current.board.stages.length ? await dataSource.manager.findOneBy(JobPlan, { jobId, version: current.board.planVersion }) : null;
    return { job: current, board: current.board, plan: row?.plan ?? null };
  });
  if (job.state === 'complete' || job.state === 'cancelled') {
    throw conflict('job_closed', `The job is ${job.state === 'complete' ? 'complete' : 'cancelled'}: nothing is left to do on paper. Its record PDF holds what was done.`);
  }
  if (!board || !plan) throw conflict('no_plan_in_force', 'There is no plan in force yet: a paper copy is printed from the board once the plan is ready.');
  return {
    kind: 'paper',
    job: { id: job.id, name: board.job.name, site: board.job.site, craneFleetNumber: board.job.craneFleetNumber, state: job.state, timeZone: job.timeZone },
    board: redactBoardFor(board, planner),
    plan: planner ? plan : redactPlan(plan),
    planner,
    boardUrl: `${context.config.publicUrl}/jobs/${encodeURIComponent(job.id)}/open`,
    printedAt: context.now().toISOString(),
  };
}

/** GET /api/jobs/:jobId/paper.pdf: the plan from the board's current state onward, to work on paper when the network is down. */
export function paperCopyRouter(context: AppContext): Router {
  const router = Router();
  router.get('/jobs/:jobId/paper.pdf', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    const task = await paperCopyTaskFor(context, job.id, can(actor, 'jobs.plan', { crewRoles }));
    const pdf = await renderPdf(task);
    res.type('application/pdf').attachment(`paper-copy-${job.id.slice(0, 8)}-v${task.board.planVersion}.pdf`).send(pdf);
  });
  return router;
}
