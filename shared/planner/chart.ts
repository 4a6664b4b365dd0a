/**
 * The main crane's own rated capacity chart: the heaviest lift as a share of the chart for the
 * planned boom length and counterweight, and the weight hanging at the tip while the boom is
 * raised as a share of the manufacturer's limit for an unassisted raise.
 */
import { chartShare, limitShare, percentUp, type ShareResult } from '../calc/chart.js';
import type { CapacityChart, HookBlock } from '../schemas/arrangement.js';
import type { Configuration, Figure, FigureStatus } from '../schemas/configuration.js';
import type { BoomOutcome } from './boom.js';
import { figure, guarded, kgToKn, stated } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { fmt, fmtUp, plain } from '../format.js';
import { ROPE_RUN_ASSUMED_WHEN_MISSING } from './rope.js';
import type { ChartResults, PlannerInputs } from './types.js';

/** One weight that hangs with the hook or at the tip; null when the data does not give it. */
interface Hanging {
  what: string;
  weightKg: number | null;
}

const sameWeight = (a: number, b: number) => Math.abs(a - b) < 0.5;

/** What hangs at the tip besides the load: the main hook block, and with the auxiliary fitted its hook and sheave head. */
export function tipHangings(config: Configuration, inputs: PlannerInputs, hookBlock: HookBlock | null): Hanging[] {
  const { arrangement } = inputs;
  const items: Hanging[] = [{ what: `main hook block ${config.mainHook.hookBlockId}`, weightKg: hookBlock?.weightKg ?? null }];
  if (config.auxiliary.enabled) {
    const aux = arrangement.hookBlocks.find((b) => b.id === config.auxiliary.hookBlockId) ?? null;
    items.push({ what: `auxiliary hook ${config.auxiliary.hookBlockId ?? '(none chosen)'}`, weightKg: aux?.weightKg ?? null });
    items.push({ what: 'auxiliary sheave head', weightKg: arrangement.auxSheave?.weightKg ?? null });
  }
  return items;
}

/**
 * The hoist rope hanging below the tip with the hook at its lowest position: falls × (tip height −
 * lowest hook position) × rope mass per metre. The tip is taken as high as the boom can stand for
 * the radius (the foot's offset ahead of the slewing centre counted only when it raises the tip;
 * a foot height the data lacks taken at the most the data format allows), so the rope is never
 * understated. Charts differ on whether this rope counts: counting it is the safe side.
 */
function ropeBelowTip(config: Configuration, inputs: PlannerInputs): { items: Hanging[]; note: string } {
  const { arrangement } = inputs;
  const ahead = Math.max(0, arrangement.machine.boomFoot?.aheadOfSlewCentreM ?? 0);
  const footHeightM = arrangement.machine.boomFoot?.heightM ?? ROPE_RUN_ASSUMED_WHEN_MISSING.footPinHeightM;
  const cos = Math.min(1, Math.max(0, (config.heaviestLoad.radiusM - ahead) / config.boomLengthM));
  const tipHeightM = footHeightM + config.boomLengthM * Math.sqrt(1 - cos * cos);
  const dropM = Math.max(0, tipHeightM - config.mainHook.lowestHookPositionM);
  const massOf = (role: 'mainHoist' | 'auxiliaryHoist') => {
    const drum = arrangement.drums.find((d) => d.role === role);
    return arrangement.ropes.find((r) => r.id === drum?.ropeId)?.massKgPerM ?? null;
  };
  const main = massOf('mainHoist');
  const items: Hanging[] = [{ what: `main hoist rope below the tip (${config.mainHook.parts} falls × ${fmt(dropM, 1)} m)`, weightKg: main === null ? null : main * config.mainHook.parts * dropM }];
  if (config.auxiliary.enabled) {
    const aux = massOf('auxiliaryHoist');
    items.push({ what: `auxiliary hoist rope below the tip (1 fall × ${fmt(dropM, 1)} m)`, weightKg: aux === null ? null : aux * dropM });
  }
  const footNote = arrangement.machine.boomFoot === null ? `; boom foot height not in the data: taken as ${ROPE_RUN_ASSUMED_WHEN_MISSING.footPinHeightM} m` : '';
  return { items, note: `hoist rope hanging from the tip ${fmt(tipHeightM, 1)} m up to the lowest hook position ${plain(config.mainHook.lowestHookPositionM)} m${footNote}` };
}

function statusOf(r: ShareResult): FigureStatus {
  return r.band;
}

function listWeights(items: readonly Hanging[]): string {
  return items.map((h) => `${h.what} ${h.weightKg === null ? 'not in the data: NOT INCLUDED' : `${fmtUp(h.weightKg / 1000, 2)} t`}`).join(' + ');
}

/** The chart figures (chart.lift, chart.raise); their results feed the plan and the record. */
export function computeChart(config: Configuration, inputs: PlannerInputs, boom: BoomOutcome, hookBlock: HookBlock | null, figures: Figure[], q: Quantities = METRIC): ChartResults {
  const caution = config.chartCautionPercent;
  const listed = boom.listed;
  const results: ChartResults = { lift: null, raise: null };
  const hangings = tipHangings(config, inputs, hookBlock);
  const missing = hangings.filter((h) => h.weightKg === null);
  const knownKg = hangings.reduce((sum, h) => sum + (h.weightKg ?? 0), 0);
  const missingNote = missing.length
    ? `${missing.map((h) => h.what).join(', ')}: weight not in the data, NOT INCLUDED — the share cannot be confirmed until the crane data gives it`
    : '';

  // ---- The heaviest lift against the crane's own chart.
  const liftLabel = 'Heaviest lift: share of the crane’s chart';
  const chartRule = 'the crane’s rated capacity chart for this boom length and counterweight (manufacturer data)';
  if (!listed) {
    figures.push(figure('chart.lift', 'boom', liftLabel, 'No chart: boom length not listed', 'fail', false, chartRule, 'no arrangement data for this boom length'));
  } else {
    const counterweightKg = listed.raising.counterweightKg;
    const chart: CapacityChart | null = listed.capacityCharts.find((c) => sameWeight(c.counterweightKg, counterweightKg)) ?? null;
    if (!chart) {
      figures.push(
        figure('chart.lift', 'boom', liftLabel, 'No chart for this boom length and counterweight in the data', 'fail', false, chartRule, `boom ${plain(config.boomLengthM)} m with ${fmt(counterweightKg / 1000, 1)} t of counterweight: the crane data holds no rated capacity chart for it; add the manufacturer's chart to the crane data`),
      );
    } else {
      guarded(figures, 'chart.lift', 'boom', liftLabel, undefined, () => {
        const { loadT, riggingT, radiusM } = config.heaviestLoad;
        const rope = ropeBelowTip(config, inputs);
        const onHook = [...hangings, ...rope.items];
        const liftMissing = onHook.filter((h) => h.weightKg === null);
        const totalKg = (loadT + riggingT) * 1000 + onHook.reduce((sum, h) => sum + (h.weightKg ?? 0), 0);
        const r = chartShare({ loadKn: kgToKn(totalKg), points: chart.points, radiusM, cautionPercent: caution });
        const status: FigureStatus = r.band === 'fail' ? 'fail' : liftMissing.length ? 'caution' : statusOf(r);
        const value =
          r.sharePercent !== null && r.capacityKn !== null && r.chartRadiusM !== null
            ? `${percentUp(r.sharePercent)} % of chart (${q.mass(totalKg, 'up', 2)} of ${q.mass((r.capacityKn / 9.80665) * 1000, 'down', 1)} at ${stated(q, r.chartRadiusM)})`
            : `Off the chart at ${stated(q, radiusM)}`;
        const detail = [
          `on the hook: load ${plain(loadT)} t + rigging ${plain(riggingT)} t + ${listWeights(onHook)}`,
          rope.note,
          `chart “${chart.description}” read at ${r.chartRadiusM === null ? '—' : `${plain(r.chartRadiusM)} m`} for ${plain(radiusM)} m radius`,
          r.reason ?? '',
          liftMissing.length ? `${liftMissing.map((h) => h.what).join(', ')}: weight not in the data, NOT INCLUDED — the share cannot be confirmed until the crane data gives it` : '',
          'any other deduction the chart’s notes list is not in the data: check the chart’s notes; the rated capacity limiter and the chart govern',
        ]
          .filter((s) => s.length > 0)
          .join('; ');
        // A missing weight may be hiding a share above 100 %: no override until the data gives it.
        figures.push(
          figure(
            'chart.lift',
            'boom',
            liftLabel,
            value,
            status,
            r.band !== 'fail' && liftMissing.length === 0,
            `${chartRule}; load = load + rigging + hook block (+ auxiliary hook and sheave head when fitted; the chart counts the hook block as load unless it says otherwise) + hoist rope below the tip with the hook at its lowest (safe side: some charts leave it out); ${r.rule}`,
            detail,
          ),
        );
        results.lift = { totalT: totalKg / 1000, capacityT: r.capacityKn === null ? null : r.capacityKn / 9.80665, chartRadiusM: r.chartRadiusM, sharePercent: r.sharePercent, status };
      });
    }
  }

  // ---- The weight at the tip while the boom is raised without help.
  const raiseLabel = 'Weight at the tip for raising';
  const raiseRule = 'the most that may hang at the tip while the boom is raised from the ground without help (manufacturer’s raising limits for this boom length)';
  if (!listed) {
    figures.push(figure('chart.raise', 'boom', raiseLabel, 'No data for this boom length', 'fail', false, raiseRule));
  } else {
    const limitKg = listed.raising.limits.maxTipLoadKg;
    const support = listed.raising.limits.tipSupportRequired
      ? 'the tip is carried until the main crane takes the boom alone; from there these weights hang at the tip'
      : '';
    if (limitKg === null) {
      figures.push(
        figure(
          'chart.raise',
          'boom',
          raiseLabel,
          `${q.mass(knownKg, 'up', 2)} at the tip; limit not given in the data`,
          'unverified',
          false,
          raiseRule,
          [`at the tip: ${listWeights(hangings)}`, 'the crane data does not give the weight allowed at the tip for an unassisted raise: it is the manufacturer’s rating, so it cannot be overridden; add it to the crane model’s arrangement data (Fleet) from the manufacturer’s raising instructions', missingNote, support].filter((s) => s.length > 0).join('; '),
        ),
      );
      results.raise = { totalT: knownKg / 1000, limitT: null, sharePercent: null, status: 'unverified' };
    } else {
      guarded(figures, 'chart.raise', 'boom', raiseLabel, undefined, () => {
        const r = limitShare({ loadKn: kgToKn(knownKg), limitKn: kgToKn(limitKg), cautionPercent: caution });
        const status: FigureStatus = r.band === 'fail' ? 'fail' : missing.length ? 'caution' : statusOf(r);
        figures.push(
          figure(
            'chart.raise',
            'boom',
            raiseLabel,
            `${percentUp(r.sharePercent ?? 0)} % (${q.mass(knownKg, 'up', 2)} of ${q.mass(limitKg, 'down', 2)} allowed)`,
            status,
            r.band !== 'fail' && missing.length === 0,
            `${raiseRule}; ${r.rule}`,
            [`at the tip: ${listWeights(hangings)}`, r.reason ?? '', missingNote, support].filter((s) => s.length > 0).join('; '),
          ),
        );
        results.raise = { totalT: knownKg / 1000, limitT: limitKg / 1000, sharePercent: r.sharePercent, status };
      });
    }
  }
  return results;
}
