import type { Plan } from '../../shared/schemas/plan.js';

/**
 * The plan as someone who acknowledges holds may see it: value checks keep their fields but lose
 * the expected values, so the reading of the controller is never a copy of the plan.
 */
export function redactPlan(plan: Plan): Plan {
  return {
    ...plan,
    stages: plan.stages.map((stage) =>
      stage.hold?.valueCheck
        ? { ...stage, hold: { ...stage.hold, valueCheck: { fields: stage.hold.valueCheck.fields.map((f) => ({ field: f.field, expected: '(hidden)' })) } } }
        : stage,
    ),
  };
}
