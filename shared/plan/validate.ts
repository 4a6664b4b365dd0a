/**
 * Checks on a plan before it is locked, and the dependency rule the board uses.
 *
 * planProblems: the structure (duplicate ids, unknown dependencies, cycles, stages that can never
 * start, holds nobody can acknowledge) and, against the generated reference plan, the mandatory
 * holds an edit may never weaken. holdsNeedPeople: whether the crew can acknowledge every hold
 * with a different person per role. activeStages: the stages whose dependencies are all done.
 */
import type { CrewRole } from '../schemas/jobs.js';
import type { Plan, PlanHold, PlanProblem } from '../schemas/plan.js';
import { qualificationLabels } from '../schemas/users.js';
import { listWords } from './format.js';

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

/** Everything that stops a plan being locked; `reference` is the plan generated from the same configuration. */
export function planProblems(plan: Plan, reference: Plan | null): PlanProblem[] {
  return [...duplicateIds(plan), ...dependencyProblems(plan), ...holdRoleProblems(plan), ...(reference ? mandatoryProblems(plan, reference) : [])];
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
