/**
 * The dismantling plan's stages, from the wording in templates/dismantling.ts: site, lowering,
 * unreeving, electrics, slackening, guy lines, mast, then the boom tip first, each joint blocked
 * before its pins are drawn, the counterweight off in the reverse of the fitting order, and close.
 */
import type { PlanStage } from '../schemas/plan.js';
import { assistLiftsStageFor, assistStageFor, commsStepsInto, guyLineUnits, hasAssist, joints, raisingBlocks, sectionLabel, siteHazardSteps, windSteps } from './common-steps.js';
import { plain, plainUp } from '../format';
import { idPart, plural, tidy } from '../text';
import { planCheck, StageDraft, type GenerateContext } from './stage-draft.js';
import { dismantlingStages } from './templates/dismantling.js';

export function dismantlingStagesFor(ctx: GenerateContext): PlanStage[] {
  const { cfg, results } = ctx;
  const t = dismantlingStages;
  const listed = results.makeup.arrangement;
  const stages: PlanStage[] = [];
  const assist = hasAssist(cfg);
  const assistLifts = assist && cfg.assist.lifts.length > 0;
  const boomWords = tidy(`a ${plain(cfg.boomLengthM)} m boom`);

  const site = new StageDraft(ctx, t.site.id, t.site, {});
  siteHazardSteps(site, ctx);
  site.add('lay-down-area', t.site.steps.layDownArea);
  if (results.platesRequired) site.add('plates', t.site.steps.plates);
  // The site hold lets the lowering start, so its wind step is held to the raising (and lowering) limit.
  windSteps(site, ctx, 'raising', `lowering ${boomWords} (the crane data’s raising limit)`);
  commsStepsInto(site, ctx);
  stages.push(site.build([]));

  if (assist) {
    stages.push(assistStageFor(ctx, 'dm-assist', [site.id]));
    if (assistLifts) stages.push(assistLiftsStageFor(ctx, 'dm-assist-lifts', ['dm-assist']));
  }
  const tipSupport = listed?.raising.limits.tipSupportRequired === true;

  const lower = new StageDraft(ctx, t.lower.id, t.lower, {});
  lower.add('unload', t.lower.steps.unload);
  if (listed) {
    const slope = listed.raising.limits.maxGroundSlopePercent;
    lower.add('ground', t.lower.steps.ground, { slopePercent: slope }, { check: { kind: 'max', limit: slope, source: `crane data: ground slope limit for raising ${boomWords}, used for lowering it` } });
  }
  lower.add('blocking', t.lower.steps.blocking).add('limiter-mode', t.lower.steps.limiterMode);
  if (tipSupport) lower.add('tip-support', t.lower.steps.tipSupport);
  // A fresh reading just before the boom comes down, held to the raising limit.
  windSteps(lower, ctx, 'raising', `lowering ${boomWords}`);
  lower.add('land-hook', t.lower.steps.landHook).add('lower', t.lower.steps.lower);
  // When the tip must be carried down, the assist crane has to be set up first.
  stages.push(lower.build(tipSupport && assist ? [site.id, 'dm-assist'] : [site.id]));

  const unreeve = new StageDraft(ctx, t.unreeve.id, t.unreeve, {});
  unreeve.add('block', t.unreeve.steps.block).add('unreeve', t.unreeve.steps.unreeve);
  if (cfg.auxiliary.enabled) unreeve.add('aux', t.unreeve.steps.aux, { hookBlockId: cfg.auxiliary.hookBlockId ?? 'the auxiliary hook' });
  unreeve.add('stow', t.unreeve.steps.stow);
  stages.push(unreeve.build([lower.id]));

  const electrics = new StageDraft(ctx, t.electrics.id, t.electrics, {});
  electrics.add('sensors', t.electrics.steps.sensors).add('cable', t.electrics.steps.cable);
  stages.push(electrics.build([lower.id]));

  const slacken = new StageDraft(ctx, t.slacken.id, t.slacken, {});
  slacken.add('clear', t.slacken.steps.clear).add('pay-out', t.slacken.steps.payOut).add('lock', t.slacken.steps.lock).add('look', t.slacken.steps.look);
  stages.push(slacken.build([unreeve.id, electrics.id]));

  const lines = guyLineUnits(ctx);
  const guys = new StageDraft(ctx, t.guys.id, t.guys, { guyPins: plural(results.makeup.pinCount.guyLinePins, 'pin') });
  guys.add('bridle', t.guys.steps.bridle);
  for (const g of lines) {
    guys.add(
      `line-${idPart(g.mark)}-${g.n}`,
      t.guys.steps.line,
      { mark: g.mark, n: g.n, quantity: g.quantity, lengthM: g.lengthM, pins: plural(g.pins, 'pin') },
      { record: { componentKind: 'guy_line', typeId: g.mark, plannedSerial: g.plannedSerial } },
    );
  }
  stages.push(guys.build(assist ? [slacken.id, 'dm-assist'] : [slacken.id]));

  const mast = new StageDraft(ctx, t.mast.id, t.mast, {});
  mast.add('clear', t.mast.steps.clear).add('lower', t.mast.steps.lower);
  stages.push(mast.build([guys.id]));

  // Tip first: each joint gets a stage that blocks both sides of it (its hold comes before any pin
  // is drawn) and then the stage that draws the pins.
  let previous = guys.id;
  for (const j of [...joints(ctx)].reverse()) {
    const vars = {
      n: j.n,
      position: j.above.position,
      typeId: j.above.typeId,
      weightT: plainUp(j.above.weightKg / 1000),
      pins: plural(j.pins, 'pin'),
      below: sectionLabel(j.below),
      above: sectionLabel(j.above),
    };
    const support = new StageDraft(ctx, t.support.id, t.support, vars);
    support.add('blocking', t.support.steps.blocking).add('support', t.support.steps.support).add('clear', t.support.steps.clear);
    stages.push(support.build([previous]));
    const joint = new StageDraft(ctx, t.joint.id, t.joint, vars);
    joint
      .add('pins', t.joint.steps.pins, {}, { check: planCheck(j.pins, `crane data: ${plural(j.pins, 'pin')} per joint at the foot of section type ${j.above.typeId}`) })
      .add('set-down', t.joint.steps.setDown)
      .add('serial', t.joint.steps.serial, { plannedSerial: j.above.serial ?? 'none recorded' }, { record: { componentKind: 'section', typeId: j.above.typeId, plannedSerial: j.above.serial } })
      .add('stow', t.joint.steps.stow);
    stages.push(joint.build([support.id]));
    previous = joint.id;
  }

  const blocks = raisingBlocks(ctx);
  const cw = new StageDraft(ctx, t.counterweight.id, t.counterweight, {});
  if (listed) {
    cw.add('confirm', t.counterweight.steps.confirm, {}, { check: planCheck(Number(plain(listed.raising.counterweightKg / 1000)), `crane data: counterweight to raise ${boomWords}`) });
  }
  // Off in the stated order: the reverse of the fitting order, last block fitted first.
  const off = [...blocks].reverse();
  off.forEach((b, i) =>
    cw.add(
      `off-${idPart(b.id)}`,
      t.counterweight.steps.block,
      { blockId: b.id, weightT: plainUp(b.weightKg / 1000), n: i + 1, count: blocks.length, remainingT: plainUp((b.cumulativeKg - b.weightKg) / 1000) },
      { after: i > 0 ? [`off-${idPart(off[i - 1].id)}`] : [] },
    ),
  );
  stages.push(cw.build([previous, mast.id]));

  const close = new StageDraft(ctx, t.close.id, t.close, {});
  close.add('damage', t.close.steps.damage).add('transport', t.close.steps.transport).add('site', t.close.steps.site);
  // Every planned assist lift is made before the site is handed back.
  stages.push(close.build(assistLifts ? [cw.id, 'dm-assist-lifts'] : [cw.id]));
  return stages;
}
