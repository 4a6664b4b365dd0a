/** The boom: make-up from the arrangement data, weight, pins, guy lines, plates, auxiliary sheave, radius. */
import { boomMakeup, platesRequired, type BoomMakeup } from '../calc/boom.js';
import type { BoomArrangement } from '../schemas/arrangement.js';
import type { Configuration, Figure } from '../schemas/configuration.js';
import { emptyMakeup, figure, guarded, kgToKn, ratingOf, stated } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { fmt, plain } from '../format.js';
import type { PlannerInputs } from './types.js';

export interface BoomOutcome {
  makeup: BoomMakeup;
  listed: BoomArrangement | null;
  /** Centre of gravity of all sections along the boom from the foot; null without sections. */
  boomCogFromFootM: number | null;
  boomWeightKn: number;
  platesRequired: boolean;
  /** cos of the boom angle that puts the tip over the planned radius; null when out of reach. */
  cosBoomAngle: number | null;
}

const ARRANGEMENT_RULE = 'manufacturer arrangement data for this boom length';

/** The boom's figures; its outcome feeds the ground and site checks. */
export function computeBoom(config: Configuration, inputs: PlannerInputs, figures: Figure[], q: Quantities = METRIC): BoomOutcome {
  const { arrangement, inventory } = inputs;
  const lengthM = config.boomLengthM;
  const makeup = guarded(figures, 'boom.makeup', 'boom', 'Boom make-up', emptyMakeup(lengthM, 'the make-up could not be worked out'), () => {
    const m = boomMakeup(arrangement, lengthM, inventory);
    const sequence = m.sections.map((s) => `${s.typeId} ${plain(s.lengthM)} m`).join(', ');
    if (m.buildable) {
      const serials = m.sections.map((s) => `${s.position}: ${s.serial ?? 'none'}`).join('; ');
      figures.push(figure('boom.makeup', 'boom', 'Boom make-up', `${plain(m.boomLengthM)} m: ${sequence}`, 'pass', false, m.rule, `serials foot to tip: ${serials}`));
    } else {
      const value = m.arrangement === null ? `${plain(lengthM)} m is not a listed length` : 'Not buildable from the parts at hand';
      figures.push(figure('boom.makeup', 'boom', 'Boom make-up', value, 'fail', false, m.rule, m.reasons.join('; ')));
    }
    return m;
  });
  const listed = makeup.arrangement;

  const weightKg = makeup.sections.reduce((sum, s) => sum + s.weightKg, 0);
  const boomCogFromFootM =
    makeup.sections.length > 0 && weightKg > 0 ? makeup.sections.reduce((sum, s) => sum + s.weightKg * s.cogFromBoomFootM, 0) / weightKg : null;
  const boomWeightKn = makeup.sections.length === 0 ? 0 : guarded(figures, 'boom.sectionWeight', 'boom', 'Boom section weight', 0, () => {
    const kn = kgToKn(weightKg);
    figures.push(
      figure(
        'boom.sectionWeight',
        'boom',
        'Boom section weight',
        `${q.mass(weightKg, 'nearest', 2)} (${q.force(kn, 'nearest')})`,
        'info',
        false,
        `sum of the section weights, foot to tip (${ARRANGEMENT_RULE}); centre of gravity ${fmt(boomCogFromFootM ?? 0, 2)} m from the boom foot = Σ weight × section CoG ÷ Σ weight`,
      ),
    );
    return kn;
  });

  if (makeup.sections.length > 0) {
    figures.push(
      figure(
        'boom.pins',
        'boom',
        'Connecting pins',
        `${makeup.pinCount.total} pins (${makeup.pinCount.jointPins} in joints, ${makeup.pinCount.guyLinePins} in guy lines)`,
        'info',
        false,
        makeup.rule,
      ),
    );
  }

  if (listed) {
    const lines = listed.guyLines.map((g) => `${g.mark} ${plain(g.lengthM)} m ×${g.quantity}`).join(', ');
    figures.push(figure('boom.guyLines', 'boom', 'Guy-line set', `${lines} (${makeup.totalGuyLineCount} lines)`, 'info', false, `guy-line set (${ARRANGEMENT_RULE})`));
    figures.push(
      figure('boom.counterweight', 'boom', 'Counterweight for raising', q.mass(listed.raising.counterweightKg, 'nearest', 1), 'info', false, `counterweight before raising (${ARRANGEMENT_RULE})`),
    );
    figures.push(figure('boom.trackGauge', 'boom', 'Track gauge for raising', stated(q, listed.raising.trackGaugeM), 'info', false, `track gauge before raising (${ARRANGEMENT_RULE})`));
    const l = listed.raising.limits;
    figures.push(
      figure(
        'boom.raisingLimits',
        'boom',
        'Raising limits',
        `ground slope ≤ ${plain(l.maxGroundSlopePercent)} %, boom hoist line pull ≤ ${ratingOf(q, 'force', l.maxBoomHoistLinePullKn)}, ${l.tipSupportRequired ? 'tip must be carried while the boom leaves the ground' : 'no tip support needed'}`,
        'info',
        false,
        `raising limits (${ARRANGEMENT_RULE})`,
      ),
    );
  }

  const plates = guarded(figures, 'boom.plates', 'boom', 'Plates under the crawler ends', false, () => {
    const p = platesRequired(lengthM, arrangement.platesThresholdBoomLengthM);
    figures.push(figure('boom.plates', 'boom', 'Plates under the crawler ends', p.required ? 'Plates required under the crawler ends' : 'Not required', 'info', false, p.rule));
    return p.required;
  });

  const auxRule = `auxiliary sheave only on the boom lengths listed for it (${ARRANGEMENT_RULE})`;
  if (!config.auxiliary.enabled) {
    figures.push(figure('boom.auxSheave', 'boom', 'Auxiliary sheave', 'Not fitted', 'info', false, auxRule));
  } else if (makeup.auxSheaveAllowed) {
    figures.push(figure('boom.auxSheave', 'boom', 'Auxiliary sheave', `Allowed on ${plain(lengthM)} m`, 'pass', false, auxRule));
  } else {
    const allowed = [...arrangement.auxSheaveBoomLengthsM].sort((a, b) => a - b).map(plain).join(', ');
    figures.push(
      figure('boom.auxSheave', 'boom', 'Auxiliary sheave', `Not allowed on ${plain(lengthM)} m`, 'fail', false, auxRule, `allowed on ${allowed} m; remove the auxiliary sheave or choose one of those lengths`),
    );
  }

  // The boom angle that puts the tip over the planned radius, measured from the slewing centre
  // with the foot pin where the data puts it (the ground and chart checks use the same geometry).
  const footAheadM = arrangement.machine.boomFoot?.aheadOfSlewCentreM ?? 0;
  const footWords = arrangement.machine.boomFoot ? `boom foot ${plain(footAheadM)} m ahead of the slewing centre` : 'boom foot position not in the data: taken at the slewing centre';
  const radiusRule = `radius = foot offset + boom length × cos(boom angle), ${footWords}; the crane’s own boom-angle range is not checked (its chart and limiter govern)`;
  const radiusM = config.heaviestLoad.radiusM;
  const projectedM = radiusM - footAheadM;
  let cosBoomAngle: number | null = null;
  if (projectedM <= 0) {
    figures.push(
      figure('boom.radius', 'boom', 'Boom angle for the heaviest lift', `${stated(q, radiusM)} is inside the boom foot`, 'fail', false, radiusRule, 'the planned radius is shorter than the boom foot’s offset: choose a longer radius'),
    );
  } else if (projectedM <= lengthM) {
    cosBoomAngle = projectedM / lengthM;
    const angleDeg = (Math.acos(cosBoomAngle) * 180) / Math.PI;
    figures.push(figure('boom.radius', 'boom', 'Boom angle for the heaviest lift', `${fmt(angleDeg)}° at ${stated(q, radiusM)} radius`, 'info', false, radiusRule));
  } else {
    figures.push(
      figure('boom.radius', 'boom', 'Boom angle for the heaviest lift', `${stated(q, radiusM)} is beyond the ${stated(q, lengthM)} boom`, 'fail', false, radiusRule, 'the planned radius is beyond the boom’s reach: choose a longer boom or a shorter radius'),
    );
  }
  // The crane's own chart is checked in chart.ts (chart.lift, chart.raise).

  return { makeup, listed, boomCogFromFootM, boomWeightKn, platesRequired: plates, cosBoomAngle };
}
