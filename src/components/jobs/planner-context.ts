import { inject, type ComputedRef, type InjectionKey, type Ref } from 'vue';
import type { BoomMakeup } from '../../../shared/calc/boom';
import type { PlannerInputs } from '../../../shared/planner/types';
import type { Configuration } from '../../../shared/schemas/configuration';

/** What every section of the planner shares: the draft it edits and what it is computed against. */
export interface PlannerContext {
  /** The configuration being planned; numbers left empty are NaN until filled in. */
  draft: Ref<Configuration>;
  /** False for people who may only read the plan, or once the job is past planning. */
  editable: ComputedRef<boolean>;
  /** Arrangement data, the unit's parts and the assist crane; null while they load. */
  inputs: ComputedRef<PlannerInputs | null>;
  /** The make-up of the chosen length from the unit's parts, even while other fields are empty. */
  makeup: ComputedRef<BoomMakeup | null>;
  /** The message to show under a field: the last refused save's, by the field's full path. */
  errorOf: (path: string) => string;
}

export const plannerKey: InjectionKey<PlannerContext> = Symbol('planner');

/** The planner's shared state, for a section inside the planner. */
export function usePlanner(): PlannerContext {
  const context = inject(plannerKey);
  if (!context) throw new Error('A planner section must sit inside the configuration planner.');
  return context;
}

/** A new configuration for a job: every figure the supervisor must supply is left empty (NaN). */
export function blankConfiguration(craneUnitId: string): Configuration {
  return {
    craneUnitId,
    boomLengthM: Number.NaN,
    // Ground level unless the supervisor says the hook goes lower (a pit, a shaft) or stays higher.
    mainHook: { hookBlockId: '', parts: Number.NaN, lowestHookPositionM: 0 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: '', loadT: Number.NaN, riggingT: Number.NaN, radiusM: Number.NaN },
    ground: { groundType: '', allowablePressureKpa: Number.NaN, source: { kind: 'none', reference: '', designer: '' } },
    // Mats start unused; their sizes only count once they are switched on and filled in.
    mats: { used: false, lengthM: Number.NaN, widthM: Number.NaN, thicknessM: Number.NaN, weightKg: Number.NaN },
    // The assist crane's pads and tandem raise start empty: the figures say "not entered" until they are.
    assist: {
      assistCraneId: null,
      chartId: null,
      lifts: [],
      pads: { kind: 'outrigger', loadT: null, lengthM: null, widthM: null, weightKg: 0 },
      tandem: { alongFromTipM: null, sideM: null, releaseAngleDeg: null, hookBlockT: 0, slingsT: 0, shacklesT: 0, deductionsT: 0 },
    },
    // The reach allowances are common practice, no source: settings the supervisor can change.
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '', loadAndTagLineAllowanceM: 3, swayAllowanceM: 2 },
    // Common practice, no source: a setting the supervisor can change.
    fallZoneMarginM: 5,
    // Common practice, no source: the site's caution share of a chart.
    chartCautionPercent: 75,
    // Common practice, no source: how old a wind reading may be before the boom moves.
    weatherFreshMinutes: 15,
  };
}

/**
 * The draft as the schema expects it: unused mats need sizes to pass the schema but are never
 * used in a figure, so empty sizes of unused mats are sent as the smallest valid values.
 */
export function configurationForCheck(draft: Configuration): Configuration {
  if (draft.mats.used) return draft;
  const fill = (v: number, fallback: number) => (Number.isFinite(v) && v > 0 ? v : fallback);
  return {
    ...draft,
    mats: {
      used: false,
      lengthM: fill(draft.mats.lengthM, 1),
      widthM: fill(draft.mats.widthM, 1),
      thicknessM: fill(draft.mats.thicknessM, 0.1),
      weightKg: Number.isFinite(draft.mats.weightKg) && draft.mats.weightKg >= 0 ? draft.mats.weightKg : 0,
    },
  };
}

/** JSON with sorted keys, so two configurations compare by content, not by key order. */
export function stableJson(value: unknown): string {
  return JSON.stringify(value, (_key, v: unknown) =>
    v && typeof v === 'object' && !Array.isArray(v) ? Object.fromEntries(Object.entries(v as Record<string, unknown>).sort(([a], [b]) => a.localeCompare(b))) : v,
  );
}
