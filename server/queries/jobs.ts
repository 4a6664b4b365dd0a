import { In, type EntityManager } from 'typeorm';
import { commsProblems } from '../../shared/plan/comms.js';
import { crewEditStates, missingCrewRoles, type JobDto, type JobSummary, type Readiness } from '../../shared/schemas/jobs.js';
import { Job } from '../entities/Job.js';
import { JobCrew } from '../entities/JobCrew.js';
import { JobOverride } from '../entities/JobOverride.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { User } from '../entities/User.js';
import { can } from '../policies/index.js';
import { presentJob } from '../presenters/job.js';
import { crewRolesByJob } from './crew.js';
import { planReadinessReasons } from './plans.js';

/** A job with its crew, overrides and the names they need, presented for one person. */
export async function jobFor(manager: EntityManager, job: Job, viewer: User): Promise<JobDto> {
  const crew = await manager.findBy(JobCrew, { jobId: job.id });
  const overrides = await manager.find(JobOverride, { where: { jobId: job.id }, order: { requestedAt: 'ASC' } });
  const ids = [...crew.map((c) => c.userId), ...overrides.flatMap((o) => [o.requestedBy, o.approvedBy ?? ''])];
  const people = new Map((await manager.findBy(User, { id: In([...new Set(ids)].filter(Boolean)) })).map((u) => [u.id, u.displayName]));
  const unit = await manager.findOneBy(CraneUnit, { id: job.craneUnitId });
  const myRoles = crew.filter((c) => c.userId === viewer.id).map((c) => c.role);
  return presentJob(job, {
    crew: crew.map((c) => ({ userId: c.userId, name: people.get(c.userId) ?? 'Unknown', role: c.role })),
    overrides,
    names: people,
    fleetNumber: unit?.fleetNumber ?? '?',
    can: {
      edit: job.state === 'planning' && can(viewer, 'jobs.plan', { crewRoles: myRoles }),
      approveOverrides: job.state === 'planning' && can(viewer, 'jobs.override', { crewRoles: myRoles }),
      // The same rule setCrew enforces (planningRole and crewEditStates), so the crew tab offers what the server accepts.
      editCrew: crewEditStates.includes(job.state) && can(viewer, 'jobs.plan', { crewRoles: myRoles }),
    },
  });
}

/**
 * Whether a person reads every job without being on its crew: the `jobs.read` row asked with no
 * crew roles, so only administrators. Everyone else, supervisors included, reads the jobs whose
 * crew they are on (in any role).
 */
export function seesAllJobs(viewer: User): boolean {
  return can(viewer, 'jobs.read', { crewRoles: [] });
}

/** The jobs a person may read (the `jobs.read` row): all for admins, otherwise those whose crew they are on. */
export async function jobsVisibleTo(manager: EntityManager, viewer: User): Promise<JobSummary[]> {
  const seesAll = seesAllJobs(viewer);
  const rolesByJob = await crewRolesByJob(manager, viewer.id);
  const onCrew = [...rolesByJob.entries()].filter(([, roles]) => can(viewer, 'jobs.read', { crewRoles: roles })).map(([jobId]) => jobId);
  const jobs = seesAll
    ? await manager.find(Job, { order: { updatedAt: 'DESC' } })
    : onCrew.length
      ? await manager.find(Job, { where: { id: In(onCrew) }, order: { updatedAt: 'DESC' } })
      : [];
  const units = new Map((await manager.findBy(CraneUnit, { id: In([...new Set(jobs.map((j) => j.craneUnitId))]) })).map((u) => [u.id, u.fleetNumber]));
  return jobs.map((j) => ({
    id: j.id,
    name: j.name,
    site: j.site,
    craneUnitId: j.craneUnitId,
    craneFleetNumber: units.get(j.craneUnitId) ?? '?',
    kind: j.kind,
    state: j.state,
    timeZone: j.timeZone,
    planVersion: j.planVersion,
    updatedAt: j.updatedAt,
    myRoles: rolesByJob.get(j.id) ?? [],
  }));
}

/**
 * Everything that stops a job leaving planning, each reason in words: the three crew roles, a
 * configuration, failing figures (never the ones that cannot be overridden; the others only
 * with an approved override), and the plan's own problems.
 */
export async function readinessOf(manager: EntityManager, job: Job): Promise<Readiness> {
  const reasons: Readiness['reasons'] = [];
  if (job.state !== 'planning') reasons.push({ code: 'invalid_state', message: `The job is ${job.state}, not planning.` });
  const crew = await manager.findBy(JobCrew, { jobId: job.id });
  for (const role of missingCrewRoles(crew)) reasons.push({ code: `crew_${role}`, message: `The crew has no ${role}. Add at least one.` });
  if (!job.configuration || !job.results) {
    reasons.push({ code: 'no_configuration', message: 'The configuration has not been planned yet.' });
  } else {
    const approved = new Set((await manager.findBy(JobOverride, { jobId: job.id })).filter((o) => o.approvedBy).map((o) => o.figureKey));
    for (const figure of job.results.figures) {
      if (figure.status !== 'fail' && figure.status !== 'unverified' && figure.status !== 'caution') continue;
      const what = figure.status === 'fail' ? `fails (${figure.value})` : figure.status === 'caution' ? `needs care (${figure.value})` : 'is unverified';
      if (!figure.overridable) reasons.push({ code: 'figure_not_overridable', message: `${figure.label} ${what} and can never be overridden. Change the configuration.` });
      else if (!approved.has(figure.key)) reasons.push({ code: 'figure_failing', message: `${figure.label} ${what}. Change the configuration, or override it with a reason and a second person's approval.` });
    }
  }
  // Every motion directed by a crew member with a call sign.
  if (job.configuration) reasons.push(...commsProblems(job.configuration, job.commsPlan, crew));
  reasons.push(...(await planReadinessReasons(manager, job)));
  return { ready: reasons.length === 0, reasons };
}
