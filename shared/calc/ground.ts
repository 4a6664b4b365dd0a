/**
 * Ground bearing: track pressure under an eccentric load, mats, and mat area.
 */
import { CalcInputError, finiteResult, requireFinite, requireInRange, requireInteger, requireNonNegative, requirePositive } from './errors';

/** Shape of the pressure block under one track. */
export type PressureDistribution = 'uniform' | 'trapezoidal' | 'triangular';

/** Pressure under one track. */
export interface TrackPressureResult {
  /** Load carried by each track (the tracks share the vertical load equally). */
  loadPerTrackKn: number;
  maxPressureKpa: number;
  minPressureKpa: number;
  distribution: PressureDistribution;
  /** Length of track in contact with the ground; shorter than the track when its end lifts. */
  contactLengthM: number;
  /** True when e > L/6 and part of the track carries no pressure. */
  partialContact: boolean;
  rule: string;
}

const ECCENTRIC_RULE =
  'rigid footing, linear pressure: e ≤ L/6: q = P/(BL)(1 ± 6e/L); e > L/6: q_max = 2P/(3B(L/2 − e)) over 3(L/2 − e) (eccentric footing theory, e.g. Das, Principles of Foundation Engineering)';

/**
 * Pressure under each track with the load's eccentricity along the track. e ≥ L/2 puts the
 * resultant at or past the track end: the crane overturns, which is refused as an input error.
 */
export function trackPressure(input: {
  verticalLoadKn: number;
  eccentricityM: number;
  trackLengthM: number;
  trackWidthM: number;
  tracks: number;
}): TrackPressureResult {
  const v = requireNonNegative('verticalLoadKn', input.verticalLoadKn);
  requireFinite('eccentricityM', input.eccentricityM);
  const l = requirePositive('trackLengthM', input.trackLengthM);
  const b = requirePositive('trackWidthM', input.trackWidthM);
  const tracks = requireInteger('tracks', input.tracks, 1, 8);
  // The sign only says which end is heavier; the pressures are symmetric in it.
  const e = Math.abs(input.eccentricityM);
  if (e >= l / 2) {
    throw new CalcInputError(
      'eccentricityM',
      `eccentricity ${e} m reaches or passes the track end (L/2 = ${l / 2} m): the load overturns the crane`,
    );
  }
  const p = v / tracks;
  const kern = l / 6;
  const atKern = Math.abs(e - kern) <= 1e-12 * l;
  let max: number;
  let min: number;
  let contact: number;
  let distribution: PressureDistribution;
  if (e === 0) {
    max = p / (b * l);
    min = max;
    contact = l;
    distribution = 'uniform';
  } else if (e < kern && !atKern) {
    max = (p / (b * l)) * (1 + (6 * e) / l);
    min = (p / (b * l)) * (1 - (6 * e) / l);
    contact = l;
    distribution = 'trapezoidal';
  } else if (atKern) {
    max = (2 * p) / (b * l);
    min = 0;
    contact = l;
    distribution = 'triangular';
  } else {
    contact = 3 * (l / 2 - e);
    max = (2 * p) / (3 * b * (l / 2 - e));
    min = 0;
    distribution = 'triangular';
  }
  return {
    loadPerTrackKn: finiteResult('verticalLoadKn', p),
    maxPressureKpa: finiteResult('verticalLoadKn', max),
    // Rounding in 1 − 6e/L can leave a hair below zero; soil carries no tension anyway.
    minPressureKpa: finiteResult('verticalLoadKn', Math.max(0, min)),
    distribution,
    contactLengthM: contact,
    partialContact: contact < l,
    rule: ECCENTRIC_RULE,
  };
}

/** Default load-spread angle through a mat, from the vertical. */
export const DEFAULT_MAT_SPREAD_ANGLE_DEG = 45;

/** Pressure under a mat. */
export interface MatPressureResult {
  bearingLengthM: number;
  bearingWidthM: number;
  bearingAreaM2: number;
  /** Pressure from the applied load only, spread through the mat. */
  pressureKpa: number;
  /** Pressure the bare contact area would put on the ground. */
  pressureWithoutMatKpa: number;
  /** The mat's own weight spread over the whole mat. */
  matSelfWeightPressureKpa: number;
  /** pressureKpa + matSelfWeightPressureKpa. */
  totalPressureKpa: number;
  rule: string;
}

/**
 * Uniform pressure under a mat: the load spreads outward at a fixed angle through the mat's
 * thickness (45° by default), limited to the mat's plan size. This spread rule is a common
 * simplification with no published source checked here: a real mat bends, and an engineered mat
 * design (e.g. the effective-bearing-length method) governs.
 */
export function matPressure(input: {
  loadKn: number;
  contactLengthM: number;
  contactWidthM: number;
  matLengthM: number;
  matWidthM: number;
  matThicknessM: number;
  spreadAngleDeg?: number;
  matWeightKn?: number;
}): MatPressureResult {
  const load = requireNonNegative('loadKn', input.loadKn);
  const cl = requirePositive('contactLengthM', input.contactLengthM);
  const cw = requirePositive('contactWidthM', input.contactWidthM);
  const ml = requirePositive('matLengthM', input.matLengthM);
  const mw = requirePositive('matWidthM', input.matWidthM);
  const t = requirePositive('matThicknessM', input.matThicknessM);
  const angle = requireInRange('spreadAngleDeg', input.spreadAngleDeg ?? DEFAULT_MAT_SPREAD_ANGLE_DEG, 0, 60);
  const matWeight = requireNonNegative('matWeightKn', input.matWeightKn ?? 0);
  // A mat smaller than what stands on it spreads nothing and hides an overhang: refuse it.
  if (ml < cl) throw new CalcInputError('matLengthM', 'the mat is shorter than the contact it carries');
  if (mw < cw) throw new CalcInputError('matWidthM', 'the mat is narrower than the contact it carries');
  const spread = angle === 0 ? 0 : t * Math.tan((angle * Math.PI) / 180);
  const bl = Math.min(ml, cl + 2 * spread);
  const bw = Math.min(mw, cw + 2 * spread);
  const area = finiteResult('matThicknessM', bl * bw);
  const pressure = finiteResult('loadKn', load / area);
  const selfWeight = finiteResult('matWeightKn', matWeight / (ml * mw));
  return {
    bearingLengthM: bl,
    bearingWidthM: bw,
    bearingAreaM2: area,
    pressureKpa: pressure,
    pressureWithoutMatKpa: finiteResult('loadKn', load / (cl * cw)),
    matSelfWeightPressureKpa: selfWeight,
    totalPressureKpa: finiteResult('loadKn', pressure + selfWeight),
    rule: `load spread at ${angle}° from vertical through the mat thickness, limited to the mat size (common practice, no source); mat weight over the whole mat`,
  };
}

/** Bearing area needed: A = (P + W) ÷ q_allowable. */
export function matAreaRequiredM2(input: { loadKn: number; allowablePressureKpa: number; matWeightKn?: number }): {
  areaM2: number;
  rule: string;
} {
  const load = requireNonNegative('loadKn', input.loadKn);
  const q = requirePositive('allowablePressureKpa', input.allowablePressureKpa);
  const w = requireNonNegative('matWeightKn', input.matWeightKn ?? 0);
  return {
    areaM2: finiteResult('loadKn', (load + w) / q),
    rule: 'A_required = (P + W) ÷ q_allowable (D. Duerr, "Effective Bearing Length of Crane Mats", 2010, Eq. 1)',
  };
}

/** One row of the guidance table of allowable ground pressures. */
export interface TypicalAllowablePressure {
  groundType: string;
  minKpa: number;
  /** null: no upper bound given. */
  maxKpa: number | null;
}

/**
 * Typical allowable bearing pressures by ground type. GUIDANCE ONLY: from memory of the presumed
 * allowable bearing values in BS 8004:1986 Table 1, not checked against the text. The allowable
 * pressure for a crane comes from a ground investigation or a temporary-works design.
 */
export const TYPICAL_ALLOWABLE_PRESSURES: readonly TypicalAllowablePressure[] = [
  { groundType: 'dense gravel, or dense sand and gravel', minKpa: 600, maxKpa: null },
  { groundType: 'medium dense gravel, or medium dense sand and gravel', minKpa: 200, maxKpa: 600 },
  { groundType: 'loose gravel, or loose sand and gravel', minKpa: 0, maxKpa: 200 },
  { groundType: 'compact sand', minKpa: 300, maxKpa: null },
  { groundType: 'medium dense sand', minKpa: 100, maxKpa: 300 },
  { groundType: 'loose sand', minKpa: 0, maxKpa: 100 },
  { groundType: 'very stiff boulder clay and hard clay', minKpa: 300, maxKpa: 600 },
  { groundType: 'stiff clay', minKpa: 150, maxKpa: 300 },
  { groundType: 'firm clay', minKpa: 75, maxKpa: 150 },
  { groundType: 'soft clay and silt', minKpa: 0, maxKpa: 75 },
];

/** Label to show beside the typical-pressure table wherever it appears. */
export const TYPICAL_ALLOWABLE_PRESSURES_LABEL =
  'Guidance only (from memory of BS 8004:1986 Table 1): use the allowable pressure from a ground investigation or temporary-works design.';
