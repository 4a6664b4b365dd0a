/**
 * The hoists: hook block, reeving, lead-line pull sheave by sheave, design factors, D/d of drums and
 * sheaves, wraps left on the drums at the lowest hook position, fleet angles, the auxiliary hoist and
 * the boom-hoist rope. Whatever the crane data does not give is taken on the safe side and said so.
 */
import { SHEAVE_EFFICIENCY_PRESETS, leadLinePullBySheave, requiredPartsBySheave } from '../calc/reeving.js';
import {
  DESIGN_FACTOR_SOURCE,
  FLEET_ANGLE_LIMITS,
  MINIMUM_WRAPS_ON_DRUM,
  dOverDCheck,
  designFactorCheck,
  drumFleetAngleCheck,
  hoistRunAtLowestHook,
  ropeLengthRequiredM,
  wrapsLeftOnDrum,
  type BendingElement,
} from '../calc/rope.js';
import { tonnesForceToKn } from '../calc/units.js';
import type { ArrangementData, Drum, HookBlock, Rope, Sheave } from '../schemas/arrangement.js';
import type { Configuration, Figure } from '../schemas/configuration.js';
import { figure, guarded, ratingOf, serviceableAtHand } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { fmt, fmtDown, fmtUp, plain } from '../format.js';
import type { ConfigurationResults, PlannerInputs } from './types.js';

type Hoist = 'mainHoist' | 'auxiliaryHoist' | 'boomHoist';
type Bearing = 'plain' | 'rolling';

const hoistWords: Record<Hoist, string> = { mainHoist: 'main hoist', auxiliaryHoist: 'auxiliary hoist', boomHoist: 'boom hoist' };

/**
 * Values taken when the crane data does not give them: the largest the arrangement data format
 * accepts, so the rope paid out can only be overstated (safe side). Said on the figure every time.
 */
export const ROPE_RUN_ASSUMED_WHEN_MISSING = {
  /** The schema's upper bound for machine.boomFoot.heightM. */
  footPinHeightM: 30,
  /** The schema's upper bound for drums[].leadToBoomFootM. */
  leadToBoomFootM: 100,
  /** The schema's upper bound for auxSheave.reachBeyondTipM. */
  auxReachBeyondTipM: 20,
} as const;

/**
 * A "Not included" figure for a value the crane data does not give, once per key: the safe-side
 * value taken is in the figure, and what to add to the crane data in its detail.
 */
function notIncluded(figures: Figure[], key: string, label: string, value: string, detail: string): void {
  if (figures.some((f) => f.key === key)) return;
  figures.push(figure(key, 'rope', `Not included: ${label}`, value, 'info', false, 'a value missing from the crane data is never taken as zero or as the favourable case: the safe-side value is named and used', detail));
}

function efficiencyOf(bearing: Bearing | null): number {
  // An unknown bearing is taken as plain: the lower efficiency, the higher pull.
  return bearing === 'rolling' ? SHEAVE_EFFICIENCY_PRESETS.rollingBearing.efficiency : SHEAVE_EFFICIENCY_PRESETS.plainBearing.efficiency;
}

/** The hoists whose rope runs over a sheave; when the data does not say, every hoist it could carry. */
function hoistsOf(s: Sheave): readonly Hoist[] {
  // `?? null` also covers models stored before the field existed (read without the schema's default).
  const listed = s.hoists ?? null;
  if (listed !== null) return listed;
  return s.role === 'boomHoist' ? ['boomHoist'] : ['mainHoist', 'auxiliaryHoist'];
}

function onPath(arrangement: ArrangementData, hoist: Hoist): Sheave[] {
  return arrangement.sheaves.filter((s) => hoistsOf(s).includes(hoist));
}

function drumAndRope(arrangement: ArrangementData, role: Hoist): { drum: Drum; rope: Rope } | null {
  const drum = arrangement.drums.find((d) => d.role === role);
  const rope = drum ? arrangement.ropes.find((r) => r.id === drum.ropeId) : undefined;
  return drum && rope ? { drum, rope } : null;
}

/** The reeving of one hoist, sheave by sheave, and the notes on what the data left out. */
interface HoistPath {
  tipEfficiency: number;
  blockEfficiency: number;
  lead: { id: string; bearing: Bearing; efficiency: number }[];
  notes: string[];
  words: string;
}

function hoistPath(arrangement: ArrangementData, hoist: Hoist, block: HookBlock | null, figures: Figure[]): HoistPath {
  const path = onPath(arrangement, hoist);
  const notes: string[] = [];
  const unknown = path.filter((s) => (s.hoists ?? null) === null);
  if (unknown.length > 0) {
    notes.push(`the data does not say which rope runs over ${unknown.map((s) => s.id).join(', ')}: counted in this hoist’s path (more friction)`);
    notIncluded(
      figures,
      'rope.notIncluded.sheavePath',
      'which rope runs over each sheave',
      `Not in the crane data for ${unknown.map((s) => s.id).join(', ')}: counted in every hoist’s path`,
      'Each load or idler sheave whose rope is not named adds its friction to the main and the auxiliary hoist, the higher line pull. Add each sheave’s hoists to the crane data from the manufacturer’s manual.',
    );
  }
  const tips = path.filter((s) => s.role === 'load');
  let tipEfficiency: number;
  if (tips.length === 0) {
    tipEfficiency = efficiencyOf(null);
    notes.push('no load sheave listed for this hoist: plain bearings taken');
  } else {
    tipEfficiency = Math.min(...tips.map((s) => efficiencyOf(s.bearing)));
  }
  let blockEfficiency = efficiencyOf(null);
  if (block && block.sheaveCount > 0) {
    const bearing = block.sheaveBearing ?? null;
    blockEfficiency = efficiencyOf(bearing);
    if (bearing === null) {
      notes.push(`the bearings of ${block.id}’s sheaves are not in the data: plain bearings taken`);
      notIncluded(figures, 'rope.notIncluded.blockBearing', `bearings of ${block.id}’s sheaves`, 'Not in the crane data: plain bearings taken (91.7 %)', 'Plain bearings lose the most to friction, so the line pull is not understated. Add the block’s sheave bearings to the crane data.');
    }
  }
  const lead = path.filter((s) => s.role === 'idler').map((s) => ({ id: s.id, bearing: s.bearing, efficiency: efficiencyOf(s.bearing) }));
  const pct = (e: number) => `${fmt(e * 100)} %`;
  const words = [
    `tip sheaves ${pct(tipEfficiency)}`,
    block && block.sheaveCount > 0 ? `block sheaves ${pct(blockEfficiency)}` : null,
    lead.length > 0 ? `lead sheaves ${lead.map((l) => `${l.id} ${pct(l.efficiency)}`).join(', ')}` : 'no lead sheaves listed',
  ]
    .filter((w): w is string => w !== null)
    .join('; ');
  return {
    tipEfficiency,
    blockEfficiency,
    lead,
    notes,
    words: `${words} (plain bearing 91.7 %, rolling 96.2 %: ${SHEAVE_EFFICIENCY_PRESETS.rollingBearing.source})`,
  };
}

/** The main hoist's figures and the other hoists', and the hook block chosen (null when the data lacks it). */
export function computeRope(
  config: Configuration,
  inputs: PlannerInputs,
  figures: Figure[],
  q: Quantities = METRIC,
): { reeving: ConfigurationResults['reeving']; hookBlock: HookBlock | null } {
  const { arrangement, inventory } = inputs;
  const { hookBlockId, parts } = config.mainHook;
  // A configuration stored before the field existed reads as ground level, the schema's default.
  const lowestHookPositionM = config.mainHook.lowestHookPositionM ?? 0;
  const hookBlock = arrangement.hookBlocks.find((b) => b.id === hookBlockId) ?? null;
  const blockRule = 'parts of line ≤ the most the block can be reeved with (manufacturer arrangement data)';

  // The boom hoist, the guy lines and the other drums do not depend on the main hook block.
  const others = () => {
    computeBoomHoist(config, arrangement, figures);
    if (config.auxiliary.enabled) computeAuxiliary(config, inputs, lowestHookPositionM, figures, q);
    computeSheavesDOverD(config, arrangement, figures);
    computeFleetAngles(config, arrangement, figures);
    figures.push(
      figure(
        'rope.guyLines',
        'rope',
        'Guy lines (pendants)',
        'The manufacturer’s rating',
        'info',
        false,
        'the crane data gives no breaking force for the guy lines, so Holdline cannot check their design factor (ASME B30.5 §5-1.7.1: standing ropes at least 3.0, the manufacturer’s to meet); use only the marked lines the manufacturer lists for this boom length',
      ),
    );
  };

  if (!hookBlock) {
    figures.push(figure('rope.hookBlock', 'rope', 'Main hook block', `${hookBlockId} is not in the model’s data`, 'fail', false, blockRule, 'choose a hook block the model lists'));
    others();
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
      ? figure('rope.hookBlockRating', 'rope', 'Hook block rating', `${q.mass(liftT * 1000, 'up', 2)} of ${ratingOf(q, 'mass', hookBlock.ratedLoadT * 1000)}`, 'pass', false, ratingRule)
      : figure('rope.hookBlockRating', 'rope', 'Hook block rating', `${q.mass(liftT * 1000, 'up', 2)} on a ${ratingOf(q, 'mass', hookBlock.ratedLoadT * 1000)} block`, 'fail', false, ratingRule, 'choose a larger hook block'),
  );

  const main = drumAndRope(arrangement, 'mainHoist');
  if (!main) {
    figures.push(figure('rope.mainHoist', 'rope', 'Main hoist', 'No main hoist drum or rope in the data', 'fail', false, 'main hoist drum and its rope (manufacturer arrangement data)'));
    others();
    return { reeving: null, hookBlock };
  }
  const { drum, rope } = main;
  const path = hoistPath(arrangement, 'mainHoist', hookBlock, figures);
  const leadEfficiencies = path.lead.map((l) => l.efficiency);

  const pulled = guarded(figures, 'rope.leadLinePull', 'rope', 'Lead-line pull', null as { pull: number; needed: number | null } | null, () => {
    const loadKn = tonnesForceToKn(liftT + hookBlock.weightKg / 1000);
    const lead = leadLinePullBySheave({ loadKn, parts, tipSheaveEfficiency: path.tipEfficiency, blockSheaveEfficiency: path.blockEfficiency, leadSheaveEfficiencies: leadEfficiencies });
    const pull = lead.leadLinePullKn;
    const permissible = drum.permissibleLinePullKn;
    const pullRule = `${lead.rule}; ${path.words}; load = (load + rigging + hook block) × 9.80665 kN/t; ≤ permissible line pull of the main hoist drum, a winch rating (manufacturer arrangement data)`;
    const notes = path.notes.length > 0 ? `; ${path.notes.join('; ')}` : '';
    figures.push(
      pull <= permissible
        ? figure('rope.leadLinePull', 'rope', 'Lead-line pull', `${q.force(pull, 'up')} of ${ratingOf(q, 'force', permissible)} permissible`, 'pass', false, pullRule, `hook load ${q.force(loadKn, 'nearest')} on ${parts} parts${notes}`)
        : figure('rope.leadLinePull', 'rope', 'Lead-line pull', `${q.force(pull, 'up')}, above the ${ratingOf(q, 'force', permissible)} permissible`, 'fail', false, pullRule, `hook load ${q.force(loadKn, 'nearest')} on ${parts} parts: reeve more parts${notes}`),
    );

    const needed = guarded(figures, 'rope.requiredParts', 'rope', 'Parts of line needed', null as number | null, () => {
      const r = requiredPartsBySheave({
        loadKn,
        tipSheaveEfficiency: path.tipEfficiency,
        blockSheaveEfficiency: path.blockEfficiency,
        leadSheaveEfficiencies: leadEfficiencies,
        permissibleLinePullKn: permissible,
        maxParts: hookBlock.maxParts,
      });
      figures.push(
        r.achievable
          ? figure('rope.requiredParts', 'rope', 'Parts of line needed', `at least ${r.parts} parts (${q.force(r.leadLinePullKn, 'nearest')})`, 'info', false, r.rule)
          : figure('rope.requiredParts', 'rope', 'Parts of line needed', `Not achievable with ${hookBlock.id}`, 'info', false, r.rule, r.reason),
      );
      return r.parts;
    });

    designFactorFigure(figures, 'rope.designFactor', 'Rope design factor', rope, pull, 'lead-line pull', 'reeve more parts');
    return { pull, needed };
  });

  guarded(figures, 'rope.dOverD.drum', 'rope', 'D/d of the main hoist drum', undefined, () => {
    dOverDFigure(figures, 'rope.dOverD.drum', 'D/d of the main hoist drum', drum.pitchDiameterMm, rope.diameterMm, 'drum');
  });
  if (hookBlock.sheavePitchDiameterMm === null) {
    figures.push(figure('rope.dOverD.hookBlock', 'rope', 'D/d of the hook block sheaves', `${hookBlock.id} has no sheaves`, 'info', false, 'an overhaul ball has no sheaves to bend the rope over'));
  } else {
    const pitch = hookBlock.sheavePitchDiameterMm;
    guarded(figures, 'rope.dOverD.hookBlock', 'rope', 'D/d of the hook block sheaves', undefined, () => {
      dOverDFigure(figures, 'rope.dOverD.hookBlock', 'D/d of the hook block sheaves', pitch, rope.diameterMm, 'lowerBlockSheave');
    });
  }

  const wraps = wrapsFigures(figures, {
    keyPrefix: 'rope',
    hoistLabel: 'main hoist',
    drum,
    parts,
    boomLengthM: config.boomLengthM,
    beyondTipM: 0,
    beyondTipNote: null,
    lowestHookPositionM,
    arrangement,
    fix: 'fewer parts, a shorter boom, a higher lowest hook position or a longer rope',
    q,
  });

  others();
  const reeving: ConfigurationResults['reeving'] = pulled
    ? {
        hookBlockId: hookBlock.id,
        parts,
        sheaveCount: hookBlock.sheaveCount,
        tipSheaveEfficiency: path.tipEfficiency,
        blockSheaveEfficiency: path.blockEfficiency,
        leadSheaves: path.lead,
        leadLinePullKn: pulled.pull,
        requiredParts: pulled.needed,
        ropePaidOutM: wraps?.paidOutM ?? null,
        wrapsLeft: wraps?.wrapsLeft ?? null,
      }
    : null;
  return { reeving, hookBlock };
}

function designFactorFigure(figures: Figure[], key: string, label: string, rope: Rope, pullKn: number, pullWords: string, fix: string): void {
  guarded(figures, key, 'rope', label, undefined, () => {
    const duty = rope.rotationResistant ? 'rotationResistant' : 'running';
    const df = designFactorCheck({ minimumBreakingForceKn: rope.minimumBreakingForceKn, linePullKn: pullKn, duty });
    const rule = `design factor = minimum breaking force (rope certificate, ${rope.id} ${plain(rope.minimumBreakingForceKn)} kN) ÷ ${pullWords}; ${df.rule}`;
    figures.push(
      df.pass
        ? figure(key, 'rope', label, `${fmtDown(df.designFactor, 2)} (at least ${plain(df.minimumDesignFactor)})`, 'pass', false, rule)
        : figure(key, 'rope', label, `${fmtDown(df.designFactor, 2)}, below ${plain(df.minimumDesignFactor)}`, 'fail', false, rule, `${rope.id} is ${rope.rotationResistant ? 'rotation-resistant' : 'running'} rope (${DESIGN_FACTOR_SOURCE}): ${fix}`),
    );
  });
}

function dOverDFigure(figures: Figure[], key: string, label: string, pitchMm: number, ropeMm: number, element: BendingElement): void {
  const c = dOverDCheck({ pitchDiameterMm: pitchMm, ropeDiameterMm: ropeMm, element });
  const value = `${fmtDown(c.ratio, 1)} (${plain(pitchMm)} mm ÷ ${plain(ropeMm)} mm; at least ${c.minimumRatio})`;
  // A D/d below the minimum is the crane's build, not a planning choice: never overridable.
  figures.push(
    c.pass
      ? figure(key, 'rope', label, value, 'pass', false, c.rule)
      : figure(key, 'rope', label, value, 'fail', false, c.rule, `at least ${plain(c.minimumPitchDiameterMm)} mm pitch diameter is needed for ${plain(ropeMm)} mm rope: the crane data does not meet the standard; ask the manufacturer`),
  );
}

/** Rope needed and wraps left on one drum at the lowest hook position. */
function wrapsFigures(
  figures: Figure[],
  o: {
    keyPrefix: string;
    hoistLabel: string;
    drum: Drum;
    parts: number;
    boomLengthM: number;
    beyondTipM: number;
    beyondTipNote: string | null;
    lowestHookPositionM: number;
    arrangement: ArrangementData;
    fix: string;
    q: Quantities;
  },
): { paidOutM: number; wrapsLeft: number } | null {
  const key = `${o.keyPrefix}.wraps`;
  const label = o.keyPrefix === 'rope' ? 'Wraps left on the drum' : `Wraps left on the ${o.hoistLabel} drum`;
  return guarded(figures, key, 'rope', label, null as { paidOutM: number; wrapsLeft: number } | null, () => {
    const missing: string[] = [];
    const foot = o.arrangement.machine.boomFoot ?? null;
    let footPinHeightM: number;
    if (foot === null) {
      footPinHeightM = ROPE_RUN_ASSUMED_WHEN_MISSING.footPinHeightM;
      missing.push(`the boom foot-pin height (taken as ${footPinHeightM} m, the most the crane data allows)`);
      notIncluded(figures, 'rope.notIncluded.footPinHeight', 'boom foot-pin height', `Not in the crane data: ${footPinHeightM} m taken for the rope paid out`, 'The most the crane data allows, so the wraps left are never overstated. Add the foot pin’s height to the crane data from the manufacturer’s manual.');
    } else footPinHeightM = foot.heightM;
    let leadToBoomFootM: number;
    const leadGiven = o.drum.leadToBoomFootM ?? null;
    if (leadGiven === null) {
      leadToBoomFootM = ROPE_RUN_ASSUMED_WHEN_MISSING.leadToBoomFootM;
      missing.push(`the rope run from the ${o.hoistLabel} drum to the boom foot (taken as ${leadToBoomFootM} m, the most the crane data allows)`);
      notIncluded(figures, `rope.notIncluded.leadToBoomFoot.${o.drum.role}`, `rope run from the ${o.hoistLabel} drum to the boom foot`, `Not in the crane data: ${leadToBoomFootM} m taken`, 'The most the crane data allows, so the wraps left are never overstated. Add the run to the crane data from the manufacturer’s manual.');
    } else leadToBoomFootM = leadGiven;
    if (o.beyondTipNote) {
      missing.push(o.beyondTipNote);
      notIncluded(figures, 'rope.notIncluded.auxReach', 'auxiliary sheave reach', `Not in the crane data: ${ROPE_RUN_ASSUMED_WHEN_MISSING.auxReachBeyondTipM} m taken for the auxiliary rope paid out`, 'The most the crane data allows, so the wraps left on the auxiliary drum are never overstated. Add the reach to the crane data.');
    }

    const run = hoistRunAtLowestHook({ boomLengthM: o.boomLengthM, footPinHeightM, beyondTipM: o.beyondTipM, lowestHookPositionM: o.lowestHookPositionM, leadToBoomFootM });
    const geometry = { parts: o.parts, reeveHeightM: run.reeveHeightM, leadLengthM: run.leadLengthM, drumDiameterM: o.drum.pitchDiameterMm / 1000 };
    const needed = ropeLengthRequiredM({ ...geometry, wrapsLeftOnDrum: MINIMUM_WRAPS_ON_DRUM });
    const w = wrapsLeftOnDrum({ ...geometry, ropeLengthM: o.drum.ropeLengthM });
    const paidOutM = o.parts * run.reeveHeightM + run.leadLengthM;
    const where = `hook at ${fmt(o.lowestHookPositionM)} m${o.lowestHookPositionM < 0 ? ' (below ground)' : ''}, tip at ${fmt(run.tipHeightM)} m: reeve height ${fmt(run.reeveHeightM)} m × ${o.parts} ${o.parts === 1 ? 'part' : 'parts'} + lead ${fmt(run.leadLengthM)} m = ${fmt(paidOutM)} m paid out`;
    const missingWords = missing.length > 0 ? `; not in the crane data: ${missing.join('; ')}` : '';
    const rule = `${w.rule}; ${run.rule}`;
    figures.push(
      figure(
        `${o.keyPrefix}.lengthRequired`,
        'rope',
        o.keyPrefix === 'rope' ? 'Main hoist rope needed' : `${o.hoistLabel[0].toUpperCase()}${o.hoistLabel.slice(1)} rope needed`,
        `${o.q.length(needed.ropeLengthRequiredM, 'up')} of ${ratingOf(o.q, 'length', o.drum.ropeLengthM)} on the drum`,
        'info',
        false,
        `${needed.rule}; ${run.rule}`,
        `${where}${missingWords}`,
      ),
    );
    // Wraps are a code's "shall" (two full wraps at the lowest hook position): never overridable.
    figures.push(
      w.pass
        ? figure(key, 'rope', label, `${fmtDown(w.wrapsLeft)} wraps (at least ${w.minimumWraps})`, 'pass', false, rule, `${where}${missingWords}`)
        : figure(key, 'rope', label, `${fmtDown(w.wrapsLeft)} wraps, fewer than ${w.minimumWraps}`, 'fail', false, rule, `${fmtUp(w.ropeShortM)} m of rope short (${where}): ${o.fix}${missingWords}`),
    );
    return { paidOutM, wrapsLeft: w.wrapsLeft };
  });
}

/**
 * The auxiliary hoist, single line over the auxiliary sheave: its line pull and design factor with
 * the auxiliary hook at its full rating (the most it may be asked to carry, on one part of line),
 * and the wraps left on its drum at the plan's lowest hook position.
 */
function computeAuxiliary(config: Configuration, inputs: PlannerInputs, lowestHookPositionM: number, figures: Figure[], q: Quantities): void {
  const { arrangement } = inputs;
  const auxId = config.auxiliary.hookBlockId;
  if (!auxId) return;
  const aux = arrangement.hookBlocks.find((b) => b.id === auxId);
  const auxRule = 'auxiliary hook or overhaul ball listed in the model’s data and serviceable among the unit’s parts';
  if (!aux) {
    figures.push(figure('rope.auxHook', 'rope', 'Auxiliary hook', `${auxId} is not in the model’s data`, 'fail', false, auxRule));
    return;
  }
  const a = serviceableAtHand(inputs.inventory, 'hook_block', aux.id);
  figures.push(
    a.serviceable.length > 0
      ? figure('rope.auxHook', 'rope', 'Auxiliary hook', `${aux.id}: ${a.serviceable[0]}`, 'pass', false, auxRule)
      : figure('rope.auxHook', 'rope', 'Auxiliary hook', `No serviceable ${aux.id}`, 'fail', false, auxRule, a.unusable.length > 0 ? `not usable: ${a.unusable.join(', ')}` : 'none among the unit’s parts'),
  );

  const hoist = drumAndRope(arrangement, 'auxiliaryHoist');
  if (!hoist) {
    figures.push(figure('rope.aux.hoist', 'rope', 'Auxiliary hoist', 'No auxiliary hoist drum or rope in the data', 'fail', false, 'auxiliary hoist drum and its rope (manufacturer arrangement data)'));
    return;
  }
  const { drum, rope } = hoist;
  const path = hoistPath(arrangement, 'auxiliaryHoist', null, figures);
  guarded(figures, 'rope.aux.leadLinePull', 'rope', 'Auxiliary hoist line pull', undefined, () => {
    const loadKn = tonnesForceToKn(aux.ratedLoadT + aux.weightKg / 1000);
    const lead = leadLinePullBySheave({ loadKn, parts: 1, tipSheaveEfficiency: path.tipEfficiency, blockSheaveEfficiency: path.blockEfficiency, leadSheaveEfficiencies: path.lead.map((l) => l.efficiency) });
    const pull = lead.leadLinePullKn;
    const permissible = drum.permissibleLinePullKn;
    // Single line over the auxiliary sheave (one sheave head); the hook's full rating is the load,
    // because the plan gives no auxiliary load and the hook may be loaded to its marking (common practice, no source).
    const rule = `${lead.rule}; ${path.words}; one part of line (a single-sheave head); load = (rated load of ${aux.id} + its own weight) × 9.80665 kN/t, the hook’s full rating because the plan gives no auxiliary load (common practice, no source); ≤ permissible line pull of the auxiliary hoist drum, a winch rating (manufacturer arrangement data)`;
    const most = (permissible * lead.mechanicalAdvantage * path.lead.reduce((p, l) => p * l.efficiency, 1)) / 9.80665 - aux.weightKg / 1000;
    const notes = path.notes.length > 0 ? `; ${path.notes.join('; ')}` : '';
    figures.push(
      pull <= permissible
        ? figure('rope.aux.leadLinePull', 'rope', 'Auxiliary hoist line pull', `${q.force(pull, 'up')} of ${ratingOf(q, 'force', permissible)} permissible`, 'pass', false, rule, `${aux.id} at its full ${ratingOf(q, 'mass', aux.ratedLoadT * 1000)} rating on one part${notes}`)
        : figure(
            'rope.aux.leadLinePull',
            'rope',
            'Auxiliary hoist line pull',
            `${q.force(pull, 'up')}, above the ${ratingOf(q, 'force', permissible)} permissible`,
            'fail',
            false,
            rule,
            `the auxiliary hoist can lift at most ${fmt(Math.max(0, Math.floor(most * 10) / 10))} t on one part: choose an auxiliary hook rated no more than that${notes}`,
          ),
    );
    designFactorFigure(figures, 'rope.aux.designFactor', 'Auxiliary hoist rope design factor', rope, pull, `auxiliary line pull with ${aux.id} at its rating`, 'choose a smaller auxiliary hook');
  });
  guarded(figures, 'rope.dOverD.auxDrum', 'rope', 'D/d of the auxiliary hoist drum', undefined, () => {
    dOverDFigure(figures, 'rope.dOverD.auxDrum', 'D/d of the auxiliary hoist drum', drum.pitchDiameterMm, rope.diameterMm, 'drum');
  });
  const sheave = arrangement.auxSheave ?? null;
  wrapsFigures(figures, {
    keyPrefix: 'rope.aux',
    hoistLabel: 'auxiliary hoist',
    drum,
    parts: 1,
    boomLengthM: config.boomLengthM,
    beyondTipM: sheave === null ? ROPE_RUN_ASSUMED_WHEN_MISSING.auxReachBeyondTipM : sheave.reachBeyondTipM,
    beyondTipNote: sheave === null ? `the auxiliary sheave’s reach beyond the tip (taken as ${ROPE_RUN_ASSUMED_WHEN_MISSING.auxReachBeyondTipM} m, the most the crane data allows)` : null,
    lowestHookPositionM,
    arrangement,
    fix: 'a shorter boom, a higher lowest hook position or a longer rope',
    q,
  });
}

/**
 * The boom-hoist rope's design factor at the higher of the raising limit and the drum's permissible
 * pull (the winch could pull either), and the boom-hoist drum's D/d.
 */
function computeBoomHoist(config: Configuration, arrangement: ArrangementData, figures: Figure[]): void {
  const hoist = drumAndRope(arrangement, 'boomHoist');
  if (!hoist) {
    figures.push(figure('rope.boomHoist', 'rope', 'Boom hoist', 'No boom hoist drum or rope in the data', 'fail', false, 'boom hoist drum and its rope (manufacturer arrangement data)'));
    return;
  }
  const { drum, rope } = hoist;
  const listed = arrangement.arrangements.find((a) => Math.abs(a.boomLengthM - config.boomLengthM) < 0.001);
  const limitKn = listed?.raising.limits.maxBoomHoistLinePullKn ?? null;
  const pullKn = Math.max(limitKn ?? 0, drum.permissibleLinePullKn);
  const pullWords =
    limitKn === null
      ? `the boom-hoist drum’s permissible pull (${plain(drum.permissibleLinePullKn)} kN; no raising limit listed for ${plain(config.boomLengthM)} m)`
      : `the higher of the raising limit for ${plain(config.boomLengthM)} m (${plain(limitKn)} kN) and the boom-hoist drum’s permissible pull (${plain(drum.permissibleLinePullKn)} kN)`;
  designFactorFigure(figures, 'rope.boomHoist.designFactor', 'Boom-hoist rope design factor', rope, pullKn, pullWords, 'the crane data does not meet the standard; ask the manufacturer');
  guarded(figures, 'rope.dOverD.boomHoistDrum', 'rope', 'D/d of the boom hoist drum', undefined, () => {
    dOverDFigure(figures, 'rope.dOverD.boomHoistDrum', 'D/d of the boom hoist drum', drum.pitchDiameterMm, rope.diameterMm, 'boomHoistDrum');
  });
}

/** D/d of every sheave on a hoist in use (main and boom hoist always, auxiliary when fitted), against the rope that runs over it. */
function computeSheavesDOverD(config: Configuration, arrangement: ArrangementData, figures: Figure[]): void {
  const inUse: Hoist[] = ['mainHoist', 'boomHoist', ...(config.auxiliary.enabled ? (['auxiliaryHoist'] as const) : [])];
  for (const s of arrangement.sheaves) {
    const hoists = hoistsOf(s).filter((h) => inUse.includes(h));
    if (hoists.length === 0) continue;
    const key = `rope.dOverD.sheave.${s.id}`;
    const label = `D/d of the sheave: ${s.location}`;
    guarded(figures, key, 'rope', label, undefined, () => {
      // The thickest rope that runs over the sheave governs; a boom-hoist sheave is held to 15d, any sheave a hoist rope runs over to 18d.
      const ropes = hoists.map((h) => drumAndRope(arrangement, h)).filter((x): x is { drum: Drum; rope: Rope } => x !== null);
      if (ropes.length === 0) return;
      const thickest = Math.max(...ropes.map((r) => r.rope.diameterMm));
      const element: BendingElement = hoists.every((h) => h === 'boomHoist') ? 'boomHoistSheave' : 'loadSheave';
      dOverDFigure(figures, key, label, s.pitchDiameterMm, thickest, element);
    });
  }
}

/** Fleet angle of each drum in use to its first sheave; the manufacturer's when the data does not give the geometry. */
function computeFleetAngles(config: Configuration, arrangement: ArrangementData, figures: Figure[]): void {
  const inUse: Hoist[] = ['mainHoist', ...(config.auxiliary.enabled ? (['auxiliaryHoist'] as const) : []), 'boomHoist'];
  for (const role of inUse) {
    const drum = arrangement.drums.find((d) => d.role === role);
    if (!drum) continue;
    const key = `rope.fleetAngle.${role}`;
    const label = `Fleet angle of the ${hoistWords[role]} drum`;
    const first = drum.firstSheave ?? null;
    if (first === null) {
      figures.push(
        figure(key, 'rope', label, 'The manufacturer’s design: not in the crane data', 'info', false, `the distance from the drum to its first sheave is not in the crane data, so the fleet angle is not checked (guidance: ${FLEET_ANGLE_LIMITS.source})`),
      );
      continue;
    }
    guarded(figures, key, 'rope', label, undefined, () => {
      const grooved = drum.grooved ?? null;
      // Unknown drum surface: the smooth-drum limit, the stricter of the two.
      const c = drumFleetAngleCheck({ drumWidthM: drum.widthM, distanceM: first.distanceM, offsetFromDrumCentreM: first.offsetFromDrumCentreM, drumSurface: grooved === true ? 'grooved' : 'smooth' });
      const surface = grooved === null ? 'drum surface not in the crane data: the smooth-drum limit taken' : grooved ? 'grooved drum' : 'smooth drum';
      const value = `${fmtUp(c.largestDeg, 2)}° (${surface}; at most ${plain(c.maxDeg)}°, at least ${plain(c.minDeg)}°)`;
      // The guidance is the rope makers’ recommendation for spooling, not a code's "shall"; the drum
      // and its first sheave are the crane's build. Outside it, the crew is told so, plainly.
      figures.push(
        c.pass
          ? figure(key, 'rope', label, value, 'pass', false, c.rule, `${fmt(c.smallestDeg, 2)}° at the other flange; drum ${plain(drum.widthM)} m wide, first sheave ${plain(first.distanceM)} m away`)
          : figure(
              key,
              'rope',
              label,
              `${value}: outside the guidance`,
              'info',
              false,
              c.rule,
              `${fmt(c.smallestDeg, 2)}° at the other flange. The drum and its first sheave are the manufacturer’s design: watch the spooling on the drum and follow the manufacturer’s manual`,
            ),
      );
    });
  }
}
