import type { EntityManager } from 'typeorm';
import type { Plan } from '../../shared/schemas/plan.js';
import type { Job } from '../entities/Job.js';
import { JobPlan } from '../entities/JobPlan.js';
import type { User } from '../entities/User.js';
import { planSourceHash, referencePlan } from '../queries/plans.js';

/** Writes the draft (version 0) inside the caller's transaction. */
export async function saveDraft(manager: EntityManager, job: Job, plan: Plan, actor: User, edited: boolean, now: Date): Promise<void> {
  await manager.save(JobPlan, {
    jobId: job.id,
    version: 0,
    plan,
    sourceHash: planSourceHash(job),
    edited,
    reason: edited ? 'edited by hand' : 'generated from the configuration',
    createdBy: actor.id,
    createdAt: now.toISOString(),
  });
}

/**
 * Regenerates the draft after the configuration or communications plan changed, unless someone
 * edited it by hand (then it is only marked stale). Returns whether it regenerated.
 */
export async function refreshGeneratedDraft(manager: EntityManager, job: Job, actor: User, now: Date): Promise<boolean> {
  const draft = await manager.findOneBy(JobPlan, { jobId: job.id, version: 0 });
  if (draft?.edited) return false;
  const plan = await referencePlan(manager, job);
  if (!plan) return false;
  await saveDraft(manager, job, plan, actor, false, now);
  return true;
}
