import type { JobEventDto } from '../schemas/jobs.js';
import type { Plan, ValueCheckField } from '../schemas/plan.js';
import { readingOutOfLimit } from './readings.js';
import { CHECK_FAILURES_BEFORE_REVIEW, stepsAfter } from './rules.js';
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
  const next: BoardState = structuredClone(state);
  next.seq = event.seq;
  const d = event.data as Record<string, unknown>;
  const by = { userId: event.by.userId, name: event.by.name, role: event.by.role, at: event.at };

  switch (event.type) {
    case 'job.updated': {
      const changes = d.changes as { name?: string; site?: string; kind?: BoardState['job']['kind'] };
      if (changes.name !== undefined) next.job.name = changes.name;
      if (changes.site !== undefined) next.job.site = changes.site;
      if (changes.kind !== undefined) next.job.kind = changes.kind;
      break;
    }
    case 'crew.set':
      next.crew = d.crew as BoardState['crew'];
      break;
    case 'configuration.set':
      next.windLimits = (d.windLimits as BoardState['windLimits']) ?? null;
      if (typeof d.weatherFreshMinutes === 'number') next.weatherFreshMinutes = d.weatherFreshMinutes;
      break;
    case 'job.ready':
      next.job.state = 'ready';
      next.planVersion = d.planVersion as number;
      next.stages = stagesFromPlan(d.plan as Plan, [], next.windLimits);
      break;
    case 'job.started':
      next.job.state = 'live';
      settle(next);
      break;
    case 'briefing.acknowledged':
      next.briefed = [...next.briefed.filter((b) => b.userId !== by.userId), { userId: by.userId, name: by.name, planVersion: d.planVersion as number, at: by.at }];
      break;
    case 'step.completed': {
      const step = findStep(next, d.stepId as string);
      step.state = 'done';
      step.doneBy = { ...by, value: (d.value as string | null) ?? null, photoId: (d.photoId as string | null) ?? null };
      step.outOfLimit = readingOutOfLimit(step.records, step.doneBy.value, next.windLimits);
      settle(next);
      break;
    }
    case 'step.reopened': {
      const stage = findStage(next, d.stageId as string);
      const step = findStep(next, d.stepId as string);
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
      const hold = findStage(next, d.stageId as string).hold!;
      hold.acknowledgments.push({ role: d.role as BoardState['crew'][number]['role'], userId: by.userId, name: by.name, at: by.at });
      if (hold.requiredRoles.every((r) => hold.acknowledgments.some((a) => a.role === r))) hold.state = 'acknowledged';
      break;
    }
    case 'hold.withdrawn': {
      const hold = findStage(next, d.stageId as string).hold!;
      hold.acknowledgments = hold.acknowledgments.filter((a) => !(a.role === d.role && a.userId === by.userId));
      hold.state = 'open';
      break;
    }
    case 'hold.check.failed': {
      const hold = holdOf(next, d.stageId as string);
      hold.checkFailures = [...(hold.checkFailures ?? []), { userId: by.userId, name: by.name, role: by.role, at: by.at, fields: (d.fields as ValueCheckField[] | null | undefined) ?? null }];
      hold.failuresSinceReview = (hold.failuresSinceReview ?? 0) + 1;
      hold.checkLocked = hold.failuresSinceReview >= CHECK_FAILURES_BEFORE_REVIEW;
      break;
    }
    case 'hold.check.reviewed': {
      const hold = holdOf(next, d.stageId as string);
      hold.failuresSinceReview = 0;
      hold.checkLocked = false;
      hold.lastReview = { userId: by.userId, name: by.name, at: by.at, note: d.note as string };
      break;
    }
    case 'hold.released': {
      const stage = findStage(next, d.stageId as string);
      stage.hold!.state = 'released';
      stage.hold!.releasedBy = by;
      stage.state = 'done';
      settle(next);
      break;
    }
    case 'stage.skipped': {
      const stage = findStage(next, d.stageId as string);
      stage.state = 'skipped';
      stage.skipReason = d.reason as string;
      if (stage.hold) stage.hold.state = 'waived';
      settle(next);
      break;
    }
    case 'job.stopped':
      if (state.job.state === 'stopped' && next.job.stop) {
        // A second press keeps the first stop and its cause; the press is kept beside it.
        next.job.stop.alsoPressedBy = [...(next.job.stop.alsoPressedBy ?? []), { userId: by.userId, name: by.name, role: by.role, pressedAt: d.pressedAt as string, at: by.at }];
        if (!next.job.stop.reason && d.reason) next.job.stop.reason = d.reason as string;
        break;
      }
      next.job.state = 'stopped';
      next.job.stop = { raisedBy: { userId: by.userId, name: by.name, role: by.role }, pressedAt: d.pressedAt as string, at: by.at, reason: (d.reason as string | null) ?? null, alsoPressedBy: [] };
      break;
    case 'job.stop.noted':
      if (next.job.stop) next.job.stop.reason = d.reason as string;
      break;
    case 'job.resumed':
      next.job.state = 'live';
      next.job.lastResume = { by: { userId: by.userId, name: by.name }, at: by.at, reason: d.reason as string };
      next.job.stop = null;
      settle(next);
      break;
    case 'weather.recorded': {
      const r = d.reading as { meanMs: number; gustMs: number; lightning: boolean; poorVisibility: boolean; ice: boolean; heightM?: number | null };
      next.weather = { ...r, heightM: r.heightM ?? null, at: by.at, by: { userId: by.userId, name: by.name } };
      const stop = d.stop as { reason: string } | null;
      if (stop) {
        next.job.state = 'stopped';
        next.job.stop = { raisedBy: { userId: by.userId, name: by.name, role: by.role }, pressedAt: by.at, at: by.at, reason: stop.reason, alsoPressedBy: [] };
      }
      break;
    }
    case 'defect.reported': {
      next.defects.push({
        id: d.defectId as string,
        description: d.description as string,
        componentId: (d.componentId as string | null) ?? null,
        stageId: (d.stageId as string | null) ?? null,
        photoId: (d.photoId as string | null) ?? null,
        at: by.at,
        by: by.name,
      });
      if (d.stageId) findStage(next, d.stageId as string).blockedBy = { description: d.description as string, at: by.at, by: by.name };
      break;
    }
    case 'plan.revised':
      next.planVersion = d.planVersion as number;
      next.stages = stagesFromPlan(d.plan as Plan, state.stages, next.windLimits);
      if (next.job.state === 'live' || next.job.state === 'stopped') settle(next);
      break;
    case 'job.completed':
      next.job.state = 'complete';
      break;
    case 'job.cancelled':
      next.job.state = 'cancelled';
      next.job.cancelReason = d.reason as string;
      break;
    default:
      // Planning events that do not change the board (overrides, plan drafts) only advance seq.
      break;
  }
  return next;
}

function created(event: JobEventDto): BoardState {
  const d = event.data as { job: { name: string; site: string; kind: BoardState['job']['kind'] }; craneFleetNumber: string; crew: BoardState['crew'] };
  return {
    seq: event.seq,
    job: { id: event.jobId, name: d.job.name, site: d.job.site, kind: d.job.kind, state: 'planning', craneFleetNumber: d.craneFleetNumber, stop: null, lastResume: null, cancelReason: null },
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
