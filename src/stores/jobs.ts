import { defineStore } from 'pinia';
import { useLoadTracker } from '../composables/useLoadTracker';
import { reactive, ref } from 'vue';
import { z } from 'zod';
import { configurationSchema, type Configuration, type Figure } from '../../shared/schemas/configuration';
import { fieldsFromZod, type FieldError } from '../../shared/schemas/errors';
import { createJobSchema, jobEnvelopeSchema, jobListSchema, overrideActionSchema, readinessSchema, setCrewSchema, updateJobSchema, verifySchema, type CrewRole, type JobDto, type JobSummary, type Readiness } from '../../shared/schemas/jobs';
import type { JobEventDto, JobEventType } from '../../shared/events/log';
import type { BoardState } from '../../shared/board/types';
import { crewCandidateListSchema, type CrewCandidate } from '../../shared/schemas/users';
import { actingTransferSchema } from '../../shared/schemas/commands';
import { api, ApiRequestError, describeError, download, fileNamePart } from '../services/api';
import { FOLLOW_LIMIT, type JobSummaryUpdate } from '../../shared/events/socket';
import { connectSocket } from '../services/socket';
import { fetchEventsAfter } from '../services/events';
import { useBoardStore } from './board';
import { useSessionStore } from './session';
import { createBurstRunner } from './bursts';
import { fieldErrorOf, fieldErrorsFrom, type FieldErrors } from './form-errors';
/** The one field of a board snapshot the job page reads: who the acting supervisor is. */
const actingOfBoardSchema = z.object({ actingSupervisor: z.object({ userId: z.string(), name: z.string(), since: z.string() }).nullable().optional() });

/** One figure that reads differently on this device and on the server. */
export interface FigureDifference {
  key: string;
  label: string;
  local: string | null;
  server: string | null;
}

/**
 * Where the server's figures differ from those computed on this device. They should match (same
 * code, same data), so a difference means the data changed in between, e.g. a part quarantined.
 */
export function figureDifferences(local: readonly Figure[], server: readonly Figure[]): FigureDifference[] {
  const words = (f: Figure | undefined) => (f ? `${f.value} (${f.status})` : null);
  const localByKey = new Map(local.map((f) => [f.key, f]));
  const serverByKey = new Map(server.map((f) => [f.key, f]));
  const keys = [...new Set([...server.map((f) => f.key), ...local.map((f) => f.key)])];
  return keys.flatMap((key) => {
    const l = localByKey.get(key);
    const s = serverByKey.get(key);
    if (words(l) === words(s)) return [];
    return [{ key, label: (s ?? l)!.label, local: words(l), server: words(s) }];
  });
}

/** The forms of the jobs screens; each keeps its own saving state and field errors. */
export type JobForm = 'create' | 'details' | 'distribution' | 'crew' | 'comms' | 'configuration' | 'override' | 'acting';

interface FormState {
  saving: boolean;
  problem: string;
  fieldErrors: FieldErrors;
}

/** What the last save of a configuration showed: the server's figures against this device's. */
export interface ServerCheck {
  at: string;
  differences: FigureDifference[];
}

const id = (value: string) => encodeURIComponent(value);

/**
 * Events that change what GET /api/jobs/:id answers beyond the board's own fields (name, site,
 * kind, state, plan version): the crew, the configuration and its figures, overrides, the
 * distribution and communications plan, and what the person may edit (it ends with planning).
 * After one of these the open job is read back; after any other its fields come from the board.
 */
const eventsReadBack: ReadonlySet<JobEventType> = new Set<JobEventType>([
  'job.updated',
  'crew.set',
  'configuration.set',
  'override.requested',
  'override.approved',
  'plan.generated',
  'plan.edited',
  'job.ready',
  'job.cancelled',
]);

/** Jobs: the list, each job with its readiness and event log, and every change a planner makes. */
export const useJobsStore = defineStore('jobs', () => {
  const items = ref<JobSummary[]>([]);
  const listLoaded = ref(false);
  const details = reactive<Record<string, JobDto>>({});
  const readiness = reactive<Record<string, Readiness>>({});
  const events = reactive<Record<string, JobEventDto[]>>({});
  const verification = reactive<Record<string, z.infer<typeof verifySchema>>>({});
  const serverChecks = reactive<Record<string, ServerCheck>>({});
  const candidates = ref<CrewCandidate[]>([]);
  /** GET /api/crew-candidates answered 403: this person cannot choose people for a crew. */
  const candidatesRefused = ref(false);

  // Loading state and the last problem per resource key ("list", "job:<id>", ...), as the fleet store does.
  const { track, isLoading, problemOf } = useLoadTracker();

  const forms = reactive<Record<JobForm, FormState>>({
    create: { saving: false, problem: '', fieldErrors: {} },
    details: { saving: false, problem: '', fieldErrors: {} },
    distribution: { saving: false, problem: '', fieldErrors: {} },
    crew: { saving: false, problem: '', fieldErrors: {} },
    comms: { saving: false, problem: '', fieldErrors: {} },
    configuration: { saving: false, problem: '', fieldErrors: {} },
    override: { saving: false, problem: '', fieldErrors: {} },
    acting: { saving: false, problem: '', fieldErrors: {} },
  });
  /** Each job's acting supervisor as its board says (null: nobody named yet), for the administrator's transfer. */
  const acting = reactive<Record<string, { userId: string; name: string; since: string } | null>>({});

  /** The site time zone a job's times are shown in (services/time.ts); the server's until the job is known. */
  function timeZoneOf(jobId: string): string {
    return details[jobId]?.timeZone ?? items.value.find((s) => s.id === jobId)?.timeZone ?? useSessionStore().serverTimeZone;
  }

  function resetForm(form: JobForm) {
    forms[form] = { saving: false, problem: '', fieldErrors: {} };
  }
  function errorOf(form: JobForm, path: string): string {
    return fieldErrorOf(forms[form].fieldErrors, path);
  }
  function refuse(form: JobForm, fields: FieldError[], message: string) {
    forms[form].fieldErrors = fieldErrorsFrom(fields);
    forms[form].problem = message;
  }

  /** Runs one submission; answers null when refused, the reasons kept on the form. */
  async function submit<T>(form: JobForm, work: () => Promise<T>): Promise<T | null> {
    const state = forms[form];
    state.saving = true;
    state.problem = '';
    state.fieldErrors = {};
    try {
      return await work();
    } catch (error) {
      if (error instanceof ApiRequestError && error.fields.length > 0) refuse(form, error.fields, error.message);
      else state.problem = describeError(error);
      return null;
    } finally {
      state.saving = false;
    }
  }

  /** Keeps the list line of a job in step with its detail. */
  function accept(job: JobDto): JobDto {
    details[job.id] = job;
    items.value = items.value.map((s) =>
      s.id === job.id ? { ...s, name: job.name, site: job.site, craneUnitId: job.craneUnitId, craneFleetNumber: job.craneFleetNumber, kind: job.kind, state: job.state, planVersion: job.planVersion, updatedAt: job.updatedAt } : s,
    );
    return job;
  }

  /**
   * One event of a job this tab follows live (through the board store's one socket): the list line
   * and the open job take their state, plan version and names from the board right after the
   * event, with no request; the event log takes the event itself when it follows on. Only what the
   * board does not carry is read back, once per burst of events.
   */
  const bursts = createBurstRunner();
  function followEvent(event: JobEventDto, board: BoardState) {
    const jobId = event.jobId;
    const fromBoard = { name: board.job.name, site: board.job.site, kind: board.job.kind, craneFleetNumber: board.job.craneFleetNumber, state: board.job.state, planVersion: board.planVersion, updatedAt: event.at };
    if (items.value.some((s) => s.id === jobId)) items.value = items.value.map((s) => (s.id === jobId ? { ...s, ...fromBoard } : s));
    const held = details[jobId];
    if (held) details[jobId] = { ...held, ...fromBoard, lastSeq: Math.max(held.lastSeq, event.seq) };
    const log = events[jobId];
    if (log) {
      const last = log.length ? log[log.length - 1].seq : 0;
      if (event.seq === last + 1) events[jobId] = [...log, event];
      else if (event.seq > last) bursts.run(`events:${jobId}`, () => loadEvents(jobId));
    }
    if (!eventsReadBack.has(event.type)) return;
    if (held) bursts.run(`job:${jobId}`, () => loadJob(jobId));
    if (readiness[jobId]) bursts.run(`readiness:${jobId}`, () => loadReadiness(jobId));
  }
  useBoardStore().onBoardEvent(followEvent);

  /**
   * A followed job changed elsewhere (another person started, stopped or revised it): its list
   * line takes the new state at once; the open job is read back once per burst when the change
   * reached it, so a page left open never shows an old state.
   */
  function applySummary(u: JobSummaryUpdate) {
    const line = { name: u.name, site: u.site, state: u.state, timeZone: u.timeZone, planVersion: u.planVersion, updatedAt: u.updatedAt };
    if (items.value.some((s) => s.id === u.jobId)) items.value = items.value.map((s) => (s.id === u.jobId ? { ...s, ...line } : s));
    const held = details[u.jobId];
    if (held && u.lastSeq > held.lastSeq) {
      details[u.jobId] = { ...held, ...line, lastSeq: u.lastSeq };
      bursts.run(`job:${u.jobId}`, () => loadJob(u.jobId));
    }
  }

  let following = false;
  /**
   * Follows the listed jobs and the open ones live through the tab's one socket (the server
   * checks each against who may read it). Pages call it once they show jobs; it follows again
   * after every reconnect.
   */
  function followLive() {
    const session = useSessionStore();
    const socket = connectSocket(() => session.token);
    const send = () => {
      const jobIds = [...new Set([...items.value.map((s) => s.id), ...Object.keys(details)])].slice(0, FOLLOW_LIMIT);
      socket.emit('jobs:follow', { jobIds }, () => undefined);
    };
    if (!following) {
      following = true;
      socket.on('jobs:summary', applySummary);
      socket.on('connect', send);
    }
    if (socket.connected) send();
  }

  /** After a change: readiness and, when it is being shown, the event log follow. */
  function followUp(jobId: string) {
    void loadReadiness(jobId);
    if (events[jobId]) void loadEvents(jobId);
  }

  function loadList() {
    return track('list', async () => {
      items.value = (await api('/jobs', { schema: jobListSchema })).items;
      listLoaded.value = true;
    });
  }

  function loadJob(jobId: string) {
    return track(`job:${jobId}`, async () => accept((await api(`/jobs/${id(jobId)}`, { schema: jobEnvelopeSchema })).job));
  }

  function loadReadiness(jobId: string) {
    return track(`readiness:${jobId}`, async () => {
      readiness[jobId] = await api(`/jobs/${id(jobId)}/readiness`, { schema: readinessSchema });
      return readiness[jobId];
    });
  }

  /** Loads the events after the last one held, so reopening the log fetches only what is new. */
  function loadEvents(jobId: string) {
    return track(`events:${jobId}`, async () => {
      const before = events[jobId] ?? [];
      const held = [...before, ...(await fetchEventsAfter(jobId, before.length ? before[before.length - 1].seq : 0))];
      // A live event may have been appended while the pages were loading: it stays.
      const last = held.length ? held[held.length - 1].seq : 0;
      events[jobId] = [...held, ...(events[jobId] ?? []).filter((e) => e.seq > last)];
      return events[jobId];
    });
  }

  /** Checks the stored chain; with `expect`, a hash from paper or an e-mail, also whether the log still leads to it. */
  function verifyRecord(jobId: string, expect?: string) {
    return track(`verify:${jobId}`, async () => {
      const query = expect ? `?expect=${encodeURIComponent(expect)}` : '';
      verification[jobId] = await api(`/jobs/${id(jobId)}/record/verify${query}`, { schema: verifySchema });
      return verification[jobId];
    });
  }

  /** The acting supervisor from the job's board snapshot (a job with no board yet has none). */
  function loadActing(jobId: string) {
    return track(`acting:${jobId}`, async () => {
      const board = (await api(`/jobs/${id(jobId)}/board`, { schema: actingOfBoardSchema })).actingSupervisor ?? null;
      acting[jobId] = board;
      return board;
    });
  }

  /** An administrator makes another supervisor of the crew the acting supervisor, with a reason (the outgoing one cannot hand over). */
  async function transferActing(jobId: string, userId: string, reason: string): Promise<JobDto | null> {
    const parsed = actingTransferSchema.safeParse({ userId, reason });
    if (!parsed.success) {
      refuse('acting', fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit('acting', async () => {
      const job = accept((await api(`/jobs/${id(jobId)}/acting-supervisor`, { method: 'POST', body: parsed.data, schema: jobEnvelopeSchema })).job);
      void loadActing(jobId);
      followUp(jobId);
      return job;
    });
  }

  /** People who may be put in a crew; a 403 is not a failure but says this person cannot choose. */
  function loadCandidates() {
    return track('candidates', async () => {
      try {
        candidates.value = (await api('/crew-candidates', { schema: crewCandidateListSchema })).items;
        candidatesRefused.value = false;
      } catch (error) {
        if (error instanceof ApiRequestError && error.status === 403) {
          candidatesRefused.value = true;
          return;
        }
        throw error;
      }
    });
  }

  async function createJob(input: z.input<typeof createJobSchema>): Promise<JobDto | null> {
    const parsed = createJobSchema.safeParse(input);
    if (!parsed.success) {
      refuse('create', fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit('create', async () => {
      const { job } = await api('/jobs', { method: 'POST', body: parsed.data, schema: jobEnvelopeSchema });
      details[job.id] = job;
      void loadList();
      return job;
    });
  }

  /** Name, site, kind, distribution list or communications plan; `form` says which editor asked. */
  async function updateJob(jobId: string, patch: z.input<typeof updateJobSchema>, form: 'details' | 'distribution' | 'comms'): Promise<JobDto | null> {
    const parsed = updateJobSchema.safeParse(patch);
    if (!parsed.success) {
      refuse(form, fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit(form, async () => {
      const job = accept((await api(`/jobs/${id(jobId)}`, { method: 'PATCH', body: parsed.data, schema: jobEnvelopeSchema })).job);
      followUp(jobId);
      return job;
    });
  }

  async function setCrew(jobId: string, members: { userId: string; role: CrewRole }[]): Promise<JobDto | null> {
    const parsed = setCrewSchema.safeParse({ members });
    if (!parsed.success) {
      refuse('crew', fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit('crew', async () => {
      const job = accept((await api(`/jobs/${id(jobId)}/crew`, { method: 'PUT', body: parsed.data, schema: jobEnvelopeSchema })).job);
      followUp(jobId);
      return job;
    });
  }

  /**
   * Saves the configuration. The server computes every figure again and its figures replace the
   * ones this device computed (`localFigures`); where they differ, the difference is kept to show.
   */
  async function saveConfiguration(jobId: string, configuration: Configuration, localFigures: readonly Figure[]): Promise<JobDto | null> {
    const parsed = configurationSchema.safeParse(configuration);
    if (!parsed.success) {
      refuse('configuration', fieldsFromZod(parsed.error), 'Some fields need fixing before the configuration can be saved.');
      return null;
    }
    return submit('configuration', async () => {
      const job = accept((await api(`/jobs/${id(jobId)}/configuration`, { method: 'PUT', body: parsed.data, schema: jobEnvelopeSchema })).job);
      serverChecks[jobId] = { at: job.updatedAt, differences: figureDifferences(localFigures, job.figures) };
      followUp(jobId);
      return job;
    });
  }

  async function overrideAction(jobId: string, body: z.input<typeof overrideActionSchema>): Promise<JobDto | null> {
    const parsed = overrideActionSchema.safeParse(body);
    if (!parsed.success) {
      refuse('override', fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit('override', async () => {
      const job = accept((await api(`/jobs/${id(jobId)}/overrides`, { method: 'POST', body: parsed.data, schema: jobEnvelopeSchema })).job);
      followUp(jobId);
      return job;
    });
  }

  /** Asks to override a failing figure, with the reason in a sentence. */
  function requestOverride(jobId: string, figureKey: string, reason: string) {
    return overrideAction(jobId, { action: 'request', figureKey, reason });
  }

  /** Approves another person's override request. */
  function approveOverride(jobId: string, overrideId: string) {
    return overrideAction(jobId, { action: 'approve', overrideId });
  }

  /** Saves the configuration sheet PDF; answers a sentence when it could not. */
  async function downloadConfigurationSheet(job: Pick<JobDto, 'id' | 'craneFleetNumber' | 'name'>): Promise<string> {
    const safeName = fileNamePart(`${job.craneFleetNumber} ${job.name}`, 'job');
    try {
      await download(`/jobs/${id(job.id)}/configuration.pdf`, `configuration-${safeName}.pdf`);
      return '';
    } catch (error) {
      return describeError(error);
    }
  }

  return {
    items,
    listLoaded,
    followLive,
    applySummary,
    details,
    readiness,
    events,
    verification,
    serverChecks,
    candidates,
    candidatesRefused,
    forms,
    isLoading,
    problemOf,
    timeZoneOf,
    resetForm,
    errorOf,
    loadList,
    loadJob,
    loadReadiness,
    loadEvents,
    verifyRecord,
    loadCandidates,
    createJob,
    updateJob,
    setCrew,
    acting,
    loadActing,
    transferActing,
    saveConfiguration,
    requestOverride,
    approveOverride,
    downloadConfigurationSheet,
  };
});
