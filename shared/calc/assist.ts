/**
 * Assist-crane lifts as a share of the assist crane's own chart. Reading the chart at the next
 * longer listed radius, never between or beyond its points, is common practice with no published
 * source; the assist crane's own chart and its rules always govern.
 */
import type { AssistChart } from '../schemas/arrangement';
import { CalcInputError, finiteResult, requireNonNegative, requirePositive } from './errors';
import { STANDARD_GRAVITY_MPS2 } from './units';

const CHART_RULE =
  'capacity read at the next longer listed radius, no interpolation, no extrapolation (common practice, no source; the assist crane chart governs)';

/** A chart reading: covered with a capacity, or not covered with the reason. */
export type ChartReading =
  | { covered: true; capacityKn: number; chartRadiusM: number; rule: string }
  | { covered: false; capacityKn: null; chartRadiusM: null; reason: string; rule: string };

/** Capacity of one chart configuration at a radius, read at the next longer listed radius. */
export function chartCapacityKn(chart: AssistChart, radiusM: number): ChartReading {
  const radius = requirePositive('radiusM', radiusM);
  if (!chart || !Array.isArray(chart.points) || chart.points.length === 0) {
    throw new CalcInputError('chart', 'has no radius/capacity points');
  }
  for (const [i, p] of chart.points.entries()) {
    requirePositive(`chart.points.${i}.radiusM`, p.radiusM);
    requireNonNegative(`chart.points.${i}.capacityT`, p.capacityT);
  }
  const points = [...chart.points].sort((a, b) => a.radiusM - b.radiusM);
  const first = points[0];
  const last = points[points.length - 1];
  if (radius < first.radiusM) {
    // Inside the shortest radius the boom would be steeper than the chart covers.
    return {
      covered: false,
      capacityKn: null,
      chartRadiusM: null,
      reason: `radius ${radius} m is shorter than the chart's shortest radius ${first.radiusM} m: not covered by the chart`,
      rule: CHART_RULE,
    };
  }
  const next = points.find((p) => p.radiusM >= radius);
  if (!next) {
    return {
      covered: false,
      capacityKn: null,
      chartRadiusM: null,
      reason: `radius ${radius} m is beyond the chart's last radius ${last.radiusM} m: no capacity`,
      rule: CHART_RULE,
    };
  }
  return {
    covered: true,
    capacityKn: finiteResult('chart', next.capacityT * STANDARD_GRAVITY_MPS2),
    chartRadiusM: next.radiusM,
    rule: CHART_RULE,
  };
}

/** Result of an assist-crane lift check. */
export interface AssistLiftResult {
  totalKn: number;
  capacityKn: number | null;
  chartRadiusM: number | null;
  /** (lift + rigging) ÷ chart capacity × 100; null when the chart does not cover the radius. */
  sharePercent: number | null;
  pass: boolean;
  reason: string | null;
  rule: string;
}

/** Lift plus rigging as a share of chart capacity at the radius; fails above 100 % or off the chart. */
export function assistLiftCheck(input: {
  liftKn: number;
  riggingKn: number;
  chart: AssistChart;
  radiusM: number;
}): AssistLiftResult {
  const lift = requireNonNegative('liftKn', input.liftKn);
  const rigging = requireNonNegative('riggingKn', input.riggingKn);
  const total = finiteResult('liftKn', lift + rigging);
  const reading = chartCapacityKn(input.chart, input.radiusM);
  const rule = `share = (lift + rigging) ÷ chart capacity ≤ 100 %; ${CHART_RULE}`;
  if (!reading.covered) {
    return { totalKn: total, capacityKn: null, chartRadiusM: null, sharePercent: null, pass: false, reason: reading.reason, rule };
  }
  if (reading.capacityKn === 0) {
    return {
      totalKn: total,
      capacityKn: 0,
      chartRadiusM: reading.chartRadiusM,
      sharePercent: null,
      pass: false,
      reason: `the chart gives no capacity at ${reading.chartRadiusM} m`,
      rule,
    };
  }
  const share = finiteResult('liftKn', (total / reading.capacityKn) * 100);
  return {
    totalKn: total,
    capacityKn: reading.capacityKn,
    chartRadiusM: reading.chartRadiusM,
    sharePercent: share,
    pass: share <= 100,
    reason: share <= 100 ? null : `${share.toFixed(1)} % of chart capacity at ${reading.chartRadiusM} m: above 100 %`,
    rule,
  };
}
