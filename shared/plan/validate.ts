/**
 * Checks on a plan before it is locked, and the dependency rule the board uses.
 *
 * planProblems: the structure (duplicate ids, unknown dependencies, cycles, stages that can never
 * start, holds nobody can acknowledge, in-stage order) and, against a reference plan, what an edit
 * may never weaken: a mandatory hold's existence, roles and value check, its place (every stage
 * and step it gated in the reference still waits for it), the steps the template marks required,
 * the reference's in-stage order, and what each reading is held to.
 *
 * The reference is the plan generated from the same configuration (hand-edited drafts, and
 * revisions on the live board, whose configuration is locked). Because a plan carries its own
 * `required`, `after` and `check`, a previous plan version works as a reference too:
 * `revisionProblems` checks a revision against both.
 *
 * holdsNeedPeople: whether the crew can acknowledge every hold with a different person per role.
 * activeStages: the stages whose dependencies are all done.
 */
import type { CrewRole } from '../schemas/jobs.js';
import type { Plan, PlanHold, PlanProblem, PlanStage, PlanStep, StepRecord } from '../schemas/plan.js';
import { qualificationLabels } from '../schemas/users.js';
import { listWords } from '../text';

/** One crew entry: a person under one role (a person may appear under several). */
export interface CrewSlot {
  userId: string;
  role: CrewRole;
}

function roleName(role: string): string {
  return (qualificationLabels as Record<string, string>)[role]?.toLowerCase() ?? role;
}

function duplicateIds(plan: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const seen = new Map<string, string>();
  const visit = (id: string, path: string) => {
    const first = seen.get(id);
    if (first !== undefined) {
      problems.push({ code: 'duplicate_id', message: `The id “${id}” is used twice (also at ${first}). Give each stage, step and hold its own id.`, path });
    } else {
      seen.set(id, path);
    }
  };
  plan.stages.forEach((s, i) => {
    visit(s.id, `stages.${i}.id`);
    s.steps.forEach((step, j) => visit(step.id, `stages.${i}.steps.${j}.id`));
    if (s.hold) visit(s.hold.id, `stages.${i}.hold.id`);
  });
  return problems;
}

/** Strongly connected components that form a cycle (more than one stage, or a stage waiting for itself). Tarjan's algorithm. */
function cycles(plan: Plan, index: Map<string, number>): number[][] {
  const n = plan.stages.length;
  const order = new Array<number>(n).fill(-1);
  const low = new Array<number>(n).fill(0);
  const onStack = new Array<boolean>(n).fill(false);
  const stack: number[] = [];
  const found: number[][] = [];
  let counter = 0;
  const edges = (v: number) => plan.stages[v].dependsOn.map((d) => index.get(d)).filter((w): w is number => w !== undefined);

  // Iterative, so a long chain of stages cannot overflow the call stack.
  for (let root = 0; root < n; root += 1) {
    if (order[root] !== -1) continue;
    const work: { v: number; next: number }[] = [{ v: root, next: 0 }];
    order[root] = low[root] = counter++;
    stack.push(root);
    onStack[root] = true;
    while (work.length > 0) {
      const frame = work[work.length - 1];
      const out = edges(frame.v);
      if (frame.next < out.length) {
        const w = out[frame.next++];
        if (order[w] === -1) {
          order[w] = low[w] = counter++;
          stack.push(w);
          onStack[w] = true;
          work.push({ v: w, next: 0 });
        } else if (onStack[w]) {
          low[frame.v] = Math.min(low[frame.v], order[w]);
        }
        continue;
      }
      work.pop();
      if (work.length > 0) low[work[work.length - 1].v] = Math.min(low[work[work.length - 1].v], low[frame.v]);
      if (low[frame.v] === order[frame.v]) {
        const component: number[] = [];
        let w: number;
        do {
          w = stack.pop() as number;
          onStack[w] = false;
          component.push(w);
        } while (w !== frame.v);
        const selfLoop = component.length === 1 && edges(component[0]).includes(component[0]);
        if (component.length > 1 || selfLoop) found.push(component.sort((a, b) => a - b));
      }
    }
  }
  return found;
}

/** Indexes of the stages that can ever start: every stage they wait for exists and can start. */
function startable(plan: Plan): Set<number> {
  const index = new Map<string, number>();
  plan.stages.forEach((s, i) => {
    if (!index.has(s.id)) index.set(s.id, i);
  });
  const canStart = new Set<number>();
  for (let changed = true; changed; ) {
    changed = false;
    plan.stages.forEach((s, i) => {
      if (canStart.has(i)) return;
      if (s.dependsOn.every((d) => index.has(d) && canStart.has(index.get(d) as number))) {
        canStart.add(i);
        changed = true;
      }
    });
  }
  return canStart;
}

function dependencyProblems(plan: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const index = new Map<string, number>();
  plan.stages.forEach((s, i) => {
    if (!index.has(s.id)) index.set(s.id, i);
  });
  const hasUnknown = new Set<number>();
  plan.stages.forEach((s, i) => {
    s.dependsOn.forEach((d, j) => {
      if (!index.has(d)) {
        hasUnknown.add(i);
        problems.push({ code: 'unknown_dependency', message: `Stage “${s.title}” waits for “${d}”, which is not a stage of this plan. Choose an existing stage.`, path: `stages.${i}.dependsOn.${j}` });
      }
    });
  });
  const inCycle = new Set<number>();
  for (const component of cycles(plan, index)) {
    component.forEach((i) => inCycle.add(i));
    const names = component.map((i) => `“${plan.stages[i].title}”`);
    problems.push({
      code: 'cycle',
      message: component.length === 1
        ? `Stage ${names[0]} waits for itself, so it can never start. Remove that dependency.`
        : `Stages ${listWords(names)} wait for each other in a circle, so none of them can ever start. Remove one of those dependencies.`,
      path: `stages.${component[0]}.dependsOn`,
    });
  }
  // A stage can start once everything it waits for can; repeat until nothing changes.
  const canStart = new Set<number>();
  for (let changed = true; changed; ) {
    changed = false;
    plan.stages.forEach((s, i) => {
      if (canStart.has(i)) return;
      if (s.dependsOn.every((d) => index.has(d) && canStart.has(index.get(d) as number))) {
        canStart.add(i);
        changed = true;
      }
    });
  }
  plan.stages.forEach((s, i) => {
    if (canStart.has(i) || inCycle.has(i) || hasUnknown.has(i)) return;
    const blocker = s.dependsOn.find((d) => !canStart.has(index.get(d) as number)) ?? '';
    const blockerTitle = plan.stages[index.get(blocker) as number]?.title ?? blocker;
    problems.push({ code: 'unreachable', message: `Stage “${s.title}” can never start: it waits for “${blockerTitle}”, which can never start.`, path: `stages.${i}.dependsOn` });
  });
  return problems;
}

function holdRoleProblems(plan: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  plan.stages.forEach((s, i) => {
    const h = s.hold;
    if (!h) return;
    const acknowledging = h.requiredRoles.filter((r) => r !== 'viewer');
    if (acknowledging.length === 0) {
      problems.push({ code: 'no_acknowledging_role', message: `Hold “${h.title}” names nobody to acknowledge it. Add at least one crew role.`, path: `stages.${i}.hold.requiredRoles` });
    } else if (acknowledging.length < h.requiredRoles.length) {
      // A viewer only reads the board, so a hold waiting for one could never be released.
      problems.push({ code: 'no_acknowledging_role', message: `Hold “${h.title}” asks a viewer to acknowledge, and viewers cannot. Remove the viewer role.`, path: `stages.${i}.hold.requiredRoles` });
    }
  });
  return problems;
}

function countRoles(roles: readonly string[]): Map<string, number> {
  const m = new Map<string, number>();
  for (const r of roles) m.set(r, (m.get(r) ?? 0) + 1);
  return m;
}

function mandatoryProblems(plan: Plan, reference: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const holds = new Map<string, { hold: PlanHold; index: number }>();
  plan.stages.forEach((s, i) => {
    if (s.hold && !holds.has(s.hold.id)) holds.set(s.hold.id, { hold: s.hold, index: i });
  });
  for (const refStage of reference.stages) {
    const ref = refStage.hold;
    if (!ref || !ref.mandatory) continue;
    const found = holds.get(ref.id);
    if (!found) {
      const stageIndex = plan.stages.findIndex((s) => s.id === refStage.id);
      problems.push({
        code: 'mandatory_hold_removed',
        message: `The mandatory hold “${ref.title}” of stage “${refStage.title}” was removed. A mandatory hold can never be removed; put it back.`,
        ...(stageIndex >= 0 ? { path: `stages.${stageIndex}.hold` } : {}),
      });
      continue;
    }
    const path = `stages.${found.index}.hold`;
    if (!found.hold.mandatory) {
      problems.push({ code: 'mandatory_hold_removed', message: `The hold “${ref.title}” was marked not mandatory. It can never be skipped; mark it mandatory again.`, path: `${path}.mandatory` });
    }
    const have = countRoles(found.hold.requiredRoles);
    for (const [role, needed] of countRoles(ref.requiredRoles)) {
      if ((have.get(role) ?? 0) < needed) {
        problems.push({ code: 'mandatory_role_removed', message: `The mandatory hold “${ref.title}” no longer asks the ${roleName(role)} to acknowledge. Roles can be added to it, never removed.`, path: `${path}.requiredRoles` });
      }
    }
    // A value check is part of what makes the hold safe: dropping or changing a field weakens it.
    for (const field of ref.valueCheck?.fields ?? []) {
      const now = found.hold.valueCheck?.fields.find((f) => f.field === field.field);
      if (!now || now.expected !== field.expected) {
        problems.push({
          code: 'mandatory_hold_removed',
          message: `The value check of the mandatory hold “${ref.title}” no longer expects ${field.field} = ${field.expected} from the configuration. Put the check back as generated.`,
          path: `${path}.valueCheck`,
        });
      }
    }
  }
  return problems;
}

/** Steps that wait for each other in a circle within one stage (Kahn's algorithm: what can never be done). */
function stepCycle(stage: PlanStage): PlanStep[] {
  const ids = new Set(stage.steps.map((s) => s.id));
  const done = new Set<string>();
  for (let changed = true; changed; ) {
    changed = false;
    for (const s of stage.steps) {
      if (done.has(s.id)) continue;
      if ((s.after ?? []).every((a) => !ids.has(a) || done.has(a))) {
        done.add(s.id);
        changed = true;
      }
    }
  }
  return stage.steps.filter((s) => !done.has(s.id));
}

/**
 * In-stage order: `after` names steps of the same stage, never the step itself, and never in a
 * circle. An id that is no step of the plan at all (a step removed in an edit or a revision) is
 * left alone: an order to a step that is gone keeps nothing from anyone, and the board ignores it.
 */
function stepOrderProblems(plan: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const stageOfStep = new Map<string, PlanStage>();
  for (const s of plan.stages) for (const st of s.steps) if (!stageOfStep.has(st.id)) stageOfStep.set(st.id, s);
  plan.stages.forEach((stage, i) => {
    const ids = new Set(stage.steps.map((s) => s.id));
    stage.steps.forEach((step, j) => {
      (step.after ?? []).forEach((a, k) => {
        if (a === step.id) {
          problems.push({ code: 'step_order', message: `Step “${step.text}” of stage “${stage.title}” waits for itself, so it can never be done. Remove that order.`, path: `stages.${i}.steps.${j}.after.${k}` });
        } else if (!ids.has(a) && stageOfStep.has(a)) {
          problems.push({
            code: 'step_order',
            message: `Step “${step.text}” of stage “${stage.title}” waits for a step of stage “${stageOfStep.get(a)?.title ?? ''}”. A step can wait only for steps of its own stage; make the stages wait for each other instead.`,
            path: `stages.${i}.steps.${j}.after.${k}`,
          });
        }
      });
    });
    const circle = stepCycle(stage).filter((s) => !(s.after ?? []).includes(s.id));
    if (circle.length > 0) {
      problems.push({
        code: 'step_order',
        message: `In stage “${stage.title}”, steps ${listWords(circle.map((s) => `“${s.text}”`))} wait for each other in a circle (or for one that does), so none of them can ever be done. Remove one of those orders.`,
        path: `stages.${i}.steps`,
      });
    }
  });
  return problems;
}

/** Where each stage, step and hold sits in a plan, and which holds every stage waits for. */
class PlanIndex {
  readonly stageIndex = new Map<string, number>();
  /** Step id → stage index and step index (first occurrence). */
  readonly stepAt = new Map<string, { stage: number; step: number }>();
  /** Hold id → index of the stage that carries it. */
  readonly holdAt = new Map<string, number>();
  private readonly upstreamCache = new Map<number, Set<number>>();

  constructor(readonly plan: Plan) {
    plan.stages.forEach((s, i) => {
      if (!this.stageIndex.has(s.id)) this.stageIndex.set(s.id, i);
      s.steps.forEach((st, j) => {
        if (!this.stepAt.has(st.id)) this.stepAt.set(st.id, { stage: i, step: j });
      });
      if (s.hold && !this.holdAt.has(s.hold.id)) this.holdAt.set(s.hold.id, i);
    });
  }

  /** Every stage this stage waits for, directly or not (not itself). */
  upstream(stage: number): Set<number> {
    const cached = this.upstreamCache.get(stage);
    if (cached) return cached;
    const seen = new Set<number>();
    const queue = [...this.plan.stages[stage].dependsOn];
    while (queue.length > 0) {
      const i = this.stageIndex.get(queue.shift() as string);
      if (i === undefined || seen.has(i)) continue;
      seen.add(i);
      queue.push(...this.plan.stages[i].dependsOn);
    }
    seen.delete(stage);
    this.upstreamCache.set(stage, seen);
    return seen;
  }

  /** Ids of the holds (mandatory ones only, or all) of the stages this stage waits for. */
  holdsBefore(stage: number, mandatoryOnly: boolean): Set<string> {
    const out = new Set<string>();
    for (const i of this.upstream(stage)) {
      const h = this.plan.stages[i].hold;
      if (h && (!mandatoryOnly || h.mandatory)) out.add(h.id);
    }
    return out;
  }
}

/**
 * A mandatory hold keeps its place: it stays in its stage, every stage that waited for it in the
 * reference still does (directly or not), and a step that was behind it is not moved in front of it.
 */
function gatingProblems(plan: Plan, reference: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const ref = new PlanIndex(reference);
  const now = new PlanIndex(plan);
  const refHold = new Map<string, { hold: PlanHold; stage: PlanStage }>();
  for (const s of reference.stages) if (s.hold?.mandatory) refHold.set(s.hold.id, { hold: s.hold, stage: s });

  // The hold stays in the stage it closes: its steps are what it attests.
  for (const [holdId, { hold, stage }] of refHold) {
    const at = now.holdAt.get(holdId);
    if (at !== undefined && plan.stages[at].id !== stage.id) {
      problems.push({
        code: 'mandatory_hold_bypassed',
        message: `The mandatory hold “${hold.title}” belongs to stage “${stage.title}” and was moved to stage “${plan.stages[at].title}”. Put it back where it was.`,
        path: `stages.${at}.hold`,
      });
    }
  }
  const inPlace = (holdId: string) => {
    const at = now.holdAt.get(holdId);
    return at !== undefined && plan.stages[at].id === refHold.get(holdId)?.stage.id;
  };
  const missing = (needed: Set<string>, have: Set<string>) => [...needed].filter((h) => inPlace(h) && !have.has(h));

  // Which stages lost which hold; a stage is named only where the gating first breaks, not every
  // stage after it that lost the hold through it.
  // A stage that can never start (a cycle, an unknown stage) bypasses nothing: those problems are reported on their own.
  const canStart = startable(plan);
  const lost = new Map<number, string[]>();
  reference.stages.forEach((refStage, r) => {
    const i = now.stageIndex.get(refStage.id);
    if (i === undefined || !canStart.has(i)) return;
    const gone = missing(ref.holdsBefore(r, true), now.holdsBefore(i, false));
    if (gone.length > 0) lost.set(i, gone);
  });
  for (const [i, gone] of lost) {
    const upstream = now.upstream(i);
    for (const h of gone) {
      if ([...upstream].some((u) => lost.get(u)?.includes(h))) continue;
      const gate = refHold.get(h);
      if (!gate) continue;
      problems.push({
        code: 'mandatory_hold_bypassed',
        message: `Stage “${plan.stages[i].title}” no longer waits for the mandatory hold “${gate.hold.title}” of stage “${gate.stage.title}”, which protects it. Make it wait for that stage again, directly or through the stages after it.`,
        path: `stages.${i}.dependsOn`,
      });
    }
  }

  // A stage added by hand waits at least for the holds every other stage waits for (the site hold:
  // nothing on the job moves before it is released).
  const waitedByAll = reference.stages
    .map((_s, r) => ref.holdsBefore(r, true))
    .filter((set, r) => reference.stages[r].dependsOn.length > 0 || set.size > 0)
    .reduce<Set<string> | null>((acc, set) => (acc ? new Set([...acc].filter((h) => set.has(h))) : new Set(set)), null);
  plan.stages.forEach((s, i) => {
    if (ref.stageIndex.has(s.id) || !canStart.has(i)) return;
    for (const h of missing(waitedByAll ?? new Set(), now.holdsBefore(i, false))) {
      const gate = refHold.get(h);
      if (!gate) continue;
      problems.push({
        code: 'mandatory_hold_bypassed',
        message: `The added stage “${s.title}” does not wait for the mandatory hold “${gate.hold.title}” of stage “${gate.stage.title}”, which every stage of the plan waits for. Make it wait for that stage.`,
        path: `stages.${i}.dependsOn`,
      });
    }
  });

  // A step moved to another stage must still be behind every mandatory hold it was behind.
  reference.stages.forEach((refStage, r) => {
    const needed = ref.holdsBefore(r, true);
    for (const refStep of refStage.steps) {
      const at = now.stepAt.get(refStep.id);
      if (!at || plan.stages[at.stage].id === refStage.id || !canStart.has(at.stage)) continue;
      // A step is done before its own stage's hold: only the holds of the stages it waits for count.
      const have = now.holdsBefore(at.stage, false);
      for (const h of missing(needed, have)) {
        const gate = refHold.get(h);
        if (!gate) continue;
        problems.push({
          code: 'mandatory_hold_bypassed',
          message: `Step “${refStep.text}” was moved to stage “${plan.stages[at.stage].title}”, which does not wait for the mandatory hold “${gate.hold.title}” of stage “${gate.stage.title}”. In the plan it comes after that hold; move it back.`,
          path: `stages.${at.stage}.steps.${at.step}`,
        });
      }
    }
  });
  return problems;
}

/** The mandatory hold a stage's steps protect, in words, for a refusal. */
function protectedWords(stage: PlanStage): string {
  return stage.hold?.mandatory
    ? `It protects the mandatory hold “${stage.hold.title}” of stage “${stage.title}”.`
    : `The plan marks it required in stage “${stage.title}”.`;
}

/** Steps the reference marks required stay, in the same stage; the reference's in-stage order stays. */
function requiredStepProblems(plan: Plan, reference: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const now = new PlanIndex(plan);
  reference.stages.forEach((refStage) => {
    const stageAt = now.stageIndex.get(refStage.id);
    for (const refStep of refStage.steps) {
      const at = now.stepAt.get(refStep.id);
      if (refStep.required) {
        if (!at) {
          problems.push({
            code: 'required_step_removed',
            message: `The step “${refStep.text}” was removed. ${protectedWords(refStage)} A required step can never be removed; put it back.`,
            ...(stageAt !== undefined ? { path: `stages.${stageAt}.steps` } : {}),
          });
          continue;
        }
        if (plan.stages[at.stage].id !== refStage.id) {
          problems.push({
            code: 'required_step_removed',
            message: `The step “${refStep.text}” was moved out of stage “${refStage.title}”. ${protectedWords(refStage)} Put it back in its stage.`,
            path: `stages.${at.stage}.steps.${at.step}`,
          });
          continue;
        }
      }
      if (!at || plan.stages[at.stage].id !== refStage.id) continue;
      // The order the reference asks for stays, directly or through other steps of the stage.
      const stage = plan.stages[at.stage];
      const before = stepsBefore(stage, refStep.id);
      for (const a of refStep.after ?? []) {
        if (!stage.steps.some((s) => s.id === a) || before.has(a)) continue;
        const first = stage.steps.find((s) => s.id === a);
        problems.push({
          code: 'step_order',
          message: `Step “${refStep.text}” of stage “${stage.title}” must come after “${first?.text ?? a}”, as the plan was generated. Put that order back.`,
          path: `stages.${at.stage}.steps.${at.step}.after`,
        });
      }
    }
  });
  return problems;
}

/** Every step a step waits for in its stage, directly or not. */
function stepsBefore(stage: PlanStage, stepId: string): Set<string> {
  const byId = new Map(stage.steps.map((s) => [s.id, s]));
  const seen = new Set<string>();
  const queue = [...(byId.get(stepId)?.after ?? [])];
  while (queue.length > 0) {
    const id = queue.shift() as string;
    if (seen.has(id)) continue;
    seen.add(id);
    queue.push(...(byId.get(id)?.after ?? []));
  }
  return seen;
}

type Check = NonNullable<StepRecord['check']>;

/** A check in words, for a refusal. */
function checkWords(c: Check, unit: string | null): string {
  const u = unit ? ` ${unit}` : '';
  switch (c.kind) {
    case 'plan':
      return `the plan’s figure ${c.planned}${u}${c.tolerance > 0 ? ` (±${c.tolerance}${u})` : ''}`;
    case 'max':
      return `at most ${c.limit}${u}`;
    case 'min':
      return `at least ${c.limit}${u}`;
    case 'wind':
      return `the ${c.phase} wind limit`;
  }
}

/** Is `now` at least as strict as `ref`? Same kind; a figure unchanged with no wider tolerance; a limit no looser; the same wind phase. */
function atLeastAsStrict(now: Check | null | undefined, ref: Check): boolean {
  if (!now || now.kind !== ref.kind) return false;
  switch (ref.kind) {
    case 'plan':
      return now.kind === 'plan' && now.planned === ref.planned && now.tolerance <= ref.tolerance;
    case 'max':
      return now.kind === 'max' && now.limit <= ref.limit;
    case 'min':
      return now.kind === 'min' && now.limit >= ref.limit;
    case 'wind':
      return now.kind === 'wind' && now.phase === ref.phase;
  }
}

/** A reading the reference compares stays compared, never against anything looser. */
function checkProblems(plan: Plan, reference: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  const now = new PlanIndex(plan);
  for (const refStage of reference.stages) {
    for (const refStep of refStage.steps) {
      const refCheck = refStep.records?.check;
      const at = now.stepAt.get(refStep.id);
      if (!refCheck || !at) continue;
      const step = plan.stages[at.stage].steps[at.step];
      const records = step.records;
      if (records?.kind === refStep.records?.kind && records?.unit === refStep.records?.unit && atLeastAsStrict(records?.check, refCheck)) continue;
      problems.push({
        code: 'check_weakened',
        message: `The reading of step “${refStep.text}” is no longer held to ${checkWords(refCheck, refStep.records?.unit ?? null)}${'source' in refCheck && refCheck.source ? ` (${refCheck.source})` : ''}. Put the check back as generated; change the configuration if the figure is wrong.`,
        path: `stages.${at.stage}.steps.${at.step}.records`,
      });
    }
  }
  return problems;
}

/** A stage the reference says raises, lowers or readies the boom keeps saying so: the wind rules hang on it. */
function boomMovementProblems(plan: Plan, reference: Plan): PlanProblem[] {
  const problems: PlanProblem[] = [];
  reference.stages.forEach((refStage) => {
    if (!refStage.boom) return;
    const at = plan.stages.findIndex((s) => s.id === refStage.id);
    if (at === -1 || plan.stages[at].boom === refStage.boom) return;
    const what = refStage.boom === 'moves' ? 'raises or lowers the boom' : 'readies the boom to be raised';
    problems.push({
      code: 'boom_movement_undeclared',
      message: `Stage “${refStage.title}” ${what}: it must keep saying so, or the fresh wind reading and the raising wind limit would no longer apply to it.`,
      path: `stages.${at}.boom`,
    });
  });
  return problems;
}

/**
 * Everything that stops a plan being locked. `reference` is the plan generated from the same
 * configuration (or a previous version of the same plan); without one only the structure is checked.
 */
export function planProblems(plan: Plan, reference: Plan | null): PlanProblem[] {
  return [
    ...duplicateIds(plan),
    ...dependencyProblems(plan),
    ...holdRoleProblems(plan),
    ...stepOrderProblems(plan),
    ...(reference
      ? [...mandatoryProblems(plan, reference), ...gatingProblems(plan, reference), ...requiredStepProblems(plan, reference), ...checkProblems(plan, reference), ...boomMovementProblems(plan, reference)]
      : []),
  ];
}

/** Problem codes that weaken a mandatory hold: a plan edit or a revision with one is refused outright. */
export const MANDATORY_PROBLEM_CODES: ReadonlySet<PlanProblem['code']> = new Set([
  'mandatory_hold_removed',
  'mandatory_role_removed',
  'mandatory_hold_bypassed',
  'required_step_removed',
  'boom_movement_undeclared',
]);

/** Does this problem weaken a mandatory hold (its existence, roles, value check, place, or a step it relies on)? */
export function protectsMandatoryHold(problem: Pick<PlanProblem, 'code'>): boolean {
  return MANDATORY_PROBLEM_CODES.has(problem.code);
}

/**
 * The problems of a revision on the live board: against the plan generated from the job's
 * configuration and against the version in force, so nothing the crew is working to can be
 * weakened, even where that version was stricter than the template. Each message once.
 */
export function revisionProblems(next: Plan, generated: Plan | null, current: Plan | null): PlanProblem[] {
  const seen = new Set<string>();
  const out: PlanProblem[] = [];
  for (const p of [...planProblems(next, generated), ...(current ? planProblems(next, current) : [])]) {
    if (seen.has(p.message)) continue;
    seen.add(p.message);
    out.push(p);
  }
  return out;
}

/**
 * The largest number of a hold's required roles that different people can fill: a bipartite
 * matching of role slots to people (Kuhn's augmenting paths), because counting people per role
 * would let one person who holds two roles count twice.
 */
function matchRoles(roles: readonly CrewRole[], people: Map<string, Set<CrewRole>>): { matched: number; unmatched: CrewRole[] } {
  const ids = [...people.keys()];
  const personOf = new Map<string, number>(); // userId → slot index
  const tryAssign = (slot: number, seen: Set<string>): boolean => {
    for (const id of ids) {
      if (seen.has(id) || !people.get(id)?.has(roles[slot])) continue;
      seen.add(id);
      const holder = personOf.get(id);
      if (holder === undefined || tryAssign(holder, seen)) {
        personOf.set(id, slot);
        return true;
      }
    }
    return false;
  };
  const unmatched: CrewRole[] = [];
  let matched = 0;
  roles.forEach((role, slot) => {
    if (tryAssign(slot, new Set())) matched += 1;
    else unmatched.push(role);
  });
  return { matched, unmatched };
}

/** Holds the crew cannot acknowledge with a different person for each required role. */
export function holdsNeedPeople(plan: Plan, crew: readonly CrewSlot[]): PlanProblem[] {
  const people = new Map<string, Set<CrewRole>>();
  for (const c of crew) {
    if (!people.has(c.userId)) people.set(c.userId, new Set());
    people.get(c.userId)?.add(c.role);
  }
  const problems: PlanProblem[] = [];
  plan.stages.forEach((s, i) => {
    const h = s.hold;
    if (!h || h.requiredRoles.length === 0) return;
    const { unmatched } = matchRoles(h.requiredRoles, people);
    if (unmatched.length === 0) return;
    problems.push({
      code: 'holds_need_more_people',
      message: `Hold “${h.title}” needs ${listWords(h.requiredRoles.map(roleName))} to be different people, and the crew cannot cover the ${listWords(unmatched.map(roleName))}. Add someone in that role to the crew.`,
      path: `stages.${i}.hold.requiredRoles`,
    });
  });
  return problems;
}

/** Stages not yet done or skipped whose every dependency is a stage of the plan that is done or skipped, in plan order. */
export function activeStages(plan: Plan, doneOrSkipped: ReadonlySet<string>): string[] {
  const ids = new Set(plan.stages.map((s) => s.id));
  return plan.stages
    .filter((s) => !doneOrSkipped.has(s.id) && s.dependsOn.every((d) => ids.has(d) && doneOrSkipped.has(d)))
    .map((s) => s.id);
}
