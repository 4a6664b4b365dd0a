/**
 * The pieces the erection and the dismantling plans share: the site, wind and communications
 * steps, the assist crane's stages, and the counts both sequences are built from (joints, guy
 * lines, counterweight blocks, pins).
 */
import type { BoomPosition } from '../calc/boom.js';
import type { Configuration } from '../schemas/configuration.js';
import type { PlanStage } from '../schemas/plan.js';
import { commsWords } from './comms.js';
import { fmtUp, plain, plainUp } from '../format';
import { fill } from '../text';
import { assistLiftFails, assistLiftsStage, assistStage, commsSteps, powerLineTooClose, radioCheckStep, siteSteps } from './templates/common.js';
import { StageDraft, type GenerateContext, type StepExtra } from './stage-draft.js';

/** The wind step: its gust is held to the job's limit for `which` by the board's one wind rule. */
export function windSteps(draft: StageDraft, ctx: GenerateContext, which: 'assembly' | 'raising', phase: string, extra: StepExtra = {}): void {
  const limits = ctx.results.windLimits;
  const check = { kind: 'wind', phase: which } as const;
  if (limits) {
    const l = limits[which];
    draft.add('wind', siteSteps.wind, { phase, gustMs: l.gustMs, meanMs: l.meanMs }, { ...extra, check });
  } else {
    draft.add('wind', siteSteps.windUnknown, {}, { ...extra, check });
  }
}

export function siteHazardSteps(draft: StageDraft, ctx: GenerateContext): void {
  const { cfg, results } = ctx;
  draft.add('exclusion-zone', siteSteps.exclusionZone, { radiusM: plainUp(results.fallZoneRadiusM, 1) });
  cfg.siteHazards.powerLines.forEach((line, i) => {
    const r = results.powerLines[i];
    const clearance = r && r.requiredClearanceM !== null
      ? `${fmtUp(r.requiredClearanceM, 2)} m${r.basisWords ? ` (${r.basisWords})` : ''}`
      : 'not in the table for this voltage: get the distance from the line’s owner';
    const tooClose = r ? !r.pass || r.assist?.pass === false : true;
    draft.add(
      `power-line-${i + 1}`,
      siteSteps.powerLine,
      { label: line.label, voltageKv: line.voltageKv ?? 'unknown', distanceM: line.distanceM, clearance },
      tooClose ? { caution: powerLineTooClose } : {},
    );
  });
  const buried = cfg.siteHazards.buriedServices.trim();
  draft.add('buried-services', siteSteps.buriedServices, {
    details: buried.length > 0 ? buried : 'none recorded; confirm with the site before anything is set down',
  });
  const neighbours = cfg.siteHazards.neighbours.trim();
  if (neighbours.length > 0) draft.add('neighbours', siteSteps.neighbours, { details: neighbours });
}

export function commsStepsInto(draft: StageDraft, ctx: GenerateContext): void {
  const words = commsWords(ctx.cfg, ctx.input.commsPlan, ctx.input.crewNames);
  if (words.channel) draft.add('comms-channel', commsSteps.channel, { channel: words.channel, callSigns: words.callSigns });
  else draft.add('comms-channel', commsSteps.channelMissing, { callSigns: words.callSigns });
  draft.add('comms-motions', commsSteps.motions, { motions: words.motions });
  draft.add('comms-hand-signals', commsSteps.handSignals, { handSignals: words.handSignals });
  // In the site stage nothing moves yet, so the radio check closes the communications steps.
  draft.add('radio-check', radioCheckStep);
  draft.add('toolbox-talk', commsSteps.toolboxTalk);
}

export function hasAssist(cfg: Configuration): boolean {
  return cfg.assist.assistCraneId !== null || cfg.assist.lifts.length > 0;
}

/** The assist crane's set-up stage, ending in its mandatory hold. */
export function assistStageFor(ctx: GenerateContext, id: string, dependsOn: string[]): PlanStage {
  const draft = new StageDraft(ctx, id, assistStage, { chartId: ctx.cfg.assist.chartId ?? 'not chosen yet' });
  const t = assistStage.steps;
  draft.add('set-up', t.setUp).add('ground', t.ground).add('limiter', t.limiter);
  return draft.build(dependsOn);
}

/** The assist crane's lifts: each lift's check just before it, and the lifts in the planned order. */
export function assistLiftsStageFor(ctx: GenerateContext, id: string, dependsOn: string[]): PlanStage {
  const draft = new StageDraft(ctx, id, assistLiftsStage, {});
  const t = assistLiftsStage.steps;
  ctx.cfg.assist.lifts.forEach((lift, i) => {
    const r = ctx.results.assistLifts[i];
    const share = r && r.sharePercent !== null && r.chartRadiusM !== null
      ? `${plainUp(r.sharePercent, 1)} % of the chart capacity read at ${plain(r.chartRadiusM)} m`
      : 'no chart capacity found for it';
    // Everything on the assist crane's hook, as its chart counts it: the lift, its hook block, slings, shackles, rigging and chart deductions.
    const onHookT = lift.liftT + lift.riggingT + lift.hookBlockT + lift.slingsT + lift.shacklesT + lift.deductionsT;
    const vars = { n: i + 1, label: lift.label, totalT: plainUp(onHookT, 2), radiusM: lift.radiusM, share };
    const fails = r && !r.pass ? fill(assistLiftFails, { reason: r.reason }) : r ? null : fill(assistLiftFails, { reason: 'not computed' });
    draft.add(`check-${i + 1}`, t.check, vars, { ...(fails ? { caution: fails } : {}), after: i > 0 ? [`lift-${i}`] : [] });
    draft.add(`lift-${i + 1}`, t.lift, vars, { ...(fails ? { caution: fails } : {}), after: [`check-${i + 1}`] });
  });
  return draft.build(dependsOn);
}

export function sectionLabel(s: BoomPosition): string {
  return `position ${s.position} (${s.typeId})`;
}

/** Joint k joins position k to position k + 1; its pins are those of the section above it. */
interface Joint {
  n: number;
  below: BoomPosition;
  above: BoomPosition;
  pins: number;
}

export function joints(ctx: GenerateContext): Joint[] {
  const list: Joint[] = [];
  for (let k = 1; k < ctx.sections.length; k += 1) {
    const above = ctx.sections[k];
    list.push({ n: k, below: ctx.sections[k - 1], above, pins: ctx.pinsPerJoint.get(above.typeId) ?? 0 });
  }
  return list;
}

/** One entry per physical guy line: each of `quantity` lines of each mark. */
interface GuyLineUnit {
  mark: string;
  n: number;
  quantity: number;
  lengthM: number;
  pins: number;
  plannedSerial: string | null;
}

export function guyLineUnits(ctx: GenerateContext): GuyLineUnit[] {
  return ctx.results.makeup.guyLines.flatMap((g) =>
    Array.from({ length: g.quantity }, (_, i) => ({
      mark: g.mark,
      n: i + 1,
      quantity: g.quantity,
      lengthM: g.lengthM,
      pins: g.pinsEach,
      plannedSerial: g.serials[i] ?? null,
    })),
  );
}

/** The counterweight blocks on the crane for raising: the fitting order, up to the raising counterweight. */
export function raisingBlocks(ctx: GenerateContext): { id: string; weightKg: number; cumulativeKg: number }[] {
  const target = ctx.results.makeup.arrangement?.raising.counterweightKg ?? 0;
  const out: { id: string; weightKg: number; cumulativeKg: number }[] = [];
  let sum = 0;
  for (const b of ctx.input.arrangement.machine.counterweight.blocks) {
    if (sum >= target - 0.5) break;
    sum += b.weightKg;
    out.push({ id: b.id, weightKg: b.weightKg, cumulativeKg: sum });
  }
  return out;
}

/**
 * The boom foot pins: the crane data's pins in the joint at the foot of the base section, which for
 * the base is the joint with the upper works. Zero when the boom is not listed.
 */
export function footPins(ctx: GenerateContext): number {
  const base = ctx.sections[0];
  return base ? (ctx.pinsPerJoint.get(base.typeId) ?? 0) : 0;
}

/** Every pin of the plan: boom foot, joints and guy lines. */
export function allPins(ctx: GenerateContext): number {
  return footPins(ctx) + ctx.results.makeup.pinCount.total;
}
