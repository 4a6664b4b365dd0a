import type { CrewRole } from '../schemas/jobs.js';
import type { Plan, PlanHold, PlanStage, PlanStep } from '../schemas/plan.js';

/**
 * Pure helpers on a plan draft, used by the plan editor and the board's revision form. They change
 * the plan they are given (the store hands them its draft) and keep every stage, step and hold id
 * unique, as the server insists.
 */

/** The answer of a helper that may refuse: the refusal is a sentence for the screen. */
export type HelperResult = { ok: true } | { ok: false; reason: string };

export const refused = (reason: string): HelperResult => ({ ok: false, reason });
export const done: HelperResult = { ok: true };

/** Every id used in the plan: stages, steps and holds share one namespace on the server. */
export function planIds(plan: Plan): Set<string> {
  const ids = new Set<string>();
  for (const stage of plan.stages) {
    ids.add(stage.id);
    for (const step of stage.steps) ids.add(step.id);
    if (stage.hold) ids.add(stage.hold.id);
  }
  return ids;
}

/** A new id of our own (`custom-…`) that the plan does not use yet. */
export function newPlanId(plan: Plan, random: () => number = Math.random): string {
  const taken = planIds(plan);
  for (;;) {
    const id = `custom-${Math.floor(random() * 36 ** 8).toString(36).padStart(8, '0')}`;
    if (!taken.has(id)) return id;
  }
}

/** Why a stage cannot be removed, or '' when it can. */
export function stageRemovalBlock(stage: PlanStage): string {
  return stage.hold?.mandatory ? `Its hold “${stage.hold.title}” is mandatory, and a mandatory hold can never be removed.` : '';
}

/** Why a hold cannot be removed, or '' when it can. */
export function holdRemovalBlock(hold: PlanHold): string {
  return hold.mandatory ? 'This hold is mandatory: it can never be removed or skipped.' : '';
}

function move<T>(list: T[], index: number, delta: number): boolean {
  const to = index + delta;
  if (index < 0 || index >= list.length || to < 0 || to >= list.length) return false;
  const [item] = list.splice(index, 1);
  list.splice(to, 0, item);
  return true;
}

/** Moves a stage up (delta −1) or down (+1). Dependencies stay as they are: they, not the order, decide when a stage starts. */
export function moveStage(plan: Plan, index: number, delta: -1 | 1): HelperResult {
  return move(plan.stages, index, delta) ? done : refused(delta < 0 ? 'This is already the first stage.' : 'This is already the last stage.');
}

/** A blank step a supervisor then words; by default the supervisor and riggers may complete it. */
export function blankStep(plan: Plan): PlanStep {
  return { id: newPlanId(plan), text: 'New step: say what is done', allowedRoles: ['supervisor', 'rigger'], requiresPhoto: false, records: null, caution: null };
}

/**
 * Adds a stage after `afterIndex` (−1: at the top). It starts after the stage above it, the
 * default the board uses, and comes with one step to word.
 */
export function addStage(plan: Plan, afterIndex: number): PlanStage {
  const above = plan.stages[afterIndex];
  const stage: PlanStage = {
    id: newPlanId(plan),
    title: 'New stage',
    summary: '',
    dependsOn: above ? [above.id] : [],
    cautions: [],
    involvesCraneMovement: false,
    steps: [],
    hold: null,
  };
  plan.stages.splice(afterIndex + 1, 0, stage);
  stage.steps.push(blankStep(plan));
  return stage;
}

/**
 * Removes a stage unless its hold is mandatory. Stages that waited for it wait instead for what
 * it waited for, so removing a stage never leaves a dependency on nothing.
 */
export function removeStage(plan: Plan, index: number): HelperResult {
  const stage = plan.stages[index];
  if (!stage) return refused('There is no such stage.');
  const block = stageRemovalBlock(stage);
  if (block) return refused(block);
  plan.stages.splice(index, 1);
  for (const other of plan.stages) {
    if (!other.dependsOn.includes(stage.id)) continue;
    const inherited = stage.dependsOn.filter((d) => d !== other.id);
    other.dependsOn = [...new Set(other.dependsOn.flatMap((d) => (d === stage.id ? inherited : [d])))];
  }
  return done;
}

/** Adds a blank step after `afterIndex` (the end when omitted). */
export function addStep(plan: Plan, stageIndex: number, afterIndex?: number): PlanStep | null {
  const stage = plan.stages[stageIndex];
  if (!stage) return null;
  const step = blankStep(plan);
  stage.steps.splice(afterIndex === undefined ? stage.steps.length : afterIndex + 1, 0, step);
  return step;
}

export function removeStep(plan: Plan, stageIndex: number, stepIndex: number): HelperResult {
  const stage = plan.stages[stageIndex];
  if (!stage?.steps[stepIndex]) return refused('There is no such step.');
  stage.steps.splice(stepIndex, 1);
  return done;
}

export function moveStep(plan: Plan, stageIndex: number, stepIndex: number, delta: -1 | 1): HelperResult {
  const stage = plan.stages[stageIndex];
  if (!stage) return refused('There is no such stage.');
  return move(stage.steps, stepIndex, delta) ? done : refused(delta < 0 ? 'This is already the first step.' : 'This is already the last step.');
}

/** Gives a stage without a hold a new, non-mandatory one that the supervisor releases. */
export function addHold(plan: Plan, stageIndex: number): HelperResult {
  const stage = plan.stages[stageIndex];
  if (!stage) return refused('There is no such stage.');
  if (stage.hold) return refused('This stage already has its hold: a stage has at most one.');
  stage.hold = {
    id: newPlanId(plan),
    title: `${stage.title}: checked`,
    instruction: 'Say what each person checks before acknowledging.',
    requiredRoles: ['supervisor'],
    releasingRole: 'supervisor',
    mandatory: false,
    valueCheck: null,
  };
  return done;
}

export function removeHold(plan: Plan, stageIndex: number): HelperResult {
  const hold = plan.stages[stageIndex]?.hold;
  if (!hold) return refused('This stage has no hold.');
  const block = holdRemovalBlock(hold);
  if (block) return refused(block);
  plan.stages[stageIndex].hold = null;
  return done;
}

/** Removes one field of a hold's value check; a mandatory hold's check stays as generated. */
export function removeValueCheckField(plan: Plan, stageIndex: number, fieldIndex: number): HelperResult {
  const hold = plan.stages[stageIndex]?.hold;
  if (!hold?.valueCheck?.fields[fieldIndex]) return refused('There is no such value check field.');
  if (hold.mandatory) return refused('The value check of a mandatory hold is part of what makes it safe: it stays as generated.');
  hold.valueCheck.fields.splice(fieldIndex, 1);
  if (hold.valueCheck.fields.length === 0) hold.valueCheck = null;
  return done;
}

/**
 * The roles of a mandatory hold that may not be unticked: those the last saved plan has. The
 * server checks against the plan generated from the configuration; the saved copy is the
 * closest thing the client holds, and roles added since can still be taken away again.
 */
export function lockedHoldRoles(saved: Plan | null, hold: PlanHold): CrewRole[] {
  if (!hold.mandatory || !saved) return [];
  for (const stage of saved.stages) if (stage.hold?.id === hold.id) return stage.hold.mandatory ? [...stage.hold.requiredRoles] : [];
  return [];
}

/** Ticks or unticks a role a hold asks to acknowledge, refusing to untick a locked one. */
export function setHoldRole(plan: Plan, stageIndex: number, role: CrewRole, on: boolean, saved: Plan | null): HelperResult {
  const hold = plan.stages[stageIndex]?.hold;
  if (!hold) return refused('This stage has no hold.');
  if (on) {
    if (!hold.requiredRoles.includes(role)) hold.requiredRoles.push(role);
    return done;
  }
  if (lockedHoldRoles(saved, hold).includes(role)) return refused('A mandatory hold’s roles can be added to, never removed.');
  hold.requiredRoles = hold.requiredRoles.filter((r) => r !== role);
  return done;
}

/** The stage index a problem or field path ("stages.3.hold.requiredRoles") points at, or null. */
export function stageIndexOfPath(path: string | undefined): number | null {
  const match = /^stages\.(\d+)(\.|$)/.exec(path ?? '');
  return match ? Number(match[1]) : null;
}

/** A change to one stage in a revision made on the board (after a defect, say). */
export interface RevisionChange {
  stageId: string;
  removeStepIds: string[];
  addStep: { text: string; roles: CrewRole[]; requiresPhoto: boolean } | null;
}

/**
 * The plan with one stage changed: steps removed, and a replacement step appended with a new id
 * from the same maker the plan editor uses. Reworded steps are already in `plan`; the server checks
 * the rest (mandatory holds, ids, dependencies). The plan given is not changed.
 */
export function revisePlan(plan: Plan, change: RevisionChange, random: () => number = Math.random): Plan {
  const stages = plan.stages.map((stage) => {
    if (stage.id !== change.stageId) return stage;
    const steps = stage.steps.filter((s) => !change.removeStepIds.includes(s.id)).map((s) => ({ ...s, text: s.text.trim() }));
    if (change.addStep) {
      // Against the plan as given: a removed step's id stays taken, so the new step never reuses it.
      steps.push({ id: newPlanId(plan, random), text: change.addStep.text, allowedRoles: change.addStep.roles, requiresPhoto: change.addStep.requiresPhoto, records: null, caution: null });
    }
    return { ...stage, steps };
  });
  return { ...plan, stages };
}
