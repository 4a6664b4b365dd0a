import type { Spread } from './types.js';

function sortedCopy(values: readonly number[]): number[] {
  return [...values].sort((a, b) => a - b);
}

/**
 * The p-th percentile (0–100) by nearest rank: always a value that was measured, never one made up
 * between two, so a p99 over a hundred samples is the 99th slowest and a max is p100. NaN when empty.
 */
export function percentile(values: readonly number[], p: number): number {
  if (values.length === 0) return Number.NaN;
  if (p < 0 || p > 100) throw new RangeError(`percentile ${p} is outside 0–100`);
  const sorted = sortedCopy(values);
  const rank = Math.max(1, Math.ceil((p / 100) * sorted.length));
  return sorted[rank - 1];
}

/** The median; with an even count the mean of the two middle values (NaN when empty). */
export function median(values: readonly number[]): number {
  if (values.length === 0) return Number.NaN;
  const sorted = sortedCopy(values);
  const middle = Math.floor(sorted.length / 2);
  return sorted.length % 2 === 1 ? sorted[middle] : (sorted[middle - 1] + sorted[middle]) / 2;
}

/** The median of the rounds with their min and max, keeping every round in the order measured. */
export function spreadOf(runs: readonly number[]): Spread {
  if (runs.length === 0) return { median: Number.NaN, min: Number.NaN, max: Number.NaN, runs: [] };
  return { median: median(runs), min: Math.min(...runs), max: Math.max(...runs), runs: [...runs] };
}

/** Holdline's median over a baseline's, or undefined when either is missing or the baseline is zero. */
export function ratioOf(holdline: Spread | undefined, baseline: Spread | undefined): number | undefined {
  if (!holdline || !baseline || !Number.isFinite(holdline.median) || !Number.isFinite(baseline.median) || baseline.median === 0) return undefined;
  return holdline.median / baseline.median;
}
