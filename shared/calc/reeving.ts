/**
 * Reeving: the pull in the lead line for a given number of parts of line, allowing for the
 * friction lost at every sheave the rope turns over.
 */
import { fmtUp } from '../format';
import { CalcInputError, finiteResult, requireInRange, requireInteger, requireNonNegative } from './errors';

/** A sheave efficiency preset with the publication it comes from. */
export interface SheaveEfficiencyPreset {
  /** Efficiency per sheave, 0 < E ≤ 1 (force out ÷ force in). */
  efficiency: number;
  /** Where the value is published. */
  source: string;
}

/**
 * Per-sheave efficiency for the two bearing types. The two handbooks agree: 91.7 % is 1/1.09 and
 * 96.2 % is 1/1.04 rounded to three figures.
 */
export const SHEAVE_EFFICIENCY_PRESETS: Readonly<Record<'plainBearing' | 'rollingBearing', SheaveEfficiencyPreset>> = {
  plainBearing: {
    efficiency: 0.917,
    source:
      'Pipeline Rules of Thumb Handbook, "block and tackle" (plain bearing sheaves 91.7 %); Wire Rope Users Manual 4th ed. (factor 1.09 per extra plain-bearing sheave)',
  },
  rollingBearing: {
    efficiency: 0.962,
    source:
      'Pipeline Rules of Thumb Handbook, "block and tackle" (roller bearing sheaves 96.2 %); Wire Rope Users Manual 4th ed. (factor 1.04 per extra anti-friction sheave)',
  },
};

/** Result of a lead-line pull calculation. */
export interface LeadLinePullResult {
  leadLinePullKn: number;
  /** Load ÷ lead-line pull before the extra lead sheaves: E(1−Eⁿ)/(1−E), or n when E = 1. */
  mechanicalAdvantage: number;
  rule: string;
}

const LEAD_LINE_RULE =
  'lead-line pull = load ÷ MA ÷ E^extraLeadSheaves, MA = E(1−Eⁿ)/(1−E) (MA = n when E = 1): Pipeline Rules of Thumb Handbook; Wire Rope Users Manual';

function mechanicalAdvantage(parts: number, e: number): number {
  // E = 1 makes the closed form 0/0; its limit is n.
  if (e === 1) return parts;
  return (e * (1 - e ** parts)) / (1 - e);
}

/** Parameters shared by the reeving functions. */
export interface ReevingInput {
  loadKn: number;
  sheaveEfficiency: number;
  extraLeadSheaves: number;
}

function checkReeving(input: ReevingInput): void {
  requireNonNegative('loadKn', input.loadKn);
  requireInRange('sheaveEfficiency', input.sheaveEfficiency, 0, 1, { minExclusive: true });
  requireInteger('extraLeadSheaves', input.extraLeadSheaves, 0, 50);
}

/** Pull in the lead line for `parts` parts of line, with friction at each sheave and each extra lead sheave. */
export function leadLinePull(input: ReevingInput & { parts: number }): LeadLinePullResult {
  checkReeving(input);
  requireInteger('parts', input.parts, 1, 100);
  const ma = mechanicalAdvantage(input.parts, input.sheaveEfficiency);
  const pull = input.loadKn / ma / input.sheaveEfficiency ** input.extraLeadSheaves;
  return {
    leadLinePullKn: finiteResult('loadKn', pull),
    mechanicalAdvantage: ma,
    rule: LEAD_LINE_RULE,
  };
}

/**
 * The sheaves a reeving of `parts` parts of line turns over, from the lead side: the first tip
 * sheave (over which part 1 leaves the tip), then a block sheave, a tip sheave and so on, one
 * sheave per part: ⌈n/2⌉ at the tip and ⌊n/2⌋ in the block.
 */
export function reevedSheaveEfficiencies(parts: number, tipSheaveEfficiency: number, blockSheaveEfficiency: number): number[] {
  requireInteger('parts', parts, 1, 100);
  requireInRange('tipSheaveEfficiency', tipSheaveEfficiency, 0, 1, { minExclusive: true });
  requireInRange('blockSheaveEfficiency', blockSheaveEfficiency, 0, 1, { minExclusive: true });
  return Array.from({ length: parts }, (_, i) => (i % 2 === 0 ? tipSheaveEfficiency : blockSheaveEfficiency));
}

/** A reeving where each sheave turns at its own bearing's efficiency. */
export interface MixedReevingInput {
  loadKn: number;
  parts: number;
  /** Efficiency of the boom-tip load sheaves the parts run over. */
  tipSheaveEfficiency: number;
  /** Efficiency of the hook block's sheaves (unused for one part of line). */
  blockSheaveEfficiency: number;
  /** Efficiency of each lead (idler, guide) sheave between the drum and the first tip sheave. */
  leadSheaveEfficiencies: readonly number[];
}

const MIXED_RULE =
  'lead-line pull = load ÷ Σₖ₌₁ⁿ Πⱼ₌₁ᵏ ηⱼ ÷ Π eᵢ, ηⱼ the efficiency of the j-th reeved sheave from the lead side (tip, block, tip…), eᵢ of each lead sheave; with one efficiency E throughout this is the handbook form MA = E(1−Eⁿ)/(1−E) times E per lead sheave (Wire Rope Users Manual 4th ed., pp. 86–88: tabulated factor × 1.09 per extra plain-bearing sheave, × 1.04 per anti-friction sheave)';

function checkMixed(input: MixedReevingInput): number[] {
  requireNonNegative('loadKn', input.loadKn);
  const reeved = reevedSheaveEfficiencies(input.parts, input.tipSheaveEfficiency, input.blockSheaveEfficiency);
  if (!Array.isArray(input.leadSheaveEfficiencies) || input.leadSheaveEfficiencies.length > 50) {
    throw new CalcInputError('leadSheaveEfficiencies', 'must list at most 50 lead sheaves');
  }
  input.leadSheaveEfficiencies.forEach((e) => requireInRange('leadSheaveEfficiencies', e, 0, 1, { minExclusive: true }));
  return reeved;
}

/**
 * Lead-line pull with every sheave at its own efficiency. While hoisting, the tension drops by the
 * sheave's efficiency across each sheave away from the drum, so part k carries P·η₁·…·ηₖ (P the pull
 * arriving at the first tip sheave) and the parts together carry the load.
 */
export function leadLinePullBySheave(input: MixedReevingInput): LeadLinePullResult {
  const reeved = checkMixed(input);
  let product = 1;
  let ma = 0;
  for (const eta of reeved) {
    product *= eta;
    ma += product;
  }
  const leadLoss = input.leadSheaveEfficiencies.reduce((p, e) => p * e, 1);
  return {
    leadLinePullKn: finiteResult('loadKn', input.loadKn / ma / leadLoss),
    mechanicalAdvantage: ma,
    rule: MIXED_RULE,
  };
}

/** Smallest number of parts of line (up to `maxParts`) whose lead-line pull, sheave by sheave, stays within the permissible pull. */
export function requiredPartsBySheave(
  input: Omit<MixedReevingInput, 'parts'> & { permissibleLinePullKn: number; maxParts: number },
): RequiredPartsResult {
  const permissible = requireInRange('permissibleLinePullKn', input.permissibleLinePullKn, 0, Number.MAX_VALUE, { minExclusive: true });
  const maxParts = requireInteger('maxParts', input.maxParts, 1, 100);
  const rule = `smallest n with ${MIXED_RULE.replace('lead-line pull', 'pull(n)')} ≤ permissible pull`;
  let last = 0;
  for (let n = 1; n <= maxParts; n += 1) {
    last = leadLinePullBySheave({ ...input, parts: n }).leadLinePullKn;
    if (last <= permissible) return { achievable: true, parts: n, leadLinePullKn: last, rule };
  }
  return {
    achievable: false,
    parts: null,
    leadLinePullKn: null,
    reason: `even ${maxParts} parts of line leave a lead-line pull of ${fmtUp(last, 1)} kN, above the permissible ${permissible} kN`,
    rule,
  };
}

/** Result of the parts-of-line search. */
export type RequiredPartsResult =
  | { achievable: true; parts: number; leadLinePullKn: number; rule: string }
  | { achievable: false; parts: null; leadLinePullKn: null; reason: string; rule: string };

/**
 * Smallest number of parts of line whose lead-line pull stays within the permissible pull.
 * Friction caps the mechanical advantage at E/(1−E), so some loads cannot be reeved at all;
 * `maxParts` bounds the search (a block only has so many sheaves) and is the caller's setting.
 */
export function requiredParts(
  input: ReevingInput & { permissibleLinePullKn: number; maxParts?: number },
): RequiredPartsResult {
  checkReeving(input);
  const permissible = requireInRange('permissibleLinePullKn', input.permissibleLinePullKn, 0, Number.MAX_VALUE, {
    minExclusive: true,
  });
  const maxParts = requireInteger('maxParts', input.maxParts ?? 40, 1, 100);
  const rule = `smallest n with ${LEAD_LINE_RULE.replace('lead-line pull', 'pull(n)')} ≤ permissible pull`;
  for (let n = 1; n <= maxParts; n += 1) {
    const { leadLinePullKn } = leadLinePull({ ...input, parts: n });
    if (leadLinePullKn <= permissible) {
      return { achievable: true, parts: n, leadLinePullKn, rule };
    }
  }
  const best = leadLinePull({ ...input, parts: maxParts }).leadLinePullKn;
  if (!Number.isFinite(best)) throw new CalcInputError('loadKn', 'is too large');
  return {
    achievable: false,
    parts: null,
    leadLinePullKn: null,
    reason: `even ${maxParts} parts of line leave a lead-line pull of ${fmtUp(best, 1)} kN, above the permissible ${permissible} kN`,
    rule,
  };
}
