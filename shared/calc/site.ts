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

/** Which rule set the minimum distance to a power line. */
export type PowerLineBasis = 'table_a' | 'default' | 'default_unknown_voltage' | 'owner';

/** The default distances that apply unless Table A may be used (29 CFR 1926.1407-1409, from memory). */
export const POWER_LINE_DEFAULT_FT = { upTo350Kv: 20, over350Kv: 50 } as const;

/** Where the default distances come from; recalled, not read from the text here. */
export const POWER_LINE_DEFAULT_SOURCE =
  '29 CFR 1926.1407(a) (assembly and disassembly) and 1926.1408(a) (operation): 20 ft up to 350 kV; 1926.1409: 50 ft over 350 kV (from memory)';

/** The minimum distance to one power line, the rule behind it and why that rule applied. */
export interface PowerLineMinimum {
  clearanceM: number | null;
  clearanceFt: number | null;
  basis: PowerLineBasis;
  /** A few words for the figure's value, e.g. "20 ft default, up to 350 kV". */
  basisShort: string;
  rule: string;
  /** Why this rule and not another, in a sentence. */
  why: string;
}

/**
 * Minimum distance to a power line. By default 20 ft (up to 350 kV) or 50 ft (over 350 kV, and
 * when the voltage is not known: the safe side). The smaller Table A distances apply only when the
 * line's owner has confirmed the voltage AND encroachment-prevention measures are in place.
 * Over 1,000 kV the distance is the owner's or a registered professional engineer's.
 */
export function powerLineMinimumDistance(input: { voltageKv: number | null; voltageConfirmedByOwner: boolean; encroachmentPreventionInPlace: boolean }): PowerLineMinimum {
  const ft = (clearanceFt: number) => ({ clearanceFt, clearanceM: clearanceFt * METRES_PER_FT });
  if (input.voltageKv === null) {
    return {
      ...ft(POWER_LINE_DEFAULT_FT.over350Kv),
      basis: 'default_unknown_voltage',
      basisShort: `${POWER_LINE_DEFAULT_FT.over350Kv} ft, voltage unknown`,
      rule: POWER_LINE_DEFAULT_SOURCE,
      why: 'The voltage is not known, so the larger default distance is taken. Have the line’s owner confirm the voltage; above 1,000 kV only the owner can give the distance.',
    };
  }
  const kv = requirePositive('voltageKv', input.voltageKv);
  const table = powerLineClearanceM(kv);
  if (table.clearanceM === null) {
    return { clearanceM: null, clearanceFt: null, basis: 'owner', basisShort: 'over 1,000 kV', rule: `${POWER_LINE_DEFAULT_SOURCE}; ${table.rule}`, why: 'reason' in table ? table.reason : '' };
  }
  if (input.voltageConfirmedByOwner && input.encroachmentPreventionInPlace) {
    return {
      clearanceM: table.clearanceM,
      clearanceFt: table.clearanceFt,
      basis: 'table_a',
      basisShort: `Table A, ${table.clearanceFt} ft for the owner-confirmed voltage`,
      rule: table.rule,
      why: 'The line’s owner confirmed the voltage and encroachment-prevention measures are in place, so the Table A distance applies.',
    };
  }
  const over = kv > 350;
  const missing = [
    input.voltageConfirmedByOwner ? '' : 'the owner’s confirmation of the voltage',
    input.encroachmentPreventionInPlace ? '' : 'encroachment-prevention measures in place',
  ].filter(Boolean);
  return {
    ...ft(over ? POWER_LINE_DEFAULT_FT.over350Kv : POWER_LINE_DEFAULT_FT.upTo350Kv),
    basis: 'default',
    basisShort: over ? `${POWER_LINE_DEFAULT_FT.over350Kv} ft default, over 350 kV` : `${POWER_LINE_DEFAULT_FT.upTo350Kv} ft default, up to 350 kV`,
    rule: POWER_LINE_DEFAULT_SOURCE,
    why: `The default distance applies: Table A (${table.clearanceFt} ft for this voltage) needs ${missing.join(' and ')}, which ${missing.length === 1 ? 'is' : 'are'} not recorded.`,
  };
}

/** Distance left between a power line and the farthest reach of a crane, against the minimum. */
export function powerLineClearanceCheck(input: { distanceM: number; reachM: number; requiredM: number }): { availableM: number; pass: boolean } {
  const distance = requirePositive('distanceM', input.distanceM);
  const reach = requireNonNegative('reachM', input.reachM);
  const required = requirePositive('requiredM', input.requiredM);
  const availableM = finiteResult('distanceM', distance - reach);
  return { availableM, pass: availableM >= required };
}

/**
 * Fall zone radius around the slewing centre: the boom foot's offset ahead of the slewing centre,
 * boom length, tip extension (auxiliary sheave) and margin. Common practice, no source; the
 * margin is the site's setting, not a published value.
 */
export function fallZoneRadiusM(input: { boomFootAheadM: number; boomLengthM: number; tipExtensionM: number; marginM: number }): {
  radiusM: number;
  rule: string;
} {
  const foot = requireNonNegative('boomFootAheadM', input.boomFootAheadM);
  const boom = requirePositive('boomLengthM', input.boomLengthM);
  const tip = requireNonNegative('tipExtensionM', input.tipExtensionM);
  const margin = requireNonNegative('marginM', input.marginM);
  const r = finiteResult('boomLengthM', foot + boom + tip + margin);
  return {
    radiusM: r,
    rule: 'radius from the slewing centre = boom foot ahead of the slewing centre + boom length + tip extension + margin (common practice, no source; margin is a site setting)',
  };
}
