import { Router } from 'express';
import { planSchema } from '../../shared/schemas/plan.js';
import { editDraft, generateDraft, makeReady } from '../commands/plans.js';
import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { JobPlan } from '../entities/JobPlan.js';
import { User } from '../entities/User.js';
import { HttpError, parseOrThrow } from '../errors.js';
import { renderPdf } from '../pdf/pool.js';
import { can } from '../policies/index.js';
import { redactPlan } from '../presenters/plan.js';
import { jobFor } from '../queries/jobs.js';
import { planProblemsOf, planSourceHash } from '../queries/plans.js';
import { commandIdOf, loadJobFor } from './job-access.js';

const noPlan = () => new HttpError(404, 'no_plan', 'There is no plan yet. Save the configuration: the plan is generated from it.');

/** The plan: draft while planning, locked versions after; editing, generating, ready, PDF. */
export function plansRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  router.get('/jobs/:jobId/plan', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    const locked = job.planVersion > 0;
    const row = await manager.findOneBy(JobPlan, { jobId: job.id, version: job.planVersion });
    if (!row) throw noPlan();
    const planner = can(actor, 'jobs.plan', { crewRoles });
    res.json({
      version: row.version,
      locked,
      stale: !locked && row.sourceHash !== planSourceHash(job),
      plan: planner ? row.plan : redactPlan(row.plan),
      problems: locked ? [] : await planProblemsOf(manager, job, row.plan),
    });
  });

  router.put('/jobs/:jobId/plan', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.plan');
    const raw: unknown = req.body && typeof req.body === 'object' && 'plan' in req.body ? (req.body as { plan: unknown }).plan : req.body;
    const plan = parseOrThrow(planSchema, raw, 'plan');
    await editDraft(context, actor, job.id, plan, commandIdOf(req));
    res.json({ job: await jobFor(manager, await manager.findOneByOrFail(Job, { id: job.id }), actor) });
  });

  router.post('/jobs/:jobId/plan/generate', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.plan');
    await generateDraft(context, actor, job.id, commandIdOf(req));
    res.status(201).json({ ok: true });
  });

  router.get('/jobs/:jobId/plan/versions', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    const rows = await manager.find(JobPlan, { where: { jobId: job.id }, order: { version: 'ASC' } });
    const planner = can(actor, 'jobs.plan', { crewRoles });
    const names = new Map((await manager.findBy(User, {})).map((u) => [u.id, u.displayName]));
    res.json({
      items: rows
        .filter((r) => r.version > 0)
        .map((r) => ({ version: r.version, createdAt: r.createdAt, createdBy: { userId: r.createdBy, name: names.get(r.createdBy) ?? 'Unknown' }, reason: r.reason, plan: planner ? r.plan : redactPlan(r.plan) })),
    });
  });

  router.post('/jobs/:jobId/ready', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.plan');
    const { job: updated } = await makeReady(context, actor, job.id, commandIdOf(req));
    res.json({ job: await jobFor(manager, updated, actor) });
  });

  router.get('/jobs/:jobId/plan.pdf', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    const row = await manager.findOneBy(JobPlan, { jobId: job.id, version: job.planVersion });
    if (!row) throw noPlan();
    const plan = can(actor, 'jobs.plan', { crewRoles }) ? row.plan : redactPlan(row.plan);
    const pdf = await renderPdf({ kind: 'plan', job: await jobFor(manager, job, actor), plan, version: row.version, printedAt: context.now().toISOString() });
    res.type('application/pdf').attachment(`plan-${job.id.slice(0, 8)}-v${row.version}.pdf`).send(pdf);
  });

  return router;
}
