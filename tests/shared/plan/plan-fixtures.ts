// Shared set-up for the plan tests: the invented demo crane and assist crane, a kit with every part
// the longest boom needs, a communications plan, and the plan generated for a configuration.
import type { z } from 'zod';
import { generatePlan } from '../../../shared/plan';
import { computeConfiguration } from '../../../shared/planner/compute';
import type { ConfigurationResults } from '../../../shared/planner/types';
import type { ArrangementData, InventoryItem } from '../../../shared/schemas/arrangement';
import { configurationSchema, type Configuration } from '../../../shared/schemas/configuration';
import type { CommsPlan } from '../../../shared/schemas/jobs';
import type { Plan, PlanStage, PlanStep } from '../../../shared/schemas/plan';
import { configuration18m } from '../../helpers/jobs';
import { demoAssistCrane, demoCrane, readDemoJson } from '../helpers';

export const crane = demoCrane();
export const assistCrane = demoAssistCrane();
export const UNIT_ID = '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f';
export const ASSIST_ID = '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d';
export const ANN = '11111111-1111-4111-8111-111111111111';
export const BEN = '22222222-2222-4222-8222-222222222222';
export const CAL = '33333333-3333-4333-8333-333333333333';

/** The demo crane model as raw JSON, read apart from the schema and the generator, for expected values. */
export interface RawCrane {
  sectionTypes: { id: string; pinsPerJoint: number }[];
  arrangements: { boomLengthM: number; sectionTypeIds: string[]; guyLines: { mark: string; quantity: number; pinsEach: number }[]; raising: { counterweightKg: number; limits: { maxGroundSlopePercent: number } } }[];
  hookBlocks: { id: string; weightKg: number }[];
  machine: { counterweight: { blocks: { id: string; weightKg: number }[] } };
}
export const rawCrane = readDemoJson('crane-model.json') as RawCrane;

/** Every boom length the demo crane's arrangement data lists. */
export const listedLengths = rawCrane.arrangements.map((a) => a.boomLengthM);

/** Every part the longest listed boom needs, all serviceable. */
export function fullKit(): InventoryItem[] {
  const kit: [InventoryItem['kind'], string, number][] = [
    ['section', 'base', 1], ['section', 'ins3', 1], ['section', 'ins6', 1], ['section', 'ins12', 6], ['section', 'tip', 1],
    ['guy_line', 'GT', 2], ['guy_line', 'GB', 2], ['guy_line', 'G3', 2], ['guy_line', 'G6', 2], ['guy_line', 'G12', 12],
    ['hook_block', 'HB250', 1], ['hook_block', 'HB120', 1], ['hook_block', 'BALL12', 1],
  ];
  return kit.flatMap(([kind, typeId, count]) =>
    Array.from({ length: count }, (_, i) => ({ serial: `T-${typeId.toUpperCase()}-${String(i + 1).padStart(2, '0')}`, kind, typeId, status: 'serviceable' as const })),
  );
}

export const comms: CommsPlan = {
  radioChannel: 'Site 3',
  callSigns: [
    { userId: ANN, callSign: 'Base' },
    { userId: BEN, callSign: 'Cab' },
    { userId: CAL, callSign: 'Banksman 1' },
  ],
  motionSignallers: [
    { motion: 'boom hoist', userId: CAL },
    { motion: 'main hoist', userId: CAL },
  ],
  // Ends its own sentence, as people type it: the plan must not add a second full stop.
  fallbackHandSignals: 'Stop, Emergency Stop, Raise Boom, Lower Boom, Hoist, Lower as agreed at the briefing.',
};
export const crewNames = { [ANN]: 'Ann Okafor', [BEN]: 'Ben Lusk', [CAL]: 'Cal Reyes' };

export type ConfigInput = Partial<z.input<typeof configurationSchema>>;

/** The 18 m configuration with changes, through the schema so fields added later take their defaults. */
export function config(overrides: ConfigInput = {}): Configuration {
  return configurationSchema.parse({ ...configuration18m(UNIT_ID), ...overrides });
}

/** A configuration with the assist crane and two planned lifts. */
export function withAssist(overrides: ConfigInput = {}): Configuration {
  return config({
    assist: {
      assistCraneId: ASSIST_ID,
      chartId: 'boom-20.5m-full-cw',
      lifts: [
        { label: 'Tip onto dollies', liftT: 4.1, riggingT: 0.2, radiusM: 9 },
        { label: 'Base into the foot pins', liftT: 7.8, riggingT: 0.3, radiusM: 7 },
      ],
    },
    ...overrides,
  } as ConfigInput);
}

export function compute(cfg: Configuration, arrangement: ArrangementData = crane): ConfigurationResults {
  return computeConfiguration(cfg, { arrangement, inventory: fullKit(), assistCrane });
}

export function plan(kind: Plan['kind'], cfg: Configuration, arrangement: ArrangementData = crane, commsPlan: CommsPlan = comms): Plan {
  return generatePlan({ kind, configuration: cfg, results: compute(cfg, arrangement), arrangement, commsPlan, crewNames });
}

export function stage(p: Plan, id: string): PlanStage {
  const s = p.stages.find((x) => x.id === id);
  if (!s) throw new Error(`no stage ${id}; stages: ${p.stages.map((x) => x.id).join(', ')}`);
  return s;
}

export function step(p: Plan, id: string): PlanStep {
  for (const s of p.stages) {
    const found = s.steps.find((st) => st.id === id);
    if (found) return found;
  }
  throw new Error(`no step ${id}`);
}

/** The stage a step is in. */
export function stageOfStep(p: Plan, stepId: string): PlanStage {
  const s = p.stages.find((x) => x.steps.some((st) => st.id === stepId));
  if (!s) throw new Error(`no step ${stepId}`);
  return s;
}

/**
 * Every stage a stage waits for, directly or not, worked out here by a depth-first walk over
 * `dependsOn` (the validator's own walk is breadth-first and not used, so a fault in one shows).
 */
export function ancestors(p: Plan, stageId: string): Set<string> {
  const byId = new Map(p.stages.map((s) => [s.id, s]));
  const seen = new Set<string>();
  const visit = (id: string) => {
    for (const d of byId.get(id)?.dependsOn ?? []) {
      if (seen.has(d)) continue;
      seen.add(d);
      visit(d);
    }
  };
  visit(stageId);
  return seen;
}

/** Every step a step waits for inside its stage, directly or not (depth-first). */
export function stepAncestors(s: PlanStage, stepId: string): Set<string> {
  const byId = new Map(s.steps.map((x) => [x.id, x]));
  const seen = new Set<string>();
  const visit = (id: string) => {
    for (const a of byId.get(id)?.after ?? []) {
      if (seen.has(a)) continue;
      seen.add(a);
      visit(a);
    }
  };
  visit(stepId);
  return seen;
}

/**
 * Must step `later` wait for step `earlier` on the board? Yes when the stage of `later` waits for
 * the stage of `earlier` (directly or not), or both are in one stage and `later` comes after it.
 */
export function mustComeAfter(p: Plan, later: string, earlier: string): boolean {
  const a = stageOfStep(p, later);
  const b = stageOfStep(p, earlier);
  if (a.id === b.id) return stepAncestors(a, later).has(earlier);
  return ancestors(p, a.id).has(b.id);
}
