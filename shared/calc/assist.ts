/**
 * The assist crane: its lifts as a share of its own chart (read by the one chart reader in
 * chart.ts), its outrigger or track pads on the ground, and its share of the main boom when it
 * carries the tip while the boom leaves the ground (a tandem lift). The assist crane's own chart,
 * its notes, its limiter and its outrigger-load data always govern.
 */
import type { AssistChart } from '../schemas/arrangement';
import { chartShare, readChart, type ChartBand, type ChartReading } from './chart';
import { CalcInputError, finiteResult, requireInRange, requireNonNegative, requirePositive } from './errors';

/** Capacity of one assist-crane chart configuration at a radius, read at the next longer listed radius. */
export function chartCapacityKn(chart: AssistChart, radiusM: number): ChartReading {
  if (!chart || !Array.isArray(chart.points) || chart.points.length === 0) throw new CalcInputError('chart', 'has no radius/capacity points');
  return readChart(chart.points, radiusM);
}

/** Result of an assist-crane lift check. */
export interface AssistLiftResult {
  /** Everything on the assist crane's hook, chart deductions included. */
  totalKn: number;
  capacityKn: number | null;
  chartRadiusM: number | null;
  /** total ÷ chart capacity × 100; null when the chart does not cover the radius. */
  sharePercent: number | null;
  band: ChartBand;
  /** True unless the share is above 100 % or the chart does not cover the radius. */
  pass: boolean;
  reason: string | null;
  rule: string;
}

/**
 * The lift, its rigging, the assist crane's own hook block, slings, shackles and the deductions
 * its chart states, as a share of its chart at the radius. Above 100 % or off the chart fails;
 * above the caution share (100 % when not given) needs care.
 */
export function assistLiftCheck(input: {
  liftKn: number;
  riggingKn: number;
  hookBlockKn?: number;
  slingsKn?: number;
  shacklesKn?: number;
  deductionsKn?: number;
  chart: AssistChart;
  radiusM: number;
  cautionPercent?: number;
}): AssistLiftResult {
  const parts = [
    requireNonNegative('liftKn', input.liftKn),
    requireNonNegative('riggingKn', input.riggingKn),
    requireNonNegative('hookBlockKn', input.hookBlockKn ?? 0),
    requireNonNegative('slingsKn', input.slingsKn ?? 0),
    requireNonNegative('shacklesKn', input.shacklesKn ?? 0),
    requireNonNegative('deductionsKn', input.deductionsKn ?? 0),
  ];
  const total = finiteResult('liftKn', parts.reduce((a, b) => a + b, 0));
  if (!input.chart || !Array.isArray(input.chart.points) || input.chart.points.length === 0) throw new CalcInputError('chart', 'has no radius/capacity points');
  const s = chartShare({ loadKn: total, points: input.chart.points, radiusM: input.radiusM, cautionPercent: input.cautionPercent ?? 100 });
  return {
    totalKn: s.totalKn,
    capacityKn: s.capacityKn,
    chartRadiusM: s.chartRadiusM,
    sharePercent: s.sharePercent,
    band: s.band,
    pass: s.band !== 'fail',
    reason: s.reason,
    rule: `load = lift + rigging + the assist crane's hook block + slings + shackles + the deductions its chart states; ${s.rule}`,
  };
}

/** Bearing pressure under one outrigger or track pad. */
export interface PadPressureResult {
  pressureKpa: number;
  areaM2: number;
  rule: string;
}

/**
 * Pressure under a pad loaded at its centre, taken as uniform: q = (load + pad weight) ÷ (length ×
 * width). A rigid pad loaded centrally (Das, Principles of Foundation Engineering: q = Q ÷ A for a
 * centrally loaded footing); a flexible or off-centre pad presses harder under the load.
 */
export function padPressure(input: { loadKn: number; padLengthM: number; padWidthM: number; padWeightKn: number }): PadPressureResult {
  const load = requireNonNegative('loadKn', input.loadKn);
  const l = requirePositive('padLengthM', input.padLengthM);
  const w = requirePositive('padWidthM', input.padWidthM);
  const pad = requireNonNegative('padWeightKn', input.padWeightKn);
  const area = finiteResult('padLengthM', l * w);
  return {
    pressureKpa: finiteResult('loadKn', (load + pad) / area),
    areaM2: area,
    rule: 'q = (outrigger or track load + pad weight) ÷ (pad length × width), uniform under a rigid pad loaded at its centre (Das, Principles of Foundation Engineering: q = Q ÷ A); a pad that bends presses harder under the float',
  };
}

/** The load the assist crane carries at the tip of the main boom, the boom hoist taken as carrying nothing. */
export function tipReactionKn(input: { boomWeightKn: number; boomCogFromFootM: number; boomLengthM: number; tipLoadKn: number }): { reactionKn: number; rule: string } {
  const w = requireNonNegative('boomWeightKn', input.boomWeightKn);
  const length = requirePositive('boomLengthM', input.boomLengthM);
  const cog = requireInRange('boomCogFromFootM', input.boomCogFromFootM, 0, length);
  const tip = requireNonNegative('tipLoadKn', input.tipLoadKn);
  // Moments about the foot pin with the assist line vertical at the tip: R·L·cos θ = W·x̄·cos θ + P·L·cos θ,
  // so the share does not change with the boom angle while the boom hoist is taken as slack (the safe side).
  return {
    reactionKn: finiteResult('boomWeightKn', (w * cog) / length + tip),
    rule: 'tip reaction = boom weight × its centre of gravity from the foot ÷ boom length + what hangs at the tip (moments about the foot pin, the assist line vertical at the tip, the boom hoist taken as carrying nothing: the safe side)',
  };
}

/** The assist crane's radius to the main boom tip as the boom rises. */
export function tandemRadiusM(input: { boomLengthM: number; boomAngleDeg: number; alongFromTipM: number; sideM: number }): number {
  const length = requirePositive('boomLengthM', input.boomLengthM);
  const angle = requireInRange('boomAngleDeg', input.boomAngleDeg, 0, 90);
  const along = requireInRange('alongFromTipM', input.alongFromTipM, -100, 300);
  const side = requireNonNegative('sideM', input.sideM);
  // The tip comes back towards the main crane by L(1 − cos θ); the assist crane stands `along` in
  // from where the tip lay flat (towards the main crane) and `side` off the boom line.
  const dx = length * (1 - Math.cos((angle * Math.PI) / 180)) - along;
  return finiteResult('boomLengthM', Math.hypot(dx, side));
}

/** One boom angle of a tandem raise. */
export interface TandemStep {
  angleDeg: number;
  radiusM: number;
  /** Height of the boom tip pin above the ground, the boom foot at its stated height. */
  tipHeightM: number;
  /**
   * A rough top of the assist crane's reach at this radius: √(its boom² − radius²) from the
   * ground; null when the radius is beyond its boom. Its range diagram governs.
   */
  reachHeightM: number | null;
  /** The tip is higher than the assist crane can reach at this radius. */
  outOfReach: boolean;
  share: AssistLiftResult;
}

/**
 * The assist crane's share of the main boom at 0°, 10°, 20°... and at the angle from which the
 * main crane carries the boom alone (the release angle, from the manufacturer's raising
 * procedure): the tip leaves the assist there, so the steps stop there.
 */
export function tandemRaise(input: {
  boomWeightKn: number;
  boomCogFromFootM: number;
  boomLengthM: number;
  /** What hangs at or is carried by the tip: hook blocks, auxiliary sheave, guy lines. */
  tipLoadKn: number;
  /** The assist crane's own hook block, slings, shackles and chart deductions. */
  riggingKn: number;
  footHeightM: number;
  alongFromTipM: number;
  sideM: number;
  releaseAngleDeg: number;
  chart: AssistChart;
  cautionPercent: number;
}): { reactionKn: number; steps: TandemStep[]; rule: string } {
  const release = requireInRange('releaseAngleDeg', input.releaseAngleDeg, 1, 85);
  const foot = requireNonNegative('footHeightM', input.footHeightM);
  const rigging = requireNonNegative('riggingKn', input.riggingKn);
  const reaction = tipReactionKn(input);
  const angles: number[] = [];
  for (let a = 0; a < release; a += 10) angles.push(a);
  angles.push(release);
  const steps = angles.map((angleDeg) => {
    const radiusM = tandemRadiusM({ boomLengthM: input.boomLengthM, boomAngleDeg: angleDeg, alongFromTipM: input.alongFromTipM, sideM: input.sideM });
    const tipHeightM = finiteResult('boomLengthM', foot + input.boomLengthM * Math.sin((angleDeg * Math.PI) / 180));
    // A radius that rounds to nothing is the hook over the slewing centre: off any chart.
    const share = assistLiftCheck({ liftKn: reaction.reactionKn, riggingKn: rigging, chart: input.chart, radiusM: Math.max(radiusM, 1e-6), cautionPercent: input.cautionPercent });
    const boom = requirePositive('chart.boomLengthM', input.chart.boomLengthM);
    const reachHeightM = radiusM < boom ? Math.sqrt(boom * boom - radiusM * radiusM) : null;
    return { angleDeg, radiusM, tipHeightM, reachHeightM, outOfReach: reachHeightM === null || tipHeightM > reachHeightM, share };
  });
  return {
    reactionKn: reaction.reactionKn,
    steps,
    rule: `${reaction.rule}; radius from the assist crane to the tip as it comes back by L(1 − cos θ); steps every 10° up to the release angle, where the main crane carries the boom alone and the tip leaves the assist; the assist crane's reach taken roughly as √(its boom² − radius²) from the ground (its boom foot height and its hook and slings left out: its range diagram governs)`,
  };
}
