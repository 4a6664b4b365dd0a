/**
 * Site hazards: minimum approach distance to power lines and the fall zone of the boom.
 */
import { finiteResult, requireNonNegative, requirePositive } from './errors';
import { METRES_PER_FT } from './units';

/** One row of the minimum clearance table. */
export interface PowerLineClearanceRow {
  /** Upper end of the band, kV, inclusive ("over 50 to 200 means up to and including 200 kV"). */
  upToKv: number;
  clearanceFt: number;
}

/** 29 CFR 1926.1408 Table A, minimum clearance distances (nominal kV, alternating current). */
export const POWER_LINE_CLEARANCE_TABLE: readonly PowerLineClearanceRow[] = [
  { upToKv: 50, clearanceFt: 10 },
  { upToKv: 200, clearanceFt: 15 },
  { upToKv: 350, clearanceFt: 20 },
  { upToKv: 500, clearanceFt: 25 },
  { upToKv: 750, clearanceFt: 35 },
  { upToKv: 1000, clearanceFt: 45 },
];

/** Where the clearance table is published. */
export const POWER_LINE_CLEARANCE_SOURCE = '29 CFR 1926.1408 Table A (Minimum Clearance Distances)';

/** Minimum approach distance for a nominal voltage, or the reason the table gives none. */
export type PowerLineClearance =
  | { clearanceM: number; clearanceFt: number; rule: string }
  | { clearanceM: null; clearanceFt: null; reason: string; rule: string };

/** Minimum clearance distance to a power line by nominal voltage (kV). */
export function powerLineClearanceM(kv: number): PowerLineClearance {
  const v = requirePositive('kv', kv);
  const row = POWER_LINE_CLEARANCE_TABLE.find((r) => v <= r.upToKv);
  if (!row) {
    return {
      clearanceM: null,
      clearanceFt: null,
      reason:
        'over 1,000 kV: as established by the utility owner/operator or a registered professional engineer who is a qualified person',
      rule: POWER_LINE_CLEARANCE_SOURCE,
    };
  }
  return {
    clearanceM: row.clearanceFt * METRES_PER_FT,
    clearanceFt: row.clearanceFt,
    rule: `${POWER_LINE_CLEARANCE_SOURCE}: up to ${row.upToKv} kV → ${row.clearanceFt} ft`,
  };
}

/**
 * Fall zone radius around the boom foot: boom length + tip extension (aux sheave, jib) + margin.
 * Common practice, no source; the margin is the site's setting, not a published value.
 */
export function fallZoneRadiusM(input: { boomLengthM: number; tipExtensionM: number; marginM: number }): {
  radiusM: number;
  rule: string;
} {
  const boom = requirePositive('boomLengthM', input.boomLengthM);
  const tip = requireNonNegative('tipExtensionM', input.tipExtensionM);
  const margin = requireNonNegative('marginM', input.marginM);
  const r = finiteResult('boomLengthM', boom + tip + margin);
  return { radiusM: r, rule: 'radius = boom length + tip extension + margin (common practice, no source; margin is a site setting)' };
}
