import { applyEvent } from '../board/apply.js';
import { SHIFT_START_HOLD_ID } from '../board/shifts.js';
import type { BoardState } from '../board/types.js';
import type { JobEventDto, JobEventOf, Withdrawn } from '../events/log.js';
import { describeEvent, namesFromLog, type EventWordsContext } from '../events/sentences.js';
import { workPhaseWords, type WorkPhase } from '../plan/templates/shift.js';
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
  /**
   * `taken_back`: the acknowledgment left with its author (removed from the crew, or their
   * account disabled); the entry names that person and role, its sentence is the crew change's.
   */
  kind: 'acknowledged' | 'withdrawn' | 'check_failed' | 'check_reviewed' | 'taken_back';
  photoId: string | null;
  /** An acknowledgment as the qualified inspector of the final sign-off, or its taking back. */
  inspector: boolean;
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

/** One signature of a start-of-shift hold: the shift inspection (with its note) or an acknowledgment. */
export interface RecordShiftSignature extends RecordEntry {
  kind: 'inspection' | 'operator' | 'supervisor';
  /** What the inspection found; null for an acknowledgment. */
  note: string | null;
  /** The crew change or disabled account that took it back; null while it stands. */
  takenBack: RecordEntry | null;
}

/** One make-safe item as the shift's end listed it, and who ticked it. */
export interface RecordMakeSafeItem {
  id: string;
  text: string;
  roles: string[];
  asksNote: boolean;
  done: (RecordEntry & { note: string | null }) | null;
}

/** A handover note in full, with who acknowledged it. */
export interface RecordHandover {
  written: RecordEntry;
  /** The shift number the note carries. */
  shift: number;
  /** The supervisor it was meant for, when one was named. */
  to: { userId: string; name: string } | null;
  done: string[];
  open: string[];
  defects: string[];
  overrides: string[];
  hazards: string;
  note: string;
  /** The incoming supervisor's acknowledgment (they became the acting supervisor by it); null while unread. */
  acknowledged: RecordEntry | null;
}

/** How one shift began and ended. */
export interface RecordShift {
  number: number;
  /** What began it: the job's start (shift 1) or the release of its start-of-shift hold; null while not begun. */
  started: RecordEntry | null;
  /** The start-of-shift hold's inspection and acknowledgments in order, taken-back ones kept (none for the first shift). */
  startHold: RecordShiftSignature[];
  /** Who acknowledged the briefing for this shift, with the plan version, in order. */
  briefed: (RecordEntry & { planVersion: number })[];
  /** The end of the shift: who ended it, the make-safe checklist, when the job was made safe; null while working. */
  end: {
    ended: RecordEntry;
    workPhase: string;
    /** The phase in words (shared/plan/templates/shift.ts); the phase id itself when the templates do not know it. */
    workPhaseWords: string;
    items: RecordMakeSafeItem[];
    /** The entry of the last item, which made the job safe; null while items are open. */
    madeSafe: RecordEntry | null;
  } | null;
  /** Handover notes written from this shift's start until the next one began, in order. */
  handovers: RecordHandover[];
}

/** A change of the acting supervisor: at the job's start, by a handover, or by an administrator. */
export interface RecordActingChange {
  entry: RecordEntry;
  how: 'job_start' | 'handover' | 'admin_transfer';
  from: { userId: string; name: string } | null;
  to: { userId: string; name: string };
  /** The administrator's reason; null for the other ways. */
  reason: string | null;
}

/** An acknowledgment a crew change or a disabled account took back. */
export interface RecordTakenBack {
  userId: string;
  name: string;
  /** The crew role, or `inspector`. */
  role: string;
  /** The hold's title, or "the start-of-shift hold". */
  hold: string;
}

/** A crew change after the job started, or a disabled account, with the acknowledgments that left with it. */
export interface RecordCrewChange {
  entry: RecordEntry;
  kind: 'crew_changed' | 'account_disabled';
  added: { userId: string; name: string; role: string }[];
  removed: { userId: string; name: string; role: string }[];
  /** The person whose account was disabled; null for a crew change. */
  disabled: { userId: string; name: string } | null;
  takenBack: RecordTakenBack[];
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
  /** The site's IANA time zone: the job's own (job.created, job.updated), else the caller's default. */
  timeZone: string;
  /** Whether the zone is the job's own or the caller's default (a job from before site time). */
  timeZoneFrom: 'job' | 'default';
  /**
   * Every shift in order: how it began and ended, its handover notes; a shift appears with the first
   * thing recorded for it (its briefing may come before the job's start), and a made-safe job's
   * next shift is listed, not begun.
   */
  shifts: RecordShift[];
  /** Every handover note in order (also under their shifts). */
  handovers: RecordHandover[];
  /** Who was acting supervisor when, and how the role passed. */
  actingChanges: RecordActingChange[];
  /** Crew changes after the job started and disabled accounts, with the acknowledgments taken back. */
  crewChanges: RecordCrewChange[];
  /** Where the shifts stand at the end of the log, as the board's reducer has it; null before the job started. */
  shiftNow: { number: number; phase: 'working' | 'making_safe' | 'made_safe' } | null;
  /** The acting supervisor at the end of the log, as the board's reducer has it. */
  actingSupervisor: { userId: string; name: string; since: string } | null;
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
  /** The zone of a job whose log names none (jobs from before site time): the server's. */
  defaultTimeZone: string;
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
  let timeZone: string | null = null;
  const shifts: RecordShift[] = [];
  const handovers: RecordHandover[] = [];
  const actingChanges: RecordActingChange[] = [];
  const crewChanges: RecordCrewChange[] = [];
  // The board's own reducer runs beside the record, so the acting supervisor and the shift are
  // what every screen showed, never worked out a second time here. A log the reducer cannot
  // follow (a hand-made one) still gives its record; only those two are then left unknown.
  let board: BoardState | null = null;
  let boardFollows = true;

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
  const shiftNumbered = (n: number): RecordShift => {
    let shift = shifts.find((s) => s.number === n);
    if (!shift) {
      shift = { number: n, started: null, startHold: [], briefed: [], end: null, handovers: [] };
      shifts.push(shift);
      shifts.sort((a, b) => a.number - b.number);
    }
    return shift;
  };
  /** The shift a handover note was written in: the last one begun, in the log's order. */
  const shiftBegunLast = () => shifts.filter((s) => s.started).sort((a, b) => a.started!.seq - b.started!.seq).at(-1) ?? null;
  /** The shift whose make-safe checklist an item belongs to: the last one ended. */
  const shiftEndedLast = () => shifts.filter((s) => s.end).sort((a, b) => a.end!.ended.seq - b.end!.ended.seq).at(-1) ?? null;
  const holdWords = (w: Withdrawn) => (w.holdId === SHIFT_START_HOLD_ID ? 'the start-of-shift hold' : (names.stages.find((s) => s.hold?.id === w.holdId)?.hold?.title ?? 'a hold point no longer in the plan'));
  /** Puts acknowledgments a crew change or a disabled account took back on their holds, and lists them. */
  const takeBack = (withdrawn: readonly Withdrawn[], entry: RecordEntry): RecordTakenBack[] =>
    withdrawn.map((w) => {
      if (w.holdId === SHIFT_START_HOLD_ID) {
        const kind = w.role === 'inspector' ? 'inspection' : w.role;
        const signature = shifts
          .filter((s) => !s.started)
          .flatMap((s) => s.startHold)
          .filter((g) => g.userId === w.userId && g.kind === kind && !g.takenBack)
          .at(-1);
        if (signature) signature.takenBack = entry;
      } else if (w.stageId) {
        holdOf(w.stageId, w.holdId).entries.push({ ...entry, userId: w.userId, name: w.name, role: w.role, kind: 'taken_back', photoId: null, inspector: w.role === 'inspector' });
      }
      return { userId: w.userId, name: w.name, role: w.role, hold: holdWords(w) };
    });

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
    const actingBefore = board?.actingSupervisor ?? null;
    if (boardFollows) {
      try {
        board = applyEvent(board, e);
      } catch {
        boardFollows = false;
        board = null;
      }
    }
    const actingAfter = board?.actingSupervisor ?? null;
    if (actingAfter && (e.type === 'job.started' || e.type === 'handover.acknowledged' || e.type === 'acting.transferred')) {
      actingChanges.push({
        entry,
        how: e.type === 'job.started' ? 'job_start' : e.type === 'handover.acknowledged' ? 'handover' : 'admin_transfer',
        from: actingBefore ? { userId: actingBefore.userId, name: actingBefore.name } : null,
        to: { userId: actingAfter.userId, name: actingAfter.name },
        reason: e.type === 'acting.transferred' ? e.data.reason : null,
      });
    }
    const state = e.data.effects?.job?.state;
    if (state === 'complete' || state === 'cancelled') {
      status = state;
      finished ??= e.at;
    }
    switch (e.type) {
      case 'job.created':
        created = e;
        ({ name, site, kind } = e.data.job);
        timeZone = e.data.job.timeZone ?? timeZone;
        crew = e.data.crew;
        for (const m of crew) if (!crewNames.some((c) => c.userId === m.userId)) crewNames.push({ userId: m.userId, name: m.name });
        break;
      case 'job.updated':
        name = e.data.changes.name ?? name;
        site = e.data.changes.site ?? site;
        kind = e.data.changes.kind ?? kind;
        timeZone = e.data.changes.timeZone ?? timeZone;
        break;
      case 'crew.set': {
        const before = crew;
        crew = e.data.crew;
        for (const m of crew) if (!crewNames.some((c) => c.userId === m.userId)) crewNames.push({ userId: m.userId, name: m.name });
        const withdrawn = e.data.withdrawn ?? [];
        // Planning sets the crew many times; the record lists the changes made once the job was under way.
        if (started || withdrawn.length) {
          const nameOf = (userId: string) => crew.find((m) => m.userId === userId)?.name ?? before.find((m) => m.userId === userId)?.name ?? crewNames.find((m) => m.userId === userId)?.name ?? 'someone no longer in the crew';
          crewChanges.push({
            entry,
            kind: 'crew_changed',
            added: e.data.added.map((m) => ({ userId: m.userId, name: nameOf(m.userId), role: m.role })),
            removed: e.data.removed.map((m) => ({ userId: m.userId, name: nameOf(m.userId), role: m.role })),
            disabled: null,
            takenBack: takeBack(withdrawn, entry),
          });
        }
        break;
      }
      case 'crew.member.disabled':
        crewChanges.push({ entry, kind: 'account_disabled', added: [], removed: [], disabled: { userId: e.data.userId, name: e.data.name }, takenBack: takeBack(e.data.withdrawn, entry) });
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
        shiftNumbered(1).started ??= entry;
        break;
      case 'briefing.acknowledged':
        revisions.find((r) => r.version === e.data.planVersion)?.briefings.push(entry);
        // A briefing from before shifts were recorded was for the first shift.
        shiftNumbered(e.data.shift ?? 1).briefed.push({ ...entry, planVersion: e.data.planVersion });
        break;
      case 'shift.ending': {
        const phase = e.data.workPhase;
        shiftNumbered(e.data.shift).end = {
          ended: entry,
          workPhase: phase,
          workPhaseWords: Object.hasOwn(workPhaseWords, phase) ? workPhaseWords[phase as WorkPhase] : phase,
          items: e.data.items.map((i) => ({ id: i.id, text: i.text, roles: [...i.roles], asksNote: i.asksNote, done: null })),
          madeSafe: null,
        };
        break;
      }
      case 'shift.item.done': {
        const end = shiftEndedLast()?.end;
        const item = end?.items.find((i) => i.id === e.data.itemId);
        if (item) item.done = { ...entry, role: e.data.role, note: e.data.note };
        if (end && e.data.madeSafe) end.madeSafe = entry;
        break;
      }
      case 'handover.written': {
        const d = e.data;
        const note: RecordHandover = { written: entry, shift: d.shift, to: d.to, done: [...d.done], open: [...d.open], defects: [...d.defects], overrides: [...d.overrides], hazards: d.hazards, note: d.note, acknowledged: null };
        handovers.push(note);
        (shiftBegunLast() ?? shiftNumbered(d.shift)).handovers.push(note);
        break;
      }
      case 'handover.acknowledged': {
        const note = handovers.find((h) => h.written.seq === e.data.handoverSeq);
        if (note) note.acknowledged = entry;
        break;
      }
      case 'shift.inspected':
        shiftNumbered(e.data.shift).startHold.push({ ...entry, kind: 'inspection', note: e.data.note, takenBack: null });
        break;
      case 'shift.start.acknowledged':
        shiftNumbered(e.data.shift).startHold.push({ ...entry, role: e.data.role, kind: e.data.role, note: null, takenBack: null });
        break;
      case 'shift.started':
        shiftNumbered(e.data.shift).started = entry;
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
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, role: e.data.role, kind: 'acknowledged', photoId: e.data.photoId, inspector: e.data.inspector === true });
        photo(e.data.photoId);
        break;
      case 'hold.withdrawn':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, role: e.data.role, kind: 'withdrawn', photoId: null, inspector: false });
        break;
      case 'hold.check.failed':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, role: e.data.role, kind: 'check_failed', photoId: e.data.photoId, inspector: false });
        photo(e.data.photoId);
        break;
      case 'hold.check.reviewed':
        holdOf(e.data.stageId, e.data.holdId).entries.push({ ...entry, kind: 'check_reviewed', photoId: null, inspector: false });
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

  // A made-safe job waits for its next shift: listed, not begun, even before anyone has signed for it.
  if (board?.shift?.phase === 'made_safe') shiftNumbered(board.shift.number + 1);

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
    timeZone: timeZone ?? context.defaultTimeZone,
    timeZoneFrom: timeZone ? 'job' : 'default',
    shifts,
    handovers,
    actingChanges,
    crewChanges,
    shiftNow: board?.shift ? { number: board.shift.number, phase: board.shift.phase } : null,
    actingSupervisor: board?.actingSupervisor ?? null,
    timeline,
    photoIds,
    lastSeq: ordered.at(-1)?.seq ?? 0,
    finalHash: context.finalHash,
  };
}
