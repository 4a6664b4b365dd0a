/**
 * The erection plan's stages, from the wording in templates/erection.ts: ground and site, the
 * upper works and counterweight, the component check, one step per joint and per guy line,
 * tensioning, reeving, electrics, configuration entry, the raise and the handover.
 */
import type { PlanHold, PlanStage } from '../schemas/plan.js';
import { allPins, assistLiftsStageFor, assistStageFor, commsStepsInto, footPins, guyLineUnits, hasAssist, joints, raisingBlocks, sectionLabel, siteHazardSteps, windSteps } from './common-steps.js';
import { plain, plainUp } from '../format';
import { idPart, plural, tidy } from '../text';
import { planCheck, StageDraft, type GenerateContext } from './stage-draft.js';
import { erectionStages } from './templates/erection.js';

/**
 * The operating mode the controller is expected to show after configuration entry: the limiter's
 * normal mode for lifting, out of its assembly (rigging) mode. Manufacturers name it differently;
 * the crew types what the controller shows and the supervisor judges a difference in wording.
 */
export const OPERATING_MODE_EXPECTED = 'lifting';

export function erectionStagesFor(ctx: GenerateContext): PlanStage[] {
  const { cfg, results } = ctx;
  const t = erectionStages;
  const listed = results.makeup.arrangement;
  const stages: PlanStage[] = [];
  const assist = hasAssist(cfg);
  const aux = cfg.auxiliary.enabled;
  const boomWords = tidy(`a ${plain(cfg.boomLengthM)} m boom`);
  const blocks = raisingBlocks(ctx);
  const raisingT = listed ? Number(plain(listed.raising.counterweightKg / 1000)) : null;

  const ground = new StageDraft(ctx, t.ground.id, t.ground, {});
  siteHazardSteps(ground, ctx);
  const src = cfg.ground.source;
  ground.add(
    'ground',
    t.ground.steps.ground,
    {
      groundType: cfg.ground.groundType.trim() || 'ground type not given',
      allowableKpa: cfg.ground.allowablePressureKpa,
      source: src.kind === 'none' ? 'no ground investigation or design yet' : `${src.kind === 'ground_investigation' ? 'ground investigation' : 'temporary-works design'} ${src.reference}`,
    },
    src.kind === 'none'
      ? { caution: 'This pressure has no ground investigation or temporary-works design behind it; a table value is only guidance. A competent person accepts the ground before the crane stands on it.' }
      : {},
  );
  if (cfg.mats.used) ground.add('mats', t.ground.steps.mats, { lengthM: cfg.mats.lengthM, widthM: cfg.mats.widthM, thicknessM: cfg.mats.thicknessM });
  if (results.platesRequired) ground.add('plates', t.ground.steps.plates, { thresholdM: ctx.input.arrangement.platesThresholdBoomLengthM });
  windSteps(ground, ctx, 'assembly', 'assembly');
  commsStepsInto(ground, ctx);
  stages.push(ground.build([]));

  // The assist crane's set-up hold gates everything it lifts: the component check and lay-down,
  // and through them the boom. Its lifts run beside the assembly, each checked just before it.
  if (assist) {
    stages.push(assistStageFor(ctx, 'er-assist', [ground.id]));
    if (cfg.assist.lifts.length > 0) stages.push(assistLiftsStageFor(ctx, 'er-assist-lifts', ['er-assist']));
  }
  const assistLifts = assist && cfg.assist.lifts.length > 0;

  const upper = new StageDraft(ctx, t.upper.id, t.upper, {});
  if (listed) {
    const slope = listed.raising.limits.maxGroundSlopePercent;
    upper.add('level', t.upper.steps.level, { slopePercent: slope }, { check: { kind: 'max', limit: slope, source: `crane data: ground slope limit for raising ${boomWords}` } });
  }
  upper.add('gauge', t.upper.steps.gauge);
  const mast = ctx.input.arrangement.machine.mast;
  upper.add('mast', t.upper.steps.mast, { mastWeight: mast ? `; the mast weighs ${plainUp(mast.weightKg / 1000)} t in the crane data` : '' });
  blocks.forEach((b, i) =>
    upper.add(
      `cw-${idPart(b.id)}`,
      t.upper.steps.block,
      { blockId: b.id, weightT: plainUp(b.weightKg / 1000), n: i + 1, count: blocks.length, cumulativeT: plainUp(b.cumulativeKg / 1000), raisingT: raisingT ?? 0 },
      { after: i > 0 ? [`cw-${idPart(blocks[i - 1].id)}`] : [] },
    ),
  );
  if (raisingT !== null && blocks.length > 0) {
    upper.add('cw-count', t.upper.steps.cwCount, { count: blocks.length }, {
      check: planCheck(raisingT, `crane data: counterweight to raise ${boomWords}, ${blocks.length} blocks in the fitting order`),
      // The blocks follow one another, so the last one brings all the others with it.
      after: [`cw-${idPart(blocks[blocks.length - 1].id)}`],
    });
  }
  upper.add('limiter-mode', t.upper.steps.limiterMode);
  stages.push(upper.build([ground.id]));

  const pinCounts = results.makeup.pinCount;
  const foot = footPins(ctx);
  const check = new StageDraft(ctx, t.check.id, t.check, {});
  check.add('sections', t.check.steps.sections);
  check.add('pins', t.check.steps.pins, { pinCount: allPins(ctx), footPins: foot, jointPins: pinCounts.jointPins, guyPins: pinCounts.guyLinePins });
  check.add('guy-lines', t.check.steps.guyLines, { lineCount: results.makeup.totalGuyLineCount });
  check.add('ropes', t.check.steps.ropes, { ropes: aux ? 'boom hoist, the main hoist and the auxiliary hoist' : 'boom hoist and the main hoist' });
  check.add('wedge-sockets', t.check.steps.wedgeSockets);
  check.add('sheaves', t.check.steps.sheaves);
  check.add('over-hoist', t.check.steps.overHoist, { auxSwitch: aux ? ', and the auxiliary one' : '' });
  check.add('hook-block', t.check.steps.hookBlock, {}, { record: { componentKind: 'hook_block', typeId: cfg.mainHook.hookBlockId } });
  if (aux && cfg.auxiliary.hookBlockId) {
    check.add('aux-hook', t.check.steps.auxHook, { hookBlockId: cfg.auxiliary.hookBlockId }, { record: { componentKind: 'hook_block', typeId: cfg.auxiliary.hookBlockId } });
  }
  for (const s of ctx.sections) {
    check.add(
      `position-${s.position}`,
      t.check.steps.laydown,
      { position: s.position, typeId: s.typeId, lengthM: s.lengthM, weightT: plainUp(s.weightKg / 1000), topFace: ctx.topFace.get(s.typeId) ?? 'see the manual', plannedSerial: s.serial ?? 'none at hand' },
      { record: { componentKind: 'section', typeId: s.typeId, plannedSerial: s.serial } },
    );
  }
  stages.push(check.build(assist ? [ground.id, 'er-assist'] : [ground.id]));

  const js = joints(ctx);
  const jointStage = new StageDraft(ctx, t.joints.id, t.joints, {
    jointCount: js.length,
    footPins: plural(foot, 'pin'),
    jointPinsWords: plural(pinCounts.jointPins, 'pin'),
    allPins: plural(foot + pinCounts.jointPins, 'pin'),
  });
  jointStage.add('slings', t.joints.steps.slings);
  const base = ctx.sections[0];
  if (base) {
    jointStage.add('foot', t.joints.steps.foot, { typeId: base.typeId, pins: plural(foot, 'pin') }, {
      check: planCheck(foot, `crane data: ${plural(foot, 'pin')} at the foot of the ${base.typeId} section, the boom foot`),
    });
    jointStage.add('backstops', t.joints.steps.backstops);
  }
  for (const j of js) {
    jointStage.add(`joint-${j.n}`, t.joints.steps.joint, { n: j.n, below: sectionLabel(j.below), above: sectionLabel(j.above), pins: plural(j.pins, 'pin') }, {
      check: planCheck(j.pins, `crane data: ${plural(j.pins, 'pin')} per joint at the foot of section type ${j.above.typeId}`),
    });
  }
  stages.push(jointStage.build([upper.id, check.id]));

  const lines = guyLineUnits(ctx);
  // Laying out needs only the component check, so it may run while the sections are pinned.
  const layout = new StageDraft(ctx, t.guyLayout.id, t.guyLayout, {});
  for (const g of lines) {
    layout.add(
      `line-${idPart(g.mark)}-${g.n}`,
      t.guyLayout.steps.line,
      { mark: g.mark, n: g.n, quantity: g.quantity, lengthM: g.lengthM },
      { record: { componentKind: 'guy_line', typeId: g.mark, plannedSerial: g.plannedSerial } },
    );
  }
  stages.push(layout.build([check.id]));

  const guys = new StageDraft(ctx, t.guys.id, t.guys, { guyPins: plural(pinCounts.guyLinePins, 'pin'), lineCount: lines.length });
  const lineSuffixes: string[] = [];
  for (const g of lines) {
    const suffix = `line-${idPart(g.mark)}-${g.n}`;
    lineSuffixes.push(suffix);
    guys.add(suffix, t.guys.steps.line, { mark: g.mark, n: g.n, quantity: g.quantity, pins: plural(g.pins, 'pin') }, {
      check: planCheck(g.pins, `crane data: guy line ${g.mark}, ${plural(g.pins, 'pin')} each`),
    });
  }
  // The bridle goes on once every line is pinned (`after` allows at most 50 ids; no listed set comes near).
  guys.add('bridle', t.guys.steps.bridle, {}, { after: lineSuffixes.length <= 50 ? lineSuffixes : [] });
  // Pinning the guy lines waits for every joint to be pinned and for the lines to be laid out.
  stages.push(guys.build([jointStage.id, layout.id]));

  // The auxiliary sheave is lifted onto the tip, so the tip stage moves a crane only when it is fitted.
  const tip = new StageDraft(ctx, t.tip.id, t.tip, {}, aux);
  tip.add('guides', t.tip.steps.guides);
  if (aux) tip.add('aux-sheave', t.tip.steps.auxSheave);
  stages.push(tip.build([jointStage.id]));

  const tension = new StageDraft(ctx, t.tension.id, t.tension, {});
  tension.add('clear', t.tension.steps.clear).add('signaller', t.tension.steps.signaller).add('draw', t.tension.steps.draw).add('lock', t.tension.steps.lock).add('look', t.tension.steps.look);
  // Tensioning needs the whole boom pinned (the tip stage follows the joints) and every guy line pinned.
  stages.push(tension.build([tip.id, guys.id]));

  // Reeving (main and auxiliary) only after the tensioning hold: never beside it.
  const reeve = new StageDraft(ctx, t.reeve.id, t.reeve, {});
  reeve.add('block', t.reeve.steps.block).add('pay-out', t.reeve.steps.payOut);
  reeve.add('count', t.reeve.steps.count, {}, { check: planCheck(cfg.mainHook.parts, `configuration: hook block ${cfg.mainHook.hookBlockId} on ${cfg.mainHook.parts} parts of line`) });
  reeve.add('over-hoist', t.reeve.steps.overHoist).add('socket', t.reeve.steps.socket);
  stages.push(reeve.build([tension.id]));

  const beforeElectrics = [reeve.id];
  if (aux) {
    const auxStage = new StageDraft(ctx, t.aux.id, t.aux, { hookBlockId: cfg.auxiliary.hookBlockId ?? 'the auxiliary hook' });
    auxStage.add('line', t.aux.steps.line).add('limit', t.aux.steps.limit).add('socket', t.aux.steps.socket);
    stages.push(auxStage.build([tension.id]));
    beforeElectrics.push(auxStage.id);
  }

  const electrics = new StageDraft(ctx, t.electrics.id, t.electrics, {});
  electrics.add('cable', t.electrics.steps.cable).add('limits', t.electrics.steps.limits).add('sensors', t.electrics.steps.sensors).add('anemometer', t.electrics.steps.anemometer);
  stages.push(electrics.build(beforeElectrics));

  const config = new StageDraft(ctx, t.config.id, t.config, { operatingMode: OPERATING_MODE_EXPECTED, count: blocks.length });
  if (raisingT !== null && blocks.length > 0) {
    config.add('cw-blocks', t.config.steps.cwBlocks, {}, { check: planCheck(raisingT, `crane data: counterweight to raise ${boomWords}`) });
  }
  config.add('parts', t.config.steps.parts, {}, { check: planCheck(cfg.mainHook.parts, `configuration: hook block ${cfg.mainHook.hookBlockId} on ${cfg.mainHook.parts} parts of line`) });
  config.add('hook-block', t.config.steps.hookBlock, {}, { record: { componentKind: 'hook_block', typeId: cfg.mainHook.hookBlockId } });
  config.add('enter', t.config.steps.enter).add('mode', t.config.steps.mode).add('photo', t.config.steps.photo);
  stages.push(config.build([electrics.id], configurationValueCheck(ctx)));

  const pre = new StageDraft(ctx, t.preRaise.id, t.preRaise, {});
  const p = t.preRaise.steps;
  pre.add('clear', p.clear).add('seated', p.seated).add('backstops', p.backstops).add('assist-arms', p.assistArms).add('limits', p.limits).add('zone', p.zone);
  if (results.platesRequired) pre.add('plates', p.plates);
  pre.add('travel', p.travel);
  if (listed?.raising.limits.tipSupportRequired) pre.add('tip-support', p.tipSupport);
  windSteps(pre, ctx, 'raising', `raising ${boomWords}`);
  stages.push(pre.build([config.id]));

  const block = ctx.input.arrangement.hookBlocks.find((b) => b.id === cfg.mainHook.hookBlockId);
  const knownLoad = block ? `hook block ${block.id}, ${plainUp(block.weightKg / 1000)} t` : 'a weighed load';
  const raise = new StageDraft(ctx, t.raise.id, t.raise, { knownLoad });
  raise.add('lift-off', t.raise.steps.liftOff).add('stop-check', t.raise.steps.stopCheck).add('raise', t.raise.steps.raise).add('over-hoist', t.raise.steps.overHoist);
  if (aux) raise.add('aux-over-hoist', t.raise.steps.auxOverHoist);
  raise.add('boom-limits', t.raise.steps.boomLimits);
  if (block) {
    const blockT = block.weightKg / 1000;
    // The upper figure in the text is rounded down, so the band it states is never wider than 110 %.
    const blockMaxT = Math.floor(blockT * 1.1 * 100) / 100;
    raise.add('limiter', t.raise.steps.limiter, { blockT: plainUp(block.weightKg / 1000), blockMaxT }, {
      check: { kind: 'min', limit: blockT, source: `crane data: hook block ${block.id} weighs ${plainUp(block.weightKg / 1000)} t; a load indicator never reads below the load (SAE J159, from memory)` },
    });
  } else {
    raise.add('limiter', t.raise.steps.limiterNoKnownLoad);
  }
  stages.push(raise.build([pre.id]));

  const handover = new StageDraft(ctx, t.handover.id, t.handover, {});
  handover.add('examination', t.handover.steps.examination).add('record', t.handover.steps.record).add('handover', t.handover.steps.handover);
  // Every planned assist lift is made before the crane is handed over.
  stages.push(handover.build(assistLifts ? [raise.id, 'er-assist-lifts'] : [raise.id]));
  return stages;
}

/** The values the controller must show after configuration entry, from the configuration. */
function configurationValueCheck(ctx: GenerateContext): NonNullable<PlanHold['valueCheck']> {
  const listed = ctx.results.makeup.arrangement;
  return {
    fields: [
      { field: 'boomLengthM', expected: plain(ctx.cfg.boomLengthM) },
      { field: 'hookBlockId', expected: ctx.cfg.mainHook.hookBlockId },
      { field: 'parts', expected: String(ctx.cfg.mainHook.parts) },
      { field: 'counterweightT', expected: listed ? plain(listed.raising.counterweightKg / 1000) : 'not listed' },
      { field: 'operatingMode', expected: OPERATING_MODE_EXPECTED },
    ],
  };
}
