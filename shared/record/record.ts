import type { JobEventDto, JobEventOf } from '../events/log.js';
import { describeEvent, namesFromLog, type EventWordsContext } from '../events/sentences.js';
import type { Configuration, Figure } from '../schemas/configuration.js';
import type { Plan } from '../schemas/plan.js';

/**
 * The job's record as a site file shows it, built from the log alone (plus what the caller knows
 * that the log does not: the people's qualifications, the server's figures with their rules, the
 * head hash). Pure: the record PDF, and later any screen, lay this out; nothing here words an
 * event itself: every sentence comes from `describeEvent`.
 */

/** Who did something, in which role, when, and the sentence of the event that recorded it. */
export interface RecordEntry {
  seq: number;
  at: string;
  userId: string;
  name: string;
  role: string;
  sentence: string;
}

export type RecordStatus = 'in_progress' | 'complete' | 'cancelled';

export interface RecordCrewMember {
  userId: string;
  name: string;
  /** Roles on this job, in the order the crew list gives them. */
  roles: string[];
  /** What the person holds, when the caller passed it; null when not known to the record. */
  qualifications: string[] | null;
  /** Marked by the admin as qualified to inspect the crane; null when the caller did not say. */
  mayInspect: boolean | null;
}

export interface RecordFigure {
  key: string;
  label: string;
  value: string;
  status: Figure['status'];
  overridable: boolean;
  /** The rule and its source; null when only the log's copy of the figure was available (it carries no rule). */
  rule: string | null;
  detail: string | null;
}

export interface RecordOverride {
  id: string;
  figureKey: string;
  figureLabel: string;
  figureValue: string;
  reason: string;
  requested: RecordEntry;
  approved: RecordEntry | null;
  /** A later configuration withdrew it (the figure it covered was recomputed). */
  withdrawn: RecordEntry | null;
}

export interface RecordStepEntry extends RecordEntry {
  kind: 'done' | 'reopened';
  value: string | null;
  photoId: string | null;
  /** The reading against its figure or limit, in a sentence; null when within it or not compared. */
  outOfLimit: string | null;
}

export interface RecordStep {
  id: string;
  text: string;
  /** Every completion and reopening, in order. */
  history: RecordStepEntry[];
  /** Done at the end of the log (its last entry is a completion). */
  done: boolean;
}

export interface RecordHoldEntry extends RecordEntry {
  kind: 'acknowledged' | 'withdrawn' | 'check_failed' | 'check_reviewed';
  photoId: string | null;
}

export interface RecordHold {
  id: string;
  title: string;
  mandatory: boolean;
  /** The final sign-off of the job (a hold the plan marks as such). */
  signOff: boolean;
  requiredRoles: string[];
  /** Acknowledgments, withdrawals and failed or reviewed configuration checks, in order. */
  entries: RecordHoldEntry[];
  /** The last release; null while not released. */
  released: RecordEntry | null;
}

export interface RecordStage {
  id: string;
  title: string;
  steps: RecordStep[];
  hold: RecordHold | null;
  skipped: (RecordEntry & { reason: string }) | null;
  /** Still in the plan in force; false for a stage a revision removed after work was recorded in it. */
  inPlan: boolean;
}

export interface RecordStop {
  pressed: RecordEntry & { reason: string | null };
  /** Others who pressed stop while it was stopped, and causes recorded afterwards. */
  alsoPressed: RecordEntry[];
  causes: (RecordEntry & { reason: string })[];
  /** Set on a stop that a weather reading raised. */
  byWeather: boolean;
  resumed: (RecordEntry & { reason: string }) | null;
}

export interface RecordWeather extends RecordEntry {
  meanMs: number;
  gustMs: number;
  heightM: number | null;
  phase: 'assembly' | 'raising';
  limit: { meanMs: number; gustMs: number } | null;
  overLimit: string | null;
  flags: string[];
}

export interface RecordDefect extends RecordEntry {
  defectId: string;
  serial: string | null;
  description: string;
  stageTitle: string | null;
  photoId: string | null;
}

export interface RecordRevision {
  version: number;
  /** The entry that put the version in force: locking the plan (version 1) or a revision. */
  made: RecordEntry;
  reason: string | null;
  /** Who acknowledged the briefing for this version, in order. */
  briefings: RecordEntry[];
}

export interface RecordConfiguration {
  saved: RecordEntry;
  configuration: Configuration;
  figures: RecordFigure[];
  /** Where the figures come from: the server's own computation with rules, or the log's copy. */
  figuresFrom: 'computed' | 'log';
}

export interface JobRecord {
  job: { id: string; name: string; site: string; kind: 'erection' | 'dismantling'; craneFleetNumber: string; crane: string | null };
  status: RecordStatus;
  /** When the job was created, started, and finished (completed or cancelled); null when it has not happened. */
  dates: { created: string | null; started: string | null; finished: string | null; lastEvent: string | null };
  crew: RecordCrewMember[];
  configuration: RecordConfiguration | null;
  overrides: RecordOverride[];
  stages: RecordStage[];
  stops: RecordStop[];
  weather: RecordWeather[];
  defects: RecordDefect[];
  revisions: RecordRevision[];
  /** The hold the plan marks as the job's final sign-off; null when the plan has none. */
  signOff: { stageTitle: string; hold: RecordHold } | null;
  cancelled: (RecordEntry & { reason: string }) | null;
  /** Every event in order, worded. */
  timeline: RecordEntry[];
  /** Photos the record refers to, in order of first mention, each once. */
  photoIds: string[];
  lastSeq: number;
  finalHash: string;
}

/** What the caller knows that the log does not. */
export interface RecordContext {
  /** The head hash of the log the events were read from (the job row's head, checked by the chain). */
  finalHash: string;
  /** The crane unit in words (fleet number and model), when known. */
  crane?: string | null;
  /** The people's qualifications by user id, when the caller has them. */
  qualificationsOf?: Readonly<Record<string, readonly string[]>>;
  /** The user ids of people qualified to inspect the crane, when the caller has them. */
  inspectors?: readonly string[];
  /** The server's figures for the configuration in force, with their rules. */
  figures?: readonly Figure[] | null;
}

/** Builds the record of a job from its whole log, in seq order. */
export function buildRecord(events: readonly JobEventDto[], context: RecordContext): JobRecord {
  const ordered = [...events].sort((a, b) => a.seq - b.seq);
  const names = namesFromLog(ordered);
  const overrideLabels: { id: string; figureLabel: string }[] = [];
  const crewNames: { userId: string; name: string }[] = [];
  const words: EventWordsContext = { names, crew: crewNames, overrides: overrideLabels };

  const entryOf = (e: JobEventDto): RecordEntry => ({ seq: e.seq, at: e.at, userId: e.by.userId, name: e.by.name, role: e.by.role, sentence: describeEvent(e, words) });

  let created: JobEventOf<'job.created'> | null = null;
  let crew: { userId: string; name: string; role: string }[] = [];
  let configuration: RecordConfiguration | null = null;
  const overrides = new Map<string, RecordOverride>();
  let name: string | null = null;
  let site = '';
  let kind: JobRecord['job']['kind'] | null = null;
  const stages = new Map<string, RecordStage>();
  const stops: RecordStop[] = [];
  const weather: RecordWeather[] = [];
  const defects: RecordDefect[] = [];
  const revisions: RecordRevision[] = [];
  const timeline: RecordEntry[] = [];
  const photoIds: string[] = [];
  let status: RecordStatus = 'in_progress';
  let started: string | null = null;
  let finished: string | null = null;
  let cancelled: JobRecord['cancelled'] = null;

  const photo = (id: string | null) => {
    if (id && !photoIds.includes(id)) photoIds.push(id);
  };
  const stageTitleOf = (stageId: string) => names.stages.find((s) => s.id === stageId)?.title ?? 'A stage no longer in the plan';
  const stageOf = (stageId: string): RecordStage => {
    let stage = stages.get(stageId);
    if (!stage) {
      stage = { id: stageId, title: stageTitleOf(stageId), steps: [], hold: null, skipped: null, inPlan: false };
      stages.set(stageId, stage);
    }
    return stage;
  };
  const stepOf = (stageId: string, stepId: string): RecordStep => {
    const stage = stageOf(stageId);
    let step = stage.steps.find((s) => s.id === stepId);
    if (!step) {
      const text = names.stages.flatMap((s) => s.steps).find((s) => s.id === stepId)?.text ?? 'A step no longer in the plan';
      step = { id: stepId, text, history: [], done: false };
      stage.steps.push(step);
    }
    return step;
  };
  const holdOf = (stageId: string, holdId: string): RecordHold => {
    const stage = stageOf(stageId);
    if (!stage.hold || stage.hold.id !== holdId) {
      const title = names.stages.find((s) => s.hold?.id === holdId)?.hold?.title ?? 'A hold point no longer in the plan';
      // A hold a revision replaced keeps its entries under the stage; the new one starts empty.
      stage.hold = { id: holdId, title, mandatory: false, signOff: false, requiredRoles: [], entries: [], released: null };
    }
    return stage.hold;
  };
  /** Lays out the plan now in force, keeping what was recorded against stages and steps it still has. */
  const putPlanInForce = (plan: Plan) => {
    const before = new Map(stages);
    stages.clear();
    for (const s of plan.stages) {
      const old = before.get(s.id);
      before.delete(s.id);
      const steps = s.steps.map((p) => {
        const kept = old?.steps.find((o) => o.id === p.id);
        return { id: p.id, text: p.text, history: kept?.history ?? [], done: kept?.done ?? false };
      });
      // Steps recorded earlier but since removed stay visible, after the plan's own.
      for (const o of old?.steps ?? []) if (o.history.length && !steps.some((p) => p.id === o.id)) steps.push(o);
      const keptHold = old?.hold && s.hold && old.hold.id === s.hold.id ? old.hold : null;
      const hold: RecordHold | null = s.hold
        ? { id: s.hold.id, title: s.hold.title, mandatory: s.hold.mandatory, signOff: s.hold.signOff === true, requiredRoles: [...s.hold.requiredRoles], entries: keptHold?.entries ?? [], released: keptHold?.released ?? null }
        : null;
      stages.set(s.id, { id: s.id, title: s.title, steps, hold, skipped: old?.skipped ?? null, inPlan: true });
    }
    // Stages a revision removed after work was recorded in them stay in the record, marked.
    for (const [id, old] of before) if (old.steps.some((s) => s.history.length) || old.hold?.entries.length || old.skipped) stages.set(id, { ...old, inPlan: false });
  };

  for (const e of ordered) {
    const entry = entryOf(e);
    timeline.push(entry);
    const state = e.data.effects?.job?.state;
    if (state === 'complete' || state === 'cancelled') {
      status = state;
      finished ??= e.at;
    }
    switch (e.type) {
      case 'job.created':
        created = e;
        ({ name, site, kind } = e.data.job);
        crew = e.data.crew;
        for (const m of crew) if (!crewNames.some((c) => c.userId === m.userId)) crewNames.push({ userId: m.userId, name: m.name });
        break;
      case 'job.updated':
        name = e.data.changes.name ?? name;
        site = e.data.changes.site ?? site;
        kind = e.data.changes.kind ?? kind;
        break;
      case 'crew.set':
        crew = e.data.crew;
        for (const m of crew) if (!crewNames.some((c) => c.userId === m.userId)) crewNames.push({ userId: m.userId, name: m.name });
        break;
      case 'configuration.set': {
        for (const w of e.data.overridesWithdrawn) {
          const o = overrides.get(w.id);
          if (o) o.withdrawn = entry;
        }
        const logFigures: RecordFigure[] = e.data.figures.map((f) => ({ key: f.key, label: f.key, value: f.value, status: f.status, overridable: f.overridable, rule: null, detail: null }));
        configuration = { saved: entry, configuration: e.data.configuration, figures: logFigures, figuresFrom: 'log' };
        break;
      }
      case 'override.requested': {
        const o = e.data.override;
        overrideLabels.push({ id: o.id, figureLabel: o.figureLabel });
        overrides.set(o.id, { id: o.id, figureKey: o.figureKey, figureLabel: o.figureLabel, figureValue: o.figureValue, reason: o.reason, requested: entryOf(e), approved: null, withdrawn: null });
        break;
      }
      case 'override.approved': {
        const o = overrides.get(e.data.overrideId);
        if (o) o.approved = entryOf(e);
        break;
      }
      case 'job.ready':
        putPlanInForce(e.data.plan);
        kind = e.data.plan.kind;
        revisions.push({ version: e.data.planVersion, made: entry, reason: null, briefings: [] });
        break;
      case 'plan.revised':
        putPlanInForce(e.data.plan);
        kind = e.data.plan.kind;
        revisions.push({ version: e.data.planVersion, made: entry, reason: e.data.reason, briefings: [] });
        break;
      case 'job.started':
        started ??= e.at;
        break;
      case 'briefing.acknowledged':
        revisions.find((r) => r.version === e.data.planVersion)?.briefings.push(entry);
        break;
      case 'step.completed': {
        const step = stepOf(e.data.stageId, e.data.stepId);
        step.history.push({ ...entry, kind: 'done', value: e.data.value, photoId: e.data.photoId, outOfLimit: e.data.outOfLimit?.reason ?? null });
        step.done = true;
        photo(e.data.photoId);
        break;
      }
      case 'step.reopened': {
        const stage = stageOf(e.data.stageId);
        const reopened = [e.data.stepId, ...(e.data.alsoReopened ?? [])];
        for (const id of reopened) {
          const step = id === e.data.stepId ? stepOf(e.data.stageId, id) : stage.steps.find((s) => s.id === id);
          if (!step) continue;
          step.history.push({ ...entry, kind: 'reopened', value: null, photoId: null, outOfLimit: null });
          step.done = false;
        }
        break;
      }
      case 'hold.acknowledged':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, role: e.data.role, kind: 'acknowledged', photoId: e.data.photoId });
        photo(e.data.photoId);
        break;
      case 'hold.withdrawn':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, role: e.data.role, kind: 'withdrawn', photoId: null });
        break;
      case 'hold.check.failed':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, role: e.data.role, kind: 'check_failed', photoId: e.data.photoId });
        photo(e.data.photoId);
        break;
      case 'hold.check.reviewed':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, kind: 'check_reviewed', photoId: null });
        break;
      case 'hold.released':
        holdOf(e.data.stageId, e.data.holdId).released = entry;
        break;
      case 'stage.skipped':
        stageOf(e.data.stageId).skipped = { ...entry, reason: e.data.reason };
        break;
      case 'job.stopped': {
        const open = stops.at(-1);
        if (e.data.alreadyStopped && open && !open.resumed) open.alsoPressed.push(entry);
        else stops.push({ pressed: { ...entry, reason: e.data.reason }, alsoPressed: [], causes: [], byWeather: false, resumed: null });
        break;
      }
      case 'job.stop.noted': {
        const open = stops.at(-1);
        if (open) open.causes.push({ ...entry, reason: e.data.reason });
        break;
      }
      case 'job.resumed': {
        const open = stops.at(-1);
        if (open && !open.resumed) open.resumed = { ...entry, reason: e.data.reason };
        break;
      }
      case 'weather.recorded': {
        const { reading } = e.data;
        const flags = [reading.lightning ? 'lightning' : '', reading.ice ? 'ice' : '', reading.poorVisibility ? 'poor visibility' : ''].filter(Boolean);
        weather.push({ ...entry, meanMs: reading.meanMs, gustMs: reading.gustMs, heightM: reading.heightM ?? null, phase: e.data.phase, limit: e.data.limit, overLimit: e.data.overLimit, flags });
        if (e.data.stop) stops.push({ pressed: { ...entry, reason: e.data.stop.reason }, alsoPressed: [], causes: [], byWeather: true, resumed: null });
        break;
      }
      case 'defect.reported':
        defects.push({ ...entry, defectId: e.data.defectId, serial: e.data.serial, description: e.data.description, stageTitle: e.data.stageId ? stageTitleOf(e.data.stageId) : null, photoId: e.data.photoId });
        photo(e.data.photoId);
        break;
      case 'job.completed':
        status = 'complete';
        finished ??= e.at;
        break;
      case 'job.cancelled':
        status = 'cancelled';
        finished ??= e.at;
        cancelled = { ...entry, reason: e.data.reason };
        break;
      default:
        break;
    }
  }

  if (configuration && context.figures?.length) {
    const saved: RecordConfiguration = configuration;
    saved.figures = context.figures.map((f) => ({ key: f.key, label: f.label, value: f.value, status: f.status, overridable: f.overridable, rule: f.rule, detail: f.detail ?? null }));
    saved.figuresFrom = 'computed';
  }

  const crewList: RecordCrewMember[] = [];
  for (const m of crew) {
    const known = crewList.find((c) => c.userId === m.userId);
    if (known) {
      if (!known.roles.includes(m.role)) known.roles.push(m.role);
      continue;
    }
    const quals = context.qualificationsOf?.[m.userId];
    crewList.push({ userId: m.userId, name: m.name, roles: [m.role], qualifications: quals ? [...quals] : null, mayInspect: context.inspectors ? context.inspectors.includes(m.userId) : null });
  }

  const stageList = [...stages.values()];
  const signOffStage = stageList.find((s) => s.inPlan && s.hold?.signOff);
  return {
    job: {
      id: ordered[0]?.jobId ?? '',
      name: name ?? 'Job name not in the log',
      site,
      kind: kind ?? 'erection',
      craneFleetNumber: created?.data.craneFleetNumber ?? '',
      crane: context.crane ?? null,
    },
    status,
    dates: { created: ordered[0]?.at ?? null, started, finished, lastEvent: ordered.at(-1)?.at ?? null },
    crew: crewList,
    configuration,
    overrides: [...overrides.values()],
    stages: stageList,
    stops,
    weather,
    defects,
    revisions,
    signOff: signOffStage?.hold ? { stageTitle: signOffStage.title, hold: signOffStage.hold } : null,
    cancelled,
    timeline,
    photoIds,
    lastSeq: ordered.at(-1)?.seq ?? 0,
    finalHash: context.finalHash,
  };
}
