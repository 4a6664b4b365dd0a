/**
 * How a plan's stages are put together: the context worked out once per plan, and the stage draft
 * that adds steps with ids that name the thing rather than its place in a list
 * ("er-joints.joint-3", "er-guys.line-G12-4"), because a later plan version keeps the progress of
 * every step whose id it still has.
 *
 * Every reading a template declares is given what it is held to (`records.check`): the figure from
 * the configuration or the crane data, a limit, or the wind phase. Steps the template marks
 * required keep `required: true`, and in-stage order becomes `after` with full step ids.
 */
import type { BoomPosition } from '../calc/boom.js';
import type { ConfigurationResults } from '../planner/types.js';
import type { Configuration } from '../schemas/configuration.js';
import type { PlanHold, PlanStage, PlanStep, StepRecord } from '../schemas/plan.js';
import { commsWords } from './comms.js';
import { plain } from '../format';
import { fill, type Vars } from '../text';
import { radioCheckStep } from './templates/common.js';
import type { StageWording, StepWording } from './templates/types.js';
import type { GeneratePlanInput } from './types.js';

type StageText = Omit<StageWording, 'id'>;

/** Everything the wording needs, worked out once. */
export interface GenerateContext {
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

function uniqueId(ctx: GenerateContext, wanted: string): string {
  let id = wanted.slice(0, 64);
  for (let n = 2; ctx.usedIds.has(id); n += 1) id = `${wanted.slice(0, 58)}-${n}`;
  ctx.usedIds.add(id);
  return id;
}

/** What a step gets beyond its wording: a caution, record fields, its check, and more step suffixes it comes after. */
export interface StepExtra {
  caution?: string | null;
  record?: Partial<Omit<StepRecord, 'check'>>;
  /** What the reading is held to; required exactly when the wording declares a check kind. */
  check?: NonNullable<StepRecord['check']>;
  /** Suffixes of steps of the same stage, added to the wording's own `after`. */
  after?: readonly string[];
}

function makeStep(ctx: GenerateContext, id: string, w: StepWording, vars: Vars, extra: StepExtra, after: string[]): PlanStep {
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
export function planCheck(planned: number, source: string): NonNullable<StepRecord['check']> {
  return { kind: 'plan', planned, tolerance: 0, source };
}

/** A stage being assembled: a crane-movement stage always opens with the radio check. */
export class StageDraft {
  readonly steps: PlanStep[] = [];
  readonly id: string;
  private readonly vars: Vars;

  constructor(
    private readonly ctx: GenerateContext,
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
          ...(h.signOff ? { signOff: true } : {}),
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

export function createContext(input: GeneratePlanInput): GenerateContext {
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
      counterweight: listed ? `${plain(listed.raising.counterweightKg / 1000)} t` : 'not listed for this boom length',
      gauge: listed ? `${plain(listed.raising.trackGaugeM)} m` : 'not listed for this boom length',
    },
  };
}
