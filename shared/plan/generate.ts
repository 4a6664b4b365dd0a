/**
 * Turns a configuration and its computed results into a plan: the erection or dismantling
 * template with the stages, steps and holds this configuration needs, one step per joint and per
 * guy line so the plan's pin count is the computed one, and the briefing.
 *
 * Deterministic: the same input gives the same plan, ids included (stage-draft.ts says why the ids
 * name things). The stages are built in erection.ts and dismantling.ts from the pieces in
 * common-steps.ts.
 */
import type { Plan } from '../schemas/plan.js';
import { buildBriefing } from './briefing.js';
import { dismantlingStagesFor } from './dismantling.js';
import { erectionStagesFor } from './erection.js';
import { createContext } from './stage-draft.js';
import type { GeneratePlanInput } from './types.js';

/** The plan for a configuration: the erection or dismantling template filled in, and its briefing. */
export function generatePlan(input: GeneratePlanInput): Plan {
  const ctx = createContext(input);
  const stages = input.kind === 'erection' ? erectionStagesFor(ctx) : dismantlingStagesFor(ctx);
  return { kind: input.kind, stages, briefing: buildBriefing(input, stages) };
}
