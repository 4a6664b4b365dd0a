import type { CrewRole } from '../../../shared/schemas/jobs';
import type { Plan } from '../../../shared/schemas/plan';

export interface RevisionChange {
  stageId: string;
  removeStepIds: string[];
  addStep: { text: string; roles: CrewRole[]; requiresPhoto: boolean } | null;
  nextVersion: number;
}

const MAX_ID = 64;

/**
 * The plan with one stage changed: steps removed, and a replacement step appended with an id that
 * names the revision (ids stay unique and within the schema's 64 characters). Reworded steps are
 * already in `plan`; the server checks the rest (mandatory holds, ids, dependencies).
 */
export function revisePlan(plan: Plan, change: RevisionChange): Plan {
  const taken = new Set(plan.stages.flatMap((s) => s.steps.map((st) => st.id)));
  return {
    ...plan,
    stages: plan.stages.map((stage) => {
      if (stage.id !== change.stageId) return stage;
      const steps = stage.steps.filter((s) => !change.removeStepIds.includes(s.id)).map((s) => ({ ...s, text: s.text.trim() }));
      if (change.addStep) {
        let n = 1;
        const base = `${stage.id}.v${change.nextVersion}-`;
        const idFor = (i: number) => (base.length + String(i).length <= MAX_ID ? `${base}${i}` : `v${change.nextVersion}-${i}-${stage.id}`.slice(0, MAX_ID));
        while (taken.has(idFor(n))) n += 1;
        steps.push({ id: idFor(n), text: change.addStep.text, allowedRoles: change.addStep.roles, requiresPhoto: change.addStep.requiresPhoto, records: null, caution: null });
      }
      return { ...stage, steps };
    }),
  };
}
