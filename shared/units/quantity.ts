/**
 * Figures in each person's system of units: metric or US customary. Every computation and every
 * record stays in SI; this is the one place a figure is converted for a person, the one place the
 * unit words live, and the one way a typed number in US units comes back to SI.
 *
 * The direction of rounding is part of the safety case, as in shared/format.ts (whose rounding
 * this uses): loads, pulls, pressures and wind round UP, capacities, allowables and clearances
 * round DOWN, information rounds to the nearest. The conversion comes first and the rounding
 * second, so a capacity converted to US tons is never shown above what the SI figure says.
 *
 * Factors (shared/calc/units.ts): 1 US ton = 907.184 74 kg, 1 lbf = 4.448 221 615 260 5 N,
 * 1 ft = 0.3048 m, 1 psi = 6 894.757… Pa, 1 mph = 0.447 04 m/s, all from the exact pound, foot
 * and standard gravity, as NIST SP 811 (2008) Appendix B lists them (checked in the tests).
 */
import { KG_PER_SHORT_TON, METRES_PER_FT, MPS_PER_MPH, NEWTONS_PER_LBF, PA_PER_PSI } from '../calc/units.js';
import { fmt, fmtDown, fmtUp } from '../format.js';

/** The systems a person may pick; metric unless they choose otherwise. */
export const unitSystems = ['metric', 'us'] as const;
export type UnitSystem = (typeof unitSystems)[number];
export const DEFAULT_UNIT_SYSTEM: UnitSystem = 'metric';

/**
 * What a figure measures, and the SI unit its value is given in:
 * mass kg, force kN, length m, pressure kPa, wind speed m/s (the units of the app's names).
 */
export type QuantityKind = 'mass' | 'force' | 'length' | 'pressure' | 'windSpeed';
export const quantityKinds: readonly QuantityKind[] = ['mass', 'force', 'length', 'pressure', 'windSpeed'];

/** Toward which side a figure is rounded: `up` loads, pulls, pressures, wind; `down` capacities, allowables, clearances; `nearest` information. */
export type Rounding = 'up' | 'down' | 'nearest';

interface UnitOf {
  /** The unit as it is written after a number. */
  word: string;
  /** The unit named in full, for a legend or a settings page. */
  name: string;
  /** How many SI units of the kind (kg, kN, m, kPa, m/s) one of this unit is: the published factor, so 1 ft is exactly 0.3048 m. */
  siPer: number;
  /** Decimals shown unless the caller asks for others. */
  decimals: number;
  /** Thousands grouped ("22,481 lbf"). */
  grouped?: boolean;
}

/** THE unit words and factors, one row per kind and system. Metric rows write what the app always wrote. */
export const units: Record<QuantityKind, Record<UnitSystem, UnitOf>> = {
  mass: {
    metric: { word: 't', name: 'tonne of 1,000 kg', siPer: 1000, decimals: 2 },
    us: { word: 'US tons', name: 'US ton, the short ton of 2,000 lb', siPer: KG_PER_SHORT_TON, decimals: 2 },
  },
  force: {
    metric: { word: 'kN', name: 'kilonewton', siPer: 1, decimals: 1 },
    us: { word: 'lbf', name: 'pound-force', siPer: NEWTONS_PER_LBF / 1000, decimals: 0, grouped: true },
  },
  length: {
    metric: { word: 'm', name: 'metre', siPer: 1, decimals: 1 },
    us: { word: 'ft', name: 'foot', siPer: METRES_PER_FT, decimals: 1 },
  },
  pressure: {
    metric: { word: 'kPa', name: 'kilopascal', siPer: 1, decimals: 1 },
    us: { word: 'psi', name: 'pound-force per square inch', siPer: PA_PER_PSI / 1000, decimals: 1 },
  },
  windSpeed: {
    metric: { word: 'm/s', name: 'metre per second', siPer: 1, decimals: 1 },
    us: { word: 'mph', name: 'mile per hour', siPer: MPS_PER_MPH, decimals: 1 },
  },
};

/** The unit written after a figure of this kind in this system ("US tons", "psi"). */
export function unitWord(kind: QuantityKind, system: UnitSystem): string {
  return units[kind][system].word;
}

/** The SI value in the person's unit, unrounded (for a drawing's scale or a field's starting value). */
export function toShown(kind: QuantityKind, siValue: number, system: UnitSystem): number {
  return siValue / units[kind][system].siPer;
}

/** A number typed in the person's unit, back in SI (kg, kN, m, kPa, m/s) for the record. */
export function fromShown(kind: QuantityKind, shownValue: number, system: UnitSystem): number {
  return shownValue * units[kind][system].siPer;
}

/**
 * The number alone, converted and rounded toward the safe side asked for, without the unit.
 * `trim` drops trailing zeros after the rounding ("12" rather than "12.0"), for a reading recorded
 * as typed.
 */
export function showNumber(kind: QuantityKind, siValue: number, system: UnitSystem, rounding: Rounding, decimals?: number, trim = false): string {
  const unit = units[kind][system];
  const places = decimals ?? unit.decimals;
  const value = siValue / unit.siPer;
  const fixed = rounding === 'up' ? fmtUp(value, places) : rounding === 'down' ? fmtDown(value, places) : fmt(value, places);
  const text = trim && fixed.includes('.') ? fixed.replace(/\.?0+$/, '') : fixed;
  return unit.grouped ? group(text) : text;
}

/**
 * THE way a figure is shown to a person: converted from SI into their system, rounded toward the
 * safe side asked for, with its unit written out ("10.0 US tons", "22,481 lbf", "29.1 psi").
 */
export function showQuantity(kind: QuantityKind, siValue: number, system: UnitSystem, rounding: Rounding, decimals?: number, trim = false): string {
  return `${showNumber(kind, siValue, system, rounding, decimals, trim)} ${unitWord(kind, system)}`;
}

/** "22481" → "22,481"; the decimals, if any, are left alone. */
function group(text: string): string {
  const [whole, fraction] = text.split('.');
  const sign = whole.startsWith('-') ? '-' : '';
  const digits = sign ? whole.slice(1) : whole;
  const withCommas = digits.replace(/\B(?=(\d{3})+(?!\d))/g, ',');
  return `${sign}${withCommas}${fraction === undefined ? '' : `.${fraction}`}`;
}

/**
 * A figure shown in the person's system, curried: the planner and the board pass one of these
 * around instead of the system, so a module never formats a quantity any other way.
 */
export interface Quantities {
  system: UnitSystem;
  /** A mass in kilograms. */
  mass(kg: number, rounding: Rounding, decimals?: number, trim?: boolean): string;
  /** A force in kilonewtons. */
  force(kn: number, rounding: Rounding, decimals?: number, trim?: boolean): string;
  /** A length in metres. */
  length(m: number, rounding: Rounding, decimals?: number, trim?: boolean): string;
  /** A pressure in kilopascals. */
  pressure(kpa: number, rounding: Rounding, decimals?: number, trim?: boolean): string;
  /** A wind speed in metres per second. */
  wind(ms: number, rounding: Rounding, decimals?: number, trim?: boolean): string;
}

/** The `Quantities` of one system. */
export function quantitiesIn(system: UnitSystem): Quantities {
  return {
    system,
    mass: (kg, r, d, t) => showQuantity('mass', kg, system, r, d, t),
    force: (kn, r, d, t) => showQuantity('force', kn, system, r, d, t),
    length: (m, r, d, t) => showQuantity('length', m, system, r, d, t),
    pressure: (kpa, r, d, t) => showQuantity('pressure', kpa, system, r, d, t),
    wind: (ms, r, d, t) => showQuantity('windSpeed', ms, system, r, d, t),
  };
}

/** Metric, as every stored text and the record is written. */
export const METRIC = quantitiesIn('metric');
