import { randomUUID } from 'node:crypto';
import { In, type EntityManager } from 'typeorm';
import type { z } from 'zod';
import { acknowledgmentsLeaving, rolesLeftUncovered } from '../../shared/board/shifts.js';
import type { BoardState } from '../../shared/board/types.js';
import type { Withdrawn } from '../../shared/events/log.js';
import { computeConfiguration } from '../../shared/planner/compute.js';
import type { ConfigurationResults } from '../../shared/planner/types.js';
import type { Configuration } from '../../shared/schemas/configuration.js';
import { listWords } from '../../shared/text.js';
import { crewEditStates, emptyCommsPlan, type CrewRole, type createJobSchema, type updateJobSchema } from '../../shared/schemas/jobs.js';
import type { AppContext } from '../context.js';
import { AssistCrane } from '../entities/AssistCrane.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Job } from '../entities/Job.js';
import { JobCrew } from '../entities/JobCrew.js';
import { JobOverride } from '../entities/JobOverride.js';
import { User } from '../entities/User.js';
import { badRequest, conflict, forbidden, HttpError, secondAdminNeeded } from '../errors.js';
import { can, liveJobAccess, type LiveJobAccess } from '../policies/index.js';
import { crewRolesOf } from '../queries/crew.js';
import { unitInventory } from '../queries/fleet.js';
import { refreshGeneratedDraft } from './plan-drafts.js';
import { recordSignInAudit } from './audit.js';
import { createJobWithEvent, runJobCommand, type CommandOutcome } from './job-writer.js';

/** The role a planning change is recorded under: the job's supervisor, or an admin acting as such. */
export async function planningRole(manager: EntityManager, job: Job, actor: User): Promise<'supervisor' | 'admin'> {
  const roles = await crewRolesOf(manager, job.id, actor.id);
  if (can(actor, 'jobs.plan', { crewRoles: roles })) return roles.includes('supervisor') ? 'supervisor' : 'admin';
  throw forbidden('Only this job’s supervisors or an administrator can change it.');
}

export function requireState(job: Job, allowed: Job['state'][], doing: string): void {
  if (!allowed.includes(job.state)) {
    throw new HttpError(409, 'invalid_state', `The job is ${job.state}; you can ${doing} only while it is ${allowed.join(' or ')}.`);
  }
}

/** Creates a job in planning; a creator qualified as supervisor joins its crew as supervisor. */
export async function createJob(context: AppContext, actor: User, input: z.output<typeof createJobSchema>, commandId?: string): Promise<CommandOutcome> {
  const now = context.now().toISOString();
  return createJobWithEvent(context, { commandId, body: input, actor }, async (manager) => {
    const unit = await manager.findOneBy(CraneUnit, { id: input.craneUnitId });
    if (!unit) throw badRequest('Choose a crane unit that exists.', [{ path: 'craneUnitId', message: 'No such crane unit' }]);
    // The site's zone as chosen, else the server's; the event carries it so the board and the record know it.
    const timeZone = input.timeZone ?? context.config.timeZone;
    const job = manager.create(Job, {
      id: randomUUID(),
      ...input,
      timeZone,
      state: 'planning',
      configuration: null,
      results: null,
      distribution: [],
      commsPlan: emptyCommsPlan,
      planVersion: 0,
      createdBy: actor.id,
      createdAt: now,
      updatedAt: now,
    });
    const joins = actor.qualifications.includes('supervisor');
    return {
      job,
      draft: {
        type: 'job.created',
        role: joins ? 'supervisor' : 'admin',
        data: { job: { ...input, timeZone, state: 'planning' }, craneFleetNumber: unit.fleetNumber, crew: joins ? [{ userId: actor.id, name: actor.displayName, role: 'supervisor' }] : [] },
      },
      after: joins ? (m: EntityManager) => m.insert(JobCrew, { jobId: job.id, userId: actor.id, role: 'supervisor' }).then(() => undefined) : undefined,
    };
  });
}

/** Changes a job's name, site, kind, time zone, distribution list or communications plan. */
export async function updateJob(context: AppContext, actor: User, jobId: string, changes: z.output<typeof updateJobSchema>, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: changes, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, changes.kind ? ['planning'] : ['planning', 'ready', 'live', 'stopped', 'made_safe'], changes.kind ? 'change the kind of job' : 'change the job');
    if (changes.commsPlan) await assertCrewIds(manager, job.id, [...changes.commsPlan.callSigns.map((c) => c.userId), ...changes.commsPlan.motionSignallers.map((m) => m.userId)]);
    if (changes.commsPlan) {
      const signallers = new Set((await manager.findBy(JobCrew, { jobId: job.id, role: 'signaller' })).map((c) => c.userId));
      changes.commsPlan.motionSignallers.forEach((m, i) => {
        if (!signallers.has(m.userId)) throw badRequest('Only the job’s signallers can direct a motion.', [{ path: `commsPlan.motionSignallers.${i}.userId`, message: 'Not a signaller on this job' }]);
      });
    }
    Object.assign(job, changes);
    const planRegenerated = changes.commsPlan || changes.kind ? await refreshGeneratedDraft(manager, job, actor, context.now()) : false;
    return { type: 'job.updated', role, data: { changes, planRegenerated } };
  });
}

async function assertCrewIds(manager: EntityManager, jobId: string, userIds: string[]): Promise<void> {
  if (userIds.length === 0) return;
  const crew = new Set((await manager.findBy(JobCrew, { jobId })).map((c) => c.userId));
  const missing = userIds.filter((id) => !crew.has(id));
  if (missing.length) throw badRequest('The communications plan names someone who is not in the crew.', [{ path: 'commsPlan', message: 'Add them to the crew first' }]);
}

/** The job states in which the job has a live board: holds, acknowledgments and an acting supervisor. */
const boardStates: readonly Job['state'][] = ['ready', 'live', 'stopped', 'made_safe'];

/**
 * Replaces the crew. Each role must be one of the person's qualifications. While the job has a
 * board, a change may not leave a role an open hold needs with nobody (name the replacement in
 * the same change), nor take the acting supervisor out of the supervisor role (they hand over
 * first, or an administrator transfers the role); the acknowledgments of holds not yet released
 * whose person leaves (or leaves that role) are withdrawn in the same event, and the hold says why.
 */
export async function setCrew(context: AppContext, actor: User, jobId: string, members: { userId: string; role: CrewRole }[], commandId?: string): Promise<CommandOutcome> {
  /** What each person whose roles changed may still receive live from the job, worked out under the queue with the change. */
  let access: { userId: string; access: LiveJobAccess }[] = [];
  const outcome = await runJobCommand(context, jobId, { commandId, body: { members }, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, [...crewEditStates], 'change the crew');
    const users = new Map((await manager.findBy(User, { id: In([...new Set(members.map((m) => m.userId))]) })).map((u) => [u.id, u]));
    const fields = members.flatMap((m, i) => {
      const user = users.get(m.userId);
      if (!user) return [{ path: `members.${i}.userId`, message: 'No such person' }];
      if (!user.active) return [{ path: `members.${i}.userId`, message: `${user.displayName} is deactivated` }];
      if (!user.qualifications.includes(m.role)) return [{ path: `members.${i}.role`, message: `${user.displayName} is not qualified as ${m.role}` }];
      return [];
    });
    if (fields.length) throw badRequest('Some crew assignments are not possible.', fields);
    const unique = [...new Map(members.map((m) => [`${m.userId}:${m.role}`, m])).values()];
    const withdrawn = job.board && boardStates.includes(job.state) ? crewChangeOnBoard(job.board, unique) : [];
    const before = await manager.findBy(JobCrew, { jobId: job.id });
    await manager.delete(JobCrew, { jobId: job.id });
    if (unique.length) await manager.insert(JobCrew, unique.map((m) => ({ jobId: job.id, userId: m.userId, role: m.role })));
    const key = (m: { userId: string; role: string }) => `${m.userId}:${m.role}`;
    const beforeKeys = new Set(before.map(key));
    const afterKeys = new Set(unique.map(key));
    const added = unique.filter((m) => !beforeKeys.has(key(m))).map((m) => ({ userId: m.userId, role: m.role }));
    const removed = before.filter((m) => !afterKeys.has(key(m))).map((m) => ({ userId: m.userId, role: m.role }));
    // An administrator's power to change any crew does not reach their own place in it: a second
    // administrator (or the job's supervisor) puts them on or takes them off. (A supervisor of the
    // job changes their own roles as any supervisor does: role 'supervisor' here.)
    if (role === 'admin' && [...added, ...removed].some((m) => m.userId === actor.id)) throw secondAdminNeeded('put yourself on this job’s crew or take yourself off it', 'another administrator or the job’s supervisor');
    const changed = [...new Set([...added, ...removed].map((m) => m.userId))];
    const people = new Map((changed.length ? await manager.findBy(User, { id: In(changed) }) : []).map((u) => [u.id, u]));
    access = changed.map((userId) => ({ userId, access: liveJobAccess(people.get(userId) ?? null, unique.filter((m) => m.userId === userId).map((m) => m.role)) }));
    if (actor.isAdmin && changed.length) {
      const names = (list: { userId: string; role: string }[]) => list.map((m) => `${people.get(m.userId)?.displayName ?? m.userId} as ${m.role}`).join(', ');
      const detail = [added.length ? `added ${names(added)}` : '', removed.length ? `took off ${names(removed)}` : ''].filter(Boolean).join('; ');
      await recordSignInAudit(manager, { kind: 'crew_changed', email: actor.email, userId: actor.id, detail: `${job.name} (${job.id}): ${detail}` }, context.now());
    }
    return {
      type: 'crew.set',
      role,
      data: {
        crew: unique.map((m) => ({ userId: m.userId, name: users.get(m.userId)!.displayName, role: m.role })),
        added,
        removed,
        ...(withdrawn.length ? { withdrawn } : {}),
      },
    };
  });
  // After the commit and the crew.set event went out, before any later event of the job can: whoever
  // is off the crew (and no admin) leaves the board on the sockets they have open, and is told why.
  if (!outcome.replayed) {
    const reason = `${actor.displayName} changed the crew of “${outcome.job.name}”: you are no longer on its crew, so its live board is closed for you. Ask the job’s supervisor if you should be on it.`;
    for (const a of access) context.publisher.limitJobAccess(jobId, a.userId, a.access, reason);
  }
  return outcome;
}

/**
 * The checks of a crew change on a job under way, and the acknowledgments it takes back. Refuses
 * (409 `crew_role_needed`, a field per role and hold) a crew that leaves a role an open hold (or
 * the start-of-shift hold) needs with nobody, and (409 `acting_supervisor`) one without the acting
 * supervisor as supervisor.
 */
function crewChangeOnBoard(board: BoardState, crew: readonly { userId: string; role: CrewRole }[]): Withdrawn[] {
  const uncovered = rolesLeftUncovered(board, crew);
  if (uncovered.length) {
    throw new HttpError(
      409,
      'crew_role_needed',
      `This change leaves nobody as ${listWords([...new Set(uncovered.map((u) => u.role))])} for a hold that is still open. Name the replacement in the same change: put the person who takes over in the crew as you take the other out.`,
      uncovered.map((u) => ({ path: `members.${u.role}`, message: `Nobody left as ${u.role} for “${u.hold}”` })),
    );
  }
  const acting = board.actingSupervisor;
  if (acting && !crew.some((m) => m.userId === acting.userId && m.role === 'supervisor')) {
    throw new HttpError(
      409,
      'acting_supervisor',
      `${acting.name} is the acting supervisor and cannot be taken off as supervisor. They hand over first (their handover note, acknowledged by the supervisor taking over); if they cannot be reached, an administrator makes someone else the acting supervisor.`,
      [{ path: 'members', message: `${acting.name} is the acting supervisor` }],
    );
  }
  return acknowledgmentsLeaving(board, (userId, role) => crew.some((m) => m.userId === userId && (role === null || m.role === role)));
}

/** Loads what the configuration is computed against. */
export async function plannerInputsFor(manager: EntityManager, config: Configuration) {
  const unit = await manager.findOneBy(CraneUnit, { id: config.craneUnitId });
  if (!unit) throw badRequest('Choose a crane unit that exists.', [{ path: 'craneUnitId', message: 'No such crane unit' }]);
  const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
  const assist = config.assist.assistCraneId ? await manager.findOneBy(AssistCrane, { id: config.assist.assistCraneId }) : null;
  if (config.assist.assistCraneId && !assist) throw badRequest('Choose an assist crane that exists.', [{ path: 'assist.assistCraneId', message: 'No such assist crane' }]);
  if (assist && config.assist.chartId && !assist.data.charts.some((c) => c.id === config.assist.chartId)) {
    throw badRequest('Choose one of the assist crane’s charts.', [{ path: 'assist.chartId', message: 'No such chart for this assist crane' }]);
  }
  return { unit, inputs: { arrangement: model.arrangement, inventory: await unitInventory(manager, unit), assistCrane: assist?.data ?? null } };
}

/** An override still stands only while its figure fails with the same value. */
function overrideStillApplies(results: ConfigurationResults, override: JobOverride): boolean {
  const figure = results.figures.find((f) => f.key === override.figureKey);
  return !!figure && figure.status !== 'pass' && figure.status !== 'info' && figure.overridable && figure.value === override.figureValue;
}

/**
 * Saves the configuration and the server's own computation of it; any figures a client sent are
 * ignored. Overrides whose figure changed or no longer fails are withdrawn in the same event.
 */
export async function setConfiguration(context: AppContext, actor: User, jobId: string, config: Configuration, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: config, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, ['planning'], 'change the configuration');
    const { inputs } = await plannerInputsFor(manager, config);
    const results = computeConfiguration(config, inputs);
    job.configuration = config;
    job.results = results;
    job.craneUnitId = config.craneUnitId;
    const overrides = await manager.findBy(JobOverride, { jobId: job.id });
    const dropped = overrides.filter((o) => !overrideStillApplies(results, o));
    if (dropped.length) await manager.delete(JobOverride, { id: In(dropped.map((o) => o.id)) });
    const planRegenerated = await refreshGeneratedDraft(manager, job, actor, context.now());
    return {
      type: 'configuration.set',
      role,
      data: {
        planRegenerated,
        windLimits: results.windLimits,
        weatherFreshMinutes: config.weatherFreshMinutes,
        configuration: config,
        figures: results.figures.map((f) => ({ key: f.key, value: f.value, status: f.status, overridable: f.overridable })),
        overridesWithdrawn: dropped.map((o) => ({ id: o.id, figureKey: o.figureKey })),
      },
    };
  });
}

/** A job supervisor asks to override a failing figure that may be overridden. */
export async function requestOverride(context: AppContext, actor: User, jobId: string, figureKey: string, reason: string, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: { action: 'request', figureKey, reason }, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, ['planning'], 'override a figure');
    const figure = job.results?.figures.find((f) => f.key === figureKey);
    if (!figure) throw badRequest('There is no such figure in the current configuration.', [{ path: 'figureKey', message: 'Unknown figure' }]);
    if (figure.status === 'pass' || figure.status === 'info') throw conflict('not_failing', `${figure.label} does not fail; there is nothing to override.`);
    if (!figure.overridable) throw conflict('not_overridable', `${figure.label} can never be overridden: change the configuration instead.`);
    if (await manager.existsBy(JobOverride, { jobId: job.id, figureKey })) throw conflict('override_exists', `An override for ${figure.label} has already been asked for.`);
    const override = manager.create(JobOverride, {
      id: randomUUID(),
      jobId: job.id,
      figureKey,
      figureLabel: figure.label,
      figureValue: figure.value,
      reason,
      requestedBy: actor.id,
      requestedAt: context.now().toISOString(),
      approvedBy: null,
      approvedAt: null,
    });
    await manager.save(override);
    return { type: 'override.requested', role, data: { override: { id: override.id, figureKey, figureLabel: figure.label, figureValue: figure.value, reason } } };
  });
}

/** A second person — another supervisor or an admin — approves an override. */
export async function approveOverride(context: AppContext, actor: User, jobId: string, overrideId: string, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: { action: 'approve', overrideId }, actor }, async (manager, job) => {
    requireState(job, ['planning'], 'approve an override');
    // The route asks the policy too; read again under the queue, so a crew change just committed counts.
    if (!can(actor, 'jobs.override', { crewRoles: await crewRolesOf(manager, job.id, actor.id) })) {
      throw forbidden('Only a supervisor in this job’s crew or an administrator can approve its overrides. Ask the job’s supervisor to add you to the crew.');
    }
    const override = await manager.findOneBy(JobOverride, { id: overrideId, jobId: job.id });
    if (!override) throw badRequest('There is no such override on this job.', [{ path: 'overrideId', message: 'Unknown override' }]);
    if (override.approvedBy) throw conflict('already_approved', 'This override is already approved.');
    if (override.requestedBy === actor.id) throw conflict('same_person', 'The person who asked for an override cannot approve it. Ask another supervisor or an administrator.');
    override.approvedBy = actor.id;
    override.approvedAt = context.now().toISOString();
    await manager.save(override);
    const role = actor.isAdmin ? 'admin' : 'supervisor';
    return { type: 'override.approved', role, data: { overrideId, figureKey: override.figureKey } };
  });
}

