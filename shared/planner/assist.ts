/**
 * The assist crane: each lift as a share of its own chart (everything on its hook counted), the
 * sling legs of a lift with the centre of gravity off centre, its outrigger or track pads on the
 * ground, and, when the main boom's tip must be carried while the boom leaves the ground, that
 * tandem lift at several boom angles.
 */
import { assistLiftCheck, padPressure, tandemRaise } from '../calc/assist.js';
import { percentUp } from '../calc/chart.js';
import { MINIMUM_SLING_ANGLE_DEG, MINIMUM_SLING_ANGLE_SOURCE, slingLegTensionsFromHookHeight } from '../calc/slings.js';
import { knToTonnesForce, tonnesForceToKn } from '../calc/units.js';
import type { AssistChart, AssistCrane, HookBlock } from '../schemas/arrangement.js';
import type { Configuration, Figure, FigureStatus } from '../schemas/configuration.js';
import type { BoomOutcome } from './boom.js';
import { tipHangings } from './chart.js';
import { figure, guarded, kgToKn, ratingOf, stated } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { fmt, fmtDown, fmtUp, plain } from '../format.js';
import type { AssistLiftResultRow, PlannerInputs, TandemStepRow } from './types.js';

/** Said with every step of a tandem raise (common practice, no source). */
const TANDEM_CAUTION =
  'TANDEM LIFT: two cranes carry the boom. One person directs both cranes; both charts and both limiters govern; the assist crane’s hoist line stays vertical over the tip (a side pull is outside every chart); the share assumes the main crane’s boom hoist carries nothing — if the procedure shares the tip differently, the manufacturer’s raising procedure governs';

const onHook = (l: { hookBlockT: number; slingsT: number; shacklesT: number; deductionsT: number }) =>
  `its hook block ${plain(l.hookBlockT)} t + slings ${plain(l.slingsT)} t + shackles ${plain(l.shacklesT)} t + chart deductions ${plain(l.deductionsT)} t`;

const HOOK_NOT_ENTERED =
  'the assist crane’s own hook block is entered as 0 t: its weight is NOT INCLUDED; enter it from the assist crane’s data (its chart counts the hook block as load unless the chart says otherwise)';

/** All the assist crane's figures; the lift rows and the tandem steps feed the plan. */
export function computeAssist(
  config: Configuration,
  inputs: PlannerInputs,
  boom: BoomOutcome,
  hookBlock: HookBlock | null,
  figures: Figure[],
  q: Quantities = METRIC,
): { lifts: AssistLiftResultRow[]; tandem: TandemStepRow[] } {
  const { lifts, assistCraneId, chartId } = config.assist;
  const tipSupport = boom.listed?.raising.limits.tipSupportRequired === true;
  const caution = config.chartCautionPercent;
  if (lifts.length === 0 && !tipSupport) {
    figures.push(figure('assist.none', 'assist', 'Assist-crane lifts', 'No assist-crane lifts planned', 'info', false, 'no lifts entered'));
    return { lifts: [], tandem: [] };
  }
  const crane = inputs.assistCrane;
  const chart = crane?.charts.find((c) => c.id === chartId) ?? null;
  const chartRule = 'the chosen chart of the assist crane (assist crane data)';
  if (!crane || !chart) {
    const value = !crane ? 'Assist crane data not loaded' : `Chart ${chartId ?? '(none)'} is not in ${crane.model}’s data`;
    const why = tipSupport && lifts.length === 0 ? 'the boom’s tip must be carried while it leaves the ground: choose the assist crane and the chart it is set up to' : 'choose the crane and a chart it has';
    figures.push(figure('assist.chart', 'assist', 'Assist-crane chart', value, 'fail', false, chartRule, `assist crane ${assistCraneId ?? '(none)'}: ${why}`));
    return { lifts: lifts.map((l) => ({ label: l.label, totalKn: 0, capacityKn: null, chartRadiusM: null, sharePercent: null, pass: false, reason: value, status: 'fail' })), tandem: [] };
  }
  figures.push(figure('assist.chart', 'assist', 'Assist-crane chart', `${crane.model}: ${chart.description}`, 'info', false, chartRule));

  const rows = lifts.map((lift, i) => computeLift(config, lift, i, chart, caution, figures, q));
  computeSlings(config, figures, q);
  const tandem = tipSupport ? computeTandem(config, inputs, boom, hookBlock, crane, chart, figures, q) : [];
  computePads(config, figures, q);
  return { lifts: rows, tandem };
}

type Lift = Configuration['assist']['lifts'][number];

function computeLift(config: Configuration, lift: Lift, i: number, chart: AssistChart, caution: number, figures: Figure[], q: Quantities): AssistLiftResultRow {
  const key = `assist.lift.${i}`;
  const label = `Assist lift: ${lift.label}`;
  const failed: AssistLiftResultRow = { label: lift.label, totalKn: 0, capacityKn: null, chartRadiusM: null, sharePercent: null, pass: false, reason: 'cannot compute', status: 'fail' };
  return guarded(figures, key, 'assist', label, failed, () => {
    const t = tonnesForceToKn;
    const r = assistLiftCheck({
      liftKn: t(lift.liftT),
      riggingKn: t(lift.riggingT),
      hookBlockKn: t(lift.hookBlockT),
      slingsKn: t(lift.slingsT),
      shacklesKn: t(lift.shacklesT),
      deductionsKn: t(lift.deductionsT),
      chart,
      radiusM: lift.radiusM,
      cautionPercent: caution,
    });
    const totalT = knToTonnesForce(r.totalKn);
    const noHook = lift.hookBlockT === 0;
    const value =
      r.sharePercent !== null && r.capacityKn !== null && r.chartRadiusM !== null
        ? `${percentUp(r.sharePercent)} % (${q.mass(totalT * 1000, 'up', 2)} of ${q.mass(knToTonnesForce(r.capacityKn) * 1000, 'down', 1)} at ${stated(q, r.chartRadiusM)})`
        : `Off the chart at ${stated(q, lift.radiusM)}`;
    const status: FigureStatus = r.band === 'fail' ? 'fail' : noHook ? 'caution' : r.band;
    const detail = [
      `on the hook: lift ${plain(lift.liftT)} t + rigging ${plain(lift.riggingT)} t + ${onHook(lift)}`,
      r.reason ?? '',
      noHook ? HOOK_NOT_ENTERED : '',
    ]
      .filter((s) => s.length > 0)
      .join('; ');
    // Above 100 % never; a hook block left out may hide a share above 100 %, so no override until it is entered.
    figures.push(figure(key, 'assist', label, value, status, r.band !== 'fail' && !noHook, r.rule, detail));
    return {
      label: lift.label,
      totalKn: r.totalKn,
      capacityKn: r.capacityKn,
      chartRadiusM: r.chartRadiusM,
      sharePercent: r.sharePercent,
      pass: status !== 'fail',
      reason: r.reason ?? (noHook ? 'hook block weight not entered' : 'within the chart'),
      status: status === 'pass' || status === 'caution' ? status : 'fail',
    };
  });
}

/** Sling legs of the lifts whose pick points are off the centre of gravity. */
function computeSlings(config: Configuration, figures: Figure[], q: Quantities): void {
  const withLegs = config.assist.lifts.map((l, i) => ({ l, i })).filter((x) => x.l.legs !== null);
  if (withLegs.length === 0) {
    figures.push(
      figure('assist.slings', 'assist', 'Sling legs', 'Not planned here', 'info', false, 'two-leg slinging with the centre of gravity off centre is checked when its pick points and hook height are entered', 'the rigger checks each leg’s load at its angle against the sling’s tag'),
    );
    return;
  }
  for (const { l, i } of withLegs) {
    const legs = l.legs!;
    const key = `assist.slings.${i}`;
    const label = `Sling legs: ${l.label}`;
    guarded(figures, key, 'assist', label, undefined, () => {
      const angleOf = (d: number) => (d === 0 ? 90 : (Math.atan2(legs.hookHeightM, d) * 180) / Math.PI);
      const angles = [angleOf(legs.toCogAM), angleOf(legs.toCogBM)];
      const flat = angles.map((a, k) => ({ a, leg: k === 0 ? 'A' : 'B' })).filter((x) => x.a < MINIMUM_SLING_ANGLE_DEG);
      const rule = `two legs from one hook over the centre of gravity: θ = atan(hook height ÷ distance to the centre of gravity), leg = load × the other distance ÷ (sum of distances) ÷ sin θ; load = lift + rigging below the hook (${MINIMUM_SLING_ANGLE_SOURCE})`;
      if (flat.length > 0) {
        figures.push(
          figure(key, 'assist', label, `Leg ${flat.map((x) => `${x.leg} at ${fmtDown(x.a)}°`).join(', ')} from horizontal`, 'fail', false, rule, `below the ${MINIMUM_SLING_ANGLE_DEG}° minimum: raise the hook or use longer slings or a spreader`),
        );
        return;
      }
      const r = slingLegTensionsFromHookHeight({ loadKn: tonnesForceToKn(l.liftT + l.riggingT), distancesToCogM: [legs.toCogAM, legs.toCogBM], hookHeightM: legs.hookHeightM });
      const [a, b] = r.legs.map((x) => knToTonnesForce(x.tensionKn));
      const value = `leg A ${q.mass(a * 1000, 'up', 2)} at ${fmtDown(r.legs[0].angleFromHorizontalDeg)}°, leg B ${q.mass(b * 1000, 'up', 2)} at ${fmtDown(r.legs[1].angleFromHorizontalDeg)}°`;
      const rated = legs.legRatedLoadT;
      const worst = Math.max(a, b);
      const status: FigureStatus = rated === null ? 'info' : worst > rated ? 'fail' : 'pass';
      const detail =
        rated === null
          ? 'no rated load entered: the rigger compares each leg with its tag'
          : `${q.mass(worst * 1000, 'up', 2)} in the heavier leg against ${ratingOf(q, 'mass', rated * 1000)} rated per leg${worst > rated ? ': above the sling’s rating, choose a stronger sling' : ''}`;
      figures.push(figure(key, 'assist', label, value, status, false, rule, `legs ${fmt(r.legs[0].legLengthM, 2)} m and ${fmt(r.legs[1].legLengthM, 2)} m from hook to pick point; ${detail}`));
    });
  }
}

/** The assist crane's outrigger or track pads against the site's allowable ground pressure. */
function computePads(config: Configuration, figures: Figure[], q: Quantities): void {
  const pads = config.assist.pads;
  const what = pads.kind === 'track' ? 'track' : 'outrigger';
  const label = `Ground under the assist crane’s ${what} pads`;
  const rule = 'the largest pad load from the assist crane’s own outrigger or track load data, over the pad (or mat) under it';
  if (pads.loadT === null || pads.lengthM === null || pads.widthM === null) {
    const missing = [pads.loadT === null ? `the largest ${what} load` : '', pads.lengthM === null ? 'pad length' : '', pads.widthM === null ? 'pad width' : ''].filter((s) => s.length > 0);
    figures.push(figure('assist.ground', 'assist', label, 'Not included: not entered', 'caution', false, rule, `enter ${missing.join(', ')} (from the assist crane’s data for the heaviest planned lift)`));
    return;
  }
  guarded(figures, 'assist.ground', 'assist', label, undefined, () => {
    const r = padPressure({ loadKn: tonnesForceToKn(pads.loadT!), padLengthM: pads.lengthM!, padWidthM: pads.widthM!, padWeightKn: kgToKn(pads.weightKg) });
    const allowable = config.ground.allowablePressureKpa;
    const unverified = config.ground.source.kind === 'none';
    const status: FigureStatus = r.pressureKpa > allowable ? 'fail' : unverified ? 'unverified' : 'pass';
    const source = unverified ? 'the allowable pressure has no ground source yet: unverified' : `allowable pressure from ${config.ground.source.reference}`;
    figures.push(
      figure(
        'assist.ground',
        'assist',
        label,
        `${q.pressure(r.pressureKpa, 'up')} (allowable ${ratingOf(q, 'pressure', allowable)})`,
        status,
        false,
        `${rule}; ${r.rule}; the site’s allowable pressure (where the assist crane stands on other ground, that ground’s allowable governs)`,
        `${plain(pads.loadT!)} t + pad ${plain(pads.weightKg)} kg on ${plain(pads.lengthM!)} m × ${plain(pads.widthM!)} m = ${fmtDown(r.areaM2, 2)} m²; ${source}${pads.weightKg === 0 ? '; pad weight entered as 0 kg: not included' : ''}${status === 'fail' ? '; a larger pad or mat spreads the load: a person cannot override the ground' : ''}`,
      ),
    );
  });
}

/** The tandem raise: the assist crane's share of the boom at the tip at 0°, 10°, 20°... to the release angle. */
function computeTandem(config: Configuration, inputs: PlannerInputs, boom: BoomOutcome, hookBlock: HookBlock | null, crane: AssistCrane, chart: AssistChart, figures: Figure[], q: Quantities): TandemStepRow[] {
  const t = config.assist.tandem;
  const listed = boom.listed!;
  const label = 'Tandem raise: assist crane carries the tip';
  const rule = 'the data says the tip must be carried while the boom leaves the ground (manufacturer’s raising limits): the assist crane’s share is planned as a lift';
  const needs = [t.alongFromTipM === null ? 'where the assist crane stands along the boom line' : '', t.sideM === null ? 'its distance to the side' : '', t.releaseAngleDeg === null ? 'the boom angle from which the main crane carries the boom alone (manufacturer’s raising procedure)' : ''].filter(
    (s) => s.length > 0,
  );
  if (needs.length > 0) {
    figures.push(figure('assist.tandem', 'assist', label, 'Not planned', 'fail', false, rule, `enter ${needs.join(', ')}; ${TANDEM_CAUTION}`));
    return [];
  }
  if (boom.boomCogFromFootM === null) {
    figures.push(figure('assist.tandem', 'assist', label, 'Cannot compute', 'fail', false, rule, 'the boom has no sections to weigh'));
    return [];
  }
  const hangings = tipHangings(config, inputs, hookBlock);
  const guyKg = listed.guyLines.map((g) => (g.weightKg === null ? null : g.weightKg * g.quantity));
  const missing = [...hangings.filter((h) => h.weightKg === null).map((h) => h.what), ...(guyKg.some((w) => w === null) ? ['guy lines'] : [])];
  if (t.hookBlockT === 0) missing.push('the assist crane’s hook block (entered as 0 t)');
  const tipKg = hangings.reduce((s, h) => s + (h.weightKg ?? 0), 0) + guyKg.reduce<number>((s, w) => s + (w ?? 0), 0);
  const footHeightM = inputs.arrangement.machine.boomFoot?.heightM ?? null;
  // Without the foot height the tip is taken at the highest foot the data format allows (30 m):
  // a higher tip is the harder one for the assist crane to reach, so reach is never overstated.
  if (footHeightM === null) missing.push('the boom foot height');
  return guarded(figures, 'assist.tandem', 'assist', label, [] as TandemStepRow[], () => {
    const r = tandemRaise({
      boomWeightKn: boom.boomWeightKn,
      boomCogFromFootM: boom.boomCogFromFootM!,
      boomLengthM: config.boomLengthM,
      tipLoadKn: kgToKn(tipKg),
      riggingKn: tonnesForceToKn(t.hookBlockT + t.slingsT + t.shacklesT + t.deductionsT),
      footHeightM: footHeightM ?? 30,
      alongFromTipM: t.alongFromTipM!,
      sideM: t.sideM!,
      releaseAngleDeg: t.releaseAngleDeg!,
      chart,
      cautionPercent: config.chartCautionPercent,
    });
    const tipT = knToTonnesForce(r.reactionKn);
    const carried = `boom sections ${fmtUp(knToTonnesForce(boom.boomWeightKn), 2)} t with their centre of gravity ${fmt(boom.boomCogFromFootM!, 2)} m from the foot of ${plain(config.boomLengthM)} m, plus at the tip ${fmtUp(tipKg / 1000, 2)} t (hook blocks, auxiliary head, guy lines taken whole at the tip) → ${fmtUp(tipT, 2)} t at the tip; plus ${onHook(t)}`;
    const missingNote = missing.length ? `${missing.join(', ')}: NOT INCLUDED` : '';
    const heightNote = footHeightM === null ? 'boom foot height not in the data: taken at 30 m, the most the data allows' : '';
    const stop = `steps stop at ${plain(t.releaseAngleDeg!)}°: from there the main crane carries the boom alone and the tip leaves the assist (the release angle entered from the manufacturer’s raising procedure)`;
    return r.steps.map((s, i) => {
      const key = `assist.tandem.${i}`;
      const status: FigureStatus = s.share.band === 'fail' || s.outOfReach ? 'fail' : missing.length ? 'caution' : s.share.band;
      const reach = s.outOfReach
        ? `; out of reach: the assist crane’s ${plain(chart.boomLengthM)} m boom reaches about ${s.reachHeightM === null ? '0' : fmt(s.reachHeightM, 1)} m up at ${fmt(s.radiusM, 1)} m`
        : '';
      const value =
        s.share.sharePercent !== null && s.share.capacityKn !== null && s.share.chartRadiusM !== null
          ? `${percentUp(s.share.sharePercent)} % (${q.mass(knToTonnesForce(s.share.totalKn) * 1000, 'up', 2)} of ${q.mass(knToTonnesForce(s.share.capacityKn) * 1000, 'down', 1)} at ${q.length(s.radiusM, 'nearest')}; tip ${q.length(s.tipHeightM, 'nearest')} up${reach})`
          : `Off the chart at ${q.length(s.radiusM, 'nearest')} (tip ${q.length(s.tipHeightM, 'nearest')} up${reach})`;
      figures.push(
        figure(
          key,
          'assist',
          `Tandem raise at ${plain(s.angleDeg)}°: assist crane share`,
          value,
          status,
          s.share.band !== 'fail' && !s.outOfReach && missing.length === 0,
          `${r.rule}; ${s.share.rule}`,
          [TANDEM_CAUTION, carried, s.share.reason ?? '', missingNote, heightNote, i === r.steps.length - 1 ? stop : '', `${crane.model}, chart “${chart.description}”`].filter((x) => x.length > 0).join('; '),
        ),
      );
      return { angleDeg: s.angleDeg, radiusM: s.radiusM, tipHeightM: s.tipHeightM, totalKn: s.share.totalKn, sharePercent: s.share.sharePercent, status };
    });
  });
}
