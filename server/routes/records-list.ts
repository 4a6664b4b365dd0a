import { Router } from 'express';
import { In } from 'typeorm';
import { recordsQuerySchema, type RecordList, type RecordsQuery } from '../../shared/schemas/records.js';
import type { AppContext } from '../context.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Job } from '../entities/Job.js';
import { JobCrew } from '../entities/JobCrew.js';
import type { User } from '../entities/User.js';
import { parseOrThrow } from '../errors.js';
import { verifyJobChain } from '../events/chain.js';
import { authorize } from '../policies/index.js';
import { seesAllJobs } from '../queries/jobs.js';

/**
 * When a job ended: the last event that completed or cancelled it, by its type or by the job state
 * its effects recorded (the final sign-off's release completes the job as a `hold.released`).
 */
const ENDING_TYPES = ['job.completed', 'job.cancelled'];
const ENDING_STATES = ['complete', 'cancelled'];
const ENDED_AT = `(SELECT MAX(e.at) FROM job_event e WHERE e.job_id = j.id AND (e.type IN (:...endingTypes) OR json_extract(e.data, '$.effects.job.state') IN (:...endingStates)))`;

/** LIKE's own wildcards typed in a site name are matched as themselves. */
const likeEscaped = (text: string) => text.replace(/[\\%_]/g, (c) => `\\${c}`);

/**
 * One page of the jobs this person may read, filtered: an administrator's list holds every job
 * (`seesAllJobs`), anyone else's, supervisors included, the jobs whose crew they are on, as GET /api/jobs.
 */
async function recordPage(context: AppContext, viewer: User, query: RecordsQuery) {
  const { manager } = context.dataSource;
  const qb = manager.createQueryBuilder(Job, 'j').select('j.id', 'id').addSelect(ENDED_AT, 'endedAt').setParameters({ endingTypes: ENDING_TYPES, endingStates: ENDING_STATES });
  if (!seesAllJobs(viewer)) {
    qb.andWhere((sub) => `j.id IN ${sub.subQuery().select('c.job_id').from(JobCrew, 'c').where('c.user_id = :viewerId').getQuery()}`, { viewerId: viewer.id });
  }
  if (query.state) qb.andWhere('j.state = :state', { state: query.state });
  if (query.craneUnitId) qb.andWhere('j.crane_unit_id = :unitId', { unitId: query.craneUnitId });
  if (query.site) qb.andWhere(`LOWER(j.site) LIKE :site ESCAPE '\\'`, { site: `%${likeEscaped(query.site.toLowerCase())}%` });
  const dateColumn = query.dateField === 'ended' ? ENDED_AT : 'j.updated_at';
  if (query.dateField === 'ended') qb.andWhere(`${ENDED_AT} IS NOT NULL`);
  if (query.from) qb.andWhere(`${dateColumn} >= :from`, { from: query.from });
  if (query.to) qb.andWhere(`${dateColumn} <= :to`, { to: query.to });
  const total = await qb.getCount();
  const picked = await qb
    .orderBy(query.dateField === 'ended' ? 'endedAt' : 'j.updated_at', 'DESC')
    .addOrderBy('j.id', 'ASC')
    .offset((query.page - 1) * query.pageSize)
    .limit(query.pageSize)
    .getRawMany<{ id: string; endedAt: string | null }>();
  const jobs = new Map((await manager.findBy(Job, { id: In(picked.map((p) => p.id)) })).map((j) => [j.id, j]));
  const units = new Map((await manager.findBy(CraneUnit, { id: In([...new Set([...jobs.values()].map((j) => j.craneUnitId))]) })).map((u) => [u.id, u.fleetNumber]));
  const rows = picked.flatMap(({ id, endedAt }) => {
    const job = jobs.get(id);
    return job ? [{ job, endedAt }] : [];
  });
  return { total, rows, units };
}

/** GET /api/records: the Records screen's list, each row with its chain checked when asked for. */
export function recordsListRouter(context: AppContext): Router {
  const router = Router();
  const { manager } = context.dataSource;

  router.get('/records', async (req, res) => {
    authorize(req.actor ?? null, 'records.list', {}, req.authProblem);
    const query = parseOrThrow(recordsQuerySchema, req.query, 'query');
    // Read through the queue: a page is never half of a command.
    const { total, rows, units } = await context.queue.run(() => recordPage(context, req.actor!, query));
    const items: RecordList['items'] = [];
    // Only this page's chains, one queued walk each, so a long list never holds the writers back for all of them.
    for (const { job, endedAt } of rows) {
      const { problem: _problem, expected: _expected, ...verification } = await context.queue.run(() => verifyJobChain(manager, job.id));
      items.push({
        id: job.id,
        name: job.name,
        site: job.site,
        kind: job.kind,
        state: job.state,
        timeZone: job.timeZone,
        craneUnitId: job.craneUnitId,
        craneFleetNumber: units.get(job.craneUnitId) ?? '?',
        createdAt: job.createdAt,
        updatedAt: job.updatedAt,
        endedAt,
        lastSeq: job.lastSeq,
        // The hash the walk just reached when it verifies (a command may have landed since the page was read).
        finalHash: verification.finalHash ?? job.headHash,
        verification,
      });
    }
    const answer: RecordList = { items, total, page: query.page, pageSize: query.pageSize };
    res.json(answer);
  });

  return router;
}
