import { describe, expect, it } from 'vitest';
import type { JobEventType } from '../../../shared/events/log.js';
import { applyEvent, replay } from '../../../shared/board/apply.js';
import {
  checkRetryAt,
  holdGatesBoomMovement,
  movesBoom,
  stagesReadyToStart,
  stepsAfter,
  stepsNeededFirst,
  weatherOverLimit,
  weatherVerdict,
  windPhase,
} from '../../../shared/board/rules.js';
import type { BoardStage, BoardState } from '../../../shared/board/types.js';
import type { Plan } from '../../../shared/schemas/plan.js';
import { eventLog, minutes, people, T0, type TestData, type Who } from './events.js';
import { planStep, smallPlan, testWindLimits } from './board-plan.js';

/**
 * The board's pure rules (shared/board/rules.ts): the one wind rule, the wind phase, which stages
 * move the boom, step order and the retry after a failed value check. Boards are built by
 * replaying events of the small hand-written plan (board-plan.ts, invented limits: assembly gust
 * 16 / mean 11 m/s, raising gust 13 / mean 9 m/s), so the rules see boards as the reducer makes them.
 */

const crew: BoardState['crew'] = [
  { userId: people.sue.userId, name: people.sue.name, role: 'supervisor' },
  { userId: people.otto.userId, name: people.otto.name, role: 'operator' },
  { userId: people.rita.userId, name: people.rita.name, role: 'rigger' },
  { userId: people.sam.userId, name: people.sam.name, role: 'signaller' },
];

/** A live job on `plan`; `fresh` is the job's own reading age in minutes, or absent for an older board. */
function liveJob(opts: { plan?: Plan; fresh?: number; windLimits?: BoardState['windLimits'] } = {}) {
  const log = eventLog();
  log.next('job.created', { job: { name: 'Rules job', site: 'Yard 2', kind: 'erection' }, craneFleetNumber: 'CR-03', crew });
  log.next('configuration.set', { windLimits: opts.windLimits === undefined ? testWindLimits : opts.windLimits, ...(opts.fresh === undefined ? {} : { weatherFreshMinutes: opts.fresh }) });
  log.next('job.ready', { planVersion: 1, plan: opts.plan ?? smallPlan() });
  log.next('job.started', {});
  let state = replay(log.events)!;
  const apply = <T extends JobEventType>(type: T, data: TestData<T>, o?: { by?: Who; at?: string }) => {
    state = applyEvent(state, log.next(type, data, o));
    return state;
  };
  return { apply, get state() { return state; } };
}
type Job = ReturnType<typeof liveJob>;

const calm = { meanMs: 3, gustMs: 5, heightM: 10, lightning: false, poorVisibility: false, ice: false };
const recordWeather = (job: Job, at: string, reading: Partial<typeof calm> = {}) => job.apply('weather.recorded', { reading: { ...calm, ...reading }, stop: null }, { by: people.sam, at });

/** Ground released, assemble and ballast done: the stage that readies the boom is active. */
function atReadyBoom(job: Job) {
  job.apply('step.completed', { stageId: 'ground', stepId: 'ground.slope', value: '0.4', photoId: null }, { by: people.rita });
  job.apply('step.completed', { stageId: 'ground', stepId: 'ground.mats', value: null, photoId: null }, { by: people.rita });
  job.apply('step.completed', { stageId: 'ground', stepId: 'ground.photo', value: null, photoId: 'p' }, { by: people.rita });
  job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita });
  job.apply('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: people.otto });
  job.apply('hold.released', { stageId: 'ground', holdId: 'ground.hold' });
  job.apply('step.completed', { stageId: 'assemble', stepId: 'assemble.pins', value: '24', photoId: null }, { by: people.rita });
  job.apply('step.completed', { stageId: 'ballast', stepId: 'ballast.fit', value: null, photoId: null }, { by: people.otto });
  return job;
}
const stage = (state: BoardState, id: string): BoardStage => {
  const s = state.stages.find((x) => x.id === id);
  if (!s) throw new Error(`no stage ${id}`);
  return s;
};
const ms = (m: number) => T0 + m * 60_000;

describe('weatherVerdict: how old a reading may be', () => {
  // The default age is 15 minutes: common practice, no source (the rule's own comment: a reading
  // is taken just before the boom moves).
  it('without a setting of the job (older boards), a reading is fresh up to 15 minutes old and stale a millisecond later', () => {
    const job = liveJob();
    recordWeather(job, minutes(100));
    expect('weatherFreshMinutes' in job.state).toBe(false);
    expect(weatherVerdict(job.state, ms(115), 'assembly')).toMatchObject({ fresh: true, ok: true, ageMs: 900_000, freshMs: 900_000, problem: null });
    expect(weatherVerdict(job.state, ms(115) + 1, 'assembly')).toMatchObject({
      fresh: false,
      ok: false,
      problem: 'Record a new weather reading: the last one is older than 15 minutes.',
    });
  });

  it('the job’s own setting (configuration weatherFreshMinutes) replaces the default, longer or shorter', () => {
    const short = liveJob({ fresh: 5 });
    recordWeather(short, minutes(100));
    expect(weatherVerdict(short.state, ms(105), 'assembly').fresh).toBe(true);
    expect(weatherVerdict(short.state, ms(105) + 1, 'assembly')).toMatchObject({ fresh: false, problem: 'Record a new weather reading: the last one is older than 5 minutes.' });
    const long = liveJob({ fresh: 30 });
    recordWeather(long, minutes(100));
    expect(weatherVerdict(long.state, ms(125), 'assembly').fresh).toBe(true);
    expect(weatherVerdict(long.state, ms(130) + 1, 'assembly')).toMatchObject({ fresh: false, freshMs: 1_800_000 });
  });

  it('with no reading at all the verdict is not ok and says how recent one must be', () => {
    const job = liveJob({ fresh: 10 });
    expect(weatherVerdict(job.state, ms(10))).toMatchObject({
      ok: false,
      reading: null,
      ageMs: null,
      fresh: false,
      overLimit: null,
      caution: null,
      problem: 'Record a weather reading first: there is none yet, and one from the last 10 minutes is needed.',
    });
  });
});

describe('weatherVerdict: the limit of the phase', () => {
  it('a gust within the assembly limit can be over the raising one; at the limit counts as within', () => {
    const job = liveJob();
    recordWeather(job, minutes(100), { gustMs: 13, meanMs: 9 });
    expect(weatherVerdict(job.state, ms(101), 'raising')).toMatchObject({ ok: true, overLimit: null, limit: testWindLimits.raising });
    recordWeather(job, minutes(102), { gustMs: 13.1, meanMs: 9 });
    expect(weatherVerdict(job.state, ms(103), 'assembly')).toMatchObject({ ok: true, phase: 'assembly', limit: testWindLimits.assembly });
    expect(weatherVerdict(job.state, ms(103), 'raising')).toMatchObject({
      ok: false,
      overLimit: 'Gust 13.1 m/s is over the limit of 13 m/s',
      problem: 'The latest reading is over the limits (Gust 13.1 m/s is over the limit of 13 m/s). Wait and record a new reading.',
    });
  });

  it('the mean wind is held to its own limit', () => {
    const job = liveJob();
    recordWeather(job, minutes(100), { gustMs: 12, meanMs: 9.1 });
    expect(weatherVerdict(job.state, ms(101), 'raising').overLimit).toBe('Mean wind 9.1 m/s is over the limit of 9 m/s');
    expect(weatherVerdict(job.state, ms(101), 'assembly').ok).toBe(true);
  });

  it('without a phase given, the verdict uses the job’s current phase', () => {
    const job = liveJob();
    recordWeather(job, minutes(100), { gustMs: 14, meanMs: 8 });
    expect(weatherVerdict(job.state, ms(101))).toMatchObject({ phase: 'assembly', ok: true });
    atReadyBoom(job);
    recordWeather(job, minutes(120), { gustMs: 14, meanMs: 8 });
    expect(weatherVerdict(job.state, ms(121))).toMatchObject({ phase: 'raising', ok: false });
  });

  it('with no wind limit known for the configuration the verdict is never ok, however calm (safe side)', () => {
    const job = liveJob({ windLimits: null });
    recordWeather(job, minutes(100), { gustMs: 1, meanMs: 0.5 });
    expect(weatherVerdict(job.state, ms(101), 'assembly')).toMatchObject({
      ok: false,
      limit: null,
      overLimit: null,
      problem: 'No assembly wind limit is known for this configuration: get the manufacturer’s limit first.',
    });
  });

  it('an over-limit reading is named before a stale one: the crew waits for the wind, not only for a new reading', () => {
    const job = liveJob();
    recordWeather(job, minutes(100), { gustMs: 20, meanMs: 12 });
    expect(weatherVerdict(job.state, ms(200), 'assembly').problem).toMatch(/^The latest reading is over the limits \(Gust 20 m\/s/);
  });
});

describe('weatherVerdict: lightning, ice and poor visibility', () => {
  it('each one stops the verdict in calm wind, and even when no wind limit is known', () => {
    for (const [flag, words] of [
      ['lightning', 'Lightning reported'],
      ['ice', 'Ice reported on the boom or the ground'],
      ['poorVisibility', 'Visibility too poor to see the signaller'],
    ] as const) {
      for (const windLimits of [testWindLimits, null]) {
        const job = liveJob({ windLimits });
        recordWeather(job, minutes(100), { [flag]: true });
        expect(weatherVerdict(job.state, ms(101), 'assembly')).toMatchObject({ ok: false, overLimit: words });
      }
    }
  });
});

describe('weatherVerdict: a gust typed into a wind step', () => {
  /** The gust step of the stage that readies the boom, typed by the signaller at `at`. */
  const typeGust = (job: Job, value: string, at: string) => job.apply('step.completed', { stageId: 'ready-boom', stepId: 'ready.gust', value, photoId: null }, { by: people.sam, at });

  it('typed after the last reading, it counts as the latest wind until a new reading', () => {
    const job = atReadyBoom(liveJob());
    recordWeather(job, minutes(100), { gustMs: 6 });
    typeGust(job, '13.5', minutes(101));
    expect(weatherVerdict(job.state, ms(102), 'raising')).toMatchObject({ ok: false, overLimit: 'Gust 13.5 m/s is over the raising limit of 13 m/s (typed at “Read the gust at the boom tip”)' });
    // The assembly limit (16 m/s) is not passed by 13.5 m/s.
    expect(weatherVerdict(job.state, ms(102), 'assembly').ok).toBe(true);
    recordWeather(job, minutes(103), { gustMs: 7 });
    const after = weatherVerdict(job.state, ms(104), 'raising');
    expect(after).toMatchObject({ ok: true, overLimit: null });
    // The step itself stays out of limit: the panel lists it.
    expect(after.stepsOverLimit).toEqual([{ stageId: 'ready-boom', stepId: 'ready.gust', text: 'Read the gust at the boom tip', reason: 'Gust 13.5 m/s is over the raising limit of 13 m/s.' }]);
  });

  it('typed before the last reading, it does not override the reading', () => {
    const job = atReadyBoom(liveJob());
    typeGust(job, '14', minutes(100));
    recordWeather(job, minutes(101), { gustMs: 6 });
    expect(weatherVerdict(job.state, ms(102), 'raising')).toMatchObject({ ok: true, overLimit: null });
  });

  it('with no reading recorded yet, a gust over the limit is named as the problem', () => {
    const job = atReadyBoom(liveJob());
    typeGust(job, '15', minutes(100));
    expect(weatherVerdict(job.state, ms(101), 'raising')).toMatchObject({ ok: false, reading: null, overLimit: expect.stringMatching(/^Gust 15 m\/s is over the raising limit/) });
  });

  it('words typed where the gust is asked for are out of limit on the step, but are no wind figure for the verdict', () => {
    const job = atReadyBoom(liveJob());
    recordWeather(job, minutes(100), { gustMs: 6 });
    typeGust(job, 'breezy', minutes(101));
    const verdict = weatherVerdict(job.state, ms(102), 'raising');
    expect(verdict).toMatchObject({ ok: true, overLimit: null });
    expect(verdict.stepsOverLimit.map((s) => s.stepId)).toEqual(['ready.gust']);
  });
});

describe('weatherVerdict: the height of the reading', () => {
  // Wind is observed at 10 m above open ground: the standard exposure of surface anemometers in
  // WMO-No. 8 (Guide to Instruments and Methods of Observation), part I, chapter 5, as restated
  // by the Hong Kong Observatory's page "Meteorological instruments - Wind" (hko.gov.hk, section
  // "Meteorological requirements": "The standard exposure of anemometers over level and open
  // terrain is 10 m above the ground"). The rule's own comment gives the same figure from memory.
  it('a reading taken lower than 10 m carries a caution, one at 10 m or above none, one with no height says so', () => {
    const job = liveJob();
    recordWeather(job, minutes(100), { heightM: 9.9 });
    expect(weatherVerdict(job.state, ms(101)).caution).toBe('Read at 9.9 m above ground: wind near the ground reads lower than at the boom tip, which the limit is for.');
    recordWeather(job, minutes(101), { heightM: 10 });
    expect(weatherVerdict(job.state, ms(102)).caution).toBeNull();
    job.apply('weather.recorded', { reading: { meanMs: 3, gustMs: 5, lightning: false, poorVisibility: false, ice: false }, stop: null }, { at: minutes(102) });
    expect(weatherVerdict(job.state, ms(103))).toMatchObject({ ok: true, caution: 'The height of this reading was not recorded; the limit is for the gust at the boom tip.' });
  });
});

describe('weatherOverLimit', () => {
  const limit = { gustMs: 13, meanMs: 9 };
  it('names the first reason in the order lightning, ice, visibility, gust, mean; null when within', () => {
    expect(weatherOverLimit({ meanMs: 10, gustMs: 14, lightning: true, ice: true, poorVisibility: true }, limit)).toBe('Lightning reported');
    expect(weatherOverLimit({ meanMs: 10, gustMs: 14, ice: true, poorVisibility: true }, limit)).toBe('Ice reported on the boom or the ground');
    expect(weatherOverLimit({ meanMs: 10, gustMs: 14, poorVisibility: true }, limit)).toBe('Visibility too poor to see the signaller');
    expect(weatherOverLimit({ meanMs: 10, gustMs: 14 }, limit)).toBe('Gust 14 m/s is over the limit of 13 m/s');
    expect(weatherOverLimit({ meanMs: 10, gustMs: 13 }, limit)).toBe('Mean wind 10 m/s is over the limit of 9 m/s');
    expect(weatherOverLimit({ meanMs: 9, gustMs: 13 }, limit)).toBeNull();
  });

  it('without a limit only the flags count: the verdict, not this function, refuses to go on without a limit', () => {
    expect(weatherOverLimit({ meanMs: 30, gustMs: 40 }, null)).toBeNull();
    expect(weatherOverLimit({ meanMs: 1, gustMs: 2, ice: true }, null)).toBe('Ice reported on the boom or the ground');
  });
});

describe('windPhase, movesBoom and holdGatesBoomMovement', () => {
  it('the phase is assembly until a stage that readies, raises or lowers the boom is active or holding', () => {
    const job = liveJob();
    expect(windPhase(job.state)).toBe('assembly');
    atReadyBoom(job);
    expect(stage(job.state, 'ready-boom').state).toBe('active');
    expect(windPhase(job.state)).toBe('raising');
    job.apply('step.completed', { stageId: 'ready-boom', stepId: 'ready.gust', value: '6', photoId: null }, { by: people.sam });
    job.apply('step.completed', { stageId: 'ready-boom', stepId: 'ready.parts', value: '6', photoId: null }, { by: people.rita });
    expect(stage(job.state, 'ready-boom').state).toBe('holding');
    expect(windPhase(job.state)).toBe('raising');
  });

  it('a stage that has finished readying the boom no longer sets the phase', () => {
    const job = atReadyBoom(liveJob());
    job.apply('stage.skipped', { stageId: 'ready-boom', reason: 'Readied on the last shift' });
    job.apply('stage.skipped', { stageId: 'lift-boom', reason: 'Raised on the last shift' });
    expect(windPhase(job.state)).toBe('assembly');
  });

  it('the plan’s boom declaration decides, whatever the stage is called', () => {
    const { state } = liveJob();
    expect(state.stages.filter(movesBoom).map((s) => s.id)).toEqual(['lift-boom']);
    expect(movesBoom({ id: 'er-raise', boom: 'prepares' })).toBe(false);
    expect(movesBoom({ id: 'hoist-it', boom: 'moves' })).toBe(true);
  });

  it('older plans without the declaration are known by the template’s stage ids', () => {
    expect(movesBoom({ id: 'er-raise' })).toBe(true);
    expect(movesBoom({ id: 'dm-lower' })).toBe(true);
    expect(movesBoom({ id: 'raise' })).toBe(true);
    expect(movesBoom({ id: 'er-preraise' })).toBe(false);
    expect(movesBoom({ id: 'er-raise-check' })).toBe(false);
    expect(movesBoom({ id: 'upraise' })).toBe(false);
    const old = smallPlan();
    old.stages = old.stages.map((s) => {
      const { boom: _declared, ...rest } = s;
      const id = s.id === 'ready-boom' ? 'er-preraise' : s.id === 'lift-boom' ? 'er-raise' : s.id;
      return { ...rest, id, dependsOn: s.dependsOn.map((d) => (d === 'ready-boom' ? 'er-preraise' : d)) };
    });
    const job = atReadyBoom(liveJob({ plan: old }));
    expect(stage(job.state, 'er-preraise').boom).toBeUndefined();
    expect(windPhase(job.state)).toBe('raising');
    expect(holdGatesBoomMovement(job.state, 'er-preraise')).toBe(true);
    expect(job.state.stages.filter(movesBoom).map((s) => s.id)).toEqual(['er-raise']);
  });

  it('only a hold whose release lets a boom-moving stage start needs the fresh reading', () => {
    const { state } = liveJob();
    expect(holdGatesBoomMovement(state, 'ready-boom')).toBe(true);
    expect(holdGatesBoomMovement(state, 'ground')).toBe(false);
    expect(holdGatesBoomMovement(state, 'lift-boom')).toBe(false);
  });
});

describe('step order', () => {
  const orderPlan = (): Plan => {
    const plan = smallPlan();
    plan.stages[0].steps = [
      planStep('a', 'First'),
      planStep('b', 'Second', { after: ['a'] }),
      planStep('c', 'Third', { after: ['b'] }),
      planStep('d', 'Beside the third', { after: ['a', 'gone'] }),
      planStep('e', 'Alone'),
    ];
    return plan;
  };

  it('stepsNeededFirst names the steps not yet done that a step waits for; none once they are done; an `after` to a step no longer in the plan is ignored', () => {
    const job = liveJob({ plan: orderPlan() });
    const ground = () => stage(job.state, 'ground');
    expect(stepsNeededFirst(ground(), 'b')).toEqual([{ id: 'a', text: 'First' }]);
    expect(stepsNeededFirst(ground(), 'd')).toEqual([{ id: 'a', text: 'First' }]);
    expect(stepsNeededFirst(ground(), 'a')).toEqual([]);
    expect(stepsNeededFirst(ground(), 'no-such-step')).toEqual([]);
    job.apply('step.completed', { stageId: 'ground', stepId: 'a', value: null, photoId: null }, { by: people.rita });
    expect(stepsNeededFirst(ground(), 'b')).toEqual([]);
    expect(stepsNeededFirst(ground(), 'd')).toEqual([]);
    // Only direct predecessors: c waits for b, which waits for a.
    expect(stepsNeededFirst(ground(), 'c')).toEqual([{ id: 'b', text: 'Second' }]);
  });

  it('stepsAfter follows the order through every later step, directly or not, and never names the step itself or an unrelated one', () => {
    const { state } = liveJob({ plan: orderPlan() });
    const ground = stage(state, 'ground');
    expect(stepsAfter(ground, 'a').sort()).toEqual(['b', 'c', 'd']);
    expect(stepsAfter(ground, 'b')).toEqual(['c']);
    expect(stepsAfter(ground, 'c')).toEqual([]);
    expect(stepsAfter(ground, 'e')).toEqual([]);
  });

  it('stepsAfter ends on steps that wait for each other in a circle (a plan the validator refuses, read safely anyway)', () => {
    const { state } = liveJob();
    const ground = structuredClone(stage(state, 'ground'));
    ground.steps[0].after = ['ground.photo'];
    expect(stepsAfter(ground, 'ground.slope').sort()).toEqual(['ground.mats', 'ground.photo']);
  });
});

describe('checkRetryAt', () => {
  // 30 seconds between a person's failed value check and their next try: common practice, no
  // source (the rule's own comment: time to read the controller again, not to guess).
  it('the same person waits 30 seconds after their latest failure; someone else may try at once', () => {
    const job = liveJob();
    const fail = (by: Who, at: string) => job.apply('hold.check.failed', { stageId: 'ground', holdId: 'ground.hold', role: 'operator', fields: ['parts'] }, { by, at });
    const hold = () => stage(job.state, 'ground').hold!;
    expect(checkRetryAt(hold(), people.otto.userId, ms(0))).toBeNull();
    fail(people.otto, '2026-03-02T10:05:00.000Z');
    expect(checkRetryAt(hold(), people.otto.userId, Date.parse('2026-03-02T10:05:29.999Z'))).toBe('2026-03-02T10:05:30.000Z');
    expect(checkRetryAt(hold(), people.otto.userId, Date.parse('2026-03-02T10:05:30.000Z'))).toBeNull();
    expect(checkRetryAt(hold(), people.sam.userId, Date.parse('2026-03-02T10:05:01.000Z'))).toBeNull();
    // A later failure by someone else does not restart Otto's wait; his own later failure does.
    fail(people.sam, '2026-03-02T10:05:10.000Z');
    expect(checkRetryAt(hold(), people.otto.userId, Date.parse('2026-03-02T10:05:31.000Z'))).toBeNull();
    fail(people.otto, '2026-03-02T10:06:00.000Z');
    expect(checkRetryAt(hold(), people.otto.userId, Date.parse('2026-03-02T10:06:10.000Z'))).toBe('2026-03-02T10:06:30.000Z');
  });
});

describe('stagesReadyToStart', () => {
  it('lists locked stages whose dependencies are all done or skipped', () => {
    const job = liveJob();
    expect(stagesReadyToStart(job.state)).toEqual([]);
    // While the job is stopped nothing is activated, so a skipped stage leaves the stages after it ready to start.
    job.apply('job.stopped', { reason: 'Break', pressedAt: minutes(50) });
    job.apply('stage.skipped', { stageId: 'ground', reason: 'Signed off yesterday' });
    expect(stagesReadyToStart(job.state)).toEqual(['assemble', 'ballast']);
  });
});
