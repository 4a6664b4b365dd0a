/**
 * Reading a rated capacity chart, for the main crane and the assist crane alike, and the bands a
 * share of it falls in. The reading rules are common practice with no published source: the
 * capacity is read at the next LONGER listed radius (a lower or equal capacity, since a chart
 * never rises with radius), never interpolated between rows and never extended beyond them. The
 * crane's own chart, its notes and its rated capacity limiter always govern.
 */
import { fmtUp } from '../format';
import { CalcInputError, finiteResult, requireInRange, requireNonNegative, requirePositive } from './errors';
import { STANDARD_GRAVITY_MPS2 } from './units';

/** One row of a chart as both the crane model data and the assist-crane data give it. */
export interface ChartRow {
  radiusM: number;
  capacityT: number;
}

/** How a chart is read (common practice, no source). */
export const CHART_READING_RULE =
  'capacity read at the next longer listed radius, never between rows and never beyond them (common practice, no source; the crane’s own chart and its notes govern)';

/** A chart reading: covered with a capacity, or not covered with the reason. */
export type ChartReading =
  | { covered: true; capacityKn: number; capacityT: number; chartRadiusM: number; rule: string }
  | { covered: false; capacityKn: null; capacityT: null; chartRadiusM: null; reason: string; rule: string };

/** The capacity of one chart at a radius, read at the next longer listed radius. */
export function readChart(points: readonly ChartRow[], radiusM: number): ChartReading {
  const radius = requirePositive('radiusM', radiusM);
  if (!Array.isArray(points) || points.length === 0) throw new CalcInputError('chart', 'has no radius/capacity rows');
  for (const [i, p] of points.entries()) {
    requirePositive(`chart.points.${i}.radiusM`, p.radiusM);
    requireNonNegative(`chart.points.${i}.capacityT`, p.capacityT);
  }
  const rows = [...points].sort((a, b) => a.radiusM - b.radiusM);
  const first = rows[0];
  const last = rows[rows.length - 1];
  const notCovered = (reason: string): ChartReading => ({ covered: false, capacityKn: null, capacityT: null, chartRadiusM: null, reason, rule: CHART_READING_RULE });
  // Inside the shortest radius the boom would be steeper than the chart covers.
  if (radius < first.radiusM) return notCovered(`radius ${radius} m is shorter than the chart's shortest radius ${first.radiusM} m: not covered by the chart`);
  const next = rows.find((p) => p.radiusM >= radius);
  if (!next) return notCovered(`radius ${radius} m is beyond the chart's last radius ${last.radiusM} m: no capacity`);
  const capacityT = next.capacityT;
  return { covered: true, capacityKn: finiteResult('chart', capacityT * STANDARD_GRAVITY_MPS2), capacityT, chartRadiusM: next.radiusM, rule: CHART_READING_RULE };
}

/** Where a share of a rating falls: within the caution share, above it, or above the rating. */
export type ChartBand = 'pass' | 'caution' | 'fail';

/** Above 100 % fails; above the site's caution share needs care; at or below it passes. */
export function chartBand(sharePercent: number, cautionPercent: number): ChartBand {
  const share = requireNonNegative('sharePercent', sharePercent);
  const caution = requireInRange('cautionPercent', cautionPercent, 1, 100);
  if (share > 100) return 'fail';
  if (share > caution) return 'caution';
  return 'pass';
}

/** A share of a chart or of a stated limit, with its band. */
export interface ShareResult {
  totalKn: number;
  /** The rating it is compared with; null when the chart does not cover the radius. */
  capacityKn: number | null;
  chartRadiusM: number | null;
  /** total ÷ rating × 100; null when there is no rating to compare with. */
  sharePercent: number | null;
  band: ChartBand;
  /** Why it fails or needs care; null when it passes. */
  reason: string | null;
  rule: string;
}

function bandReason(band: ChartBand, share: number, cautionPercent: number, where: string): string | null {
  if (band === 'fail') return `${percentUp(share)} % of ${where}: above 100 %`;
  if (band === 'caution') return `${percentUp(share)} % of ${where}: above the site's caution share of ${cautionPercent} %`;
  return null;
}

/** A load as a share of a chart at a radius: fails off the chart or above 100 %, caution above the site's share. */
export function chartShare(input: { loadKn: number; points: readonly ChartRow[]; radiusM: number; cautionPercent: number }): ShareResult {
  const total = requireNonNegative('loadKn', input.loadKn);
  const caution = requireInRange('cautionPercent', input.cautionPercent, 1, 100);
  const reading = readChart(input.points, input.radiusM);
  const rule = `share = everything on the hook ÷ chart capacity, shown rounded up to 0.1 %; above 100 % refused, above ${caution} % (the site's caution share) needs care; ${CHART_READING_RULE}`;
  if (!reading.covered) return { totalKn: total, capacityKn: null, chartRadiusM: null, sharePercent: null, band: 'fail', reason: reading.reason, rule };
  if (reading.capacityKn === 0) {
    return { totalKn: total, capacityKn: 0, chartRadiusM: reading.chartRadiusM, sharePercent: null, band: 'fail', reason: `the chart gives no capacity at ${reading.chartRadiusM} m`, rule };
  }
  const share = finiteResult('loadKn', (total / reading.capacityKn) * 100);
  const band = chartBand(share, caution);
  return { totalKn: total, capacityKn: reading.capacityKn, chartRadiusM: reading.chartRadiusM, sharePercent: share, band, reason: bandReason(band, share, caution, `the chart at ${reading.chartRadiusM} m`), rule };
}

/** A load as a share of a stated limit (e.g. the most allowed at the tip for an unassisted raise). */
export function limitShare(input: { loadKn: number; limitKn: number; cautionPercent: number }): ShareResult {
  const total = requireNonNegative('loadKn', input.loadKn);
  const limit = requirePositive('limitKn', input.limitKn);
  const caution = requireInRange('cautionPercent', input.cautionPercent, 1, 100);
  const share = finiteResult('loadKn', (total / limit) * 100);
  const band = chartBand(share, caution);
  return {
    totalKn: total,
    capacityKn: limit,
    chartRadiusM: null,
    sharePercent: share,
    band,
    reason: bandReason(band, share, caution, 'the limit'),
    rule: `share = load ÷ the manufacturer's limit, shown rounded up to 0.1 %; above 100 % refused, above ${caution} % (the site's caution share) needs care`,
  };
}

/** A percentage for people, rounded UP to one decimal so a share never reads lower than it is. */
export function percentUp(sharePercent: number): string {
  return fmtUp(sharePercent, 1);
}
