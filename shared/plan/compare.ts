import type { Plan, PlanStage, PlanStep } from '../schemas/plan.js';

/** Two versions of a plan compared by ids and text, for the version list and the revision record. */

export interface StageChange {
  stageId: string;
  title: string;
  /** What differs, in words: "title", "hold", "starts after", ... */
  what: string[];
}

export interface StepChange {
  stepId: string;
  stageTitle: string;
  /** The step's text in the newer plan, or the older one for a removed step. */
  text: string;
  /** For a changed step: its text before, when the text itself changed. */
  before?: string;
  what: string[];
}

export interface PlanComparison {
  stages: { added: StageChange[]; removed: StageChange[]; changed: StageChange[] };
  steps: { added: StepChange[]; removed: StepChange[]; changed: StepChange[] };
  /** Nothing differs. */
  same: boolean;
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

function stageDifferences(a: PlanStage, b: PlanStage, orderMoved: boolean): string[] {
  const what: string[] = [];
  if (a.title !== b.title) what.push('title');
  if (a.summary !== b.summary) what.push('summary');
  if (!same(a.cautions, b.cautions)) what.push('cautions');
  if (!same([...a.dependsOn].sort(), [...b.dependsOn].sort())) what.push('starts after');
  if (a.involvesCraneMovement !== b.involvesCraneMovement) what.push('crane movement');
  if (!same(a.hold, b.hold)) what.push(a.hold && b.hold ? 'hold' : a.hold ? 'hold removed' : 'hold added');
  if (orderMoved) what.push('place in the order');
  return what;
}

function stepDifferences(a: PlanStep, b: PlanStep): string[] {
  const what: string[] = [];
  if (a.text !== b.text) what.push('text');
  if (!same([...a.allowedRoles].sort(), [...b.allowedRoles].sort())) what.push('roles');
  if (a.requiresPhoto !== b.requiresPhoto) what.push('photo');
  if (!same(a.records, b.records)) what.push('recorded value');
  if ((a.caution ?? '') !== (b.caution ?? '')) what.push('caution');
  return what;
}

/** What changed from `older` to `newer`: stages and steps matched by id, then compared field by field. */
export function comparePlans(older: Plan, newer: Plan): PlanComparison {
  const olderStages = new Map(older.stages.map((s, i) => [s.id, { stage: s, index: i }]));
  const newerStages = new Map(newer.stages.map((s, i) => [s.id, { stage: s, index: i }]));
  const olderSteps = new Map(older.stages.flatMap((s) => s.steps.map((step) => [step.id, { step, stage: s }] as const)));
  const newerSteps = new Map(newer.stages.flatMap((s) => s.steps.map((step) => [step.id, { step, stage: s }] as const)));

  // The relative order of the stages both versions share, so adding one does not mark every later stage as moved.
  const sharedOld = older.stages.filter((s) => newerStages.has(s.id)).map((s) => s.id);
  const sharedNew = newer.stages.filter((s) => olderStages.has(s.id)).map((s) => s.id);

  const out: PlanComparison = { stages: { added: [], removed: [], changed: [] }, steps: { added: [], removed: [], changed: [] }, same: true };
  for (const s of newer.stages) {
    const before = olderStages.get(s.id);
    if (!before) {
      out.stages.added.push({ stageId: s.id, title: s.title, what: [] });
      continue;
    }
    const what = stageDifferences(before.stage, s, sharedOld.indexOf(s.id) !== sharedNew.indexOf(s.id));
    if (what.length) out.stages.changed.push({ stageId: s.id, title: s.title, what });
  }
  for (const s of older.stages) if (!newerStages.has(s.id)) out.stages.removed.push({ stageId: s.id, title: s.title, what: [] });

  for (const [id, { step, stage }] of newerSteps) {
    const before = olderSteps.get(id);
    if (!before) {
      out.steps.added.push({ stepId: id, stageTitle: stage.title, text: step.text, what: [] });
      continue;
    }
    const what = stepDifferences(before.step, step);
    if (before.stage.id !== stage.id) what.push('stage');
    if (what.length) out.steps.changed.push({ stepId: id, stageTitle: stage.title, text: step.text, ...(before.step.text !== step.text ? { before: before.step.text } : {}), what });
  }
  for (const [id, { step, stage }] of olderSteps) if (!newerSteps.has(id)) out.steps.removed.push({ stepId: id, stageTitle: stage.title, text: step.text, what: [] });

  out.same = [out.stages, out.steps].every((g) => g.added.length + g.removed.length + g.changed.length === 0);
  return out;
}
