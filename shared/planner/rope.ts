/** The main hoist: hook block, reeving, lead-line pull, design factor, D/d, wraps left on the drum. */
import { SHEAVE_EFFICIENCY_PRESETS, leadLinePull, requiredParts } from '../calc/reeving.js';
import {
  DESIGN_FACTOR_SOURCE,
  MINIMUM_WRAPS_ON_DRUM,
  dOverDCheck,
  designFactorCheck,
  ropeLengthRequiredM,
  wrapsLeftOnDrum,
} from '../calc/rope.js';
import { tonnesForceToKn } from '../calc/units.js';
import type { HookBlock } from '../schemas/arrangement.js';
import type { Configuration, Figure } from '../schemas/configuration.js';
import { figure, fmt, guarded, plain, serviceableAtHand } from './figures.js';
import type { ConfigurationResults, PlannerInputs } from './types.js';

/** The main hoist's figures, and the hook block chosen (null when the data lacks it). */
export function computeRope(
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
