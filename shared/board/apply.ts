import type { JobEventDto, JobEventOf } from '../events/log.js';
import type { Plan } from '../schemas/plan.js';
import { readingOutOfLimit } from './readings.js';
import { CHECK_FAILURES_BEFORE_REVIEW, stepsAfter } from './rules.js';
import { shiftOf, withdrawAcknowledgments } from './shifts.js';
import type { BoardHold, BoardStage, BoardState, StageState } from './types.js';

/**
 * The one reducer of a job's board, used by the server (to keep its projection and answer
 * snapshots) and by every client (to apply `board:event`). Pure: the same log gives the same
 * board anywhere. It reads only what events carry; `data.effects` is a summary for people and
 * is recomputed here, never trusted.
 */
export function applyEvent(state: BoardState | null, event: JobEventDto): BoardState {
  if (event.type === 'job.created') return created(event);
  if (!state) throw new Error(`event ${event.seq} (${event.type}) before job.created`);
  if (event.seq !== state.seq + 1) throw new Error(`event ${event.seq} does not follow ${state.seq}`);
  // The stages are most of a board (tens of kilobytes of plan text): an event that never changes
  // a stage shares them with the board before it instead of copying them.
  const next = leavesStages.has(event.type) ? { ...clonePlain({ ...state, stages: [] }), stages: state.stages } : clonePlain(state);
  next.seq = event.seq;
  const by = { userId: event.by.userId, name: event.by.name, role: event.by.role, at: event.at };

  switch (event.type) {
    case 'job.updated': {
      const { changes } = event.data;
      if (changes.name !== undefined) next.job.name = changes.name;
      if (changes.site !== undefined) next.job.site = changes.site;
      if (changes.kind !== undefined) next.job.kind = changes.kind;
      if (changes.timeZone !== undefined) next.job.timeZone = changes.timeZone;
      break;
    }
    case 'crew.set': {
      next.crew = event.data.crew;
      const withdrawn = event.data.withdrawn ?? [];
      if (withdrawn.length) withdrawAcknowledgments(next, withdrawn, `${[...new Set(withdrawn.map((w) => w.name))].join(', ')} left the crew or changed role`, by.at);
      break;
    }
    case 'crew.member.disabled':
      withdrawAcknowledgments(next, event.data.withdrawn, `${event.data.name}’s account was disabled`, by.at);
      break;
    case 'configuration.set':
      next.windLimits = event.data.windLimits ?? null;
      if (event.data.weatherFreshMinutes !== undefined) next.weatherFreshMinutes = event.data.weatherFreshMinutes;
      break;
    case 'job.ready':
      next.job.state = 'ready';
      next.planVersion = event.data.planVersion;
      next.stages = stagesFromPlan(event.data.plan, [], next.windLimits);
      break;
    case 'job.started':
      next.job.state = 'live';
      next.shift = { number: 1, phase: 'working', startedAt: by.at, makeSafe: null, start: null };
      // Whoever starts the job runs it until they hand over; an admin's start names nobody yet.
      next.actingSupervisor = by.role === 'supervisor' ? { userId: by.userId, name: by.name, since: by.at } : null;
      settle(next);
      break;
    case 'briefing.acknowledged': {
      const shift = event.data.shift;
      next.briefed = [
        ...next.briefed.filter((b) => b.userId !== by.userId),
        { userId: by.userId, name: by.name, planVersion: event.data.planVersion, at: by.at, ...(shift !== undefined ? { shift } : {}) },
      ];
      break;
    }
    case 'shift.ending':
      next.shift = {
        ...shiftOf(next),
        phase: 'making_safe',
        makeSafe: {
          begunBy: { userId: by.userId, name: by.name, at: by.at },
          workPhase: event.data.workPhase,
          items: event.data.items.map((item) => ({ ...item, doneBy: null })),
          madeSafe: null,
        },
      };
      break;
    case 'shift.item.done': {
      const makeSafe = next.shift?.makeSafe;
      const item = makeSafe?.items.find((i) => i.id === event.data.itemId);
      if (!makeSafe || !item || !next.shift) throw new Error(`event ${event.seq}: no make-safe item ${event.data.itemId}`);
      item.doneBy = { userId: by.userId, name: by.name, at: by.at, role: event.data.role, note: event.data.note };
      if (makeSafe.items.every((i) => i.doneBy)) {
        // The last item done: nothing works until the next shift's start-of-shift hold is released.
        makeSafe.madeSafe = { userId: by.userId, name: by.name, at: by.at };
        next.shift.phase = 'made_safe';
        next.shift.start = { inspection: null, operator: null, supervisor: null };
        next.job.state = 'made_safe';
        next.job.stop = null;
      }
      break;
    }
    case 'handover.written': {
      const d = event.data;
      next.handovers = [
        ...(next.handovers ?? []),
        { seq: event.seq, shift: d.shift, from: { userId: by.userId, name: by.name }, to: d.to, at: by.at, done: d.done, open: d.open, defects: d.defects, overrides: d.overrides, hazards: d.hazards, note: d.note, acknowledgedBy: null },
      ];
      break;
    }
    case 'handover.acknowledged': {
      const note = next.handovers?.find((h) => h.seq === event.data.handoverSeq);
      if (note) note.acknowledgedBy = { userId: by.userId, name: by.name, at: by.at };
      next.actingSupervisor = { userId: by.userId, name: by.name, since: by.at };
      clearOutgoingSupervisorStart(next);
      break;
    }
    case 'acting.transferred':
      next.actingSupervisor = { ...event.data.to, since: by.at };
      clearOutgoingSupervisorStart(next);
      break;
    case 'shift.inspected': {
      const start = next.shift?.start;
      if (start) start.inspection = { userId: by.userId, name: by.name, at: by.at, note: event.data.note };
      break;
    }
    case 'shift.start.acknowledged': {
      const start = next.shift?.start;
      if (start) start[event.data.role] = { userId: by.userId, name: by.name, at: by.at };
      break;
    }
    case 'shift.started':
      next.job.state = 'live';
      next.shift = { number: event.data.shift, phase: 'working', startedAt: by.at, makeSafe: null, start: null };
      settle(next);
      break;
    case 'step.completed': {
      const step = findStep(next, event.data.stepId);
      step.state = 'done';
      step.doneBy = { ...by, value: event.data.value ?? null, photoId: event.data.photoId ?? null };
      step.outOfLimit = readingOutOfLimit(step.records, step.doneBy.value, next.windLimits);
      settle(next);
      break;
    }
    case 'step.reopened': {
      const stage = findStage(next, event.data.stageId);
      const step = findStep(next, event.data.stepId);
      // Steps that were to come after it are open again too: the order is kept when the work is redone.
      for (const id of [step.id, ...stepsAfter(stage, step.id)]) {
        const s = findStep(next, id);
        s.state = 'open';
        s.doneBy = null;
        s.outOfLimit = null;
      }
      if (stage.state === 'holding' && stage.hold) {
        stage.state = 'active';
        stage.hold.state = 'waiting';
        stage.hold.acknowledgments = [];
      }
      break;
    }
    case 'hold.acknowledged': {
      const hold = holdOf(next, event.data.stageId);
      hold.acknowledgments.push({ role: event.data.role, userId: by.userId, name: by.name, at: by.at, ...(event.data.inspector ? { inspector: true } : {}) });
      if (holdFullyAcknowledged(hold)) hold.state = 'acknowledged';
      break;
    }
    case 'hold.withdrawn': {
      const { stageId, role } = event.data;
      const hold = holdOf(next, stageId);
      hold.acknowledgments = hold.acknowledgments.filter((a) => !(a.role === role && a.userId === by.userId));
      hold.state = 'open';
      break;
    }
    case 'hold.check.failed': {
      const hold = holdOf(next, event.data.stageId);
      hold.checkFailures = [...(hold.checkFailures ?? []), { userId: by.userId, name: by.name, role: by.role, at: by.at, fields: event.data.fields ?? null }];
      hold.failuresSinceReview = (hold.failuresSinceReview ?? 0) + 1;
      hold.checkLocked = hold.failuresSinceReview >= CHECK_FAILURES_BEFORE_REVIEW;
      break;
    }
    case 'hold.check.reviewed': {
      const hold = holdOf(next, event.data.stageId);
      hold.failuresSinceReview = 0;
      hold.checkLocked = false;
      hold.lastReview = { userId: by.userId, name: by.name, at: by.at, note: event.data.note };
      break;
    }
    case 'hold.released': {
      const stage = findStage(next, event.data.stageId);
      const hold = holdOf(next, stage.id);
      hold.state = 'released';
      hold.releasedBy = by;
      stage.state = 'done';
      // The final sign-off ends the job: its board is read-only from here on.
      if (hold.signOff) next.job.state = 'complete';
      settle(next);
      break;
    }
    case 'stage.skipped': {
      const stage = findStage(next, event.data.stageId);
      stage.state = 'skipped';
      stage.skipReason = event.data.reason;
      if (stage.hold) stage.hold.state = 'waived';
      settle(next);
      break;
    }
    case 'job.stopped': {
      const { pressedAt, reason } = event.data;
      if (state.job.state === 'stopped' && next.job.stop) {
        // A second press keeps the first stop and its cause; the press is kept beside it.
        next.job.stop.alsoPressedBy = [...(next.job.stop.alsoPressedBy ?? []), { userId: by.userId, name: by.name, role: by.role, pressedAt, at: by.at }];
        if (!next.job.stop.reason && reason) next.job.stop.reason = reason;
        break;
      }
      next.job.state = 'stopped';
      next.job.stop = { raisedBy: { userId: by.userId, name: by.name, role: by.role }, pressedAt, at: by.at, reason: reason ?? null, alsoPressedBy: [] };
      break;
    }
    case 'job.stop.noted':
      if (next.job.stop) next.job.stop.reason = event.data.reason;
      break;
    case 'job.resumed':
      next.job.state = 'live';
      next.job.lastResume = { by: { userId: by.userId, name: by.name }, at: by.at, reason: event.data.reason };
      next.job.stop = null;
      settle(next);
      break;
    case 'weather.recorded': {
      const { reading, stop } = event.data;
      next.weather = { ...reading, heightM: reading.heightM ?? null, at: by.at, by: { userId: by.userId, name: by.name } };
      if (stop) {
        next.job.state = 'stopped';
        next.job.stop = { raisedBy: { userId: by.userId, name: by.name, role: by.role }, pressedAt: by.at, at: by.at, reason: stop.reason, alsoPressedBy: [] };
      }
      break;
    }
    case 'defect.reported': {
      const { defectId, description, componentId, stageId, photoId } = event.data;
      next.defects.push({ id: defectId, description, componentId, stageId, photoId, at: by.at, by: by.name });
      if (stageId) findStage(next, stageId).blockedBy = { description, at: by.at, by: by.name };
      break;
    }
    case 'plan.revised':
      next.planVersion = event.data.planVersion;
      next.stages = stagesFromPlan(event.data.plan, state.stages, next.windLimits);
      if (next.job.state === 'live' || next.job.state === 'stopped') settle(next);
      break;
    case 'job.completed':
      next.job.state = 'complete';
      break;
    case 'job.cancelled':
      next.job.state = 'cancelled';
      next.job.cancelReason = event.data.reason;
      break;
    case 'override.requested':
    case 'override.approved':
    case 'plan.generated':
    case 'plan.edited':
      // Planning events that do not change the board only advance seq.
      break;
    default: {
      // Every type is handled above (the compiler checks); an event from a newer server only advances seq.
      const unknown: never = event;
      void unknown;
      break;
    }
  }
  return next;
}

/**
 * Event types whose case below changes nothing inside `stages` (a new plan replaces the array
 * whole). tests/shared/board/apply.test.ts applies each to a board whose stages are frozen.
 */
export const leavesStages: ReadonlySet<JobEventDto['type']> = new Set<JobEventDto['type']>([
  'job.updated',
  'configuration.set',
  'job.ready',
  'briefing.acknowledged',
  'shift.ending',
  'shift.item.done',
  'handover.written',
  'handover.acknowledged',
  'acting.transferred',
  'shift.inspected',
  'shift.start.acknowledged',
  'job.stopped',
  'job.stop.noted',
  'weather.recorded',
  'job.completed',
  'job.cancelled',
  'override.requested',
  'override.approved',
  'plan.generated',
  'plan.edited',
]);

/**
 * A deep copy of plain JSON-like data (the board is nothing else), for the reducer to change
 * freely. Several times faster than structuredClone, which also handles types the board never
 * holds: this copy runs for every event on the server and on every screen.
 */
function clonePlain<T>(value: T): T {
  if (Array.isArray(value)) return value.map(clonePlain) as T;
  if (value === null || typeof value !== 'object') return value;
  const copy: Record<string, unknown> = {};
  for (const key of Object.keys(value)) copy[key] = clonePlain((value as Record<string, unknown>)[key]);
  return copy as T;
}

function created(event: JobEventOf<'job.created'>): BoardState {
  const d = event.data;
  return {
    seq: event.seq,
    job: {
      id: event.jobId,
      name: d.job.name,
      site: d.job.site,
      kind: d.job.kind,
      state: 'planning',
      craneFleetNumber: d.craneFleetNumber,
      stop: null,
      lastResume: null,
      cancelReason: null,
      ...(d.job.timeZone ? { timeZone: d.job.timeZone } : {}),
    },
    planVersion: 0,
    stages: [],
    crew: d.crew,
    briefed: [],
    weather: null,
    windLimits: null,
    defects: [],
  };
}

/**
 * Board stages for a plan. For a revision, steps and stages whose id and wording are unchanged
 * keep their progress; everything else starts again. A kept reading is compared again with what
 * the revised step is held to, so a revision that changes the plan's figure settles it. A hold
 * that keeps its id keeps its failed value checks and its lock: only the supervisor's review
 * clears them.
 */
export function stagesFromPlan(plan: Plan, previous: readonly BoardStage[], windLimits: BoardState['windLimits'] = null): BoardStage[] {
  const before = new Map(previous.map((s) => [s.id, s]));
  return plan.stages.map((stage, i): BoardStage => {
    const old = before.get(stage.id);
    const steps = stage.steps.map((step) => {
      const oldStep = old?.steps.find((s) => s.id === step.id && s.text === step.text);
      const doneBy = oldStep?.doneBy ?? null;
      return {
        id: step.id,
        text: step.text,
        state: oldStep?.state ?? 'open',
        allowedRoles: step.allowedRoles,
        requiresPhoto: step.requiresPhoto,
        records: step.records,
        caution: step.caution,
        doneBy,
        required: step.required ?? false,
        after: step.after ?? [],
        outOfLimit: oldStep?.state === 'done' ? readingOutOfLimit(step.records, doneBy?.value ?? null, windLimits) : null,
      };
    });
    const unchangedHold = old?.hold && stage.hold && old.hold.id === stage.hold.id && old.hold.title === stage.hold.title;
    const sameHold = old?.hold && stage.hold && old.hold.id === stage.hold.id ? old.hold : null;
    const finished = old && (old.state === 'done' || old.state === 'skipped') && steps.every((s) => s.state === 'done' || old.state === 'skipped') && (!stage.hold || unchangedHold);
    return {
      id: stage.id,
      order: i + 1,
      title: stage.title,
      summary: stage.summary,
      state: finished ? old.state : 'locked',
      dependsOn: stage.dependsOn,
      cautions: stage.cautions,
      involvesCraneMovement: stage.involvesCraneMovement,
      ...(stage.boom ? { boom: stage.boom } : {}),
      steps,
      hold: stage.hold
        ? {
            id: stage.hold.id,
            state: finished && old.hold ? old.hold.state : 'waiting',
            title: stage.hold.title,
            instruction: stage.hold.instruction,
            mandatory: stage.hold.mandatory,
            requiredRoles: stage.hold.requiredRoles,
            valueCheck: stage.hold.valueCheck ? { fields: stage.hold.valueCheck.fields.map((f) => f.field) } : null,
            ...(stage.hold.signOff ? { signOff: true } : {}),
            acknowledgments: finished && old.hold ? old.hold.acknowledgments : [],
            releasedBy: finished && old.hold ? old.hold.releasedBy : null,
            checkFailures: sameHold?.checkFailures ?? [],
            failuresSinceReview: sameHold?.failuresSinceReview ?? 0,
            checkLocked: sameHold?.checkLocked ?? false,
            lastReview: sameHold?.lastReview ?? null,
          }
        : null,
      skipReason: finished ? old.skipReason : null,
      blockedBy: null,
    };
  });
}

const finishedStates: ReadonlySet<StageState> = new Set(['done', 'skipped']);

/**
 * Moves stages forward as far as the rules allow: a locked stage whose dependencies are all done
 * becomes active; an active stage whose steps are all done opens its hold (holding), or is done
 * when it has none. Repeats until nothing changes, so one release can activate several stages.
 */
export function settle(state: BoardState): void {
  if (state.job.state !== 'live') return;
  const byId = new Map(state.stages.map((s) => [s.id, s]));
  let changed = true;
  while (changed) {
    changed = false;
    for (const stage of state.stages) {
      if (stage.state === 'locked' && stage.dependsOn.every((d) => finishedStates.has(byId.get(d)?.state ?? 'locked'))) {
        stage.state = 'active';
        changed = true;
      }
      if (stage.state === 'active' && stage.steps.every((s) => s.state === 'done')) {
        if (stage.hold) {
          stage.state = 'holding';
          stage.hold.state = 'open';
        } else {
          stage.state = 'done';
        }
        changed = true;
      }
    }
  }
}

/** When the acting role passes, the outgoing supervisor's acknowledgment of the start-of-shift hold no longer counts: the new one gives their own. */
function clearOutgoingSupervisorStart(state: BoardState): void {
  const start = state.shift?.start;
  if (start?.supervisor && start.supervisor.userId !== state.actingSupervisor?.userId) start.supervisor = null;
}

/** Every required role has acknowledged (each slot by another person), and a sign-off's inspector too. */
export function holdFullyAcknowledged(hold: BoardHold): boolean {
  const roles = hold.acknowledgments.filter((a) => !a.inspector);
  return hold.requiredRoles.every((r) => roles.some((a) => a.role === r)) && (!hold.signOff || hold.acknowledgments.some((a) => a.inspector));
}

/** The stage with this id; throws when the board has none (a bug, not a user error). */
export function findStage(state: BoardState, stageId: string): BoardStage {
  const stage = state.stages.find((s) => s.id === stageId);
  if (!stage) throw new Error(`no stage ${stageId}`);
  return stage;
}

/** The hold of a stage; throws when the stage has none (a bug, not a user error). */
function holdOf(state: BoardState, stageId: string): BoardHold {
  const hold = findStage(state, stageId).hold;
  if (!hold) throw new Error(`stage ${stageId} has no hold`);
  return hold;
}

/** The step with this id anywhere on the board. */
export function findStep(state: BoardState, stepId: string) {
  for (const stage of state.stages) {
    const step = stage.steps.find((s) => s.id === stepId);
    if (step) return step;
  }
  throw new Error(`no step ${stepId}`);
}

/** Replays a whole log. */
export function replay(events: readonly JobEventDto[]): BoardState | null {
  return events.reduce<BoardState | null>((state, event) => applyEvent(state, event), null);
}
