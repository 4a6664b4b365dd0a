/**
 * Turns a configuration and its computed results into a plan: the erection or dismantling
 * template with the stages, steps and holds this configuration needs, one step per joint and per
 * guy line so the plan's pin count is the computed one, and the briefing.
 *
 * Deterministic, with ids that name the thing rather than its place in a list ("er-joints.joint-3",
 * "er-guys.line-G12-4"), because a later plan version keeps the progress of every step whose id it
 * still has.
 *
 * Every reading a template declares is given what it is held to (`records.check`): the figure from
 * the configuration or the crane data, a limit, or the wind phase. Steps the template marks
 * required keep `required: true`, and in-stage order becomes `after` with full step ids.
 */
import type { BoomPosition } from '../calc/boom.js';
import type { ConfigurationResults } from '../planner/types.js';
import type { ArrangementData } from '../schemas/arrangement.js';
import type { Configuration } from '../schemas/configuration.js';
import type { CommsPlan } from '../schemas/jobs.js';
import type { Plan, PlanHold, PlanStage, PlanStep, StepRecord } from '../schemas/plan.js';
import { buildBriefing } from './briefing.js';
import { commsWords } from './comms.js';
import { fill, idPart, num, plural, tidy, tonnes, type Vars } from './format.js';
import { assistLiftFails, assistLiftsStage, assistStage, commsSteps, powerLineTooClose, radioCheckStep, siteSteps } from './templates/common.js';
import { dismantlingStages } from './templates/dismantling.js';
import { erectionStages } from './templates/erection.js';
import type { StageWording, StepWording } from './templates/types.js';

/**
 * The operating mode the controller is expected to show after configuration entry: the limiter's
 * normal mode for lifting, out of its assembly (rigging) mode. Manufacturers name it differently;
 * the crew types what the controller shows and the supervisor judges a difference in wording.
 */
export const OPERATING_MODE_EXPECTED = 'lifting';

/** What a plan is generated from. */
export interface GeneratePlanInput {
  kind: 'erection' | 'dismantling';
  configuration: Configuration;
  results: ConfigurationResults;
  arrangement: ArrangementData;
  commsPlan: CommsPlan;
  /** Names by user id, to put names beside call signs. */
  crewNames?: Record<string, string>;
}

type StageText = Omit<StageWording, 'id'>;

/** Everything the wording needs, worked out once. */
interface Context {
  input: GeneratePlanInput;
  cfg: Configuration;
  results: ConfigurationResults;
  sections: BoomPosition[];
  pinsPerJoint: Map<string, number>;
  topFace: Map<string, string>;
  /** Ids already used, so a clash of sanitised names can never produce a duplicate. */
  usedIds: Set<string>;
  base: Vars;
}

function uniqueId(ctx: Context, wanted: string): string {
  let id = wanted.slice(0, 64);
  for (let n = 2; ctx.usedIds.has(id); n += 1) id = `${wanted.slice(0, 58)}-${n}`;
  ctx.usedIds.add(id);
  return id;
}

/** What a step gets beyond its wording: a caution, record fields, its check, and more step suffixes it comes after. */
interface StepExtra {
  caution?: string | null;
  record?: Partial<Omit<StepRecord, 'check'>>;
  /** What the reading is held to; required exactly when the wording declares a check kind. */
  check?: NonNullable<StepRecord['check']>;
  /** Suffixes of steps of the same stage, added to the wording's own `after`. */
  after?: readonly string[];
}

function makeStep(ctx: Context, id: string, w: StepWording, vars: Vars, extra: StepExtra, after: string[]): PlanStep {
  let records: StepRecord | null = null;
  if (w.record) {
    const declared = w.record.check;
    if (declared !== null && extra.check?.kind !== declared) {
      // A template reading without its figure would be recorded and never compared: a generator bug.
      throw new Error(`plan wording: step ${id} declares a ${declared} check and the generator gave ${extra.check?.kind ?? 'none'}`);
    }
    if (declared === null && extra.check) throw new Error(`plan wording: step ${id} declares no check and the generator gave one`);
    records = {
      kind: w.record.kind,
      label: w.record.label,
      unit: w.record.unit,
      componentKind: null,
      typeId: null,
      plannedSerial: null,
      ...extra.record,
      check: declared === null ? null : (extra.check ?? null),
    };
  }
  const caution = extra.caution !== undefined ? extra.caution : w.caution !== undefined ? fill(w.caution, vars) : null;
  return {
    id: uniqueId(ctx, id),
    text: fill(w.text, vars),
    allowedRoles: [...w.roles],
    requiresPhoto: w.photo === true,
    records,
    caution,
    required: w.required === true,
    after,
  };
}

/** A check against the plan's own figure: counts are exact, so no tolerance. */
function planCheck(planned: number, source: string): NonNullable<StepRecord['check']> {
  return { kind: 'plan', planned, tolerance: 0, source };
}

/** A stage being assembled: a crane-movement stage always opens with the radio check. */
class StageDraft {
  readonly steps: PlanStep[] = [];
  readonly id: string;
  private readonly vars: Vars;

  constructor(
    private readonly ctx: Context,
    id: string,
    private readonly w: StageText,
    vars: Vars,
    private readonly movement: boolean = w.involvesCraneMovement,
  ) {
    this.vars = { ...ctx.base, ...vars };
    this.id = uniqueId(ctx, fill(id, this.vars));
    if (movement) this.add('radio-check', radioCheckStep);
  }

  /** The steps each step comes after, by full id, as the wording and the generator asked; resolved in `build`. */
  private readonly wantedAfter = new Map<PlanStep, string[]>();

  /**
   * Adds one step; its id is the stage id and the suffix. Its `after` holds the steps of this
   * stage that the wording or `extra.after` name (and the radio check for a step that moves the
   * crane); a name the stage does not have (an optional step left out for this configuration) is
   * dropped when the stage is built.
   */
  add(suffix: string, w: StepWording, vars: Vars = {}, extra: StepExtra = {}): this {
    const wanted = [...(w.after ?? []), ...(extra.after ?? []), ...(w.moves ? ['radio-check'] : [])].map((s) => `${this.id}.${s}`);
    const step = makeStep(this.ctx, `${this.id}.${suffix}`, w, { ...this.vars, ...vars }, extra, []);
    this.wantedAfter.set(step, [...new Set(wanted)]);
    this.steps.push(step);
    return this;
  }

  build(dependsOn: string[], valueCheck: PlanHold['valueCheck'] = null): PlanStage {
    const present = new Set(this.steps.map((s) => s.id));
    for (const step of this.steps) step.after = (this.wantedAfter.get(step) ?? []).filter((id) => id !== step.id && present.has(id));
    const h = this.w.hold;
    const hold: PlanHold | null = h
      ? {
          id: uniqueId(this.ctx, `${this.id}.hold`),
          title: fill(h.title, this.vars),
          instruction: fill(h.instruction, this.vars),
          requiredRoles: [...h.roles],
          releasingRole: 'supervisor',
          mandatory: h.mandatory,
          valueCheck,
        }
      : null;
    return {
      id: this.id,
      title: fill(this.w.title, this.vars),
      summary: fill(this.w.summary, this.vars),
      dependsOn,
      cautions: this.w.cautions.map((c) => fill(c, this.vars)),
      involvesCraneMovement: this.movement,
      ...(this.w.boom ? { boom: this.w.boom } : {}),
      steps: this.steps,
      hold,
    };
  }
}

// ---------------------------------------------------------------------------------------------
// Shared pieces

/** The wind step: its gust is held to the job's limit for `which` by the board's one wind rule. */
function windSteps(draft: StageDraft, ctx: Context, which: 'assembly' | 'raising', phase: string, extra: StepExtra = {}): void {
  const limits = ctx.results.windLimits;
  const check = { kind: 'wind', phase: which } as const;
  if (limits) {
    const l = limits[which];
    draft.add('wind', siteSteps.wind, { phase, gustMs: l.gustMs, meanMs: l.meanMs }, { ...extra, check });
  } else {
    draft.add('wind', siteSteps.windUnknown, {}, { ...extra, check });
  }
}

function siteHazardSteps(draft: StageDraft, ctx: Context): void {
  const { cfg, results } = ctx;
  draft.add('exclusion-zone', siteSteps.exclusionZone, { radiusM: Math.ceil(results.fallZoneRadiusM * 10) / 10 });
  cfg.siteHazards.powerLines.forEach((line, i) => {
    const r = results.powerLines[i];
    const clearance = r && r.requiredClearanceM !== null
      ? `${num(Math.ceil(r.requiredClearanceM * 100 - 1e-9) / 100)} m${r.basisWords ? ` (${r.basisWords})` : ''}`
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

function commsStepsInto(draft: StageDraft, ctx: Context): void {
  const words = commsWords(ctx.cfg, ctx.input.commsPlan, ctx.input.crewNames);
  if (words.channel) draft.add('comms-channel', commsSteps.channel, { channel: words.channel, callSigns: words.callSigns });
  else draft.add('comms-channel', commsSteps.channelMissing, { callSigns: words.callSigns });
  draft.add('comms-motions', commsSteps.motions, { motions: words.motions });
  draft.add('comms-hand-signals', commsSteps.handSignals, { handSignals: words.handSignals });
  // In the site stage nothing moves yet, so the radio check closes the communications steps.
  draft.add('radio-check', radioCheckStep);
  draft.add('toolbox-talk', commsSteps.toolboxTalk);
}

function hasAssist(cfg: Configuration): boolean {
  return cfg.assist.assistCraneId !== null || cfg.assist.lifts.length > 0;
}

/** The assist crane's set-up stage, ending in its mandatory hold. */
function assistStageFor(ctx: Context, id: string, dependsOn: string[]): PlanStage {
  const draft = new StageDraft(ctx, id, assistStage, { chartId: ctx.cfg.assist.chartId ?? 'not chosen yet' });
  const t = assistStage.steps;
  draft.add('set-up', t.setUp).add('ground', t.ground).add('limiter', t.limiter);
  return draft.build(dependsOn);
}

/** The assist crane's lifts: each lift's check just before it, and the lifts in the planned order. */
function assistLiftsStageFor(ctx: Context, id: string, dependsOn: string[]): PlanStage {
  const draft = new StageDraft(ctx, id, assistLiftsStage, {});
  const t = assistLiftsStage.steps;
  ctx.cfg.assist.lifts.forEach((lift, i) => {
    const r = ctx.results.assistLifts[i];
    const share = r && r.sharePercent !== null && r.chartRadiusM !== null
      ? `${num(Math.round(r.sharePercent * 10) / 10)} % of the chart capacity read at ${num(r.chartRadiusM)} m`
      : 'no chart capacity found for it';
    // Everything on the assist crane's hook, as its chart counts it: the lift, its hook block, slings, shackles, rigging and chart deductions.
    const onHookT = lift.liftT + lift.riggingT + lift.hookBlockT + lift.slingsT + lift.shacklesT + lift.deductionsT;
    const vars = { n: i + 1, label: lift.label, totalT: num(Math.round(onHookT * 100) / 100), radiusM: lift.radiusM, share };
    const fails = r && !r.pass ? fill(assistLiftFails, { reason: r.reason }) : r ? null : fill(assistLiftFails, { reason: 'not computed' });
    draft.add(`check-${i + 1}`, t.check, vars, { ...(fails ? { caution: fails } : {}), after: i > 0 ? [`lift-${i}`] : [] });
    draft.add(`lift-${i + 1}`, t.lift, vars, { ...(fails ? { caution: fails } : {}), after: [`check-${i + 1}`] });
  });
  return draft.build(dependsOn);
}

function sectionLabel(s: BoomPosition): string {
  return `position ${s.position} (${s.typeId})`;
}

/** Joint k joins position k to position k + 1; its pins are those of the section above it. */
interface Joint {
  n: number;
  below: BoomPosition;
  above: BoomPosition;
  pins: number;
}

function joints(ctx: Context): Joint[] {
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

function guyLineUnits(ctx: Context): GuyLineUnit[] {
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
function raisingBlocks(ctx: Context): { id: string; weightKg: number; cumulativeKg: number }[] {
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
function footPins(ctx: Context): number {
  const base = ctx.sections[0];
  return base ? (ctx.pinsPerJoint.get(base.typeId) ?? 0) : 0;
}

/** Every pin of the plan: boom foot, joints and guy lines. */
function allPins(ctx: Context): number {
  return footPins(ctx) + ctx.results.makeup.pinCount.total;
}

function createContext(input: GeneratePlanInput): Context {
  const words = commsWords(input.configuration, input.commsPlan, input.crewNames);
  const listed = input.results.makeup.arrangement;
  return {
    input,
    cfg: input.configuration,
    results: input.results,
    sections: input.results.makeup.sections,
    pinsPerJoint: new Map(input.arrangement.sectionTypes.map((t) => [t.id, t.pinsPerJoint])),
    topFace: new Map(input.arrangement.sectionTypes.map((t) => [t.id, t.topFace])),
    usedIds: new Set(),
    base: {
      channelName: words.channel ? `channel ${words.channel}` : 'the agreed channel',
      boomLengthM: input.configuration.boomLengthM,
      hookBlockId: input.configuration.mainHook.hookBlockId,
      parts: input.configuration.mainHook.parts,
      counterweight: listed ? `${tonnes(listed.raising.counterweightKg)} t` : 'not listed for this boom length',
      gauge: listed ? `${num(listed.raising.trackGaugeM)} m` : 'not listed for this boom length',
    },
  };
}

// ---------------------------------------------------------------------------------------------
// Erection

function erectionStagesFor(ctx: Context): PlanStage[] {
  const { cfg, results } = ctx;
  const t = erectionStages;
  const listed = results.makeup.arrangement;
  const stages: PlanStage[] = [];
  const assist = hasAssist(cfg);
  const aux = cfg.auxiliary.enabled;
  const boomWords = tidy(`a ${num(cfg.boomLengthM)} m boom`);
  const blocks = raisingBlocks(ctx);
  const raisingT = listed ? Number(tonnes(listed.raising.counterweightKg)) : null;

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
  upper.add('mast', t.upper.steps.mast, { mastWeight: mast ? `; the mast weighs ${tonnes(mast.weightKg)} t in the crane data` : '' });
  blocks.forEach((b, i) =>
    upper.add(
      `cw-${idPart(b.id)}`,
      t.upper.steps.block,
      { blockId: b.id, weightT: tonnes(b.weightKg), n: i + 1, count: blocks.length, cumulativeT: tonnes(b.cumulativeKg), raisingT: raisingT ?? 0 },
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
      { position: s.position, typeId: s.typeId, lengthM: s.lengthM, weightT: tonnes(s.weightKg), topFace: ctx.topFace.get(s.typeId) ?? 'see the manual', plannedSerial: s.serial ?? 'none at hand' },
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
  const knownLoad = block ? `hook block ${block.id}, ${tonnes(block.weightKg)} t` : 'a weighed load';
  const raise = new StageDraft(ctx, t.raise.id, t.raise, { knownLoad });
  raise.add('lift-off', t.raise.steps.liftOff).add('stop-check', t.raise.steps.stopCheck).add('raise', t.raise.steps.raise).add('over-hoist', t.raise.steps.overHoist);
  if (aux) raise.add('aux-over-hoist', t.raise.steps.auxOverHoist);
  raise.add('boom-limits', t.raise.steps.boomLimits);
  if (block) {
    const blockT = block.weightKg / 1000;
    // The upper figure in the text is rounded down, so the band it states is never wider than 110 %.
    const blockMaxT = Math.floor(blockT * 1.1 * 100) / 100;
    raise.add('limiter', t.raise.steps.limiter, { blockT: tonnes(block.weightKg), blockMaxT }, {
      check: { kind: 'min', limit: blockT, source: `crane data: hook block ${block.id} weighs ${tonnes(block.weightKg)} t; a load indicator never reads below the load (SAE J159, from memory)` },
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
function configurationValueCheck(ctx: Context): NonNullable<PlanHold['valueCheck']> {
  const listed = ctx.results.makeup.arrangement;
  return {
    fields: [
      { field: 'boomLengthM', expected: num(ctx.cfg.boomLengthM) },
      { field: 'hookBlockId', expected: ctx.cfg.mainHook.hookBlockId },
      { field: 'parts', expected: String(ctx.cfg.mainHook.parts) },
      { field: 'counterweightT', expected: listed ? tonnes(listed.raising.counterweightKg) : 'not listed' },
      { field: 'operatingMode', expected: OPERATING_MODE_EXPECTED },
    ],
  };
}

// ---------------------------------------------------------------------------------------------
// Dismantling

function dismantlingStagesFor(ctx: Context): PlanStage[] {
  const { cfg, results } = ctx;
  const t = dismantlingStages;
  const listed = results.makeup.arrangement;
  const stages: PlanStage[] = [];
  const assist = hasAssist(cfg);
  const assistLifts = assist && cfg.assist.lifts.length > 0;
  const boomWords = tidy(`a ${num(cfg.boomLengthM)} m boom`);

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
      weightT: tonnes(j.above.weightKg),
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
    cw.add('confirm', t.counterweight.steps.confirm, {}, { check: planCheck(Number(tonnes(listed.raising.counterweightKg)), `crane data: counterweight to raise ${boomWords}`) });
  }
  // Off in the stated order: the reverse of the fitting order, last block fitted first.
  const off = [...blocks].reverse();
  off.forEach((b, i) =>
    cw.add(
      `off-${idPart(b.id)}`,
      t.counterweight.steps.block,
      { blockId: b.id, weightT: tonnes(b.weightKg), n: i + 1, count: blocks.length, remainingT: tonnes(b.cumulativeKg - b.weightKg) },
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

/** The plan for a configuration: the erection or dismantling template filled in, and its briefing. */
export function generatePlan(input: GeneratePlanInput): Plan {
  const ctx = createContext(input);
  const stages = input.kind === 'erection' ? erectionStagesFor(ctx) : dismantlingStagesFor(ctx);
  return { kind: input.kind, stages, briefing: buildBriefing(input, stages) };
}
