// A small invented plan for the plan-editing and comparison tests: three stages in a chain, the
// first with a mandatory hold and a value check, the second with an ordinary hold.
import type { Plan, PlanHold, PlanStage, PlanStep } from '../../../shared/schemas/plan.js';

export function step(id: string, text: string, overrides: Partial<PlanStep> = {}): PlanStep {
  return { id, text, allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null, ...overrides };
}

export function hold(id: string, overrides: Partial<PlanHold> = {}): PlanHold {
  return { id, title: 'Checked', instruction: 'Look at it yourself.', requiredRoles: ['supervisor'], releasingRole: 'supervisor', mandatory: false, valueCheck: null, ...overrides };
}

export function stage(id: string, overrides: Partial<PlanStage> = {}): PlanStage {
  return { id, title: `Stage ${id}`, summary: '', dependsOn: [], cautions: [], involvesCraneMovement: false, steps: [step(`${id}.a`, `First step of ${id}`)], hold: null, ...overrides };
}

/** Three stages in a chain; the first has a mandatory hold with a value check, the second an ordinary one. */
export function plan(): Plan {
  return {
    kind: 'erection',
    stages: [
      stage('ground', {
        hold: hold('ground.hold', {
          mandatory: true,
          requiredRoles: ['supervisor', 'operator', 'signaller'],
          valueCheck: { fields: [{ field: 'boomLengthM', expected: '18' }] },
        }),
      }),
      stage('upper', { dependsOn: ['ground'], steps: [step('upper.a', 'Set the gauge'), step('upper.b', 'Fit counterweight')], hold: hold('upper.hold') }),
      stage('laydown', { dependsOn: ['upper'] }),
    ],
    briefing: { title: 'Toolbox talk', sections: [{ heading: 'The job', items: ['An 18 m boom.'] }] },
  };
}

/** Every id of the plan, with repeats: a duplicate shows as a longer list than the set. */
export function allIds(p: Plan): string[] {
  return p.stages.flatMap((s) => [s.id, ...s.steps.map((x) => x.id), ...(s.hold ? [s.hold.id] : [])]);
}
