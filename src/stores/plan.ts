import { defineStore } from 'pinia';
import { useLoadTracker } from '../composables/useLoadTracker';
import { reactive, toRaw } from 'vue';
import type { z } from 'zod';
import type { FieldError } from '../../shared/schemas/errors';
import { jobEnvelopeSchema, type CrewRole, type JobDto } from '../../shared/schemas/jobs';
import {
  planEnvelopeSchema,
  planSchema,
  planVersionListSchema,
  type Plan,
  type PlanHold,
  type PlanStage,
  type PlanStep,
  type PlanVersionDto,
} from '../../shared/schemas/plan';
import { api, ApiRequestError, describeError, download } from '../services/api';
import { fieldErrorOf, fieldErrorsFrom, fieldsFromZod, useJobsStore, type FieldErrors } from './jobs';

export type PlanEnvelope = z.infer<typeof planEnvelopeSchema>;

/** The answer of a helper that may refuse: the refusal is a sentence for the screen. */
export type HelperResult = { ok: true } | { ok: false; reason: string };

const refused = (reason: string): HelperResult => ({ ok: false, reason });
const done: HelperResult = { ok: true };

// ---------------------------------------------------------------------------------------------
// Pure helpers on a plan. They change the plan they are given (the store hands them its draft)
// and keep every stage, step and hold id unique, as the server insists.
// ---------------------------------------------------------------------------------------------

/** Every id used in the plan: stages, steps and holds share one namespace on the server. */
export function planIds(plan: Plan): Set<string> {
  const ids = new Set<string>();
  for (const stage of plan.stages) {
    ids.add(stage.id);
    for (const step of stage.steps) ids.add(step.id);
    if (stage.hold) ids.add(stage.hold.id);
  }
  return ids;
}

/** A new id of our own (`custom-…`) that the plan does not use yet. */
export function newPlanId(plan: Plan, random: () => number = Math.random): string {
  const taken = planIds(plan);
  for (;;) {
    const id = `custom-${Math.floor(random() * 36 ** 8).toString(36).padStart(8, '0')}`;
    if (!taken.has(id)) return id;
  }
}

/** Why a stage cannot be removed, or '' when it can. */
export function stageRemovalBlock(stage: PlanStage): string {
  return stage.hold?.mandatory ? `Its hold “${stage.hold.title}” is mandatory, and a mandatory hold can never be removed.` : '';
}

/** Why a hold cannot be removed, or '' when it can. */
export function holdRemovalBlock(hold: PlanHold): string {
  return hold.mandatory ? 'This hold is mandatory: it can never be removed or skipped.' : '';
}

function move<T>(list: T[], index: number, delta: number): boolean {
  const to = index + delta;
  if (index < 0 || index >= list.length || to < 0 || to >= list.length) return false;
  const [item] = list.splice(index, 1);
  list.splice(to, 0, item);
  return true;
}

/** Moves a stage up (delta −1) or down (+1). Dependencies stay as they are: they, not the order, decide when a stage starts. */
export function moveStage(plan: Plan, index: number, delta: -1 | 1): HelperResult {
  return move(plan.stages, index, delta) ? done : refused(delta < 0 ? 'This is already the first stage.' : 'This is already the last stage.');
}

/** A blank step a supervisor then words; by default the supervisor and riggers may complete it. */
export function blankStep(plan: Plan): PlanStep {
  return { id: newPlanId(plan), text: 'New step: say what is done', allowedRoles: ['supervisor', 'rigger'], requiresPhoto: false, records: null, caution: null };
}

/**
 * Adds a stage after `afterIndex` (−1: at the top). It starts after the stage above it, the
 * default the board uses, and comes with one step to word.
 */
export function addStage(plan: Plan, afterIndex: number): PlanStage {
  const above = plan.stages[afterIndex];
  const stage: PlanStage = {
    id: newPlanId(plan),
    title: 'New stage',
    summary: '',
    dependsOn: above ? [above.id] : [],
    cautions: [],
    involvesCraneMovement: false,
    steps: [],
    hold: null,
  };
  plan.stages.splice(afterIndex + 1, 0, stage);
  stage.steps.push(blankStep(plan));
  return stage;
}

/**
 * Removes a stage unless its hold is mandatory. Stages that waited for it wait instead for what
 * it waited for, so removing a stage never leaves a dependency on nothing.
 */
export function removeStage(plan: Plan, index: number): HelperResult {
  const stage = plan.stages[index];
  if (!stage) return refused('There is no such stage.');
  const block = stageRemovalBlock(stage);
  if (block) return refused(block);
  plan.stages.splice(index, 1);
  for (const other of plan.stages) {
    if (!other.dependsOn.includes(stage.id)) continue;
    const inherited = stage.dependsOn.filter((d) => d !== other.id);
    other.dependsOn = [...new Set(other.dependsOn.flatMap((d) => (d === stage.id ? inherited : [d])))];
  }
  return done;
}

/** Adds a blank step after `afterIndex` (the end when omitted). */
export function addStep(plan: Plan, stageIndex: number, afterIndex?: number): PlanStep | null {
  const stage = plan.stages[stageIndex];
  if (!stage) return null;
  const step = blankStep(plan);
  stage.steps.splice(afterIndex === undefined ? stage.steps.length : afterIndex + 1, 0, step);
  return step;
}

export function removeStep(plan: Plan, stageIndex: number, stepIndex: number): HelperResult {
  const stage = plan.stages[stageIndex];
  if (!stage?.steps[stepIndex]) return refused('There is no such step.');
  stage.steps.splice(stepIndex, 1);
  return done;
}

export function moveStep(plan: Plan, stageIndex: number, stepIndex: number, delta: -1 | 1): HelperResult {
  const stage = plan.stages[stageIndex];
  if (!stage) return refused('There is no such stage.');
  return move(stage.steps, stepIndex, delta) ? done : refused(delta < 0 ? 'This is already the first step.' : 'This is already the last step.');
}

/** Gives a stage without a hold a new, non-mandatory one that the supervisor releases. */
export function addHold(plan: Plan, stageIndex: number): HelperResult {
  const stage = plan.stages[stageIndex];
  if (!stage) return refused('There is no such stage.');
  if (stage.hold) return refused('This stage already has its hold: a stage has at most one.');
  stage.hold = {
    id: newPlanId(plan),
    title: `${stage.title}: checked`,
    instruction: 'Say what each person checks before acknowledging.',
    requiredRoles: ['supervisor'],
    releasingRole: 'supervisor',
    mandatory: false,
    valueCheck: null,
  };
  return done;
}

export function removeHold(plan: Plan, stageIndex: number): HelperResult {
  const hold = plan.stages[stageIndex]?.hold;
  if (!hold) return refused('This stage has no hold.');
  const block = holdRemovalBlock(hold);
  if (block) return refused(block);
  plan.stages[stageIndex].hold = null;
  return done;
}

/** Removes one field of a hold's value check; a mandatory hold's check stays as generated. */
export function removeValueCheckField(plan: Plan, stageIndex: number, fieldIndex: number): HelperResult {
  const hold = plan.stages[stageIndex]?.hold;
  if (!hold?.valueCheck?.fields[fieldIndex]) return refused('There is no such value check field.');
  if (hold.mandatory) return refused('The value check of a mandatory hold is part of what makes it safe: it stays as generated.');
  hold.valueCheck.fields.splice(fieldIndex, 1);
  if (hold.valueCheck.fields.length === 0) hold.valueCheck = null;
  return done;
}

/**
 * The roles of a mandatory hold that may not be unticked: those the last saved plan has. The
 * server checks against the plan generated from the configuration; the saved copy is the
 * closest thing the client holds, and roles added since can still be taken away again.
 */
export function lockedHoldRoles(saved: Plan | null, hold: PlanHold): CrewRole[] {
  if (!hold.mandatory || !saved) return [];
  for (const stage of saved.stages) if (stage.hold?.id === hold.id) return stage.hold.mandatory ? [...stage.hold.requiredRoles] : [];
  return [];
}

/** Ticks or unticks a role a hold asks to acknowledge, refusing to untick a locked one. */
export function setHoldRole(plan: Plan, stageIndex: number, role: CrewRole, on: boolean, saved: Plan | null): HelperResult {
  const hold = plan.stages[stageIndex]?.hold;
  if (!hold) return refused('This stage has no hold.');
  if (on) {
    if (!hold.requiredRoles.includes(role)) hold.requiredRoles.push(role);
    return done;
  }
  if (lockedHoldRoles(saved, hold).includes(role)) return refused('A mandatory hold’s roles can be added to, never removed.');
  hold.requiredRoles = hold.requiredRoles.filter((r) => r !== role);
  return done;
}

// ---------------------------------------------------------------------------------------------
// Comparing two versions by ids and text.
// ---------------------------------------------------------------------------------------------

export interface StageChange {
  stageId: string;
  title: string;
  /** What differs, in words: "title", "hold", "starts after", ... */
  what: string[];
}

export interface StepChange {
  stepId: string;
  stageTitle: string;
  /** The step's text in the newer plan, or the older one for a removed step. */
  text: string;
  /** For a changed step: its text before, when the text itself changed. */
  before?: string;
  what: string[];
}

export interface PlanComparison {
  stages: { added: StageChange[]; removed: StageChange[]; changed: StageChange[] };
  steps: { added: StepChange[]; removed: StepChange[]; changed: StepChange[] };
  /** Nothing differs. */
  same: boolean;
}

const same = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

function stageDifferences(a: PlanStage, b: PlanStage, orderMoved: boolean): string[] {
  const what: string[] = [];
  if (a.title !== b.title) what.push('title');
  if (a.summary !== b.summary) what.push('summary');
  if (!same(a.cautions, b.cautions)) what.push('cautions');
  if (!same([...a.dependsOn].sort(), [...b.dependsOn].sort())) what.push('starts after');
  if (a.involvesCraneMovement !== b.involvesCraneMovement) what.push('crane movement');
  if (!same(a.hold, b.hold)) what.push(a.hold && b.hold ? 'hold' : a.hold ? 'hold removed' : 'hold added');
  if (orderMoved) what.push('place in the order');
  return what;
}

function stepDifferences(a: PlanStep, b: PlanStep): string[] {
  const what: string[] = [];
  if (a.text !== b.text) what.push('text');
  if (!same([...a.allowedRoles].sort(), [...b.allowedRoles].sort())) what.push('roles');
  if (a.requiresPhoto !== b.requiresPhoto) what.push('photo');
  if (!same(a.records, b.records)) what.push('recorded value');
  if ((a.caution ?? '') !== (b.caution ?? '')) what.push('caution');
  return what;
}

/** What changed from `older` to `newer`: stages and steps matched by id, then compared field by field. */
export function comparePlans(older: Plan, newer: Plan): PlanComparison {
  const olderStages = new Map(older.stages.map((s, i) => [s.id, { stage: s, index: i }]));
  const newerStages = new Map(newer.stages.map((s, i) => [s.id, { stage: s, index: i }]));
  const olderSteps = new Map(older.stages.flatMap((s) => s.steps.map((step) => [step.id, { step, stage: s }] as const)));
  const newerSteps = new Map(newer.stages.flatMap((s) => s.steps.map((step) => [step.id, { step, stage: s }] as const)));

  // The relative order of the stages both versions share, so adding one does not mark every later stage as moved.
  const sharedOld = older.stages.filter((s) => newerStages.has(s.id)).map((s) => s.id);
  const sharedNew = newer.stages.filter((s) => olderStages.has(s.id)).map((s) => s.id);

  const out: PlanComparison = { stages: { added: [], removed: [], changed: [] }, steps: { added: [], removed: [], changed: [] }, same: true };
  for (const s of newer.stages) {
    const before = olderStages.get(s.id);
    if (!before) {
      out.stages.added.push({ stageId: s.id, title: s.title, what: [] });
      continue;
    }
    const what = stageDifferences(before.stage, s, sharedOld.indexOf(s.id) !== sharedNew.indexOf(s.id));
    if (what.length) out.stages.changed.push({ stageId: s.id, title: s.title, what });
  }
  for (const s of older.stages) if (!newerStages.has(s.id)) out.stages.removed.push({ stageId: s.id, title: s.title, what: [] });

  for (const [id, { step, stage }] of newerSteps) {
    const before = olderSteps.get(id);
    if (!before) {
      out.steps.added.push({ stepId: id, stageTitle: stage.title, text: step.text, what: [] });
      continue;
    }
    const what = stepDifferences(before.step, step);
    if (before.stage.id !== stage.id) what.push('stage');
    if (what.length) out.steps.changed.push({ stepId: id, stageTitle: stage.title, text: step.text, ...(before.step.text !== step.text ? { before: before.step.text } : {}), what });
  }
  for (const [id, { step, stage }] of olderSteps) if (!newerSteps.has(id)) out.steps.removed.push({ stepId: id, stageTitle: stage.title, text: step.text, what: [] });

  out.same = [out.stages, out.steps].every((g) => g.added.length + g.removed.length + g.changed.length === 0);
  return out;
}

/** The stage index a problem or field path ("stages.3.hold.requiredRoles") points at, or null. */
export function stageIndexOfPath(path: string | undefined): number | null {
  const match = /^stages\.(\d+)(\.|$)/.exec(path ?? '');
  return match ? Number(match[1]) : null;
}

// ---------------------------------------------------------------------------------------------
// The store.
// ---------------------------------------------------------------------------------------------

const idOf = (value: string) => encodeURIComponent(value);
const copy = (plan: Plan): Plan => structuredClone(toRaw(plan));

interface SaveState {
  saving: boolean;
  problem: string;
  fieldErrors: FieldErrors;
}

/** One readiness reason the server gave when it refused to make the job ready. */
export interface ReadyReason {
  code: string;
  message: string;
}

/** Each job's plan: the server's copy, the supervisor's draft of it, its versions, saving and making ready. */
export const usePlanStore = defineStore('plan', () => {
  const envelopes = reactive<Record<string, PlanEnvelope>>({});
  const drafts = reactive<Record<string, Plan>>({});
  const versions = reactive<Record<string, PlanVersionDto[]>>({});
  /** Jobs the server has no plan for yet (404 no_plan): the configuration is not saved. */
  const missing = reactive(new Set<string>());
  const saves = reactive<Record<string, SaveState>>({});
  const readyRefusals = reactive<Record<string, ReadyReason[]>>({});
  const readying = reactive(new Set<string>());
  const generating = reactive(new Set<string>());

  // Loading and the last problem per resource key, as the other stores keep them.
  const { problems, track, isLoading, problemOf } = useLoadTracker();

  function saveState(jobId: string): SaveState {
    saves[jobId] ??= { saving: false, problem: '', fieldErrors: {} };
    return saves[jobId];
  }
  const idle: Readonly<SaveState> = Object.freeze({ saving: false, problem: '', fieldErrors: {} });
  /** The save state for screens: reading it never writes, so it is safe inside a render. */
  function formOf(jobId: string): Readonly<SaveState> {
    return saves[jobId] ?? idle;
  }
  function errorOf(jobId: string, path: string): string {
    return fieldErrorOf(saves[jobId]?.fieldErrors ?? {}, path);
  }
  function clearFieldErrors(jobId: string) {
    if (saves[jobId]) saves[jobId].fieldErrors = {};
  }

  /** True when the draft differs from the server's copy. */
  function isDirty(jobId: string): boolean {
    const draft = drafts[jobId];
    const envelope = envelopes[jobId];
    return !!draft && !!envelope && !envelope.locked && !same(draft, envelope.plan);
  }

  /** Puts the server's copy in place and starts a fresh draft from it. */
  function accept(jobId: string, envelope: PlanEnvelope) {
    envelopes[jobId] = envelope;
    drafts[jobId] = copy(envelope.plan);
    missing.delete(jobId);
  }

  /** Drops the supervisor's unsaved edits. */
  function discardDraft(jobId: string) {
    const envelope = envelopes[jobId];
    if (envelope) drafts[jobId] = copy(envelope.plan);
    clearFieldErrors(jobId);
    if (saves[jobId]) saves[jobId].problem = '';
  }

  function loadPlan(jobId: string) {
    return track(`plan:${jobId}`, async () => {
      try {
        const envelope = await api(`/jobs/${idOf(jobId)}/plan`, { schema: planEnvelopeSchema });
        accept(jobId, envelope);
        return envelope;
      } catch (error) {
        // Not a failure: the plan is generated once the configuration is saved.
        if (error instanceof ApiRequestError && error.code === 'no_plan') {
          missing.add(jobId);
          delete envelopes[jobId];
          delete drafts[jobId];
          return null;
        }
        throw error;
      }
    });
  }

  function loadVersions(jobId: string) {
    return track(`versions:${jobId}`, async () => {
      versions[jobId] = (await api(`/jobs/${idOf(jobId)}/plan/versions`, { schema: planVersionListSchema })).items;
      return versions[jobId];
    });
  }

  /**
   * Runs one helper on the draft. A change of structure clears the field errors of the last
   * refused save: they name places by position, and the positions have just moved.
   */
  function edit(jobId: string, work: (draft: Plan) => HelperResult, structural = true): HelperResult {
    const draft = drafts[jobId];
    if (!draft) return refused('The plan has not loaded yet.');
    const result = work(draft);
    if (result.ok && structural) clearFieldErrors(jobId);
    return result;
  }
  const saved = (jobId: string) => envelopes[jobId]?.plan ?? null;

  const editing = {
    moveStage: (jobId: string, index: number, delta: -1 | 1) => edit(jobId, (p) => moveStage(p, index, delta)),
    addStage: (jobId: string, afterIndex: number) => edit(jobId, (p) => (addStage(p, afterIndex), done)),
    removeStage: (jobId: string, index: number) => edit(jobId, (p) => removeStage(p, index)),
    addStep: (jobId: string, stageIndex: number, afterIndex?: number) => edit(jobId, (p) => (addStep(p, stageIndex, afterIndex) ? done : refused('There is no such stage.'))),
    removeStep: (jobId: string, stageIndex: number, stepIndex: number) => edit(jobId, (p) => removeStep(p, stageIndex, stepIndex)),
    moveStep: (jobId: string, stageIndex: number, stepIndex: number, delta: -1 | 1) => edit(jobId, (p) => moveStep(p, stageIndex, stepIndex, delta)),
    addHold: (jobId: string, stageIndex: number) => edit(jobId, (p) => addHold(p, stageIndex)),
    removeHold: (jobId: string, stageIndex: number) => edit(jobId, (p) => removeHold(p, stageIndex)),
    removeValueCheckField: (jobId: string, stageIndex: number, fieldIndex: number) => edit(jobId, (p) => removeValueCheckField(p, stageIndex, fieldIndex)),
    setHoldRole: (jobId: string, stageIndex: number, role: CrewRole, on: boolean) => edit(jobId, (p) => setHoldRole(p, stageIndex, role, on, saved(jobId)), false),
    /** The roles of a stage's hold that may not be unticked. */
    lockedRoles: (jobId: string, stageIndex: number): CrewRole[] => {
      const hold = drafts[jobId]?.stages[stageIndex]?.hold;
      return hold ? lockedHoldRoles(saved(jobId), hold) : [];
    },
  };

  /** The job the server answered replaces the jobs store's copy, and readiness follows. */
  function followJob(job: JobDto) {
    const jobs = useJobsStore();
    jobs.details[job.id] = job;
    void jobs.loadReadiness(job.id);
  }

  function refuse(jobId: string, fields: readonly FieldError[], message: string) {
    const state = saveState(jobId);
    state.fieldErrors = fieldErrorsFrom(fields);
    state.problem = message;
  }

  /**
   * Saves the draft. The client checks the shape first so a blank text is named before a round
   * trip; the server then checks the mandatory holds. A refusal keeps the draft and every field error.
   */
  async function savePlan(jobId: string): Promise<boolean> {
    const draft = drafts[jobId];
    if (!draft) return false;
    const state = saveState(jobId);
    const parsed = planSchema.safeParse(copy(draft));
    if (!parsed.success) {
      refuse(jobId, fieldsFromZod(parsed.error), 'Some fields need fixing before the plan can be saved.');
      return false;
    }
    state.saving = true;
    state.problem = '';
    state.fieldErrors = {};
    try {
      const { job } = await api(`/jobs/${idOf(jobId)}/plan`, { method: 'PUT', body: parsed.data, schema: jobEnvelopeSchema });
      followJob(job);
      // The answer carries the job, not the plan: read the plan back for its new problems.
      await loadPlan(jobId);
      return !problems[`plan:${jobId}`];
    } catch (error) {
      if (error instanceof ApiRequestError && error.fields.length > 0) refuse(jobId, error.fields, error.message);
      else state.problem = describeError(error);
      return false;
    } finally {
      state.saving = false;
    }
  }

  /** Generates the draft again from the configuration; every hand edit is lost (the screen asks first). */
  async function generateAgain(jobId: string): Promise<boolean> {
    const state = saveState(jobId);
    generating.add(jobId);
    state.problem = '';
    state.fieldErrors = {};
    try {
      await api(`/jobs/${idOf(jobId)}/plan/generate`, { method: 'POST' });
      await loadPlan(jobId);
      void useJobsStore().loadReadiness(jobId);
      return !problems[`plan:${jobId}`];
    } catch (error) {
      state.problem = describeError(error);
      return false;
    } finally {
      generating.delete(jobId);
    }
  }

  /** Locks plan version 1 and makes the job ready, or keeps every reason the server gave. */
  async function makeReady(jobId: string): Promise<boolean> {
    readying.add(jobId);
    delete readyRefusals[jobId];
    try {
      const { job } = await api(`/jobs/${idOf(jobId)}/ready`, { method: 'POST', schema: jobEnvelopeSchema });
      followJob(job);
      await Promise.all([loadPlan(jobId), loadVersions(jobId)]);
      return true;
    } catch (error) {
      if (error instanceof ApiRequestError && error.code === 'not_ready' && error.fields.length > 0) {
        readyRefusals[jobId] = error.fields.map((f) => ({ code: f.path, message: f.message }));
      } else {
        readyRefusals[jobId] = [{ code: error instanceof ApiRequestError ? error.code : 'error', message: describeError(error) }];
      }
      return false;
    } finally {
      readying.delete(jobId);
    }
  }

  /** Saves the printable plan (with the briefing) as a PDF; answers a sentence when it could not. */
  async function downloadPlanPdf(job: Pick<JobDto, 'id' | 'craneFleetNumber' | 'name'>, version: number): Promise<string> {
    const safeName = `${job.craneFleetNumber} ${job.name}`.replace(/[^\w.-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 80) || 'job';
    try {
      await download(`/jobs/${idOf(job.id)}/plan.pdf`, `plan-${safeName}-${version > 0 ? `v${version}` : 'draft'}.pdf`);
      return '';
    } catch (error) {
      return describeError(error);
    }
  }

  return {
    envelopes,
    drafts,
    versions,
    missing,
    saves,
    readyRefusals,
    readying,
    generating,
    isLoading,
    problemOf,
    formOf,
    errorOf,
    clearFieldErrors,
    isDirty,
    discardDraft,
    loadPlan,
    loadVersions,
    savePlan,
    generateAgain,
    makeReady,
    downloadPlanPdf,
    ...editing,
  };
});
