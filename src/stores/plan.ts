import { defineStore } from 'pinia';
import { useLoadTracker } from '../composables/useLoadTracker';
import { reactive, toRaw } from 'vue';
import type { z } from 'zod';
import { fieldsFromZod, type FieldError } from '../../shared/schemas/errors';
import { jobEnvelopeSchema, type CrewRole, type JobDto } from '../../shared/schemas/jobs';
import { planEnvelopeSchema, planSchema, planVersionListSchema, type Plan, type PlanVersionDto } from '../../shared/schemas/plan';
import {
  addHold,
  addStage,
  addStep,
  done,
  lockedHoldRoles,
  moveStage,
  moveStep,
  refused,
  removeHold,
  removeStage,
  removeStep,
  removeValueCheckField,
  setHoldRole,
  type HelperResult,
} from '../../shared/plan/edit';
import { api, ApiRequestError, describeError, download, fileNamePart } from '../services/api';
import type { JobEventDto, JobEventType } from '../../shared/events/log';
import { useBoardStore } from './board';
import { createBurstRunner } from './bursts';
import { fieldErrorOf, fieldErrorsFrom, type FieldErrors } from './form-errors';
import { useJobsStore } from './jobs';

export type PlanEnvelope = z.infer<typeof planEnvelopeSchema>;

const idOf = (value: string) => encodeURIComponent(value);
const copy = (plan: Plan): Plan => structuredClone(toRaw(plan));

/** Events after which the server's copy of a job's plan (or its list of versions) is different. */
const eventsChangingPlan: ReadonlySet<JobEventType> = new Set<JobEventType>(['plan.generated', 'plan.edited', 'job.ready', 'plan.revised']);

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
    return !!draft && !!envelope && !envelope.locked && JSON.stringify(draft) !== JSON.stringify(envelope.plan);
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
   * A plan event of a job whose plan is shown: the plan and its versions are read back, once per
   * burst. A draft with unsaved edits is left alone: the person's work is never replaced under
   * them, and the server checks their save against the version in force.
   */
  const bursts = createBurstRunner();
  function followEvent(event: JobEventDto) {
    if (!eventsChangingPlan.has(event.type)) return;
    const jobId = event.jobId;
    if ((envelopes[jobId] || missing.has(jobId)) && !isDirty(jobId)) bursts.run(`plan:${jobId}`, () => loadPlan(jobId));
    if (versions[jobId]) bursts.run(`versions:${jobId}`, () => loadVersions(jobId));
  }
  useBoardStore().onBoardEvent(followEvent);

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
    const safeName = fileNamePart(`${job.craneFleetNumber} ${job.name}`, 'job');
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
