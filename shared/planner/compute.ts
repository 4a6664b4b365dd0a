/**
 * The configuration planner's computation: every figure of a planned configuration, each with the
 * rule that produced it. Pure and deterministic; the browser runs it as the supervisor types and
 * the server runs it again as the authority.
 *
 * It never throws for a schema-valid configuration: a calculation that refuses its input
 * (CalcInputError) becomes a failing figure naming the field, so the screen can point at it.
 * Anything else unexpected also becomes a failing, non-overridable figure: a planner that cannot
 * compute a check must not let the plan through.
 */
import { boomMakeup, platesRequired, type BoomMakeup } from '../calc/boom.js';
import { CalcInputError, finiteResult } from '../calc/errors.js';
import { assistLiftCheck } from '../calc/assist.js';
import { matPressure, trackPressure, type MatPressureResult, type TrackPressureResult } from '../calc/ground.js';
import { SHEAVE_EFFICIENCY_PRESETS, leadLinePull, requiredParts } from '../calc/reeving.js';
import {
  DESIGN_FACTOR_SOURCE,
  MINIMUM_WRAPS_ON_DRUM,
  dOverDCheck,
  designFactorCheck,
  ropeLengthRequiredM,
  wrapsLeftOnDrum,
} from '../calc/rope.js';
import { fallZoneRadiusM, powerLineClearanceM } from '../calc/site.js';
import { knToTonnesForce, tonnesForceToKn } from '../calc/units.js';
import type { BoomArrangement, HookBlock, InventoryItem } from '../schemas/arrangement.js';
import type { Configuration, Figure, FigureStatus } from '../schemas/configuration.js';
import type { AssistLiftResultRow, ConfigurationResults, LoadCaseResult, PlannerInputs, PowerLineResult } from './types.js';

/**
 * How far the auxiliary sheave reaches beyond the main boom tip, for the fall zone and the
 * power-line clearance. Common practice, no source: the model's data carries no such dimension.
 */
export const AUX_SHEAVE_TIP_EXTENSION_M = 1.5;

type Group = Figure['group'];

function figure(
  key: string,
  group: Group,
  label: string,
  value: string,
  status: FigureStatus,
  overridable: boolean,
  rule: string,
  detail?: string,
): Figure {
  const f: Figure = { key, group, label, value, status, overridable: status === 'fail' ? overridable : false, rule };
  if (detail !== undefined && detail.length > 0) f.detail = detail;
  return f;
}

/** A number for people: fixed decimals, no "-0". */
function fmt(value: number, decimals = 1): string {
  const s = value.toFixed(decimals);
  return /^-0(\.0+)?$/.test(s) ? s.slice(1) : s;
}

/** A number without trailing zeros (lengths and counts from the data). */
function plain(value: number): string {
  return String(Math.round(value * 1000) / 1000);
}

/** Kilograms to kilonewtons through tonne-force (1 tf = 9.80665 kN). */
function kgToKn(weightKg: number): number {
  return tonnesForceToKn(weightKg / 1000);
}

/** Runs one check; a refused input or an unexpected error becomes a failing figure instead of a throw. */
function guarded<T>(figures: Figure[], key: string, group: Group, label: string, fallback: T, run: () => T): T {
  try {
    return run();
  } catch (error) {
    figures.push(failureFromError(key, group, label, error));
    return fallback;
  }
}

function failureFromError(key: string, group: Group, label: string, error: unknown): Figure {
  if (error instanceof CalcInputError) {
    return figure(key, group, label, 'Cannot compute', 'fail', false, `input refused: ${error.field}`, error.message);
  }
  const message = error instanceof Error ? error.message : String(error);
  return figure(key, group, label, 'Cannot compute', 'fail', false, 'the calculation stopped with an error; the plan cannot be checked', message);
}

function emptyMakeup(boomLengthM: number, reason: string): BoomMakeup {
  return {
    boomLengthM,
    buildable: false,
    reasons: [reason],
    sections: [],
    guyLines: [],
    totalSectionWeightKg: 0,
    totalGuyLineCount: 0,
    pinCount: { jointPins: 0, guyLinePins: 0, total: 0 },
    arrangement: null,
    platesRequired: false,
    auxSheaveAllowed: false,
    rule: 'no make-up: the boom could not be worked out',
  };
}

function serviceableAtHand(inventory: readonly InventoryItem[], kind: InventoryItem['kind'], typeId: string): {
  serviceable: string[];
  unusable: string[];
} {
  const ofType = inventory.filter((i) => i.kind === kind && i.typeId === typeId);
  return {
    serviceable: ofType.filter((i) => i.status === 'serviceable').map((i) => i.serial),
    unusable: ofType.filter((i) => i.status !== 'serviceable').map((i) => `${i.serial} (${i.status})`),
  };
}

// ---------------------------------------------------------------------------------------------
// Boom

interface BoomOutcome {
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

function computeBoom(config: Configuration, inputs: PlannerInputs, figures: Figure[]): BoomOutcome {
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
        `${fmt(weightKg / 1000, 2)} t (${fmt(kn)} kN)`,
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
      figure('boom.counterweight', 'boom', 'Counterweight for raising', `${fmt(listed.raising.counterweightKg / 1000, 1)} t`, 'info', false, `counterweight before raising (${ARRANGEMENT_RULE})`),
    );
    figures.push(figure('boom.trackGauge', 'boom', 'Track gauge for raising', `${plain(listed.raising.trackGaugeM)} m`, 'info', false, `track gauge before raising (${ARRANGEMENT_RULE})`));
    const l = listed.raising.limits;
    figures.push(
      figure(
        'boom.raisingLimits',
        'boom',
        'Raising limits',
        `ground slope ≤ ${plain(l.maxGroundSlopePercent)} %, boom hoist line pull ≤ ${plain(l.maxBoomHoistLinePullKn)} kN, ${l.tipSupportRequired ? 'tip must be carried while the boom leaves the ground' : 'no tip support needed'}`,
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

  // The boom angle that puts the tip over the planned radius. The boom foot is taken at the
  // slewing centre and at ground level: a simplification, since the real foot pin sits ahead of
  // the centre and above the ground; the crane's own range of boom angles is not checked here.
  const radiusRule =
    'radius = boom length × cos(boom angle), the boom foot taken at the slewing centre (simplification: the real foot pin sits ahead of it; the crane’s own boom-angle range is not checked)';
  const radiusM = config.heaviestLoad.radiusM;
  let cosBoomAngle: number | null = null;
  if (radiusM <= lengthM) {
    cosBoomAngle = radiusM / lengthM;
    const angleDeg = (Math.acos(cosBoomAngle) * 180) / Math.PI;
    figures.push(figure('boom.radius', 'boom', 'Boom angle for the heaviest lift', `${fmt(angleDeg)}° at ${plain(radiusM)} m radius`, 'info', false, radiusRule));
  } else {
    figures.push(
      figure('boom.radius', 'boom', 'Boom angle for the heaviest lift', `${plain(radiusM)} m is beyond the ${plain(lengthM)} m boom`, 'fail', false, radiusRule, 'the planned radius is longer than the boom: choose a longer boom or a shorter radius'),
    );
  }
  figures.push(
    figure(
      'boom.loadChart',
      'boom',
      'Crane load chart',
      'Not checked here',
      'info',
      false,
      'Holdline holds no load chart for this model: the crane’s own load chart and rated capacity limiter govern every lift (manufacturer)',
    ),
  );

  return { makeup, listed, boomCogFromFootM, boomWeightKn, platesRequired: plates, cosBoomAngle };
}

// ---------------------------------------------------------------------------------------------
// Rope (main hoist)

function computeRope(
  config: Configuration,
  inputs: PlannerInputs,
  figures: Figure[],
): { reeving: ConfigurationResults['reeving']; hookBlock: HookBlock | null } {
  const { arrangement, inventory } = inputs;
  const { hookBlockId, parts } = config.mainHook;
  const hookBlock = arrangement.hookBlocks.find((b) => b.id === hookBlockId) ?? null;
  const blockRule = 'parts of line ≤ the most the block can be reeved with (manufacturer arrangement data)';
  if (!hookBlock) {
    figures.push(figure('rope.hookBlock', 'rope', 'Main hook block', `${hookBlockId} is not in the model’s data`, 'fail', false, blockRule, 'choose a hook block the model lists'));
    return { reeving: null, hookBlock: null };
  }
  if (parts <= hookBlock.maxParts) {
    figures.push(figure('rope.hookBlock', 'rope', 'Main hook block', `${hookBlock.id}, ${parts} parts (at most ${hookBlock.maxParts})`, 'pass', false, blockRule));
  } else {
    figures.push(
      figure('rope.hookBlock', 'rope', 'Main hook block', `${parts} parts on ${hookBlock.id}: at most ${hookBlock.maxParts}`, 'fail', false, blockRule, `${hookBlock.id} has ${hookBlock.sheaveCount} sheaves: reeve fewer parts or choose a larger block`),
    );
  }

  const atHand = serviceableAtHand(inventory, 'hook_block', hookBlock.id);
  const atHandRule = 'a serviceable block of this type among the unit’s parts; quarantined and retired parts are never used';
  figures.push(
    atHand.serviceable.length > 0
      ? figure('rope.hookBlockAtHand', 'rope', 'Main hook block at hand', atHand.serviceable[0], 'pass', false, atHandRule)
      : figure(
          'rope.hookBlockAtHand',
          'rope',
          'Main hook block at hand',
          `No serviceable ${hookBlock.id}`,
          'fail',
          false,
          atHandRule,
          atHand.unusable.length > 0 ? `not usable: ${atHand.unusable.join(', ')}` : 'none among the unit’s parts',
        ),
  );

  const liftT = config.heaviestLoad.loadT + config.heaviestLoad.riggingT;
  const ratingRule = 'load + rigging ≤ rated load of the hook block (manufacturer arrangement data)';
  figures.push(
    liftT <= hookBlock.ratedLoadT
      ? figure('rope.hookBlockRating', 'rope', 'Hook block rating', `${fmt(liftT, 2)} t of ${plain(hookBlock.ratedLoadT)} t`, 'pass', false, ratingRule)
      : figure('rope.hookBlockRating', 'rope', 'Hook block rating', `${fmt(liftT, 2)} t on a ${plain(hookBlock.ratedLoadT)} t block`, 'fail', false, ratingRule, 'choose a larger hook block'),
  );

  const drum = arrangement.drums.find((d) => d.role === 'mainHoist');
  const rope = drum ? arrangement.ropes.find((r) => r.id === drum.ropeId) : undefined;
  if (!drum || !rope) {
    figures.push(figure('rope.mainHoist', 'rope', 'Main hoist', 'No main hoist drum or rope in the data', 'fail', false, 'main hoist drum and its rope (manufacturer arrangement data)'));
    return { reeving: null, hookBlock };
  }

  // Sheave efficiency by the bearing of the model's load sheaves; if they differ, or the data
  // lists none, the plain-bearing value is taken, because it gives the higher pull.
  const loadSheaves = arrangement.sheaves.filter((s) => s.role === 'load');
  const allRolling = loadSheaves.length > 0 && loadSheaves.every((s) => s.bearing === 'rolling');
  const preset = allRolling ? SHEAVE_EFFICIENCY_PRESETS.rollingBearing : SHEAVE_EFFICIENCY_PRESETS.plainBearing;
  // Every idler sheave the data lists is counted as a lead sheave between the drum and the tip,
  // at the load sheaves' efficiency. The data does not say which rope each idler carries, so
  // counting them all adds friction rather than risking leaving some out; a plain-bearing idler
  // taken at a rolling-bearing efficiency understates its own loss slightly (said in the rule).
  const extraLeadSheaves = arrangement.sheaves.filter((s) => s.role === 'idler').length;
  const sheaveEfficiency = preset.efficiency;
  const efficiencyRule = `${(sheaveEfficiency * 100).toFixed(1)} % per sheave (${allRolling ? 'rolling' : 'plain'}-bearing load sheaves: ${preset.source}); every idler sheave in the model’s data (${extraLeadSheaves}) counted as a lead sheave at that efficiency (simplification)`;

  const reeving = guarded(figures, 'rope.leadLinePull', 'rope', 'Lead-line pull', null as ConfigurationResults['reeving'], () => {
    const loadKn = tonnesForceToKn(liftT + hookBlock.weightKg / 1000);
    const lead = leadLinePull({ loadKn, parts, sheaveEfficiency, extraLeadSheaves });
    const pull = lead.leadLinePullKn;
    const permissible = drum.permissibleLinePullKn;
    const pullRule = `${lead.rule}; load = (load + rigging + hook block) × 9.80665 kN/t; ${efficiencyRule}; ≤ permissible line pull of the main hoist drum (manufacturer arrangement data)`;
    figures.push(
      pull <= permissible
        ? figure('rope.leadLinePull', 'rope', 'Lead-line pull', `${fmt(pull)} kN of ${plain(permissible)} kN permissible`, 'pass', false, pullRule, `hook load ${fmt(loadKn)} kN on ${parts} parts`)
        : figure('rope.leadLinePull', 'rope', 'Lead-line pull', `${fmt(pull)} kN, above the ${plain(permissible)} kN permissible`, 'fail', true, pullRule, `hook load ${fmt(loadKn)} kN on ${parts} parts: reeve more parts`),
    );

    const needed = guarded(figures, 'rope.requiredParts', 'rope', 'Parts of line needed', null as number | null, () => {
      const r = requiredParts({ loadKn, sheaveEfficiency, extraLeadSheaves, permissibleLinePullKn: permissible, maxParts: hookBlock.maxParts });
      figures.push(
        r.achievable
          ? figure('rope.requiredParts', 'rope', 'Parts of line needed', `at least ${r.parts} parts (${fmt(r.leadLinePullKn)} kN)`, 'info', false, r.rule)
          : figure('rope.requiredParts', 'rope', 'Parts of line needed', `Not achievable with ${hookBlock.id}`, 'info', false, r.rule, r.reason),
      );
      return r.parts;
    });

    guarded(figures, 'rope.designFactor', 'rope', 'Rope design factor', undefined, () => {
      const duty = rope.rotationResistant ? 'rotationResistant' : 'running';
      const df = designFactorCheck({ minimumBreakingForceKn: rope.minimumBreakingForceKn, linePullKn: pull, duty });
      const rule = `design factor = minimum breaking force (rope certificate, ${plain(rope.minimumBreakingForceKn)} kN) ÷ lead-line pull; ${df.rule}`;
      figures.push(
        df.pass
          ? figure('rope.designFactor', 'rope', 'Rope design factor', `${fmt(df.designFactor, 2)} (at least ${plain(df.minimumDesignFactor)})`, 'pass', false, rule)
          : figure(
              'rope.designFactor',
              'rope',
              'Rope design factor',
              `${fmt(df.designFactor, 2)}, below ${plain(df.minimumDesignFactor)}`,
              'fail',
              false,
              rule,
              `${rope.id} is ${rope.rotationResistant ? 'rotation-resistant' : 'running'} rope (${DESIGN_FACTOR_SOURCE}): reeve more parts`,
            ),
      );
    });

    return { hookBlockId: hookBlock.id, parts, sheaveCount: hookBlock.sheaveCount, sheaveEfficiency, extraLeadSheaves, leadLinePullKn: pull, requiredParts: needed };
  });

  guarded(figures, 'rope.dOverD.drum', 'rope', 'D/d of the main hoist drum', undefined, () => {
    const c = dOverDCheck({ pitchDiameterMm: drum.pitchDiameterMm, ropeDiameterMm: rope.diameterMm, element: 'drum' });
    const value = `${fmt(c.ratio, 1)} (${plain(drum.pitchDiameterMm)} mm ÷ ${plain(rope.diameterMm)} mm; at least ${c.minimumRatio})`;
    figures.push(figure('rope.dOverD.drum', 'rope', 'D/d of the main hoist drum', value, c.pass ? 'pass' : 'fail', true, c.rule));
  });
  if (hookBlock.sheavePitchDiameterMm === null) {
    figures.push(figure('rope.dOverD.hookBlock', 'rope', 'D/d of the hook block sheaves', `${hookBlock.id} has no sheaves`, 'info', false, 'an overhaul ball has no sheaves to bend the rope over'));
  } else {
    const pitch = hookBlock.sheavePitchDiameterMm;
    guarded(figures, 'rope.dOverD.hookBlock', 'rope', 'D/d of the hook block sheaves', undefined, () => {
      const c = dOverDCheck({ pitchDiameterMm: pitch, ropeDiameterMm: rope.diameterMm, element: 'lowerBlockSheave' });
      const value = `${fmt(c.ratio, 1)} (${plain(pitch)} mm ÷ ${plain(rope.diameterMm)} mm; at least ${c.minimumRatio})`;
      figures.push(figure('rope.dOverD.hookBlock', 'rope', 'D/d of the hook block sheaves', value, c.pass ? 'pass' : 'fail', true, c.rule));
    });
  }

  // Rope paid out: the reeve height is taken as the boom length (tip at its highest with the boom
  // near vertical, hook down at ground level: the most rope off the drum), and the lead from the
  // drum to the tip as the boom length too. Both are simplifications: the foot-pin height, the
  // run from the drum to the boom foot and any lowering below ground level are left out.
  const runSimplification =
    'reeve height and lead length both taken as the boom length (simplification: hook at ground level under the tip at its highest; foot-pin height, the run from drum to boom foot and lowering below ground are left out)';
  guarded(figures, 'rope.wraps', 'rope', 'Wraps left on the drum', undefined, () => {
    const run = { parts, reeveHeightM: config.boomLengthM, leadLengthM: config.boomLengthM, drumDiameterM: drum.pitchDiameterMm / 1000 };
    const needed = ropeLengthRequiredM({ ...run, wrapsLeftOnDrum: MINIMUM_WRAPS_ON_DRUM });
    figures.push(
      figure(
        'rope.lengthRequired',
        'rope',
        'Main hoist rope needed',
        `${fmt(needed.ropeLengthRequiredM)} m of ${plain(drum.ropeLengthM)} m on the drum`,
        'info',
        false,
        `${needed.rule}; ${runSimplification}`,
      ),
    );
    const w = wrapsLeftOnDrum({ ...run, ropeLengthM: drum.ropeLengthM });
    const rule = `${w.rule}; ${runSimplification}`;
    figures.push(
      w.pass
        ? figure('rope.wraps', 'rope', 'Wraps left on the drum', `${fmt(w.wrapsLeft)} wraps (at least ${w.minimumWraps})`, 'pass', false, rule)
        : figure('rope.wraps', 'rope', 'Wraps left on the drum', `${fmt(w.wrapsLeft)} wraps, fewer than ${w.minimumWraps}`, 'fail', true, rule, `${fmt(w.ropeShortM)} m of rope short: fewer parts, a shorter boom or a longer rope`),
    );
  });

  if (config.auxiliary.enabled && config.auxiliary.hookBlockId) {
    const auxId = config.auxiliary.hookBlockId;
    const aux = arrangement.hookBlocks.find((b) => b.id === auxId);
    const auxRule = 'auxiliary hook or overhaul ball listed in the model’s data and serviceable among the unit’s parts';
    if (!aux) {
      figures.push(figure('rope.auxHook', 'rope', 'Auxiliary hook', `${auxId} is not in the model’s data`, 'fail', false, auxRule));
    } else {
      const a = serviceableAtHand(inventory, 'hook_block', aux.id);
      figures.push(
        a.serviceable.length > 0
          ? figure('rope.auxHook', 'rope', 'Auxiliary hook', `${aux.id}: ${a.serviceable[0]}`, 'pass', false, auxRule)
          : figure('rope.auxHook', 'rope', 'Auxiliary hook', `No serviceable ${aux.id}`, 'fail', false, auxRule, a.unusable.length > 0 ? `not usable: ${a.unusable.join(', ')}` : 'none among the unit’s parts'),
      );
    }
  }

  return { reeving, hookBlock };
}

// ---------------------------------------------------------------------------------------------
// Assist crane

function computeAssist(config: Configuration, inputs: PlannerInputs, figures: Figure[]): AssistLiftResultRow[] {
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

// ---------------------------------------------------------------------------------------------
// Ground

interface Weight {
  weightKn: number;
  /** Horizontal distance from the slewing centre, positive towards the boom. */
  armM: number;
}

const WEIGHTS_RULE =
  'vertical load = machine base + raising counterweight + boom sections + hook block(s) (+ load and rigging); moment about the slewing centre = Σ weight × horizontal distance (counterweight behind = negative), the boom foot taken at the slewing centre (simplification); guy lines and ropes neglected: the data gives no weights for them';

function totals(weights: readonly Weight[]): { verticalLoadKn: number; momentKnm: number } {
  const verticalLoadKn = finiteResult('heaviestLoad.loadT', weights.reduce((sum, w) => sum + w.weightKn, 0));
  const momentKnm = finiteResult('heaviestLoad.radiusM', weights.reduce((sum, w) => sum + w.weightKn * w.armM, 0));
  return { verticalLoadKn, momentKnm };
}

/** The load on one mat-width strip at the heavy end of the pressure block, for the mat check. */
function heavyEndStrip(track: TrackPressureResult, stripLengthM: number, shoeWidthM: number): number {
  const contact = track.contactLengthM;
  const w = Math.min(stripLengthM, contact);
  const qEnd = track.minPressureKpa; // at the far end of the contact length (0 for a triangle)
  const qAtW = track.maxPressureKpa + ((qEnd - track.maxPressureKpa) * w) / contact;
  return shoeWidthM * w * ((track.maxPressureKpa + qAtW) / 2);
}

function computeGround(
  config: Configuration,
  inputs: PlannerInputs,
  boom: BoomOutcome,
  hookBlock: HookBlock | null,
  figures: Figure[],
): LoadCaseResult[] {
  const { arrangement } = inputs;
  const allowable = config.ground.allowablePressureKpa;
  const unverified = config.ground.source.kind === 'none';
  const caseLabels: Record<LoadCaseResult['key'], string> = {
    raising: 'Raising (boom horizontal, no load)',
    overEnd: 'Heaviest lift over the end',
    overSide: 'Heaviest lift over the side',
    unloaded: 'Unloaded, boom at the lifting angle',
  };
  const keys: LoadCaseResult['key'][] = ['raising', 'overEnd', 'overSide', 'unloaded'];
  const cannot = (reason: string) => {
    for (const k of keys) figures.push(figure(`ground.${k}`, 'ground', `Ground pressure: ${caseLabels[k]}`, 'Cannot compute', 'fail', false, WEIGHTS_RULE, reason));
    return [];
  };
  if (!boom.listed) return cannot('no arrangement data for this boom length: counterweight and track gauge unknown');
  if (boom.boomCogFromFootM === null) return cannot('the boom has no sections to weigh');
  const listed = boom.listed;
  const boomCog = boom.boomCogFromFootM;
  const tracks = arrangement.tracks;
  const machine = arrangement.machine;
  const lengthM = config.boomLengthM;

  const base: Weight[] = [
    { weightKn: kgToKn(machine.baseWeightKg), armM: machine.cogFromSlewCentreM },
    { weightKn: kgToKn(listed.raising.counterweightKg), armM: machine.counterweight.cogFromSlewCentreM },
  ];
  // Hook blocks hang at the tip; the auxiliary hook too when it is fitted.
  let hookWeightKg = hookBlock?.weightKg ?? 0;
  if (config.auxiliary.enabled && config.auxiliary.hookBlockId) {
    hookWeightKg += arrangement.hookBlocks.find((b) => b.id === config.auxiliary.hookBlockId)?.weightKg ?? 0;
  }
  const hookKn = kgToKn(hookWeightKg);
  const liftKn = tonnesForceToKn(config.heaviestLoad.loadT + config.heaviestLoad.riggingT);
  const results: LoadCaseResult[] = [];

  const statusOf = (pressureKpa: number): FigureStatus => (pressureKpa > allowable ? 'fail' : unverified ? 'unverified' : 'pass');
  const pressureValue = (pressureKpa: number) => `${fmt(pressureKpa)} kPa max (allowable ${plain(allowable)} kPa)`;
  const sourceNote = unverified ? 'allowable pressure has no ground source yet: unverified' : `allowable pressure from ${config.ground.source.reference}`;

  const evaluate = (key: LoadCaseResult['key'], weights: readonly Weight[], side: boolean, geometryNote: string) => {
    const label = `Ground pressure: ${caseLabels[key]}`;
    const suffix = config.mats.used ? ' without mats' : '';
    const figKey = `ground.${key}`;
    guarded(figures, figKey, 'ground', label + suffix, undefined, () => {
      const { verticalLoadKn, momentKnm } = totals(weights);
      let track: TrackPressureResult;
      let detail: string;
      let rule: string;
      if (!side) {
        const e = momentKnm / verticalLoadKn;
        try {
          track = trackPressure({ verticalLoadKn, eccentricityM: e, trackLengthM: tracks.lengthM, trackWidthM: tracks.shoeWidthM, tracks: tracks.count });
        } catch (error) {
          if (error instanceof CalcInputError && error.field === 'eccentricityM') {
            figures.push(
              figure(figKey, 'ground', label + suffix, 'Overturns', 'fail', false, `e = M ÷ V along the tracks must stay inside the track length; ${WEIGHTS_RULE}`, `the resultant falls outside the tracks: e = ${fmt(e, 2)} m, half the track length ${plain(tracks.lengthM / 2)} m`),
            );
            return;
          }
          throw error;
        }
        rule = `${track.rule}; e = M ÷ V along the tracks, ${tracks.count} tracks sharing V; ${WEIGHTS_RULE}; ${geometryNote}`;
        detail = `vertical load ${fmt(verticalLoadKn)} kN, moment ${fmt(momentKnm)} kN·m, eccentricity ${fmt(e, 2)} m (${track.distribution}), ${fmt(track.loadPerTrackKn)} kN per track; ${sourceNote}`;
      } else {
        const gauge = listed.raising.trackGaugeM;
        const perSide = Math.max(1, Math.floor(tracks.count / 2));
        const heavyKn = finiteResult('heaviestLoad.loadT', verticalLoadKn / 2 + Math.abs(momentKnm) / gauge);
        const lightKn = verticalLoadKn / 2 - Math.abs(momentKnm) / gauge;
        if (lightKn < 0) {
          figures.push(
            figure(figKey, 'ground', label + suffix, 'Overturns', 'fail', false, `heavier track = V/2 + M/gauge, the lighter = V/2 − M/gauge must stay ≥ 0; ${WEIGHTS_RULE}`, `the resultant falls outside the tracks: M ÷ V = ${fmt(Math.abs(momentKnm) / verticalLoadKn, 2)} m, beyond half the ${plain(gauge)} m gauge`),
          );
          return;
        }
        // The heavier side's load, taken uniform along the track: no eccentricity along it.
        track = trackPressure({ verticalLoadKn: heavyKn, eccentricityM: 0, trackLengthM: tracks.lengthM, trackWidthM: tracks.shoeWidthM, tracks: perSide });
        rule = `heavier track = V/2 + M/gauge (gauge ${plain(gauge)} m, the raising gauge), uniform along the track; ${track.rule}; ${WEIGHTS_RULE}; ${geometryNote}`;
        detail = `vertical load ${fmt(verticalLoadKn)} kN, moment ${fmt(momentKnm)} kN·m, heavier side ${fmt(heavyKn)} kN, lighter side ${fmt(lightKn)} kN; ${sourceNote}`;
      }
      const status = statusOf(track.maxPressureKpa);
      figures.push(figure(figKey, 'ground', label + suffix, pressureValue(track.maxPressureKpa), status, true, rule, detail));

      let mats: LoadCaseResult['mats'] = null;
      if (config.mats.used) {
        const matKey = `${figKey}.mats`;
        mats = guarded(figures, matKey, 'ground', `${label} with mats`, null as LoadCaseResult['mats'], () => {
          // One mat under the heavy end of the heavier track, laid across it: its length spans the
          // track width, its width runs along the track and carries that much of the pressure block.
          const stripKn = heavyEndStrip(track, config.mats.widthM, tracks.shoeWidthM);
          const stripM = Math.min(config.mats.widthM, track.contactLengthM);
          let m: MatPressureResult;
          try {
            m = matPressure({
              loadKn: stripKn,
              contactLengthM: stripM,
              contactWidthM: tracks.shoeWidthM,
              matLengthM: config.mats.widthM,
              matWidthM: config.mats.lengthM,
              matThicknessM: config.mats.thicknessM,
              matWeightKn: kgToKn(config.mats.weightKg),
            });
          } catch (error) {
            if (error instanceof CalcInputError && error.field === 'matWidthM') {
              throw new CalcInputError('mats.lengthM', `the mat (${plain(config.mats.lengthM)} m) is shorter than the track shoe is wide (${plain(tracks.shoeWidthM)} m)`);
            }
            throw error;
          }
          const matRule = `the most loaded mat: under the heavy end of the heavier track, carrying the pressure block over its width (${plain(config.mats.widthM)} m along the track); ${m.rule}`;
          figures.push(
            figure(
              matKey,
              'ground',
              `${label} with mats`,
              pressureValue(m.totalPressureKpa),
              statusOf(m.totalPressureKpa),
              true,
              matRule,
              `${fmt(stripKn)} kN on ${fmt(m.bearingLengthM, 2)} m × ${fmt(m.bearingWidthM, 2)} m, mat weight ${fmt(m.matSelfWeightPressureKpa)} kPa; ${sourceNote}`,
            ),
          );
          return { pressureKpa: m.totalPressureKpa, rule: matRule };
        });
      }
      results.push({ key, label: caseLabels[key], verticalLoadKn, momentKnm, track, mats, allowablePressureKpa: allowable });
    });
  };

  const hookWeights = (armM: number): Weight[] => (hookKn > 0 ? [{ weightKn: hookKn, armM }] : []);
  // Raising: the boom lies horizontal, its weight at its centre of gravity along the boom, the hook block at the tip.
  evaluate(
    'raising',
    [...base, { weightKn: boom.boomWeightKn, armM: boomCog }, ...hookWeights(lengthM)],
    false,
    `boom horizontal: its centre of gravity ${fmt(boomCog, 2)} m out, hook block at the tip ${plain(lengthM)} m out; taken over the end of the tracks`,
  );
  const cos = boom.cosBoomAngle;
  if (cos === null) {
    for (const k of ['overEnd', 'overSide', 'unloaded'] as const) {
      figures.push(figure(`ground.${k}`, 'ground', `Ground pressure: ${caseLabels[k]}`, 'Cannot compute', 'fail', false, WEIGHTS_RULE, 'the planned radius is beyond the boom length'));
    }
    return results;
  }
  const radiusM = config.heaviestLoad.radiusM;
  const boomArm = boomCog * cos;
  const angleNote = `boom at the angle that puts the tip over ${plain(radiusM)} m: its centre of gravity ${fmt(boomArm, 2)} m out`;
  const lifting = [...base, { weightKn: boom.boomWeightKn, armM: boomArm }, ...hookWeights(radiusM), { weightKn: liftKn, armM: radiusM }];
  evaluate('overEnd', lifting, false, `${angleNote}; load, rigging and hook block at ${plain(radiusM)} m`);
  evaluate('overSide', lifting, true, `${angleNote}; load, rigging and hook block at ${plain(radiusM)} m`);
  evaluate('unloaded', [...base, { weightKn: boom.boomWeightKn, armM: boomArm }, ...hookWeights(radiusM)], false, `${angleNote}; no load, hook block at the tip; taken over the end of the tracks`);
  return results;
}

// ---------------------------------------------------------------------------------------------
// Site

const POWER_LINE_GEOMETRY_RULE =
  'available = distance from the slewing centre − (boom length + tip extension): the boom could swing or fall toward the line (common practice, no source for the geometry)';

function computeSite(config: Configuration, figures: Figure[]): { fallZoneRadiusM: number; powerLines: PowerLineResult[] } {
  const tipExtensionM = config.auxiliary.enabled ? AUX_SHEAVE_TIP_EXTENSION_M : 0;
  const extensionNote = config.auxiliary.enabled
    ? `tip extension ${plain(AUX_SHEAVE_TIP_EXTENSION_M)} m for the auxiliary sheave (common practice, no source)`
    : 'no tip extension';
  const fallZone = guarded(figures, 'site.fallZone', 'site', 'Fall zone radius', 0, () => {
    const r = fallZoneRadiusM({ boomLengthM: config.boomLengthM, tipExtensionM, marginM: config.fallZoneMarginM });
    figures.push(
      figure('site.fallZone', 'site', 'Fall zone radius', `${fmt(r.radiusM)} m`, 'info', false, `${r.rule}; ${extensionNote}; margin ${plain(config.fallZoneMarginM)} m; measured from the slewing centre (boom foot taken there)`),
    );
    return r.radiusM;
  });

  const reachM = config.boomLengthM + tipExtensionM;
  const powerLines = config.siteHazards.powerLines.map((line, i): PowerLineResult => {
    const key = `powerLine.${i}`;
    const label = `Power line: ${line.label}`;
    const availableM = Number.isFinite(line.distanceM - reachM) ? line.distanceM - reachM : -Number.MAX_VALUE;
    const failed: PowerLineResult = { label: line.label, voltageKv: line.voltageKv, distanceM: line.distanceM, requiredClearanceM: null, availableClearanceM: availableM, pass: false };
    return guarded(figures, key, 'site', label, failed, () => {
      const c = powerLineClearanceM(line.voltageKv);
      const rule = `${c.rule}; ${POWER_LINE_GEOMETRY_RULE}; ${extensionNote}`;
      if (c.clearanceM === null) {
        figures.push(figure(key, 'site', label, 'Get the line owner’s distance', 'fail', false, rule, c.reason));
        return failed;
      }
      const pass = availableM >= c.clearanceM;
      const value = `${fmt(availableM)} m available, ${fmt(c.clearanceM, 2)} m required (${plain(line.voltageKv)} kV)`;
      figures.push(
        figure(
          key,
          'site',
          label,
          value,
          pass ? 'pass' : 'fail',
          false,
          rule,
          pass ? undefined : `line ${plain(line.distanceM)} m from the slewing centre, boom reach ${fmt(reachM)} m: move the crane, shorten the boom, or have the line de-energised by its owner`,
        ),
      );
      return { label: line.label, voltageKv: line.voltageKv, distanceM: line.distanceM, requiredClearanceM: c.clearanceM, availableClearanceM: availableM, pass };
    });
  });
  return { fallZoneRadiusM: fallZone, powerLines };
}

// ---------------------------------------------------------------------------------------------

/** Every figure of a planned configuration against the crane's data, parts and assist crane; never throws for a schema-valid configuration. */
export function computeConfiguration(config: Configuration, inputs: PlannerInputs): ConfigurationResults {
  const figures: Figure[] = [];
  const boom = computeBoom(config, inputs, figures);
  const { reeving, hookBlock } = computeRope(config, inputs, figures);
  const assistLifts = computeAssist(config, inputs, figures);
  const loadCases = guarded(figures, 'ground.cases', 'ground', 'Ground pressure', [] as LoadCaseResult[], () => computeGround(config, inputs, boom, hookBlock, figures));

  let windLimits: ConfigurationResults['windLimits'] = null;
  const windRule = 'limits for this boom length from the crane model data (manufacturer); Holdline has no wind limits of its own';
  if (boom.listed) {
    const { assembly, raising } = boom.listed.wind;
    windLimits = { assembly, raising };
    figures.push(figure('wind.assembly', 'wind', 'Wind limit for assembly', `gust ≤ ${plain(assembly.gustMs)} m/s, mean ≤ ${plain(assembly.meanMs)} m/s`, 'info', false, windRule));
    figures.push(figure('wind.raising', 'wind', 'Wind limit for raising', `gust ≤ ${plain(raising.gustMs)} m/s, mean ≤ ${plain(raising.meanMs)} m/s`, 'info', false, windRule));
  } else {
    for (const [key, label] of [['wind.assembly', 'Wind limit for assembly'], ['wind.raising', 'Wind limit for raising']] as const) {
      figures.push(figure(key, 'wind', label, 'No data for this boom length', 'fail', false, windRule));
    }
  }

  const site = computeSite(config, figures);
  return {
    figures,
    makeup: boom.makeup,
    reeving,
    loadCases,
    assistLifts,
    powerLines: site.powerLines,
    fallZoneRadiusM: site.fallZoneRadiusM,
    platesRequired: boom.platesRequired,
    windLimits,
  };
}
