/**
 * Wind: Beaufort force, dynamic pressure, and the check against the crane model's own limits.
 */
import type { WindLimit } from '../schemas/arrangement';
import { CalcInputError, finiteResult, requireNonNegative } from './errors';

/** One Beaufort force with the lower bound of its 10-minute mean speed band. */
export interface BeaufortBand {
  force: number;
  description: string;
  /** Lowest mean speed of the band, m/s (bands as published to 0.1 m/s). */
  fromMs: number;
}

/**
 * Beaufort scale bands in m/s as meteorological services publish them (0–0.2, 0.3–1.5, 1.6–3.3 …
 * 32.7 and above); names as the UK Met Office lists them.
 */
export const BEAUFORT_SCALE: readonly BeaufortBand[] = [
  { force: 0, description: 'Calm', fromMs: 0 },
  { force: 1, description: 'Light air', fromMs: 0.3 },
  { force: 2, description: 'Light breeze', fromMs: 1.6 },
  { force: 3, description: 'Gentle breeze', fromMs: 3.4 },
  { force: 4, description: 'Moderate breeze', fromMs: 5.5 },
  { force: 5, description: 'Fresh breeze', fromMs: 8.0 },
  { force: 6, description: 'Strong breeze', fromMs: 10.8 },
  { force: 7, description: 'Near gale', fromMs: 13.9 },
  { force: 8, description: 'Gale', fromMs: 17.2 },
  { force: 9, description: 'Strong gale', fromMs: 20.8 },
  { force: 10, description: 'Storm', fromMs: 24.5 },
  { force: 11, description: 'Violent storm', fromMs: 28.5 },
  { force: 12, description: 'Hurricane force', fromMs: 32.7 },
];

/** Beaufort force for a mean wind speed; a speed between two published bands goes to the lower force. */
export function beaufortForce(speedMs: number): { force: number; description: string; rule: string } {
  const v = requireNonNegative('speedMs', speedMs);
  let band = BEAUFORT_SCALE[0];
  for (const b of BEAUFORT_SCALE) if (v >= b.fromMs) band = b;
  return {
    force: band.force,
    description: band.description,
    rule: 'Beaufort scale, mean speed bands in m/s as published by meteorological services (WMO / Met Office)',
  };
}

/** Dynamic wind pressure q = 0.613·v² (N/m² from m/s). */
export function windPressureNpm2(speedMs: number): { pressureNpm2: number; rule: string } {
  const v = requireNonNegative('speedMs', speedMs);
  return { pressureNpm2: finiteResult('speedMs', 0.613 * v * v), rule: 'q = 0.613·v² (ISO 4302)' };
}

/** Result of a wind check. */
export interface WindCheckResult {
  pass: boolean;
  gustWithinLimit: boolean;
  meanWithinLimit: boolean;
  reasons: string[];
  rule: string;
}

/**
 * Measured gust and mean against a limit taken from the crane model's data (assembly or raising
 * for the boom length); Holdline has no wind limits of its own. At the limit counts as within it.
 */
export function windCheck(input: { gustMs: number; meanMs: number; limits: WindLimit }): WindCheckResult {
  const gust = requireNonNegative('gustMs', input.gustMs);
  const mean = requireNonNegative('meanMs', input.meanMs);
  if (!input.limits) throw new CalcInputError('limits', 'must come from the crane model data');
  const gustLimit = requireNonNegative('limits.gustMs', input.limits.gustMs);
  const meanLimit = requireNonNegative('limits.meanMs', input.limits.meanMs);
  // A gust is the peak over the same period as the mean, so it cannot be lower than the mean.
  if (gust < mean) throw new CalcInputError('gustMs', `the gust (${gust} m/s) cannot be lower than the mean (${mean} m/s)`);
  const gustOk = gust <= gustLimit;
  const meanOk = mean <= meanLimit;
  const reasons: string[] = [];
  if (!gustOk) reasons.push(`gust ${gust} m/s is above the limit of ${gustLimit} m/s`);
  if (!meanOk) reasons.push(`mean ${mean} m/s is above the limit of ${meanLimit} m/s`);
  return {
    pass: gustOk && meanOk,
    gustWithinLimit: gustOk,
    meanWithinLimit: meanOk,
    reasons,
    rule: 'gust ≤ gust limit and mean ≤ mean limit, limits from the crane model data (manufacturer)',
  };
}
