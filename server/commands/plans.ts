import { planProblems, protectsMandatoryHold } from '../../shared/plan/index.js';
import type { Plan } from '../../shared/schemas/plan.js';
import type { AppContext } from '../context.js';
import { JobPlan } from '../entities/JobPlan.js';
import type { User } from '../entities/User.js';
import { badRequest, conflict, HttpError } from '../errors.js';
import { redactPlan } from '../presenters/plan.js';
import { readinessOf } from '../queries/jobs.js';
import { referencePlan, withFreshBriefing } from '../queries/plans.js';
import { saveDraft } from './plan-drafts.js';
import { runJobCommand, type CommandOutcome } from './job-writer.js';
import { planningRole, requireState } from './jobs.js';

/** Regenerates the draft from the current configuration, discarding hand edits. */
export async function generateDraft(context: AppContext, actor: User, jobId: string, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: { generate: true }, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, ['planning'], 'generate the plan');
    const plan = await referencePlan(manager, job);
    if (!plan) throw conflict('no_configuration', 'Save the configuration first: the plan is generated from it.');
    await saveDraft(manager, job, plan, actor, false, context.now());
    return { type: 'plan.generated', role, data: { plan: redactPlan(plan) } };
  });
}

/**
 * Saves a hand-edited draft. Mandatory holds and their required roles cannot be removed; other
 * problems (a cycle, an unreachable stage) are kept with the draft and stop `ready` instead.
 */
export async function editDraft(context: AppContext, actor: User, jobId: string, plan: Plan, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: plan, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, ['planning'], 'edit the plan (after ready, the plan changes only by a new version)');
    if (plan.kind !== job.kind) throw badRequest('The plan is for another kind of job.', [{ path: 'kind', message: `This job is ${job.kind}` }]);
    const problems = planProblems(plan, await referencePlan(manager, job));
    // Anything that weakens a mandatory hold (removed, a role gone, moved, bypassed, a required step gone) is refused outright.
    const refused = problems.filter((p) => protectsMandatoryHold(p) || p.code === 'duplicate_id');
    if (refused.length) {
      throw new HttpError(
        refused[0].code === 'duplicate_id' ? 400 : 409,
        refused[0].code === 'duplicate_id' ? 'validation' : 'mandatory_hold',
        refused[0].code === 'duplicate_id' ? 'Two parts of the plan share an id.' : `Mandatory holds keep their roles, their place and their required steps: ${refused[0].message}`,
        refused.map((p) => ({ path: p.path ?? 'plan', message: p.message })),
      );
    }
    const briefed = await withFreshBriefing(manager, job, plan);
    await saveDraft(manager, job, briefed, actor, true, context.now());
    return { type: 'plan.edited', role, data: { plan: redactPlan(briefed), problems: problems.map((p) => p.code) } };
  });
}

/** Locks plan version 1 and moves the job to ready, or refuses with every readiness reason. */
export async function makeReady(context: AppContext, actor: User, jobId: string, commandId?: string): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId, body: { ready: true }, actor }, async (manager, job) => {
    const role = await planningRole(manager, job, actor);
    requireState(job, ['planning'], 'make the job ready');
    const readiness = await readinessOf(manager, job);
    if (!readiness.ready) {
      throw new HttpError(409, 'not_ready', 'The job cannot leave planning yet.', readiness.reasons.map((r) => ({ path: r.code, message: r.message })));
    }
    const draft = await manager.findOneByOrFail(JobPlan, { jobId: job.id, version: 0 });
    const now = context.now().toISOString();
    await manager.save(JobPlan, { ...draft, version: 1, reason: 'locked at ready', createdBy: actor.id, createdAt: now });
    job.planVersion = 1;
    job.state = 'ready';
    return { type: 'job.ready', role, data: { state: 'ready', planVersion: 1, plan: redactPlan(draft.plan) } };
  });
}

