/**
 * Wire rope: breaking force, design factor, D/d ratios, fleet angle and rope on the drum.
 */
import { CalcInputError, finiteResult, requireInRange, requireInteger, requireNonNegative, requirePositive } from './errors';

/**
 * Minimum breaking force factor K per rope class and core (EN 12385-4 / ISO 2408 factors, as
 * tabulated in a rope maker's published "calculation variables" table; class 6x7 FC checked against
 * API Spec 9A Table C.1). Rotation-resistant ropes have no preset here: use the breaking force
 * certified for the rope, held in the crane data.
 */
export const BREAKING_FORCE_FACTOR_K = {
  '6x7-FC': 0.332,
  '6x7-IWRC': 0.359,
  '6x19-FC': 0.33,
  '6x19-IWRC': 0.356,
  '6x36-FC': 0.33,
  '6x36-IWRC': 0.356,
  '8x36-FC': 0.293,
  '8x36-IWRC': 0.356,
} as const satisfies Record<string, number>;

/** Minimum breaking force F = K·d²·R/1000 (kN from mm and N/mm²). */
export function minimumBreakingForceKn(input: { diameterMm: number; gradeNpmm2: number; factorK: number }): {
  minimumBreakingForceKn: number;
  rule: string;
} {
  const d = requirePositive('diameterMm', input.diameterMm);
  const r = requirePositive('gradeNpmm2', input.gradeNpmm2);
  const k = requireInRange('factorK', input.factorK, 0, 1, { minExclusive: true });
  return {
    minimumBreakingForceKn: finiteResult('diameterMm', (k * d * d * r) / 1000),
    rule: 'F_min = K·d²·R_r/1000 (ISO 2408; EN 12385-2)',
  };
}

/** The duty a rope serves, which sets its minimum design factor. */
export type RopeDuty = 'running' | 'standing' | 'rotationResistant';

/** Minimum design factors (minimum breaking force ÷ line pull) by rope duty. */
export const DESIGN_FACTOR_MINIMUMS: Readonly<Record<RopeDuty, number>> = {
  running: 3.5,
  standing: 3.0,
  rotationResistant: 5.0,
};

/**
 * Where the design-factor minimums are published. The rotation-resistant 5 is 29 CFR
 * 1926.1414(e)(2)(iii)–(iv) as the regulation text reads; (e)(3) only sets the conditions under
 * which Types II and III may go below 5 (never below the 3.5 of (e)(2)(ii)), which Holdline does
 * not apply: it keeps 5.
 */
export const DESIGN_FACTOR_SOURCE =
  'ASME B30.5 §5-1.7.1 (same wording ASME B30.22-2000 §22-1.5.1: running 3.5, standing 3.0, rotation-resistant 5); 29 CFR 1926.1414(e)(2)(iii)–(iv): rotation-resistant rope not less than 5 (the exceptions of (e)(3) are not applied)';

const DUTY_WORDS: Readonly<Record<RopeDuty, string>> = { running: 'running', standing: 'standing', rotationResistant: 'rotation-resistant' };

/** Design factor = minimum breaking force ÷ line pull. */
export function designFactor(input: { minimumBreakingForceKn: number; linePullKn: number }): {
  designFactor: number;
  rule: string;
} {
  const mbf = requirePositive('minimumBreakingForceKn', input.minimumBreakingForceKn);
  const pull = requirePositive('linePullKn', input.linePullKn);
  return {
    designFactor: finiteResult('minimumBreakingForceKn', mbf / pull),
    rule: 'design factor = minimum breaking force ÷ line pull (ASME B30.5 §5-1.7.1)',
  };
}

/** Design factor compared with the published minimum for the rope's duty. */
export function designFactorCheck(input: { minimumBreakingForceKn: number; linePullKn: number; duty: RopeDuty }): {
  designFactor: number;
  minimumDesignFactor: number;
  pass: boolean;
  rule: string;
} {
  if (!Object.hasOwn(DESIGN_FACTOR_MINIMUMS, input.duty)) throw new CalcInputError('duty', `unknown rope duty ${String(input.duty)}`);
  const minimum = DESIGN_FACTOR_MINIMUMS[input.duty];
  const { designFactor: df } = designFactor(input);
  return {
    designFactor: df,
    minimumDesignFactor: minimum,
    pass: df >= minimum,
    rule: `design factor ≥ ${minimum} for ${DUTY_WORDS[input.duty]} rope (${DESIGN_FACTOR_SOURCE})`,
  };
}

/** Where the rope bends, which sets its minimum D/d. */
export type BendingElement = 'drum' | 'boomHoistDrum' | 'loadSheave' | 'boomHoistSheave' | 'lowerBlockSheave';

/** Minimum pitch-diameter-to-rope-diameter ratios; each one's paragraph of ASME B30.5 is in D_OVER_D_BASIS. */
export const D_OVER_D_MINIMUMS: Readonly<Record<BendingElement, number>> = {
  drum: 18,
  boomHoistDrum: 15,
  loadSheave: 18,
  boomHoistSheave: 15,
  lowerBlockSheave: 16,
};

/** Each element in words, with the paragraph that sets its minimum. */
const D_OVER_D_BASIS: Readonly<Record<BendingElement, { words: string; source: string }>> = {
  drum: { words: 'a load hoist drum', source: 'ASME B30.5-2018 §5-1.3.1(a)(3), first layer; wording as published, paragraph number from memory' },
  boomHoistDrum: { words: 'a boom hoist drum', source: 'ASME B30.5 §5-1.3.2, from memory' },
  loadSheave: { words: 'a load hoisting sheave (every tip, guide or idler sheave the hoist rope runs over)', source: 'ASME B30.5 §5-1.7.4(b); wording as published, paragraph letter from memory' },
  boomHoistSheave: { words: 'a boom hoisting sheave', source: 'ASME B30.5 §5-1.7.4(a); wording as published, paragraph letter from memory' },
  lowerBlockSheave: { words: 'a lower load block sheave', source: 'ASME B30.5 §5-1.7.4(c); wording as published, paragraph letter from memory' },
};

/** D/d of a drum or sheave against the published minimum. */
export function dOverDCheck(input: { pitchDiameterMm: number; ropeDiameterMm: number; element: BendingElement }): {
  ratio: number;
  minimumRatio: number;
  minimumPitchDiameterMm: number;
  pass: boolean;
  rule: string;
} {
  const pd = requirePositive('pitchDiameterMm', input.pitchDiameterMm);
  const d = requirePositive('ropeDiameterMm', input.ropeDiameterMm);
  if (!Object.hasOwn(D_OVER_D_MINIMUMS, input.element)) {
    throw new CalcInputError('element', `unknown element ${String(input.element)}`);
  }
  const minimum = D_OVER_D_MINIMUMS[input.element];
  const ratio = finiteResult('pitchDiameterMm', pd / d);
  return {
    ratio,
    minimumRatio: minimum,
    minimumPitchDiameterMm: finiteResult('ropeDiameterMm', minimum * d),
    pass: ratio >= minimum,
    rule: `D/d ≥ ${minimum} for ${D_OVER_D_BASIS[input.element].words} (${D_OVER_D_BASIS[input.element].source})`,
  };
}

/** Fleet angle limits; sources differ, so these are settings that name where they come from. */
export interface FleetAngleLimits {
  smoothDrumMaxDeg: number;
  groovedDrumMaxDeg: number;
  minDeg: number;
  source: string;
}

/** Default fleet angle limits. */
export const FLEET_ANGLE_LIMITS: Readonly<FleetAngleLimits> = {
  smoothDrumMaxDeg: 1.5,
  groovedDrumMaxDeg: 2,
  minDeg: 0.5,
  source: 'Wire Rope Users Manual (Wire Rope Technical Board), fleet angle: ≤ 1½° smooth drum, ≤ 2° grooved drum, avoid < ½°',
};

/** Fleet angle = atan(offset ÷ distance), offset from the sheave's centre line to the drum flange. */
export function fleetAngleDeg(input: { offsetM: number; distanceM: number }): { fleetAngleDeg: number; rule: string } {
  const offset = requireNonNegative('offsetM', input.offsetM);
  const distance = requirePositive('distanceM', input.distanceM);
  return {
    fleetAngleDeg: (Math.atan2(offset, distance) * 180) / Math.PI,
    rule: 'fleet angle = atan(offset ÷ distance from lead sheave to drum) (Wire Rope Users Manual)',
  };
}

/** Fleet angle compared with the limits for the drum's surface. */
export function fleetAngleCheck(input: {
  offsetM: number;
  distanceM: number;
  drumSurface: 'smooth' | 'grooved';
  limits?: FleetAngleLimits;
}): { fleetAngleDeg: number; maxDeg: number; minDeg: number; pass: boolean; rule: string } {
  const limits = input.limits ?? FLEET_ANGLE_LIMITS;
  const { fleetAngleDeg: angle } = fleetAngleDeg(input);
  const maxDeg = input.drumSurface === 'grooved' ? limits.groovedDrumMaxDeg : limits.smoothDrumMaxDeg;
  return {
    fleetAngleDeg: angle,
    maxDeg,
    minDeg: limits.minDeg,
    pass: angle <= maxDeg && angle >= limits.minDeg,
    rule: `${limits.minDeg}° ≤ fleet angle ≤ ${maxDeg}° (${limits.source})`,
  };
}

/** Minimum full wraps left on a drum at the lowest hook position. */
export const MINIMUM_WRAPS_ON_DRUM = 2;

/** Where the two-wrap minimum is published. */
export const MINIMUM_WRAPS_SOURCE =
  'no less than two full wraps of rope on the drum with the hook in its extreme low position (ASME B30.5-2018 §5-1.3.1(a)(2)(-a), wording as published; paragraph number from memory)';

/** The hoist rope's run with the hook at its lowest, from the crane's geometry. */
export interface HoistRunInput {
  boomLengthM: number;
  /** Height of the boom foot pin above the ground. */
  footPinHeightM: number;
  /** How far the sheave the rope hangs from reaches beyond the main tip (the auxiliary sheave); 0 for the main tip. */
  beyondTipM: number;
  /** Height of the lowest hook position above the ground; negative below it (a pit, a shaft, over a quay edge). */
  lowestHookPositionM: number;
  /** Rope run from the drum to the boom foot. */
  leadToBoomFootM: number;
}

/**
 * Reeve height and lead length at the lowest hook position. The tip is taken at its highest, the
 * boom vertical: tip height = foot-pin height + boom length (+ reach beyond the tip), the most rope a
 * boom angle can pay out; the reeve height runs from there down to the lowest hook position, so the
 * block's own height is counted as rope too. The lead runs from the drum to the boom foot and up the
 * boom. Both overstate the rope paid out, never understate it.
 */
export function hoistRunAtLowestHook(input: HoistRunInput): { reeveHeightM: number; leadLengthM: number; tipHeightM: number; rule: string } {
  const boom = requirePositive('boomLengthM', input.boomLengthM);
  const foot = requireNonNegative('footPinHeightM', input.footPinHeightM);
  const beyond = requireNonNegative('beyondTipM', input.beyondTipM);
  const lead = requireNonNegative('leadToBoomFootM', input.leadToBoomFootM);
  const lowest = input.lowestHookPositionM;
  if (typeof lowest !== 'number' || !Number.isFinite(lowest)) throw new CalcInputError('lowestHookPositionM', `must be a finite height, got ${String(lowest)}`);
  const tipHeightM = foot + boom + beyond;
  if (lowest >= tipHeightM) throw new CalcInputError('lowestHookPositionM', `is at or above the tip (${tipHeightM.toFixed(1)} m): the hook cannot hang there`);
  return {
    reeveHeightM: tipHeightM - lowest,
    leadLengthM: lead + boom + beyond,
    tipHeightM,
    rule: 'reeve height = foot-pin height + boom length (+ reach beyond the tip) − lowest hook position (boom vertical: the most rope paid out); lead = drum to boom foot + boom length (+ reach beyond the tip)',
  };
}

/** Fleet angle at both flanges of a drum whose first sheave may sit to one side of its centre. */
export function drumFleetAngleCheck(input: {
  drumWidthM: number;
  distanceM: number;
  offsetFromDrumCentreM: number;
  drumSurface: 'smooth' | 'grooved';
  limits?: FleetAngleLimits;
}): { largestDeg: number; smallestDeg: number; maxDeg: number; minDeg: number; pass: boolean; rule: string } {
  const half = requirePositive('drumWidthM', input.drumWidthM) / 2;
  const off = requireNonNegative('offsetFromDrumCentreM', input.offsetFromDrumCentreM);
  const far = fleetAngleCheck({ offsetM: half + off, distanceM: input.distanceM, drumSurface: input.drumSurface, limits: input.limits });
  const near = fleetAngleCheck({ offsetM: Math.abs(half - off), distanceM: input.distanceM, drumSurface: input.drumSurface, limits: input.limits });
  return {
    largestDeg: far.fleetAngleDeg,
    smallestDeg: near.fleetAngleDeg,
    maxDeg: far.maxDeg,
    minDeg: far.minDeg,
    pass: far.pass && near.pass,
    rule: `at each flange: fleet angle = atan((half the drum width ± sheave offset) ÷ distance to the first sheave); ${far.rule}`,
  };
}

/** Geometry of the reeving at the lowest hook position. */
export interface RopeRunInput {
  /** Parts of line between the tip sheaves and the hook block. */
  parts: number;
  /** Vertical distance from the tip sheaves to the hook block at its lowest position. */
  reeveHeightM: number;
  /** Rope from the drum up the boom to the tip sheaves (including the dead-end run). */
  leadLengthM: number;
  /** Pitch diameter of the first layer on the drum. */
  drumDiameterM: number;
}

function checkRun(input: RopeRunInput): void {
  requireInteger('parts', input.parts, 1, 100);
  requireNonNegative('reeveHeightM', input.reeveHeightM);
  requireNonNegative('leadLengthM', input.leadLengthM);
  requirePositive('drumDiameterM', input.drumDiameterM);
}

/** Rope length needed: parts × reeve height + lead length + the wraps left on the drum. */
export function ropeLengthRequiredM(input: RopeRunInput & { wrapsLeftOnDrum: number }): {
  ropeLengthRequiredM: number;
  rule: string;
} {
  checkRun(input);
  const wraps = requireNonNegative('wrapsLeftOnDrum', input.wrapsLeftOnDrum);
  const length = input.parts * input.reeveHeightM + input.leadLengthM + wraps * Math.PI * input.drumDiameterM;
  return {
    ropeLengthRequiredM: finiteResult('reeveHeightM', length),
    rule: 'length = parts × reeve height + lead length + wraps × π × drum pitch diameter (geometry; first layer)',
  };
}

/**
 * Full wraps left on the drum when the hook is at its lowest, against the minimum. The wraps left
 * lie in the first layer, so the first-layer pitch diameter is the right one to use.
 */
export function wrapsLeftOnDrum(input: RopeRunInput & { ropeLengthM: number; minimumWraps?: number }): {
  wrapsLeft: number;
  minimumWraps: number;
  ropeShortM: number;
  pass: boolean;
  rule: string;
} {
  checkRun(input);
  const ropeLength = requirePositive('ropeLengthM', input.ropeLengthM);
  const minimumWraps = requireNonNegative('minimumWraps', input.minimumWraps ?? MINIMUM_WRAPS_ON_DRUM);
  const paidOut = input.parts * input.reeveHeightM + input.leadLengthM;
  const circumference = Math.PI * input.drumDiameterM;
  const raw = finiteResult('ropeLengthM', (ropeLength - paidOut) / circumference);
  return {
    wrapsLeft: Math.max(0, raw),
    minimumWraps,
    ropeShortM: finiteResult('ropeLengthM', Math.max(0, (minimumWraps - raw) * circumference)),
    pass: raw >= minimumWraps,
    rule: `wraps = (rope length − parts × reeve height − lead length) ÷ (π × drum diameter) ≥ ${minimumWraps} (${MINIMUM_WRAPS_SOURCE})`,
  };
}
