// A small erection plan written by hand for the board tests, so the reducer and the rules are
// tested whatever the templates hold. Its figures are invented plan data, not trade values: the
// tests check how the board carries and compares them, not the figures themselves.
//
//   ground (3 steps in order; mandatory hold: rigger + operator)
//     ├── assemble (pin count held to the plan)  ─┐
//     └── ballast (no hold)                       ─┴── ready-boom (boom: prepares; gust step;
//                                                       mandatory hold with a value check)
//                                                          └── lift-boom (boom: moves)
// Stage ids do not end in -preraise/-raise/-lower, so the wind rules find these stages by the
// plan's `boom` declaration, not by the older id convention.
import type { Plan, PlanHold, PlanStage, PlanStep, StepRecord } from '../../../shared/schemas/plan.js';

export const reading = (check: StepRecord['check'], unit: string | null, label = 'Reading'): StepRecord => ({
  kind: 'reading',
  label,
  unit,
  componentKind: null,
  typeId: null,
  plannedSerial: null,
  check,
});

export const planStep = (id: string, text: string, extra: Partial<PlanStep> = {}): PlanStep => ({
  id,
  text,
  allowedRoles: ['rigger'],
  requiresPhoto: false,
  records: null,
  caution: null,
  ...extra,
});

const hold = (id: string, title: string, requiredRoles: PlanHold['requiredRoles'], extra: Partial<PlanHold> = {}): PlanHold => ({
  id,
  title,
  instruction: `Check and sign: ${title.toLowerCase()}.`,
  requiredRoles,
  releasingRole: 'supervisor',
  mandatory: true,
  valueCheck: null,
  ...extra,
});

const planStage = (id: string, dependsOn: string[], steps: PlanStep[], h: PlanHold | null, extra: Partial<PlanStage> = {}): PlanStage => ({
  id,
  title: `Stage ${id}`,
  summary: `Why ${id} is done.`,
  dependsOn,
  cautions: [],
  involvesCraneMovement: false,
  steps,
  hold: h,
  ...extra,
});

/** Invented wind limits of the test crane (m/s): the raising limit is the lower one. */
export const testWindLimits = { assembly: { gustMs: 16, meanMs: 11 }, raising: { gustMs: 13, meanMs: 9 } };

export function smallPlan(): Plan {
  return {
    kind: 'erection',
    stages: [
      planStage(
        'ground',
        [],
        [
          planStep('ground.slope', 'Measure the slope under the tracks', { records: reading({ kind: 'max', limit: 1, source: 'test crane data: ground slope' }, '%') }),
          planStep('ground.mats', 'Lay the mats', { after: ['ground.slope'] }),
          planStep('ground.photo', 'Photograph the mats', { requiresPhoto: true, after: ['ground.mats'] }),
        ],
        hold('ground.hold', 'Ground ready', ['rigger', 'operator']),
      ),
      planStage('assemble', ['ground'], [planStep('assemble.pins', 'Count the boom pins fitted', { records: reading({ kind: 'plan', planned: 24, tolerance: 0, source: 'test plan: pin count' }, null) })], null),
      planStage('ballast', ['ground'], [planStep('ballast.fit', 'Fit the counterweight', { allowedRoles: ['operator'] })], null),
      planStage(
        'ready-boom',
        ['assemble', 'ballast'],
        [
          planStep('ready.gust', 'Read the gust at the boom tip', { allowedRoles: ['signaller'], records: reading({ kind: 'wind', phase: 'raising' }, 'm/s', 'Gust') }),
          planStep('ready.parts', 'Count the parts of line', { records: reading({ kind: 'plan', planned: 6, tolerance: 0, source: 'test plan: reeving' }, null) }),
        ],
        hold('ready.hold', 'Ready to raise', ['operator', 'signaller'], { valueCheck: { fields: [{ field: 'parts', expected: '6' }] } }),
        { boom: 'prepares' },
      ),
      planStage('lift-boom', ['ready-boom'], [planStep('lift.up', 'Raise the boom on the signaller’s call', { allowedRoles: ['operator'] })], null, { boom: 'moves', involvesCraneMovement: true }),
    ],
    briefing: { title: 'Briefing', sections: [{ heading: 'Today', items: ['Raise the boom.'] }] },
  };
}
