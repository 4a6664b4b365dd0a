import { describe, expect, it } from 'vitest';
import { applyEvent } from '../../../shared/board/apply.js';
import { outOfLimitBeforeHold, outOfLimitSteps, parseReading, readingOutOfLimit, readingsBlockingRelease } from '../../../shared/board/readings.js';
import { checkRetryAt, CHECK_RETRY_MS, holdGatesBoomMovement, movesBoom, stepsAfter, stepsNeededFirst, weatherVerdict, WEATHER_FRESH_MS } from '../../../shared/board/rules.js';
import type { BoardStage, BoardState, BoardStep } from '../../../shared/board/types.js';
import { parseJobEvent, type EventData, type JobEventDto, type JobEventType } from '../../../shared/events/log.js';
import type { StepRecord } from '../../../shared/schemas/plan.js';
import { config } from '../plan/plan-fixtures.js';

/**
 * The pure board rules. The figures compared here are the plan's and the crane data's, not
 * computed: these tests check the comparison (at the limit is within it, words are never within
 * a numeric check, typed decimals compare as the person meant them), the one wind rule and the
 * step-order and retry rules. Where a rule is a trade habit rather than a published figure, the
 * rule's own comment says so (common practice, no source).
 */

const record = (check: StepRecord['check'], unit: string | null = null): StepRecord => ({ kind: 'reading', label: 'Reading', unit, componentKind: null, typeId: null, plannedSerial: null, check });
const limits = { assembly: { gustMs: 16, meanMs: 11 }, raising: { gustMs: 13, meanMs: 9 } };

describe('parseReading', () => {
  it('reads plain numbers, a decimal comma and the step’s own unit; anything else is not a number', () => {
    expect(parseReading('6', null)).toBe(6);
    expect(parseReading(' 6,5 ', 't')).toBe(6.5);
    expect(parseReading('6.5 t', 't')).toBe(6.5);
    expect(parseReading('.5', null)).toBe(0.5);
    expect(parseReading('6 m', 't')).toBeNull();
    expect(parseReading('six', null)).toBeNull();
    expect(parseReading('6/6', null)).toBeNull();
    expect(parseReading('1e3', null)).toBeNull();
    expect(parseReading('', null)).toBeNull();
  });
});

describe('readingOutOfLimit', () => {
  it('a plan figure: equal or within the tolerance is within; a typed 6.4 against 6.5 ± 0.1 is within although 6.5 − 6.4 is 0.1000000000000005 in binary', () => {
    expect(readingOutOfLimit(record({ kind: 'plan', planned: 6, tolerance: 0, source: 'plan' }), '6', null)).toBeNull();
    expect(readingOutOfLimit(record({ kind: 'plan', planned: 6.5, tolerance: 0.1, source: 'plan' }, 't'), '6.4', null)).toBeNull();
    expect(readingOutOfLimit(record({ kind: 'plan', planned: 6.5, tolerance: 0.1, source: 'plan' }, 't'), '6.6', null)).toBeNull();
    const out = readingOutOfLimit(record({ kind: 'plan', planned: 6.5, tolerance: 0.1, source: 'crane data' }, 't'), '6.3', null);
    expect(out).toEqual({ kind: 'plan', value: '6.3', valueNumber: 6.3, planned: 6.5, tolerance: 0.1, limit: null, unit: 't', source: 'crane data', reason: '6.3 t was recorded; the plan says 6.5 t (±0.1 t).' });
    expect(readingOutOfLimit(record({ kind: 'plan', planned: 6, tolerance: 0, source: 'plan' }), '5', null)?.reason).toBe('5 was recorded; the plan says 6.');
  });

  it('a maximum and a minimum: at the limit is within, a hair over is out', () => {
    const max = record({ kind: 'max', limit: 1, source: 'crane data: ground slope' }, '%');
    expect(readingOutOfLimit(max, '1', null)).toBeNull();
    expect(readingOutOfLimit(max, '1.01', null)?.reason).toBe('1.01 % was recorded; the limit is at most 1 %.');
    const min = record({ kind: 'min', limit: 2, source: 'manual: dead wraps' }, null);
    expect(readingOutOfLimit(min, '2', null)).toBeNull();
    expect(readingOutOfLimit(min, '1', null)?.reason).toBe('1 was recorded; it must be at least 2.');
  });

  it('words where a number is asked for are out of limit, for every kind of check', () => {
    for (const check of [
      { kind: 'plan', planned: 6, tolerance: 0, source: '' },
      { kind: 'max', limit: 1, source: '' },
      { kind: 'min', limit: 1, source: '' },
      { kind: 'wind', phase: 'raising' },
    ] as const) {
      expect(readingOutOfLimit(record(check), 'checked', limits)).toMatchObject({ valueNumber: null });
    }
  });

  it('a wind gust is held to the phase’s gust limit by the one wind rule; with no limit known it is out of limit', () => {
    const wind = record({ kind: 'wind', phase: 'raising' }, 'm/s');
    expect(readingOutOfLimit(wind, '13', limits)).toBeNull();
    expect(readingOutOfLimit(wind, '13.1 m/s', limits)).toMatchObject({ limit: 13, reason: 'Gust 13.1 m/s is over the raising limit of 13 m/s.' });
    // The assembly limit of the same crane is higher: 14 is within it.
    expect(readingOutOfLimit(record({ kind: 'wind', phase: 'assembly' }, 'm/s'), '14', limits)).toBeNull();
    expect(readingOutOfLimit(wind, '3', null)?.reason).toMatch(/^No wind limit is known for raising/);
  });

  it('a step that compares nothing, or has no value, is never out of limit', () => {
    expect(readingOutOfLimit(record(null), 'anything', null)).toBeNull();
    expect(readingOutOfLimit(record(undefined), 'anything', null)).toBeNull();
    expect(readingOutOfLimit(null, '5', null)).toBeNull();
    expect(readingOutOfLimit(record({ kind: 'max', limit: 1, source: '' }), null, null)).toBeNull();
  });
});

/** A small board: ground (mandatory hold) → upper (no hold) → preraise (mandatory) → raise. */
function board(): BoardState {
  const hold = (id: string, mandatory: boolean) => ({
    id,
    state: 'waiting' as const,
    title: id,
    instruction: '',
    mandatory,
    requiredRoles: ['operator' as const],
    valueCheck: null,
    acknowledgments: [],
    releasedBy: null,
    checkFailures: [],
    failuresSinceReview: 0,
    checkLocked: false,
    lastReview: null,
  });
  const stepOf = (id: string, check: StepRecord['check'] = null, after: string[] = []): BoardStep => ({
    id,
    text: `Step ${id}`,
    state: 'open',
    allowedRoles: ['rigger'],
    requiresPhoto: false,
    records: check ? record(check, null) : null,
    caution: null,
    doneBy: null,
    required: false,
    after,
    outOfLimit: null,
  });
  const stage = (id: string, dependsOn: string[], steps: BoardStep[], h: BoardStage['hold']): BoardStage => ({
    id,
    order: 0,
    title: id,
    summary: '',
    state: 'locked',
    dependsOn,
    cautions: [],
    involvesCraneMovement: false,
    steps,
    hold: h,
    skipReason: null,
    blockedBy: null,
  });
  return {
    seq: 1,
    job: { id: 'j', name: 'j', site: 's', kind: 'erection', state: 'live', craneFleetNumber: 'FL-1', stop: null, lastResume: null, cancelReason: null },
    planVersion: 1,
    stages: [
      stage('er-ground', [], [stepOf('g1', { kind: 'plan', planned: 6, tolerance: 0, source: '' })], hold('er-ground.hold', true)),
      stage('er-upper', ['er-ground'], [stepOf('u1', { kind: 'max', limit: 1, source: '' }), stepOf('u2', null, ['u1']), stepOf('u3', null, ['u2'])], null),
      stage('er-preraise', ['er-upper'], [stepOf('p1')], hold('er-preraise.hold', true)),
      stage('er-raise', ['er-preraise'], [stepOf('r1')], null),
      stage('er-side', ['er-ground'], [stepOf('s1')], hold('er-side.hold', true)),
    ],
    crew: [],
    briefed: [],
    weather: null,
    windLimits: limits,
    defects: [],
  };
}

const event = <T extends JobEventType>(seq: number, type: T, data: EventData<T>, at = '2026-01-01T10:00:00.000Z'): JobEventDto =>
  parseJobEvent({ jobId: 'j', seq, type, at, by: { userId: 'u', name: 'Rigger', role: 'rigger' }, data });

describe('out-of-limit steps on the board', () => {
  it('the reducer marks the step; the console list and the holds that follow it read the same mark', () => {
    let state = board();
    state.stages[1].state = 'active';
    state = applyEvent(state, event(2, 'step.completed', { stageId: 'er-upper', stepId: 'u1', value: '2.5', photoId: null }));
    expect(state.stages[1].steps[0].outOfLimit?.reason).toBe('2.5 was recorded; the limit is at most 1.');
    expect(outOfLimitSteps(state).map((e) => e.stepId)).toEqual(['u1']);
    // The pre-raise hold depends on er-upper: blocked. The side stage does not: not blocked. Ground is upstream only.
    expect(readingsBlockingRelease(state, 'er-preraise').map((e) => e.stepId)).toEqual(['u1']);
    expect(readingsBlockingRelease(state, 'er-side')).toEqual([]);
    expect(readingsBlockingRelease(state, 'er-ground')).toEqual([]);
    expect(outOfLimitBeforeHold(state, 'er-raise').map((e) => e.stepId)).toEqual(['u1']);
    // Reopened (the steps after it with it) and redone within the limit: nothing blocks.
    state = applyEvent(state, event(3, 'step.completed', { stageId: 'er-upper', stepId: 'u2', value: null, photoId: null }));
    state = applyEvent(state, event(4, 'step.reopened', { stageId: 'er-upper', stepId: 'u1', clearedAcknowledgments: 0 }));
    expect(state.stages[1].steps.map((s) => s.state)).toEqual(['open', 'open', 'open']);
    state = applyEvent(state, event(5, 'step.completed', { stageId: 'er-upper', stepId: 'u1', value: '0.8', photoId: null }));
    expect(readingsBlockingRelease(state, 'er-preraise')).toEqual([]);
  });

  it('a non-mandatory hold is never blocked by readings (the supervisor judges), but still lists them', () => {
    const state = board();
    state.stages[0].hold!.mandatory = false;
    state.stages[0].steps[0] = { ...state.stages[0].steps[0], state: 'done', outOfLimit: readingOutOfLimit(state.stages[0].steps[0].records, '5', null) };
    expect(readingsBlockingRelease(state, 'er-ground')).toEqual([]);
    expect(outOfLimitBeforeHold(state, 'er-ground')).toHaveLength(1);
  });
});

describe('step order', () => {
  it('names the steps still needed first, and everything that comes after a step', () => {
    const stage = board().stages[1];
    expect(stepsNeededFirst(stage, 'u2')).toEqual([{ id: 'u1', text: 'Step u1' }]);
    expect(stepsNeededFirst(stage, 'u1')).toEqual([]);
    expect(stepsAfter(stage, 'u1').sort()).toEqual(['u2', 'u3']);
    expect(stepsAfter(stage, 'u3')).toEqual([]);
  });
});

describe('the one wind rule', () => {
  const now = Date.parse('2026-01-01T10:00:00.000Z');
  const reading = (minutesAgo: number, gustMs: number, meanMs: number, heightM: number | null = 10) => ({
    meanMs,
    gustMs,
    lightning: false,
    poorVisibility: false,
    ice: false,
    heightM,
    at: new Date(now - minutesAgo * 60_000).toISOString(),
    by: { userId: 'u', name: 'Rigger' },
  });

  it('the stages that move the boom and the holds before them', () => {
    const state = board();
    expect(state.stages.filter(movesBoom).map((s) => s.id)).toEqual(['er-raise']);
    expect(movesBoom({ id: 'dm-lower' })).toBe(true);
    expect(movesBoom({ id: 'er-preraise' })).toBe(false);
    // A stage renamed by hand still counts when its plan declares that it moves the boom.
    expect(movesBoom({ id: 'raise-the-boom-today', boom: 'moves' })).toBe(true);
    expect(movesBoom({ id: 'raise-the-boom-today' })).toBe(false);
    expect(holdGatesBoomMovement(state, 'er-preraise')).toBe(true);
    expect(holdGatesBoomMovement(state, 'er-ground')).toBe(false);
  });

  it('fresh means within 15 minutes, the limit is the phase’s, and a reading inside the assembly limit can be over the raising one', () => {
    const state = board();
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ ok: false, problem: expect.stringMatching(/^Record a weather reading first/) });
    state.weather = reading(15, 5, 3);
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ fresh: true, ok: true, ageMs: WEATHER_FRESH_MS });
    state.weather = reading(15.01, 5, 3);
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ fresh: false, ok: false, problem: 'Record a new weather reading: the last one is older than 15 minutes.' });
    state.weather = reading(1, 14, 8);
    expect(weatherVerdict(state, now, 'assembly').ok).toBe(true);
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ ok: false, overLimit: 'Gust 14 m/s is over the limit of 13 m/s' });
    state.weather = reading(1, 12, 9.5);
    expect(weatherVerdict(state, now, 'raising').overLimit).toBe('Mean wind 9.5 m/s is over the limit of 9 m/s');
    state.windLimits = null;
    state.weather = reading(1, 2, 1);
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ ok: false, problem: 'No raising wind limit is known for this configuration: get the manufacturer’s limit first.' });
  });

  it('a job that sets its own age for a wind reading is held to it; the setting arrives with the configuration (common practice, no source)', () => {
    let state = board();
    state = applyEvent(state, event(2, 'configuration.set', { windLimits: state.windLimits, weatherFreshMinutes: 5, planRegenerated: false, configuration: config(), figures: [], overridesWithdrawn: [] }));
    expect(state.weatherFreshMinutes).toBe(5);
    state.weather = reading(5, 5, 3);
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ fresh: true, ok: true });
    state.weather = reading(6, 5, 3);
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ fresh: false, ok: false, problem: 'Record a new weather reading: the last one is older than 5 minutes.' });
  });

  it('a reading taken low down, or with no height (older events), carries a caution', () => {
    const state = board();
    state.weather = reading(1, 5, 3, 2);
    expect(weatherVerdict(state, now).caution).toMatch(/^Read at 2 m above ground/);
    state.weather = reading(1, 5, 3, 10);
    expect(weatherVerdict(state, now).caution).toBeNull();
    state.weather = reading(1, 5, 3, null);
    expect(weatherVerdict(state, now).caution).toMatch(/height of this reading was not recorded/);
  });

  it('an old weather event without a height still applies, as height unknown', () => {
    let state = board();
    state = applyEvent(state, event(2, 'weather.recorded', { reading: { meanMs: 4, gustMs: 7, lightning: false, poorVisibility: false, ice: false }, phase: 'assembly', limit: null, stop: null, overLimit: null }));
    expect(state.weather).toMatchObject({ meanMs: 4, gustMs: 7, heightM: null });
  });
});

describe('the blind check’s retry and lock', () => {
  it('the same person waits after a failure; three failures lock the hold until a review clears the count', () => {
    let state = board();
    state.stages[0].state = 'holding';
    const failed = (seq: number, at: string) => event(seq, 'hold.check.failed', { stageId: 'er-ground', holdId: 'er-ground.hold', role: 'operator', photoId: null, fields: ['parts'] }, at);
    state = applyEvent(state, failed(2, '2026-01-01T10:00:00.000Z'));
    const hold = () => state.stages[0].hold!;
    expect(checkRetryAt(hold(), 'u', Date.parse('2026-01-01T10:00:10.000Z'))).toBe(new Date(Date.parse('2026-01-01T10:00:00.000Z') + CHECK_RETRY_MS).toISOString());
    expect(checkRetryAt(hold(), 'u', Date.parse('2026-01-01T10:00:30.000Z'))).toBeNull();
    expect(checkRetryAt(hold(), 'someone-else', Date.parse('2026-01-01T10:00:10.000Z'))).toBeNull();
    state = applyEvent(state, failed(3, '2026-01-01T10:01:00.000Z'));
    expect(hold().checkLocked).toBe(false);
    state = applyEvent(state, failed(4, '2026-01-01T10:02:00.000Z'));
    expect(hold()).toMatchObject({ checkLocked: true, failuresSinceReview: 3 });
    state = applyEvent(state, event(5, 'hold.check.reviewed', { stageId: 'er-ground', holdId: 'er-ground.hold', note: 'Reviewed', failuresReviewed: 3 }));
    expect(hold()).toMatchObject({ checkLocked: false, failuresSinceReview: 0, lastReview: { note: 'Reviewed' } });
    expect(hold().checkFailures).toHaveLength(3);
  });
});

describe('a gust typed into a step is wind information too', () => {
  it('a wind step over the limit recorded after the last reading makes the verdict over the limit; a later reading supersedes it', () => {
    const now = Date.parse('2026-01-01T10:00:00.000Z');
    let state = board();
    state.stages[2].steps.push({ ...state.stages[2].steps[0], id: 'p-gust', text: 'Read the gust', records: record({ kind: 'wind', phase: 'raising' }, 'm/s') });
    state.stages[2].state = 'active';
    state = applyEvent(state, event(2, 'weather.recorded', { reading: { meanMs: 4, gustMs: 7, heightM: 10, lightning: false, poorVisibility: false, ice: false }, phase: 'raising', limit: null, stop: null, overLimit: null }, '2026-01-01T09:58:00.000Z'));
    expect(weatherVerdict(state, now, 'raising').ok).toBe(true);
    state = applyEvent(state, event(3, 'step.completed', { stageId: 'er-preraise', stepId: 'p-gust', value: '14', photoId: null }, '2026-01-01T09:59:00.000Z'));
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ ok: false, overLimit: 'Gust 14 m/s is over the raising limit of 13 m/s (typed at “Read the gust”)' });
    // For assembly the same 14 m/s is within 16 m/s.
    expect(weatherVerdict(state, now, 'assembly').ok).toBe(true);
    state = applyEvent(state, event(4, 'weather.recorded', { reading: { meanMs: 4, gustMs: 8, heightM: 10, lightning: false, poorVisibility: false, ice: false }, phase: 'raising', limit: null, stop: null, overLimit: null }, '2026-01-01T09:59:30.000Z'));
    expect(weatherVerdict(state, now, 'raising')).toMatchObject({ ok: true, overLimit: null });
    // The step stays out of limit on its own, and the panel lists it.
    expect(weatherVerdict(state, now, 'raising').stepsOverLimit.map((s) => s.stepId)).toEqual(['p-gust']);
  });
});
