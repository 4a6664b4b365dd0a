/**
 * The only figures a person may override, each with the reason it is a matter of judgement.
 * Everything else that fails is a manufacturer's rating or a code's "shall" (line pull, dead wraps,
 * D/d, ground pressure, chart capacity, power-line distance...) and can never be overridden: the
 * configuration must change, or, for ground, mats or a temporary-works design must raise the
 * allowable pressure. An override still needs a reason and a second person's approval.
 */
const OVERRIDABLE_FIGURES: readonly { key: RegExp; why: string }[] = [
  {
    key: /^chart\.lift$/,
    why: 'Within the chart but above the site’s caution share: whether such a lift goes ahead, and under what extra controls (a critical-lift plan), is the lift planner’s judgement. Above 100 % of the chart is never allowed.',
  },
  {
    key: /^chart\.raise$/,
    why: 'Within the manufacturer’s raising limit but above the site’s caution share: going ahead is the lift planner’s judgement. Above the limit is never allowed.',
  },
  {
    key: /^assist\.lift\.\d+$/,
    why: 'Within the assist crane’s chart but above the site’s caution share: going ahead is the lift planner’s judgement. Above 100 % of its chart is never allowed.',
  },
  {
    key: /^assist\.tandem(\.\d+)?$/,
    why: 'A tandem lift while the boom leaves the ground is within both charts but above the site’s caution share: going ahead, with a tandem-lift plan, is the lift planner’s judgement.',
  },
];

/** Why a figure may be overridden, or null when it never may. */
export function overrideReason(figureKey: string): string | null {
  return OVERRIDABLE_FIGURES.find((o) => o.key.test(figureKey))?.why ?? null;
}
