/** Assist-crane lifts as a share of the assist crane's chart. */
import { assistLiftCheck } from '../calc/assist.js';
import { knToTonnesForce, tonnesForceToKn } from '../calc/units.js';
import type { Configuration, Figure } from '../schemas/configuration.js';
import { figure, fmt, guarded, plain } from './figures.js';
import type { AssistLiftResultRow, PlannerInputs } from './types.js';

/** One figure per planned assist lift. */
export function computeAssist(config: Configuration, inputs: PlannerInputs, figures: Figure[]): AssistLiftResultRow[] {
  const { lifts, assistCraneId, chartId } = config.assist;
  if (lifts.length === 0) {
    figures.push(figure('assist.none', 'assist', 'Assist-crane lifts', 'No assist-crane lifts planned', 'info', false, 'no lifts entered'));
    return [];
  }
  const crane = inputs.assistCrane;
  const chart = crane?.charts.find((c) => c.id === chartId) ?? null;
  const chartRule = 'the chosen chart of the assist crane (assist crane data)';
  if (!crane || !chart) {
    const value = !crane ? 'Assist crane data not loaded' : `Chart ${chartId ?? '(none)'} is not in ${crane.model}’s data`;
    figures.push(figure('assist.chart', 'assist', 'Assist-crane chart', value, 'fail', false, chartRule, `assist crane ${assistCraneId ?? '(none)'}: choose the crane and a chart it has`));
    return lifts.map((l) => ({ label: l.label, totalKn: 0, capacityKn: null, chartRadiusM: null, sharePercent: null, pass: false, reason: value }));
  }
  figures.push(figure('assist.chart', 'assist', 'Assist-crane chart', `${crane.model}: ${chart.description}`, 'info', false, chartRule));
  return lifts.map((lift, i) => {
    const key = `assist.lift.${i}`;
    const label = `Assist lift: ${lift.label}`;
    const failed: AssistLiftResultRow = { label: lift.label, totalKn: 0, capacityKn: null, chartRadiusM: null, sharePercent: null, pass: false, reason: 'cannot compute' };
    return guarded(figures, key, 'assist', label, failed, () => {
      const r = assistLiftCheck({ liftKn: tonnesForceToKn(lift.liftT), riggingKn: tonnesForceToKn(lift.riggingT), chart, radiusM: lift.radiusM });
      const total = `${fmt(lift.liftT + lift.riggingT, 2)} t`;
      let value: string;
      if (r.sharePercent !== null && r.capacityKn !== null && r.chartRadiusM !== null) {
        value = `${fmt(r.sharePercent)} % (${total} of ${fmt(knToTonnesForce(r.capacityKn), 1)} t at ${plain(r.chartRadiusM)} m)`;
      } else {
        value = `Off the chart at ${plain(lift.radiusM)} m`;
      }
      figures.push(figure(key, 'assist', label, value, r.pass ? 'pass' : 'fail', false, r.rule, r.reason ?? undefined));
      return {
        label: lift.label,
        totalKn: r.totalKn,
        capacityKn: r.capacityKn,
        chartRadiusM: r.chartRadiusM,
        sharePercent: r.sharePercent,
        pass: r.pass,
        reason: r.reason ?? 'within the chart',
      };
    });
  });
}
