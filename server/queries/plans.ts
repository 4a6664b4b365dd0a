import { createHash } from 'node:crypto';
import canonicalize from 'canonicalize';
import type { EntityManager } from 'typeorm';
import { buildBriefing, generatePlan, holdsNeedPeople, planProblems, type GeneratePlanInput } from '../../shared/plan/index.js';
import type { Plan, PlanProblem } from '../../shared/schemas/plan.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import type { Job } from '../entities/Job.js';
import { JobCrew } from '../entities/JobCrew.js';
import { JobPlan } from '../entities/JobPlan.js';

/** Hash of what a draft is generated from, so a later configuration marks it stale. */
export function planSourceHash(job: Job): string {
  return createHash('sha256').update(canonicalize({ configuration: job.configuration, commsPlan: job.commsPlan, kind: job.kind }) ?? '').digest('hex');
}

/** The plan the configuration generates now: the reference a hand-edited draft is checked against. */
export async function referencePlan(manager: EntityManager, job: Job): Promise<Plan | null> {
  const input = await generateInputOf(manager, job);
  return input ? generatePlan(input) : null;
}

/** What plans for this job are generated from; null before a configuration is saved. */
async function generateInputOf(manager: EntityManager, job: Job): Promise<GeneratePlanInput | null> {
  if (!job.configuration || !job.results) return null;
  const unit = await manager.findOneByOrFail(CraneUnit, { id: job.craneUnitId });
  const model = await manager.findOneByOrFail(CraneModel, { id: unit.modelId });
  return { kind: job.kind, configuration: job.configuration, results: job.results, arrangement: model.arrangement, commsPlan: job.commsPlan };
}

/** A hand-edited plan with its briefing rebuilt from its own stages, so holds are listed as edited. */
export async function withFreshBriefing(manager: EntityManager, job: Job, plan: Plan): Promise<Plan> {
  const input = await generateInputOf(manager, job);
  return input ? { ...plan, briefing: buildBriefing(input, plan.stages) } : plan;
}

/** The problems of a draft: its structure against the generated reference, and whether the crew can acknowledge every hold. */
export async function planProblemsOf(manager: EntityManager, job: Job, plan: Plan): Promise<PlanProblem[]> {
  const crew = await manager.findBy(JobCrew, { jobId: job.id });
  return [...planProblems(plan, await referencePlan(manager, job)), ...holdsNeedPeople(plan, crew.map((c) => ({ userId: c.userId, role: c.role })))];
}

/** The plan's own reasons for not being ready, for the readiness check. */
export async function planReadinessReasons(manager: EntityManager, job: Job): Promise<{ code: string; message: string }[]> {
  const draft = await manager.findOneBy(JobPlan, { jobId: job.id, version: 0 });
  if (!draft) return job.configuration ? [{ code: 'no_plan', message: 'The plan has not been generated yet. Generate it from the configuration.' }] : [];
  const reasons: { code: string; message: string }[] = [];
  if (draft.sourceHash !== planSourceHash(job)) {
    reasons.push({ code: 'plan_stale', message: 'The plan was made for an earlier configuration or communications plan. Generate it again, or review your edits and save them.' });
  }
  for (const p of await planProblemsOf(manager, job, draft.plan)) reasons.push({ code: `plan_${p.code}`, message: p.message });
  return reasons;
}
