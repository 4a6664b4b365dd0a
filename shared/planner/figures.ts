/**
 * The small helpers every part of the planner uses to build its figures: one figure with its rule
 * and a guard that turns a refused input into a failing figure (numbers for people: shared/format.ts).
 */
import type { BoomMakeup } from '../calc/boom.js';
import { CalcInputError } from '../calc/errors.js';
import { tonnesForceToKn } from '../calc/units.js';
import type { InventoryItem } from '../schemas/arrangement.js';
import type { Figure, FigureStatus } from '../schemas/configuration.js';
import { plain } from '../format.js';
import { showQuantity, toShown, unitWord, type QuantityKind, type Quantities } from '../units/quantity.js';
import { overrideReason } from './overrides.js';

/** The group a figure is listed under. */
export type Group = Figure['group'];

export function figure(
  key: string,
  group: Group,
  label: string,
  value: string,
  status: FigureStatus,
  overridable: boolean,
  rule: string,
  detail?: string,
): Figure {
  // Only a failing or caution figure whose key is in the one list of matters of judgement may be overridden.
  const mayOverride = (status === 'fail' || status === 'caution') && overridable && overrideReason(key) !== null;
  const f: Figure = { key, group, label, value, status, overridable: mayOverride, rule };
  if (detail !== undefined && detail.length > 0) f.detail = detail;
  return f;
}

/** A dimension from the data or the configuration, as stated: metres to 3 decimals as written, feet to 0.1 (information, nearest). */
export function stated(q: Quantities, lengthM: number): string {
  return q.length(lengthM, 'nearest', q.system === 'metric' ? 3 : 1, true);
}

/**
 * A rating or limit from the data (a block's rated load, a drum's permissible pull): in metric as
 * the data states it, in another system converted and rounded DOWN, never above the rating.
 */
export function ratingOf(q: Quantities, kind: QuantityKind, siValue: number): string {
  if (q.system === 'metric') return `${plain(toShown(kind, siValue, 'metric'))} ${unitWord(kind, 'metric')}`;
  return showQuantity(kind, siValue, q.system, 'down', undefined, true);
}

/** Kilograms to kilonewtons through tonne-force (1 tf = 9.80665 kN). */
export function kgToKn(weightKg: number): number {
  return tonnesForceToKn(weightKg / 1000);
}

/** Runs one check; a refused input or an unexpected error becomes a failing figure instead of a throw. */
export function guarded<T>(figures: Figure[], key: string, group: Group, label: string, fallback: T, run: () => T): T {
  try {
    return run();
  } catch (error) {
    figures.push(failureFromError(key, group, label, error));
    return fallback;
  }
}

function failureFromError(key: string, group: Group, label: string, error: unknown): Figure {
  if (error instanceof CalcInputError) {
    return figure(key, group, label, 'Cannot compute', 'fail', false, `input refused: ${error.field}`, error.message);
  }
  const message = error instanceof Error ? error.message : String(error);
  return figure(key, group, label, 'Cannot compute', 'fail', false, 'the calculation stopped with an error; the plan cannot be checked', message);
}

export function emptyMakeup(boomLengthM: number, reason: string): BoomMakeup {
  return {
    boomLengthM,
    buildable: false,
    reasons: [reason],
    sections: [],
    guyLines: [],
    totalSectionWeightKg: 0,
    totalGuyLineCount: 0,
    pinCount: { jointPins: 0, guyLinePins: 0, total: 0 },
    arrangement: null,
    platesRequired: false,
    auxSheaveAllowed: false,
    rule: 'no make-up: the boom could not be worked out',
  };
}

export function serviceableAtHand(inventory: readonly InventoryItem[], kind: InventoryItem['kind'], typeId: string): {
  serviceable: string[];
  unusable: string[];
} {
  const ofType = inventory.filter((i) => i.kind === kind && i.typeId === typeId);
  return {
    serviceable: ofType.filter((i) => i.status === 'serviceable').map((i) => i.serial),
    unusable: ofType.filter((i) => i.status !== 'serviceable').map((i) => `${i.serial} (${i.status})`),
  };
}
