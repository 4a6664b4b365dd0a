import { Router } from 'express';
import { z } from 'zod';
import { actingTransferSchema } from '../../shared/schemas/commands.js';
import { configurationSchema } from '../../shared/schemas/configuration.js';
import { createJobSchema, overrideActionSchema, setCrewSchema, updateJobSchema } from '../../shared/schemas/jobs.js';
import { transferActingSupervisor } from '../commands/acting.js';
import { approveOverride, createJob, requestOverride, setConfiguration, setCrew, updateJob } from '../commands/jobs.js';
import type { AppContext } from '../context.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Job } from '../entities/Job.js';
import type { User } from '../entities/User.js';
import { parseOrThrow } from '../errors.js';
import { renderPdf } from '../pdf/pool.js';
import { authorize, can } from '../policies/index.js';
import { eventsAfter } from '../queries/events.js';
import { jobFor, jobsVisibleTo, readinessOf } from '../queries/jobs.js';
import { commandIdOf, loadJobFor } from './job-access.js';

/** Most events one request returns; a client asks again from the last seq it got. */
export const EVENTS_PAGE_LIMIT = 1000;
const eventsQuerySchema = z.object({ after: z.coerce.number().int().min(0).default(0) });

/** Jobs: list, create, read, change, crew, configuration, overrides and events (the record's exports are in records.ts). */
export function jobsRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;
  // Reads of a job go through the queue (as GET /board does), so nobody is shown a change that is still being written and may yet fail.
  const answerJob = (jobId: string, actor: User) => context.queue.run(async () => jobFor(manager, await manager.findOneByOrFail(Job, { id: jobId }), actor));

  router.get('/jobs', async (req, res) => {
    authorize(req.actor ?? null, 'jobs.list', {}, req.authProblem);
    res.json({ items: await context.queue.run(() => jobsVisibleTo(manager, req.actor!)) });
  });

  router.post('/jobs', async (req, res) => {
    authorize(req.actor ?? null, 'jobs.create', {}, req.authProblem);
    const body = parseOrThrow(createJobSchema, req.body, 'job');
    const { job } = await createJob(context, req.actor!, body, commandIdOf(req));
    res.status(201).json({ job: await answerJob(job.id, req.actor!) });
  });

  router.get('/jobs/:jobId', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.read');
    res.json({ job: await answerJob(job.id, actor) });
  });

  router.patch('/jobs/:jobId', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.plan');
    const body = parseOrThrow(updateJobSchema, req.body, 'change');
    await updateJob(context, actor, job.id, body, commandIdOf(req));
    res.json({ job: await answerJob(job.id, actor) });
  });

  router.put('/jobs/:jobId/crew', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.plan');
    const body = parseOrThrow(setCrewSchema, req.body, 'crew');
    await setCrew(context, actor, job.id, body.members, commandIdOf(req));
    res.json({ job: await answerJob(job.id, actor) });
  });

  // Figures a client may have sent with the configuration are not read: the server computes its own.
  router.put('/jobs/:jobId/configuration', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.plan');
    const raw: unknown = req.body && typeof req.body === 'object' && 'configuration' in req.body ? (req.body as { configuration: unknown }).configuration : req.body;
    const configuration = parseOrThrow(configurationSchema, raw, 'configuration');
    await setConfiguration(context, actor, job.id, configuration, commandIdOf(req));
    res.json({ job: await answerJob(job.id, actor) });
  });

  // An administrator names the acting supervisor when the outgoing one cannot hand over.
  router.post('/jobs/:jobId/acting-supervisor', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.acting.transfer');
    const body = parseOrThrow(actingTransferSchema, req.body, 'transfer');
    const { event } = await transferActingSupervisor(context, actor, job.id, body, commandIdOf(req));
    res.json({ seq: event.seq, job: await answerJob(job.id, actor) });
  });

  router.post('/jobs/:jobId/overrides', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.override');
    const body = parseOrThrow(overrideActionSchema, req.body, 'override');
    if (body.action === 'request') await requestOverride(context, actor, job.id, body.figureKey, body.reason, commandIdOf(req));
    else await approveOverride(context, actor, job.id, body.overrideId, commandIdOf(req));
    res.status(body.action === 'request' ? 201 : 200).json({ job: await answerJob(job.id, actor) });
  });

  router.get('/jobs/:jobId/events', async (req, res) => {
    const { job, actor, crewRoles } = await loadJobFor(context, req, 'jobs.read');
    const { after } = parseOrThrow(eventsQuerySchema, req.query, 'query');
    const planner = can(actor, 'jobs.plan', { crewRoles });
    // The page and the last seq from one queued read: never an event that is not committed, never a last seq older than the page.
    res.json(
      await context.queue.run(async () => ({
        items: await eventsAfter(manager, job.id, after, { planner, limit: EVENTS_PAGE_LIMIT }),
        lastSeq: (await manager.findOneByOrFail(Job, { id: job.id })).lastSeq,
      })),
    );
  });

  router.get('/jobs/:jobId/readiness', async (req, res) => {
    const { job } = await loadJobFor(context, req, 'jobs.read');
    res.json(await context.queue.run(() => readinessOf(manager, job)));
  });

  router.get('/jobs/:jobId/configuration.pdf', async (req, res) => {
    const { job, actor } = await loadJobFor(context, req, 'jobs.read');
    const unit = await manager.findOneByOrFail(CraneUnit, { id: job.craneUnitId });
    const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
    const pdf = await renderPdf({ kind: 'configuration', job: await jobFor(manager, job, actor), results: job.results, arrangement: model.arrangement, printedAt: context.now().toISOString() });
    res.type('application/pdf').attachment(`configuration-${job.id.slice(0, 8)}.pdf`).send(pdf);
  });

  return router;
}
