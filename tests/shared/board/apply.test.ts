import { describe, expect, it } from 'vitest';
import type { JobEventType } from '../../../shared/events/log.js';
import { applyEvent, leavesStages, replay, settle, stagesFromPlan } from '../../../shared/board/apply.js';
import type { BoardStage, BoardState } from '../../../shared/board/types.js';
import type { Plan } from '../../../shared/schemas/plan.js';
import { event, eventLog, JOB_ID, minutes, people, type TestData, type Who } from './events.js';
import { smallPlan, testWindLimits } from './board-plan.js';

/**
 * The board reducer on its own: what each event type does to the board, the seq guards, how
 * stages move forward (`settle`) and how a revision keeps or restarts progress (`stagesFromPlan`).
 * The readings compared here are held to invented plan figures (board-plan.ts); the comparison
 * itself has its own tests (readingOutOfLimit in the readings test file).
 */

const crew: BoardState['crew'] = [
  { userId: people.sue.userId, name: people.sue.name, role: 'supervisor' },
  { userId: people.otto.userId, name: people.otto.name, role: 'operator' },
  { userId: people.rita.userId, name: people.rita.name, role: 'rigger' },
  { userId: people.sam.userId, name: people.sam.name, role: 'signaller' },
];

/** A job made ready with the small plan and started; the log continues from there. */
function liveJob(plan: Plan = smallPlan()) {
  const log = eventLog();
  log.next('job.created', { job: { name: 'North bay erection', site: 'Yard 4', kind: 'erection', state: 'planning' }, craneFleetNumber: 'CR-07', crew: [crew[0]] });
  log.next('crew.set', { crew });
  log.next('configuration.set', { windLimits: testWindLimits, weatherFreshMinutes: 10 });
  log.next('job.ready', { state: 'ready', planVersion: 1, plan });
  log.next('job.started', {});
  let state = replay(log.events)!;
  /** Appends an event to the log and applies it to the board. */
  const apply = <T extends JobEventType>(type: T, data: TestData<T>, opts?: { by?: Who; at?: string }) => {
    // The reducer shares the stages with the board before for these types: they get frozen stages,
    // so a case that changed one would throw here (ES modules run in strict mode).
    if (leavesStages.has(type)) deepFreeze(state.stages);
    state = applyEvent(state, log.next(type, data, opts));
    return state;
  };
  return { log, apply, get state() { return state; } };
}

function deepFreeze<T>(value: T): T {
  if (value !== null && typeof value === 'object' && !Object.isFrozen(value)) {
    Object.freeze(value);
    for (const item of Object.values(value)) deepFreeze(item);
  }
  return value;
}

const stateOf = (state: BoardState, id: string) => stageOf(state, id).state;
function stageOf(state: BoardState, id: string): BoardStage {
  const stage = state.stages.find((s) => s.id === id);
  if (!stage) throw new Error(`no stage ${id}`);
  return stage;
}
const stepOf = (state: BoardState, stageId: string, stepId: string) => {
  const step = stageOf(state, stageId).steps.find((s) => s.id === stepId);
  if (!step) throw new Error(`no step ${stepId}`);
  return step;
};

/** Completes the ground stage's three steps in order, within the slope limit. */
function finishGroundSteps(job: ReturnType<typeof liveJob>) {
  job.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '0.5', photoId: null }, { by: people.rita });
  job.apply('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: people.rita });
  job.apply('step.completed', { stageId: 'ground', stepId: 'ground.photo', value: null, photoId: 'photo-1' }, { by: people.rita });
}
function releaseGround(job: ReturnType<typeof liveJob>) {
  finishGroundSteps(job);
  job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita });
  job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: people.otto });
  job.apply('hold.released', { stageId: 'ground', holdId: 'ground.hold' }, { by: people.sue });
}

describe('the seq guards', () => {
  it('job.created starts a board at its seq; anything else before it is refused', () => {
    const created = event(1, 'job.created', { job: { name: 'J', site: 'S', kind: 'dismantling' }, craneFleetNumber: 'CR-07', crew: [] });
    const state = applyEvent(null, created);
    expect(state).toMatchObject({ seq: 1, planVersion: 0, stages: [], weather: null, windLimits: null, defects: [], briefed: [] });
    expect(state.job).toEqual({ id: JOB_ID, name: 'J', site: 'S', kind: 'dismantling', state: 'planning', craneFleetNumber: 'CR-07', stop: null, lastResume: null, cancelReason: null });
    expect(() => applyEvent(null, event(1, 'crew.set', { crew }))).toThrow('event 1 (crew.set) before job.created');
  });

  it('an event must be the next seq: a gap, a repeat or a step back is refused and the board is left as it was', () => {
    const state = applyEvent(null, event(1, 'job.created', { job: { name: 'J', site: 'S', kind: 'erection' }, craneFleetNumber: 'CR-07', crew: [] }));
    const before = structuredClone(state);
    expect(() => applyEvent(state, event(3, 'crew.set', { crew }))).toThrow('event 3 does not follow 1');
    expect(() => applyEvent(state, event(1, 'crew.set', { crew }))).toThrow('event 1 does not follow 1');
    expect(() => applyEvent(state, event(0, 'crew.set', { crew }))).toThrow('event 0 does not follow 1');
    expect(state).toEqual(before);
    expect(applyEvent(state, event(2, 'crew.set', { crew })).seq).toBe(2);
  });

  it('returns a new board and leaves the one it was given untouched (the follower keeps the old one until the new one is whole)', () => {
    const job = liveJob();
    const before = job.state;
    const copy = structuredClone(before);
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '0.4', photoId: null }, { by: people.rita });
    expect(job.state).not.toBe(before);
    expect(before).toEqual(copy);
  });

  it('replaying the whole log gives the board built one event at a time', () => {
    const job = liveJob();
    releaseGround(job);
    expect(replay(job.log.events)).toEqual(job.state);
    expect(replay([])).toBeNull();
  });
});

describe('each event type', () => {
  it('job.updated changes only the fields it names', () => {
    const job = liveJob();
    job.apply('job.updated', { changes: { name: 'South bay erection' } });
    expect(job.state.job).toMatchObject({ name: 'South bay erection', site: 'Yard 4', kind: 'erection' });
    job.apply('job.updated', { changes: { site: 'Yard 5', kind: 'dismantling' } });
    expect(job.state.job).toMatchObject({ name: 'South bay erection', site: 'Yard 5', kind: 'dismantling' });
  });

  it('crew.set replaces the crew as a whole', () => {
    const job = liveJob();
    job.apply('crew.set', { crew: [crew[0], crew[2]] });
    expect(job.state.crew.map((c) => c.userId)).toEqual([people.sue.userId, people.rita.userId]);
  });

  it('configuration.set carries the wind limits and the age a reading may have; an older event without the age leaves it unset', () => {
    const job = liveJob();
    expect(job.state).toMatchObject({ windLimits: testWindLimits, weatherFreshMinutes: 10 });
    job.apply('configuration.set', { windLimits: null });
    expect(job.state.windLimits).toBeNull();
    expect(job.state.weatherFreshMinutes).toBe(10);
    const old = applyEvent(null, event(1, 'job.created', { job: { name: 'J', site: 'S', kind: 'erection' }, craneFleetNumber: 'CR-07', crew: [] }));
    expect('weatherFreshMinutes' in applyEvent(old, event(2, 'configuration.set', { windLimits: testWindLimits }))).toBe(false);
  });

  it('planning events that do not change the board (overrides, drafts) only advance seq', () => {
    const log = eventLog();
    log.next('job.created', { job: { name: 'J', site: 'S', kind: 'erection' }, craneFleetNumber: 'CR-07', crew });
    let state = replay(log.events)!;
    const planning = [
      log.next('override.requested', { override: { id: 'o1', figureKey: 'groundPressure', figureLabel: 'Ground pressure', figureValue: '180 kPa', reason: 'Mats measured on site' } }),
      log.next('override.approved', { overrideId: 'o1', figureKey: 'groundPressure' }),
      log.next('plan.generated', { plan: smallPlan() }),
      log.next('plan.edited', { plan: smallPlan(), problems: [] }),
    ];
    for (const e of planning) {
      const next = applyEvent(deepFreeze(state), e);
      expect(next).toEqual({ ...state, seq: e.seq });
      state = next;
    }
    expect(state.stages).toEqual([]);
  });

  it('job.ready puts the plan on the board: every stage locked, every hold waiting, the value check’s fields without their values', () => {
    const log = eventLog();
    log.next('job.created', { job: { name: 'J', site: 'S', kind: 'erection' }, craneFleetNumber: 'CR-07', crew });
    log.next('job.ready', { planVersion: 1, plan: smallPlan() });
    const state = replay(log.events)!;
    expect(state.job.state).toBe('ready');
    expect(state.planVersion).toBe(1);
    expect(state.stages.map((s) => [s.id, s.order, s.state, s.hold?.state ?? null])).toEqual([
      ['ground', 1, 'locked', 'waiting'],
      ['assemble', 2, 'locked', null],
      ['ballast', 3, 'locked', null],
      ['ready-boom', 4, 'locked', 'waiting'],
      ['lift-boom', 5, 'locked', null],
    ]);
    expect(stageOf(state, 'ready-boom').hold?.valueCheck).toEqual({ fields: ['parts'] });
    expect(JSON.stringify(stageOf(state, 'ready-boom').hold)).not.toContain('expected');
    expect(stageOf(state, 'ready-boom').boom).toBe('prepares');
    expect('boom' in stageOf(state, 'assemble')).toBe(false);
    expect(stepOf(state, 'ground', 'ground.mats')).toMatchObject({ state: 'open', after: ['ground.slope'], required: false, doneBy: null, outOfLimit: null });
  });

  it('job.started makes the job live and activates the stages that wait for nothing', () => {
    const job = liveJob();
    expect(job.state.job.state).toBe('live');
    expect(job.state.stages.map((s) => s.state)).toEqual(['active', 'locked', 'locked', 'locked', 'locked']);
  });

  it('briefing.acknowledged keeps one entry per person, the latest plan version', () => {
    const job = liveJob();
    job.apply('briefing.acknowledged', { planVersion: 1 }, { by: people.rita });
    job.apply('briefing.acknowledged', { planVersion: 1 }, { by: people.otto });
    job.apply('briefing.acknowledged', { planVersion: 2 }, { by: people.rita });
    expect(job.state.briefed.map((b) => [b.userId, b.planVersion])).toEqual([
      [people.otto.userId, 1],
      [people.rita.userId, 2],
    ]);
  });

  it('step.completed records who, when, the value and the photo, and compares the reading', () => {
    const job = liveJob();
    const at = minutes(30);
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '1.5', photoId: 'p-9' }, { by: people.rita, at });
    expect(stepOf(job.state, 'ground', 'ground.slope')).toMatchObject({
      state: 'done',
      doneBy: { userId: people.rita.userId, name: people.rita.name, role: 'rigger', at, value: '1.5', photoId: 'p-9' },
      outOfLimit: { kind: 'max', limit: 1, valueNumber: 1.5 },
    });
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: people.rita });
    expect(stepOf(job.state, 'ground', 'ground.mats')).toMatchObject({ state: 'done', outOfLimit: null, doneBy: { value: null, photoId: null } });
  });

  it('the last step of a stage with a hold opens the hold; acknowledgments by every required role make it acknowledged; a withdrawal opens it again', () => {
    const job = liveJob();
    finishGroundSteps(job);
    expect(stageOf(job.state, 'ground')).toMatchObject({ state: 'holding', hold: { state: 'open', acknowledgments: [] } });
    job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita });
    expect(stageOf(job.state, 'ground').hold?.state).toBe('open');
    job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: people.otto });
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ state: 'acknowledged', acknowledgments: [{ role: 'rigger', userId: people.rita.userId }, { role: 'operator', userId: people.otto.userId }] });
    job.apply('hold.withdrawn', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: people.otto });
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ state: 'open', acknowledgments: [{ role: 'rigger' }] });
  });

  it('a withdrawal takes back only that person’s acknowledgment in that role', () => {
    const job = liveJob();
    finishGroundSteps(job);
    job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita });
    job.apply('hold.withdrawn', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.otto });
    expect(stageOf(job.state, 'ground').hold?.acknowledgments).toHaveLength(1);
  });

  // Three failures before the lock is the board's own rule (CHECK_FAILURES_BEFORE_REVIEW): common
  // practice, no source.
  it('hold.check.failed counts failures and locks the hold at the third; hold.check.reviewed clears the count and the lock but keeps every failure for the record', () => {
    const job = liveJob();
    const fail = (n: number) => job.apply('hold.check.failed', { stageId: 'ground', holdId: 'ground.hold', role: 'operator', fields: ['parts'] }, { by: people.otto, at: minutes(20 + n) });
    fail(1);
    fail(2);
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ failuresSinceReview: 2, checkLocked: false });
    fail(3);
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ failuresSinceReview: 3, checkLocked: true });
    expect(stageOf(job.state, 'ground').hold?.checkFailures[0]).toEqual({ userId: people.otto.userId, name: people.otto.name, role: 'operator', at: minutes(21), fields: ['parts'] });
    job.apply('hold.check.reviewed', { stageId: 'ground', holdId: 'ground.hold', note: 'Controller screen read again with the operator' }, { by: people.sue, at: minutes(30) });
    expect(stageOf(job.state, 'ground').hold).toMatchObject({
      failuresSinceReview: 0,
      checkLocked: false,
      lastReview: { userId: people.sue.userId, at: minutes(30), note: 'Controller screen read again with the operator' },
    });
    expect(stageOf(job.state, 'ground').hold?.checkFailures).toHaveLength(3);
    // The next failure after a review counts from one again: the lock needs three more.
    fail(4);
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ failuresSinceReview: 1, checkLocked: false });
    expect(() => job.apply('hold.check.failed', { stageId: 'assemble', holdId: 'x', role: 'operator', fields: null })).toThrow('stage assemble has no hold');
  });

  it('hold.released finishes the stage and names who released it', () => {
    const job = liveJob();
    releaseGround(job);
    expect(stageOf(job.state, 'ground')).toMatchObject({ state: 'done', hold: { state: 'released', releasedBy: { userId: people.sue.userId, role: 'supervisor' } } });
  });

  it('stage.skipped waives its hold, keeps the reason, and lets the stages after it start', () => {
    const job = liveJob();
    job.apply('stage.skipped', { stageId: 'ground', reason: 'Ground prepared and signed off yesterday' });
    expect(stageOf(job.state, 'ground')).toMatchObject({ state: 'skipped', skipReason: 'Ground prepared and signed off yesterday', hold: { state: 'waived' } });
    expect([stateOf(job.state, 'assemble'), stateOf(job.state, 'ballast')]).toEqual(['active', 'active']);
  });

  it('job.stopped stops the job with who pressed it, when it was pressed and when it was recorded', () => {
    const job = liveJob();
    job.apply('job.stopped', { reason: null, pressedAt: minutes(9.5) }, { by: people.vic, at: minutes(10) });
    expect(job.state.job).toMatchObject({
      state: 'stopped',
      stop: { raisedBy: { userId: people.vic.userId, name: people.vic.name, role: 'viewer' }, pressedAt: minutes(9.5), at: minutes(10), reason: null, alsoPressedBy: [] },
    });
  });

  it('a second stop press keeps the first stop and its cause, and is kept beside it; a cause given with the second press fills a missing one', () => {
    const job = liveJob();
    job.apply('job.stopped', { reason: null, pressedAt: minutes(9) }, { by: people.sam, at: minutes(9) });
    job.apply('job.stopped', { reason: 'Person under the boom', pressedAt: minutes(9.2), alreadyStopped: true }, { by: people.rita, at: minutes(9.3) });
    expect(job.state.job.stop).toMatchObject({
      raisedBy: { userId: people.sam.userId },
      pressedAt: minutes(9),
      reason: 'Person under the boom',
      alsoPressedBy: [{ userId: people.rita.userId, role: 'rigger', pressedAt: minutes(9.2), at: minutes(9.3) }],
    });
    job.apply('job.stopped', { reason: 'Something else', pressedAt: minutes(9.4) }, { by: people.otto });
    expect(job.state.job.stop?.reason).toBe('Person under the boom');
    expect(job.state.job.stop?.alsoPressedBy.map((p) => p.userId)).toEqual([people.rita.userId, people.otto.userId]);
  });

  it('job.stop.noted records the cause; job.resumed makes the job live again, clears the stop and keeps why work went on', () => {
    const job = liveJob();
    job.apply('job.stopped', { reason: null, pressedAt: minutes(9) }, { by: people.sam });
    job.apply('job.stop.noted', { reason: 'Hand signal not seen' }, { by: people.sam });
    expect(job.state.job.stop?.reason).toBe('Hand signal not seen');
    job.apply('job.resumed', { reason: 'Signaller moved to a place the operator sees' }, { by: people.sue, at: minutes(40) });
    expect(job.state.job).toMatchObject({
      state: 'live',
      stop: null,
      lastResume: { by: { userId: people.sue.userId, name: people.sue.name }, at: minutes(40), reason: 'Signaller moved to a place the operator sees' },
    });
  });

  it('a step completed while stopped moves no stage until the job is resumed', () => {
    const job = liveJob();
    job.apply('job.stopped', { reason: 'Check the mats', pressedAt: minutes(8) }, { by: people.rita });
    finishGroundSteps(job);
    expect(stateOf(job.state, 'ground')).toBe('active');
    job.apply('job.resumed', { reason: 'Mats checked' });
    expect(stageOf(job.state, 'ground')).toMatchObject({ state: 'holding', hold: { state: 'open' } });
  });

  it('weather.recorded keeps the reading with who took it; an older event without a height reads as height unknown', () => {
    const job = liveJob();
    job.apply('weather.recorded', { reading: { meanMs: 4.2, gustMs: 7.1, heightM: 12, lightning: false, poorVisibility: false, ice: false }, stop: null }, { by: people.sam, at: minutes(15) });
    expect(job.state.weather).toEqual({ meanMs: 4.2, gustMs: 7.1, heightM: 12, lightning: false, poorVisibility: false, ice: false, at: minutes(15), by: { userId: people.sam.userId, name: people.sam.name } });
    job.apply('weather.recorded', { reading: { meanMs: 3, gustMs: 5, lightning: false, poorVisibility: false, ice: false }, stop: null });
    expect(job.state.weather?.heightM).toBeNull();
    expect(job.state.job.state).toBe('live');
  });

  it('a weather reading that the server found over the limit stops the job, raised by whoever recorded it, with the reason', () => {
    const job = liveJob();
    job.apply(
      'weather.recorded',
      { reading: { meanMs: 12, gustMs: 17, heightM: 10, lightning: false, poorVisibility: false, ice: false }, phase: 'assembly', limit: testWindLimits.assembly, overLimit: 'Gust 17 m/s is over the limit of 16 m/s', stop: { reason: 'Gust 17 m/s is over the limit of 16 m/s' } },
      { by: people.sam, at: minutes(16) },
    );
    expect(job.state.job).toMatchObject({
      state: 'stopped',
      stop: { raisedBy: { userId: people.sam.userId, role: 'signaller' }, pressedAt: minutes(16), at: minutes(16), reason: 'Gust 17 m/s is over the limit of 16 m/s', alsoPressedBy: [] },
    });
  });

  it('defect.reported lists the defect and blocks the stage it names; one without a stage blocks nothing', () => {
    const job = liveJob();
    job.apply('defect.reported', { defectId: 'd1', description: 'Cracked lacing on the insert', componentId: 'c-1', stageId: 'ground', photoId: 'p-2' }, { by: people.rita, at: minutes(12) });
    job.apply('defect.reported', { defectId: 'd2', description: 'Worn sling', componentId: null, stageId: null, photoId: null }, { by: people.rita });
    expect(job.state.defects.map((d) => [d.id, d.stageId, d.by])).toEqual([
      ['d1', 'ground', people.rita.name],
      ['d2', null, people.rita.name],
    ]);
    expect(stageOf(job.state, 'ground').blockedBy).toEqual({ description: 'Cracked lacing on the insert', at: minutes(12), by: people.rita.name });
    expect(job.state.stages.filter((s) => s.blockedBy).map((s) => s.id)).toEqual(['ground']);
  });

  it('job.completed and job.cancelled end the job; a cancellation keeps its reason', () => {
    const done = liveJob();
    done.apply('job.completed', {});
    expect(done.state.job.state).toBe('complete');
    const cancelled = liveJob();
    cancelled.apply('job.cancelled', { reason: 'Client postponed the lift' });
    expect(cancelled.state.job).toMatchObject({ state: 'cancelled', cancelReason: 'Client postponed the lift' });
  });

  it('an event naming a stage or step the board does not have is a bug and throws', () => {
    const job = liveJob();
    expect(() => job.apply('step.completed', { stageId: 'ground', stepId: 'nowhere', value: null, photoId: null })).toThrow('no step nowhere');
    const fresh = liveJob();
    expect(() => fresh.apply('stage.skipped', { stageId: 'nowhere', reason: 'x' })).toThrow('no stage nowhere');
  });
});

describe('step.reopened', () => {
  it('reopens the step and every step that came after it, clears their values and marks, and leaves earlier steps done', () => {
    const job = liveJob();
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '0.5', photoId: null }, { by: people.rita });
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: people.rita });
    job.apply('step.reopened', { stageId: 'ground', stepId: 'ground.mats', alsoReopened: [] }, { by: people.rita });
    expect(stageOf(job.state, 'ground').steps.map((s) => [s.id, s.state])).toEqual([
      ['ground.slope', 'done'],
      ['ground.mats', 'open'],
      ['ground.photo', 'open'],
    ]);
  });

  it('reopening a step of a holding stage sends the stage back to work and the hold back to waiting, dropping its acknowledgments', () => {
    const job = liveJob();
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '1.4', photoId: null }, { by: people.rita });
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: people.rita });
    job.apply('step.completed', { stageId: 'ground', stepId: 'ground.photo', value: null, photoId: 'p' }, { by: people.rita });
    job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita });
    expect(stepOf(job.state, 'ground', 'ground.slope').outOfLimit).not.toBeNull();
    job.apply('step.reopened', { stageId: 'ground', stepId: 'ground.slope', alsoReopened: ['ground.mats', 'ground.photo'], clearedAcknowledgments: 1 }, { by: people.rita });
    const ground = stageOf(job.state, 'ground');
    expect(ground).toMatchObject({ state: 'active', hold: { state: 'waiting', acknowledgments: [] } });
    expect(ground.steps.map((s) => [s.state, s.doneBy, s.outOfLimit])).toEqual([
      ['open', null, null],
      ['open', null, null],
      ['open', null, null],
    ]);
    // Redone within the limit, the stage holds again with a clean reading.
    finishGroundSteps(job);
    expect(stageOf(job.state, 'ground')).toMatchObject({ state: 'holding', hold: { state: 'open' } });
    expect(stepOf(job.state, 'ground', 'ground.slope').outOfLimit).toBeNull();
  });
});

describe('settle: stages move forward as far as the rules allow', () => {
  it('one release activates every stage that waited only for it', () => {
    const job = liveJob();
    releaseGround(job);
    expect(job.state.stages.map((s) => [s.id, s.state])).toEqual([
      ['ground', 'done'],
      ['assemble', 'active'],
      ['ballast', 'active'],
      ['ready-boom', 'locked'],
      ['lift-boom', 'locked'],
    ]);
  });

  it('a stage without a hold is done with its last step, and a stage waiting for it starts in the same event', () => {
    const job = liveJob();
    releaseGround(job);
    job.apply('step.completed', { stageId: 'ballast', stepId: 'ballast.fit', value: null, photoId: null }, { by: people.otto });
    expect([stateOf(job.state, 'ballast'), stateOf(job.state, 'ready-boom')]).toEqual(['done', 'locked']);
    job.apply('step.completed', { stageId: 'assemble', stepId: 'assemble.pins', value: '24', photoId: null }, { by: people.rita });
    expect([stateOf(job.state, 'assemble'), stateOf(job.state, 'ready-boom')]).toEqual(['done', 'active']);
  });

  it('runs until nothing changes: skipping a stage can finish a chain of empty stages at once', () => {
    const plan: Plan = {
      kind: 'dismantling',
      stages: [
        { id: 'a', title: 'A', summary: '', dependsOn: [], cautions: [], involvesCraneMovement: false, steps: [{ id: 'a.1', text: 'Do a', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null }], hold: null },
        // Listed against their order of work, so one pass over the list is not enough.
        { id: 'd', title: 'D', summary: '', dependsOn: ['c'], cautions: [], involvesCraneMovement: false, steps: [{ id: 'd.1', text: 'Do d', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null }], hold: null },
        { id: 'c', title: 'C', summary: '', dependsOn: ['b'], cautions: [], involvesCraneMovement: false, steps: [], hold: null },
        { id: 'b', title: 'B', summary: '', dependsOn: ['a'], cautions: [], involvesCraneMovement: false, steps: [], hold: null },
      ],
      briefing: { title: 'B', sections: [] },
    };
    const job = liveJob(plan);
    job.apply('stage.skipped', { stageId: 'a', reason: 'Done on the previous shift' });
    expect(job.state.stages.map((s) => [s.id, s.state])).toEqual([
      ['a', 'skipped'],
      ['d', 'active'],
      ['c', 'done'],
      ['b', 'done'],
    ]);
  });

  it('does nothing unless the job is live', () => {
    const log = eventLog();
    log.next('job.created', { job: { name: 'J', site: 'S', kind: 'erection' }, craneFleetNumber: 'CR-07', crew });
    log.next('job.ready', { planVersion: 1, plan: smallPlan() });
    const ready = replay(log.events)!;
    const copy = structuredClone(ready);
    settle(ready);
    expect(ready).toEqual(copy);
    ready.job.state = 'stopped';
    settle(ready);
    expect(ready.stages.every((s) => s.state === 'locked')).toBe(true);
  });
});

describe('stagesFromPlan on a revision', () => {
  /** The ground released, ballast fitted, the pin count recorded as 24 (the plan's figure). */
  function underway() {
    const job = liveJob();
    releaseGround(job);
    job.apply('step.completed', { stageId: 'ballast', stepId: 'ballast.fit', value: null, photoId: null }, { by: people.otto });
    job.apply('step.completed', { stageId: 'assemble', stepId: 'assemble.pins', value: '24', photoId: null }, { by: people.rita });
    return job;
  }
  const revise = (job: ReturnType<typeof liveJob>, edit: (plan: Plan) => void, version = 2) => {
    const plan = smallPlan();
    edit(plan);
    job.apply('plan.revised', { planVersion: version, plan, reason: 'Revised on site' });
    return job.state;
  };

  it('a revision that changes nothing keeps every stage, step and hold as it was', () => {
    const job = underway();
    const before = job.state;
    const after = revise(job, () => {});
    expect(after.planVersion).toBe(2);
    expect(after.stages).toEqual(before.stages);
  });

  it('steps and holds whose id and wording are unchanged keep their progress; a reworded step starts again and so does its stage', () => {
    const job = underway();
    const after = revise(job, (plan) => {
      plan.stages[2].steps[0].text = 'Fit the counterweight slabs in the order on the sheet';
    });
    expect(stageOf(after, 'ground')).toMatchObject({ state: 'done', hold: { state: 'released', releasedBy: { userId: people.sue.userId } } });
    expect(stageOf(after, 'assemble').state).toBe('done');
    expect(stepOf(after, 'assemble', 'assemble.pins').doneBy?.value).toBe('24');
    // The reworded step is open; its stage is started again by settle (its dependency is done);
    // the stage after it waits again.
    expect(stepOf(after, 'ballast', 'ballast.fit')).toMatchObject({ state: 'open', doneBy: null });
    expect(stateOf(after, 'ballast')).toBe('active');
    expect(stateOf(after, 'ready-boom')).toBe('locked');
  });

  it('a reworded hold starts its stage again; a stage the revision adds starts locked', () => {
    const job = liveJob();
    releaseGround(job);
    const after = revise(job, (plan) => {
      plan.stages[0].hold!.title = 'Ground and mats ready';
      plan.stages.splice(1, 0, { ...plan.stages[2], id: 'extra', title: 'Extra', dependsOn: ['ground'], steps: [] });
    });
    const ground = stageOf(after, 'ground');
    // The steps keep their progress, so settle finds the stage complete and opens the hold afresh.
    expect(ground.steps.every((s) => s.state === 'done')).toBe(true);
    expect(ground).toMatchObject({ state: 'holding', hold: { state: 'open', acknowledgments: [], releasedBy: null, title: 'Ground and mats ready' } });
    expect(stateOf(after, 'extra')).toBe('locked');
    expect(after.stages.map((s) => s.order)).toEqual([1, 2, 3, 4, 5, 6]);
  });

  it('a hold that keeps its id keeps its failed value checks and its lock, even when its stage starts again', () => {
    const job = liveJob();
    for (const n of [1, 2, 3]) job.apply('hold.check.failed', { stageId: 'ground', holdId: 'ground.hold', role: 'operator', fields: ['parts'] }, { by: people.otto, at: minutes(20 + n) });
    const after = revise(job, (plan) => {
      plan.stages[0].hold!.title = 'Ground ready, reworded';
      plan.stages[0].steps[0].text = 'Measure the slope under both tracks';
    });
    expect(stageOf(after, 'ground').hold).toMatchObject({ state: 'waiting', failuresSinceReview: 3, checkLocked: true });
    expect(stageOf(after, 'ground').hold?.checkFailures).toHaveLength(3);
  });

  it('a hold given a new id is a new hold: no failures, no lock', () => {
    const job = liveJob();
    for (const n of [1, 2, 3]) job.apply('hold.check.failed', { stageId: 'ground', holdId: 'ground.hold', role: 'operator', fields: ['parts'] }, { by: people.otto, at: minutes(20 + n) });
    const after = revise(job, (plan) => {
      plan.stages[0].hold!.id = 'ground.hold-2';
    });
    expect(stageOf(after, 'ground').hold).toMatchObject({ id: 'ground.hold-2', checkFailures: [], failuresSinceReview: 0, checkLocked: false, lastReview: null });
  });

  it('a kept reading is compared again with what the revised step is held to', () => {
    const job = underway();
    expect(stepOf(job.state, 'assemble', 'assemble.pins').outOfLimit).toBeNull();
    // The plan's figure changes to 26 pins with the same wording: the recorded 24 is now out of limit.
    const after = revise(job, (plan) => {
      plan.stages[1].steps[0].records = { ...plan.stages[1].steps[0].records!, check: { kind: 'plan', planned: 26, tolerance: 0, source: 'revised plan: pin count' } };
    });
    expect(stepOf(after, 'assemble', 'assemble.pins')).toMatchObject({ state: 'done', outOfLimit: { kind: 'plan', planned: 26, valueNumber: 24, source: 'revised plan: pin count' } });
    // And the other way: a slope recorded over the limit, then a revision with a larger figure settles it.
    const slope = liveJob();
    slope.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '1.5', photoId: null }, { by: people.rita });
    const settled = revise(slope, (plan) => {
      plan.stages[0].steps[0].records = { ...plan.stages[0].steps[0].records!, check: { kind: 'max', limit: 2, source: 'revised ground survey' } };
    });
    expect(stepOf(settled, 'ground', 'ground.slope')).toMatchObject({ state: 'done', outOfLimit: null });
  });

  it('a reading kept for a wind step is compared with the job’s wind limits as the board holds them', () => {
    const previous = liveJob().state.stages.map((s) => ({ ...s }));
    const gust = previous.find((s) => s.id === 'ready-boom')!.steps[0];
    gust.state = 'done';
    gust.doneBy = { ...people.sam, at: minutes(3), value: '14', photoId: null };
    const plan = smallPlan();
    expect(stagesFromPlan(plan, previous, testWindLimits)[3].steps[0].outOfLimit).toMatchObject({ kind: 'wind', limit: 13 });
    expect(stagesFromPlan(plan, previous, { ...testWindLimits, raising: { gustMs: 15, meanMs: 9 } })[3].steps[0].outOfLimit).toBeNull();
    // No limit known: the gust cannot be judged within one, so it is out of limit (safe side).
    expect(stagesFromPlan(plan, previous)[3].steps[0].outOfLimit).toMatchObject({ kind: 'wind', limit: null });
  });

  it('a revision while stopped keeps the job stopped and moves no stage until it resumes', () => {
    const job = underway();
    job.apply('job.stopped', { reason: 'Plan change', pressedAt: minutes(40) });
    const after = revise(job, (plan) => {
      plan.stages[2].steps[0].text = 'Fit the counterweight, reworded';
    });
    expect(after.job.state).toBe('stopped');
    expect(stateOf(after, 'ballast')).toBe('locked');
    job.apply('job.resumed', { reason: 'Revision briefed' });
    expect(stateOf(job.state, 'ballast')).toBe('active');
  });

  it('a revision lifts the block a reported defect put on a stage', () => {
    const job = liveJob();
    job.apply('defect.reported', { defectId: 'd1', description: 'Bent mat', componentId: null, stageId: 'ground', photoId: null }, { by: people.rita });
    expect(stageOf(job.state, 'ground').blockedBy).not.toBeNull();
    const after = revise(job, () => {});
    expect(stageOf(after, 'ground').blockedBy).toBeNull();
    expect(after.defects).toHaveLength(1);
  });

  it('a stage skipped before a revision stays skipped when it is unchanged', () => {
    const job = liveJob();
    releaseGround(job);
    job.apply('stage.skipped', { stageId: 'ballast', reason: 'Counterweight stays on from the last job' });
    const after = revise(job, () => {});
    expect(stageOf(after, 'ballast')).toMatchObject({ state: 'skipped', skipReason: 'Counterweight stays on from the last job' });
  });
});

describe('shifts (issue 17)', () => {
  const items = [
    { id: 'hookBlocks', text: 'Hook blocks secured.', roles: ['rigger', 'operator'] as const, asksNote: false },
    { id: 'forecast', text: 'Forecast noted.', roles: ['supervisor'] as const, asksNote: true },
  ].map((i) => ({ ...i, roles: [...i.roles] }));
  /** A live job whose shift 1 is ended and whose checklist is ticked: made safe. */
  function madeSafeJob() {
    const job = liveJob();
    job.apply('shift.ending', { shift: 1, workPhase: 'boom-on-ground', items });
    job.apply('shift.item.done', { itemId: 'hookBlocks', role: 'rigger', note: null, madeSafe: false }, { by: people.rita });
    job.apply('shift.item.done', { itemId: 'forecast', role: 'supervisor', note: 'Gusts easing overnight', madeSafe: true }, { by: people.sue, at: minutes(120) });
    return job;
  }

  it('job.started begins shift 1 with whoever started it as the acting supervisor; a start not recorded as a supervisor’s names nobody', () => {
    const job = liveJob();
    expect(job.state.shift).toEqual({ number: 1, phase: 'working', startedAt: minutes(5), makeSafe: null, start: null });
    expect(job.state.actingSupervisor).toEqual({ userId: people.sue.userId, name: people.sue.name, since: minutes(5) });
    const log = eventLog();
    log.next('job.created', { job: { name: 'J', site: 'S', kind: 'erection', state: 'planning' }, craneFleetNumber: 'CR-07', crew });
    log.next('job.ready', { state: 'ready', planVersion: 1, plan: smallPlan() });
    log.next('job.started', {}, { by: people.vic });
    expect(replay(log.events)!.actingSupervisor).toBeNull();
  });

  it('briefing.acknowledged keeps the shift the briefing was for; an older event without one keeps none', () => {
    const job = liveJob();
    job.apply('briefing.acknowledged', { planVersion: 1, shift: 2 }, { by: people.rita });
    job.apply('briefing.acknowledged', { planVersion: 1 }, { by: people.otto });
    expect(job.state.briefed.find((b) => b.userId === people.rita.userId)).toMatchObject({ planVersion: 1, shift: 2 });
    expect(job.state.briefed.find((b) => b.userId === people.otto.userId)).not.toHaveProperty('shift');
  });

  it('shift.ending puts the checklist on the board, nothing ticked; the job stays live until the last item', () => {
    const job = liveJob();
    job.apply('shift.ending', { shift: 1, workPhase: 'boom-on-ground', items }, { at: minutes(100) });
    expect(job.state.job.state).toBe('live');
    expect(job.state.shift).toMatchObject({ number: 1, phase: 'making_safe', makeSafe: { begunBy: { userId: people.sue.userId, at: minutes(100) }, workPhase: 'boom-on-ground', madeSafe: null } });
    expect(job.state.shift!.makeSafe!.items.map((i) => [i.id, i.doneBy])).toEqual([
      ['hookBlocks', null],
      ['forecast', null],
    ]);
    job.apply('shift.item.done', { itemId: 'hookBlocks', role: 'rigger', note: null, madeSafe: false }, { by: people.rita });
    expect(job.state.job.state).toBe('live');
    expect(job.state.shift!.makeSafe!.items[0].doneBy).toMatchObject({ userId: people.rita.userId, role: 'rigger', note: null });
  });

  it('the last item makes the job safe with when and by whom, opens an empty start-of-shift hold, and clears a stop', () => {
    const job = liveJob();
    job.apply('job.stopped', { reason: 'Wind rising', pressedAt: minutes(90) }, { by: people.sam });
    job.apply('shift.ending', { shift: 1, workPhase: 'boom-on-ground', items });
    job.apply('shift.item.done', { itemId: 'hookBlocks', role: 'operator', note: null, madeSafe: false }, { by: people.otto });
    job.apply('shift.item.done', { itemId: 'forecast', role: 'supervisor', note: 'Gusts easing overnight', madeSafe: true }, { by: people.sue, at: minutes(120) });
    expect(job.state.job).toMatchObject({ state: 'made_safe', stop: null });
    expect(job.state.shift).toMatchObject({ number: 1, phase: 'made_safe', start: { inspection: null, operator: null, supervisor: null } });
    expect(job.state.shift!.makeSafe!.madeSafe).toEqual({ userId: people.sue.userId, name: people.sue.name, at: minutes(120) });
    expect(job.state.shift!.makeSafe!.items[1].doneBy).toMatchObject({ note: 'Gusts easing overnight' });
  });

  it('an item the checklist does not have is a bug and throws', () => {
    const job = liveJob();
    expect(() => job.apply('shift.item.done', { itemId: 'hookBlocks', role: 'rigger', note: null, madeSafe: false })).toThrow('no make-safe item hookBlocks');
  });

  it('handover.written keeps the note with its lists; handover.acknowledged marks it read and makes its reader the acting supervisor', () => {
    const job = madeSafeJob();
    const written = job.log.events.length + 1;
    job.apply('handover.written', {
      shift: 1,
      to: { userId: people.ned.userId, name: people.ned.name },
      done: ['Stage ground'],
      open: ['Stage assemble: 1 of 1 steps to do'],
      defects: [],
      overrides: ['Lift against the chart: slow lift'],
      hazards: 'Soft ground by the gate',
      note: 'Mats to be checked first',
    });
    expect(job.state.handovers).toEqual([
      {
        seq: written,
        shift: 1,
        from: { userId: people.sue.userId, name: people.sue.name },
        to: { userId: people.ned.userId, name: people.ned.name },
        at: minutes(written),
        done: ['Stage ground'],
        open: ['Stage assemble: 1 of 1 steps to do'],
        defects: [],
        overrides: ['Lift against the chart: slow lift'],
        hazards: 'Soft ground by the gate',
        note: 'Mats to be checked first',
        acknowledgedBy: null,
      },
    ]);
    expect(job.state.actingSupervisor?.userId).toBe(people.sue.userId);
    job.apply('handover.acknowledged', { handoverSeq: written, from: { userId: people.sue.userId, name: people.sue.name } }, { by: people.ned, at: minutes(200) });
    expect(job.state.handovers![0].acknowledgedBy).toEqual({ userId: people.ned.userId, name: people.ned.name, at: minutes(200) });
    expect(job.state.actingSupervisor).toEqual({ userId: people.ned.userId, name: people.ned.name, since: minutes(200) });
  });

  it('when the acting role passes, the outgoing supervisor’s acknowledgment of the start-of-shift hold is cleared; the operator’s stays', () => {
    for (const pass of ['handover', 'transfer'] as const) {
      const job = madeSafeJob();
      job.apply('shift.inspected', { shift: 2, note: 'As left' }, { by: people.rita });
      job.apply('shift.start.acknowledged', { shift: 2, role: 'operator' }, { by: people.otto });
      job.apply('shift.start.acknowledged', { shift: 2, role: 'supervisor' }, { by: people.sue });
      if (pass === 'handover') {
        const written = job.log.events.length + 1;
        job.apply('handover.written', { shift: 1, to: null, done: [], open: [], defects: [], overrides: [], hazards: 'None', note: '' });
        job.apply('handover.acknowledged', { handoverSeq: written, from: { userId: people.sue.userId, name: people.sue.name } }, { by: people.ned });
      } else {
        job.apply('acting.transferred', { from: { userId: people.sue.userId, name: people.sue.name }, to: { userId: people.ned.userId, name: people.ned.name }, reason: 'Sue taken ill' });
      }
      expect(job.state.shift!.start).toMatchObject({ supervisor: null, operator: { userId: people.otto.userId }, inspection: { userId: people.rita.userId } });
    }
  });

  it('acting.transferred names the new acting supervisor', () => {
    const job = liveJob();
    job.apply('acting.transferred', { from: { userId: people.sue.userId, name: people.sue.name }, to: { userId: people.ned.userId, name: people.ned.name }, reason: 'Sue taken ill' }, { at: minutes(50) });
    expect(job.state.actingSupervisor).toEqual({ userId: people.ned.userId, name: people.ned.name, since: minutes(50) });
  });

  it('the inspection and both acknowledgments fill the start-of-shift hold; shift.started makes the job live in the next shift and work moves on', () => {
    const job = madeSafeJob();
    job.apply('shift.inspected', { shift: 2, note: 'Pins and blocking as left' }, { by: people.rita, at: minutes(300) });
    job.apply('shift.start.acknowledged', { shift: 2, role: 'operator' }, { by: people.otto, at: minutes(301) });
    job.apply('shift.start.acknowledged', { shift: 2, role: 'supervisor' }, { by: people.sue, at: minutes(302) });
    expect(job.state.shift!.start).toMatchObject({
      inspection: { userId: people.rita.userId, name: people.rita.name, at: minutes(300), note: 'Pins and blocking as left' },
      operator: { userId: people.otto.userId, name: people.otto.name, at: minutes(301) },
      supervisor: { userId: people.sue.userId, name: people.sue.name, at: minutes(302) },
    });
    expect(job.state.job.state).toBe('made_safe');
    job.apply('shift.started', { shift: 2 }, { at: minutes(310) });
    expect(job.state.job.state).toBe('live');
    expect(job.state.shift).toEqual({ number: 2, phase: 'working', startedAt: minutes(310), makeSafe: null, start: null });
    releaseGround(job);
    expect(stateOf(job.state, 'assemble')).toBe('active');
    expect(replay(job.log.events)).toEqual(job.state);
  });

  it('crew.set with acknowledgments withdrawn takes them off and says why on the hold; a disabled account does the same', () => {
    const job = liveJob();
    finishGroundSteps(job);
    job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita });
    job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: people.otto });
    expect(stageOf(job.state, 'ground').hold?.state).toBe('acknowledged');
    const ottoOut = [{ stageId: 'ground', holdId: 'ground.hold', userId: people.otto.userId, name: people.otto.name, role: 'operator' }];
    job.apply('crew.set', { crew: crew.filter((m) => m.userId !== people.otto.userId), withdrawn: ottoOut }, { at: minutes(60) });
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ state: 'open', reopenedBecause: { reason: 'Otto Brand left the crew or changed role', at: minutes(60) } });
    expect(stageOf(job.state, 'ground').hold!.acknowledgments.map((a) => a.userId)).toEqual([people.rita.userId]);
    const ritaOut = [{ stageId: 'ground', holdId: 'ground.hold', userId: people.rita.userId, name: people.rita.name, role: 'rigger' }];
    job.apply('crew.member.disabled', { userId: people.rita.userId, name: people.rita.name, withdrawn: ritaOut }, { at: minutes(70) });
    expect(stageOf(job.state, 'ground').hold).toMatchObject({ state: 'open', acknowledgments: [], reopenedBecause: { reason: 'Rita Venn’s account was disabled', at: minutes(70) } });
  });
});
