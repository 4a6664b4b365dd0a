/**
 * Unit conversions at the edges of the app (imported charts in tonnes, feet, mph...). Every
 * quantity converted here is a magnitude (a force, length, speed or pressure), so negative and
 * non-finite values are refused like any other invalid input.
 */
import { finiteResult, requireNonNegative } from './errors';

/** Standard acceleration of gravity, m/s², exact by definition (3rd CGPM, 1901): 1 tf = 9.80665 kN. */
export const STANDARD_GRAVITY_MPS2 = 9.80665;
/** Newtons in one pound-force, exact: 0.45359237 kg × 9.80665 m/s². */
export const NEWTONS_PER_LBF = 4.4482216152605;
/** Metres in one international foot, exact (1959 international yard and pound agreement). */
export const METRES_PER_FT = 0.3048;
/** Kilograms in one avoirdupois pound, exact (1959 international yard and pound agreement). */
export const KG_PER_LB = 0.45359237;
/** Kilograms in one short ton (US ton, 2,000 lb), exact. */
export const KG_PER_SHORT_TON = 2000 * KG_PER_LB;
/** Metres in one inch, exact (1/12 ft). */
export const METRES_PER_INCH = 0.0254;
/** Pascals in one pound-force per square inch (1 lbf over 1 in², from the exact factors above). */
export const PA_PER_PSI = NEWTONS_PER_LBF / (METRES_PER_INCH * METRES_PER_INCH);
/** Metres per second in one mile per hour, exact (1609.344 m / 3600 s). */
export const MPS_PER_MPH = 0.44704;
/** Metres per second in one kilometre per hour (1000 m / 3600 s). */
export const MPS_PER_KMH = 1000 / 3600;
/** Metres per second in one knot (international nautical mile 1852 m / 3600 s). */
export const MPS_PER_KNOT = 1852 / 3600;

function convert(field: string, value: number, factor: number): number {
  requireNonNegative(field, value);
  return finiteResult(field, value * factor);
}

/** Tonnes-force (mass in tonnes under standard gravity) to kilonewtons. */
export function tonnesForceToKn(tonnesForce: number): number {
  return convert('tonnesForce', tonnesForce, STANDARD_GRAVITY_MPS2);
}

/** Kilonewtons to tonnes-force. */
export function knToTonnesForce(kn: number): number {
  return convert('kn', kn, 1 / STANDARD_GRAVITY_MPS2);
}

/** Pounds-force to kilonewtons. */
export function lbfToKn(lbf: number): number {
  return convert('lbf', lbf, NEWTONS_PER_LBF / 1000);
}

/** Kilonewtons to pounds-force. */
export function knToLbf(kn: number): number {
  return convert('kn', kn, 1000 / NEWTONS_PER_LBF);
}

/** Feet to metres. */
export function ftToM(ft: number): number {
  return convert('ft', ft, METRES_PER_FT);
}

/** Metres to feet. */
export function mToFt(m: number): number {
  return convert('m', m, 1 / METRES_PER_FT);
}

/** Miles per hour to metres per second. */
export function mphToMs(mph: number): number {
  return convert('mph', mph, MPS_PER_MPH);
}

/** Metres per second to miles per hour. */
export function msToMph(ms: number): number {
  return convert('ms', ms, 1 / MPS_PER_MPH);
}

/** Kilometres per hour to metres per second. */
export function kmhToMs(kmh: number): number {
  return convert('kmh', kmh, MPS_PER_KMH);
}

/** Metres per second to kilometres per hour. */
export function msToKmh(ms: number): number {
  return convert('ms', ms, 1 / MPS_PER_KMH);
}

/** Knots to metres per second. */
export function knotsToMs(knots: number): number {
  return convert('knots', knots, MPS_PER_KNOT);
}

/** Kilopascals (kN/m²) to tonnes-force per square metre. */
export function kpaToTonnesPerM2(kpa: number): number {
  return convert('kpa', kpa, 1 / STANDARD_GRAVITY_MPS2);
}

/** Tonnes-force per square metre to kilopascals. */
export function tonnesPerM2ToKpa(tonnesPerM2: number): number {
  return convert('tonnesPerM2', tonnesPerM2, STANDARD_GRAVITY_MPS2);
}
