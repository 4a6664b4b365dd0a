import { describe, expect, it } from 'vitest';
import type { BoardHold, BoardStage, BoardState, BoardStep } from '../../shared/board/types';
import { planSchema, type Plan } from '../../shared/schemas/plan';
import {
  ageWords,
  boardStatus,
  currentStages,
  focusStage,
  myOpenSteps,
  nextStep,
  outOfLimitAll,
  outOfLimitBefore,
  outOfLimitWords,
  pendingAcknowledgments,
  radioCheckOf,
} from '../../src/components/board/progress';
import { revisePlan } from '../../src/components/board/revision';
import { openJobTarget, viewForRoles, viewsForRoles } from '../../src/components/board/views';
import { boardEventLine, clause, describeChange, sentences } from '../../src/components/board/words';

function step(id: string, overrides: Partial<BoardStep> = {}): BoardStep {
  return { id, text: `Step ${id}`, state: 'open', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null, doneBy: null, required: false, after: [], outOfLimit: null, ...overrides };
}

function hold(id: string, overrides: Partial<BoardHold> = {}): BoardHold {
  return { id, state: 'waiting', title: `Hold ${id}`, instruction: 'Check it', mandatory: false, requiredRoles: ['operator', 'signaller'], valueCheck: null, acknowledgments: [], releasedBy: null, checkFailures: [], failuresSinceReview: 0, checkLocked: false, lastReview: null, ...overrides };
}

function stage(id: string, order: number, overrides: Partial<BoardStage> = {}): BoardStage {
  return {
    id,
    order,
    title: `Stage ${id}`,
    summary: '',
    state: 'locked',
    dependsOn: [],
    cautions: [],
    involvesCraneMovement: false,
    steps: [],
    hold: null,
    skipReason: null,
    blockedBy: null,
    ...overrides,
  };
}

function board(stages: BoardStage[], state: BoardState['job']['state'] = 'live'): BoardState {
  return {
    seq: 10,
    job: { id: 'job-1', name: 'Job', site: 'Site', kind: 'erection', state, craneFleetNumber: 'LC-07', stop: null, lastResume: null, cancelReason: null },
    planVersion: 1,
    stages,
    crew: [],
    briefed: [],
    weather: null,
    windLimits: null,
    defects: [],
  };
}

describe('which view a person lands on', () => {
  it('takes each role to its own view, a supervisor first, and anyone else to the whole board', () => {
    expect(viewForRoles(['supervisor'])).toBe('console');
    expect(viewForRoles(['operator'])).toBe('cab');
    expect(viewForRoles(['signaller'])).toBe('signaller');
    expect(viewForRoles(['rigger'])).toBe('rigger');
    expect(viewForRoles(['viewer'])).toBe('board');
    expect(viewForRoles([])).toBe('board');
    // A supervisor who also rigs releases holds: the console wins whatever order the roles come in.
    expect(viewForRoles(['rigger', 'signaller', 'supervisor'])).toBe('console');
    expect(viewForRoles(['rigger', 'signaller'])).toBe('signaller');
  });

  it('always offers the whole board and the display, plus the person’s own views', () => {
    expect(viewsForRoles(['viewer'])).toEqual(['board', 'display']);
    expect(viewsForRoles(['signaller', 'rigger'])).toEqual(['board', 'signaller', 'rigger', 'display']);
  });

  it('opens ready, live and stopped jobs on the board and the rest on the planning page', () => {
    expect(openJobTarget({ id: 'j', state: 'live', myRoles: ['operator'] })).toEqual({ name: 'cab', params: { id: 'j' } });
    expect(openJobTarget({ id: 'j', state: 'stopped', myRoles: ['rigger'] })).toEqual({ name: 'rigger', params: { id: 'j' } });
    expect(openJobTarget({ id: 'j', state: 'ready', myRoles: [] })).toEqual({ name: 'board', params: { id: 'j' } });
    expect(openJobTarget({ id: 'j', state: 'planning', myRoles: ['supervisor'] })).toEqual({ name: 'job', params: { id: 'j' } });
    expect(openJobTarget({ id: 'j', state: 'complete', myRoles: ['operator'] })).toEqual({ name: 'job', params: { id: 'j' } });
  });
});

describe('the cab’s stage and next step', () => {
  const stages = [
    stage('site', 1, { state: 'done' }),
    stage('reeving', 8, { state: 'active', steps: [step('reeving.a', { state: 'done' }), step('reeving.b')] }),
    stage('tension', 7, { state: 'holding', steps: [step('tension.a', { state: 'done' })], hold: hold('tension.hold', { state: 'open' }) }),
    stage('raise', 9),
  ];

  it('leads with the earliest stage in progress or holding, in plan order', () => {
    expect(currentStages(board(stages)).map((s) => s.id)).toEqual(['tension', 'reeving']);
    expect(focusStage(board(stages))?.id).toBe('tension');
    expect(focusStage(board([stage('a', 1, { state: 'done' })]))).toBeNull();
  });

  it('names the first open step, then the hold point once every step is done', () => {
    const reeving = stages[1];
    const next = nextStep(reeving);
    expect(next.kind === 'step' && next.step.id).toBe('reeving.b');
    const tension = stages[2];
    const atHold = nextStep(tension);
    expect(atHold.kind === 'hold' && atHold.hold.id).toBe('tension.hold');
    expect(nextStep(null)).toEqual({ kind: 'none' });
    expect(nextStep(stage('x', 1, { state: 'done', hold: hold('x.hold', { state: 'released' }) }))).toEqual({ kind: 'none' });
  });

  it('says a blocked stage is blocked before naming any step', () => {
    const blocked = stage('b', 1, { state: 'active', steps: [step('b.1')], blockedBy: { description: 'Bent lacing', at: '2025-01-01T10:00:00Z', by: 'Callum' } });
    expect(nextStep(blocked)).toEqual({ kind: 'blocked', description: 'Bent lacing' });
  });

  it('reports the board as stopped over holding over open', () => {
    expect(boardStatus(board(stages))).toBe('holding');
    expect(boardStatus(board([stages[1]]))).toBe('open');
    expect(boardStatus(board(stages, 'stopped'))).toBe('stopped');
    expect(boardStatus(board(stages, 'ready'))).toBe('not-started');
    expect(boardStatus(board(stages, 'complete'))).toBe('finished');
  });

  it('reminds of the radio check where the plan has one or the crane moves', () => {
    expect(radioCheckOf(stage('s', 1, { steps: [step('s.radio-check', { state: 'done' })] }))).toEqual({ done: true });
    expect(radioCheckOf(stage('s', 1, { steps: [step('s.radio-check')] }))).toEqual({ done: false });
    expect(radioCheckOf(stage('s', 1, { involvesCraneMovement: true }))).toEqual({ done: false });
    expect(radioCheckOf(stage('s', 1, { steps: [step('s.pins')] }))).toBeNull();
  });
});

describe('what a person still has to answer', () => {
  const open = hold('h', { state: 'open', requiredRoles: ['operator', 'signaller'] });

  it('lists open holds needing one of the person’s roles that nobody has taken', () => {
    const b = board([stage('s', 1, { state: 'holding', hold: open })]);
    expect(pendingAcknowledgments(b, 'u-op', ['operator']).map((p) => [p.hold.id, p.role])).toEqual([['h', 'operator']]);
    expect(pendingAcknowledgments(b, 'u-rig', ['rigger'])).toEqual([]);
  });

  it('drops a hold the person already answered, even under another role, and a role someone else took', () => {
    const answered = hold('h', { ...open, acknowledgments: [{ role: 'signaller', userId: 'u-both', name: 'Aisha', at: '2025-01-01T10:00:00Z' }] });
    const b = board([stage('s', 1, { state: 'holding', hold: answered })]);
    // One person never answers one hold under two roles.
    expect(pendingAcknowledgments(b, 'u-both', ['operator', 'signaller'])).toEqual([]);
    expect(pendingAcknowledgments(b, 'u-other', ['signaller'])).toEqual([]);
    expect(pendingAcknowledgments(b, 'u-op', ['operator']).map((p) => p.role)).toEqual(['operator']);
  });

  it('ignores holds that are not open yet and stages blocked by a defect', () => {
    const waiting = board([stage('s', 1, { state: 'active', hold: hold('h'), steps: [step('s.1')] })]);
    expect(pendingAcknowledgments(waiting, 'u', ['operator'])).toEqual([]);
    const blocked = board([stage('s', 1, { state: 'holding', hold: open, blockedBy: { description: 'x', at: '', by: '' } })]);
    expect(pendingAcknowledgments(blocked, 'u', ['operator'])).toEqual([]);
  });

  it('lists the open steps of active stages that the person’s roles may complete', () => {
    const b = board([
      stage('a', 1, { state: 'active', steps: [step('a.1', { allowedRoles: ['operator', 'signaller'] }), step('a.2'), step('a.3', { allowedRoles: ['operator'], state: 'done' })] }),
      stage('b', 2, { state: 'locked', steps: [step('b.1', { allowedRoles: ['operator'] })] }),
    ]);
    expect(myOpenSteps(b, ['operator']).map((m) => m.step.id)).toEqual(['a.1']);
    expect(myOpenSteps(b, ['rigger']).map((m) => m.step.id)).toEqual(['a.2']);
  });
});

describe('words for changes', () => {
  it('describes a stop, a hold opening and a release as facts, never as instructions', () => {
    const before = board([stage('t', 7, { state: 'active', steps: [step('t.1')], hold: hold('t.hold') })]);
    const opened = board([stage('t', 7, { state: 'holding', steps: [step('t.1', { state: 'done' })], hold: hold('t.hold', { state: 'open', title: 'Tip still on the ground' }) })]);
    const released = board([stage('t', 7, { state: 'done', steps: [step('t.1', { state: 'done' })], hold: hold('t.hold', { state: 'released', title: 'Tip still on the ground' }) })]);
    const stopped: BoardState = { ...opened, job: { ...opened.job, state: 'stopped', stop: { raisedBy: { userId: 'u', name: 'Callum Frey', role: 'rigger' }, pressedAt: '', at: '', reason: null, alsoPressedBy: [] } } };

    const sentences = [describeChange(before, opened), describeChange(opened, released), describeChange(opened, stopped)];
    expect(sentences).toEqual(['Hold point open: Tip still on the ground.', 'Hold point released: Tip still on the ground.', 'Job stopped on the board by Callum Frey.']);
    // Speech reads these aloud: none may sound like a signal to move.
    for (const s of sentences) expect(s).not.toMatch(/\b(go|move|raise|lower|hoist|swing|travel|proceed|continue)\b/i);
  });

  it('says nothing for the first board or when no state changed', () => {
    const b = board([stage('t', 1, { state: 'active' })]);
    expect(describeChange(null, b)).toBeNull();
    expect(describeChange(b, { ...b, seq: 11 })).toBeNull();
  });

  it('words board events as plain sentences with step and hold names and the value recorded', () => {
    const parts = { kind: 'reading' as const, label: 'Parts of line', unit: null, componentKind: null, typeId: null, plannedSerial: null };
    const b = board([
      stage('t', 1, {
        steps: [step('t.1', { text: 'Pin the tip.' }), step('t.2', { text: 'Count the parts of line', records: parts })],
        hold: hold('t.hold', { title: 'Pins counted' }),
      }),
    ]);
    const by = { userId: 'u', name: 'Priya', role: 'rigger' };
    // The step's own full stop is not doubled.
    expect(boardEventLine({ type: 'step.completed', data: { stepId: 't.1', value: null }, by }, b)).toBe('Marked done: Pin the tip.');
    expect(boardEventLine({ type: 'step.completed', data: { stepId: 't.2', value: '5', outOfLimit: { reason: 'Parts of line 5, planned 6.' } }, by }, b)).toBe(
      'Marked done: Count the parts of line. Recorded parts of line 5. OUT OF LIMIT: Parts of line 5, planned 6.',
    );
    expect(boardEventLine({ type: 'hold.acknowledged', data: { holdId: 't.hold', role: 'signaller' }, by }, b)).toBe('Acknowledged the hold point “Pins counted” as signaller.');
    expect(boardEventLine({ type: 'job.stopped', data: { reason: null }, by }, b)).toBe('Raised an ALL STOP.');
    expect(boardEventLine({ type: 'weather.recorded', data: { reading: { meanMs: 6.5, gustMs: 9.1, heightM: 12 }, overLimit: null }, by }, b)).toBe(
      'Recorded the wind: mean 6.5 m/s, gust 9.1 m/s at 12 m. Within the limit.',
    );
  });

  it('never shows an internal event name or a list of fields, even for an event it does not know', () => {
    const by = { userId: 'u', name: 'Priya', role: 'rigger' };
    const line = boardEventLine({ type: 'board.somethingNew', data: { stageId: 's1', secretField: 1 }, by }, null);
    expect(line).not.toMatch(/somethingNew|stageId|secretField/);
    expect(line).toMatch(/^[A-Z].*\.$/);
    // A step or hold the names do not know is said in words, not by its id.
    expect(boardEventLine({ type: 'step.reopened', data: { stepId: 'er-reeve.block' }, by }, null)).toBe('Reopened: a step no longer in the plan.');
  });

  it('joins sentences with exactly one full stop each', () => {
    expect(sentences('Reason: Wind over the limit.', 'Within the limit', '', null, false)).toBe('Reason: Wind over the limit. Within the limit.');
    expect(clause('Boom hoist stopped..')).toBe('Boom hoist stopped');
  });

  it('gives the age of a reading in minutes and hours', () => {
    const now = Date.parse('2025-01-01T12:00:00Z');
    expect(ageWords('2025-01-01T11:59:40Z', now)).toBe('just now');
    expect(ageWords('2025-01-01T11:56:00Z', now)).toBe('4 min ago');
    expect(ageWords('2025-01-01T09:55:00Z', now)).toBe('2 h 5 min ago');
  });
});

describe('plan revision after a defect', () => {
  const plan: Plan = {
    kind: 'erection',
    briefing: { title: 'Briefing', sections: [] },
    stages: [
      {
        id: 'sections',
        title: 'Boom sections',
        summary: '',
        dependsOn: [],
        cautions: [],
        involvesCraneMovement: true,
        steps: [
          { id: 'sections.j1', text: 'Pin joint 1', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null },
          { id: 'sections.j2', text: 'Pin joint 2', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null },
        ],
        hold: null,
      },
      { id: 'tip', title: 'Tip', summary: '', dependsOn: ['sections'], cautions: [], involvesCraneMovement: false, steps: [], hold: null },
    ],
  };

  it('removes the chosen steps and appends a replacement with a new valid id, leaving other stages alone', () => {
    const revised = revisePlan(plan, { stageId: 'sections', removeStepIds: ['sections.j2'], addStep: { text: 'Fit spare insert, pin joint 2', roles: ['rigger'], requiresPhoto: true }, nextVersion: 2 });
    expect(revised.stages[0].steps.map((s) => s.id)).toEqual(['sections.j1', 'sections.v2-1']);
    expect(revised.stages[0].steps[1]).toMatchObject({ text: 'Fit spare insert, pin joint 2', requiresPhoto: true, allowedRoles: ['rigger'] });
    expect(revised.stages[1]).toBe(plan.stages[1]);
    expect(planSchema.safeParse(revised).success).toBe(true);
  });

  it('keeps a new step id unique and within 64 characters for a long stage id', () => {
    const longId = 'x'.repeat(62);
    const long: Plan = { ...plan, stages: [{ ...plan.stages[0], id: longId, steps: [] }] };
    const revised = revisePlan(long, { stageId: longId, removeStepIds: [], addStep: { text: 'New', roles: ['rigger'], requiresPhoto: false }, nextVersion: 3 });
    const id = revised.stages[0].steps[0].id;
    expect(id.length).toBeLessThanOrEqual(64);
    expect(planSchema.safeParse(revised).success).toBe(true);
  });
});

describe('readings out of limit', () => {
  const parts = { kind: 'reading' as const, label: 'Parts of line', unit: null, componentKind: null, typeId: null, plannedSerial: null };
  const out = (value: number, planned: number) => ({ reason: `${value} was recorded; the plan says ${planned}.`, kind: 'plan' as const, value: String(value), valueNumber: value, planned, tolerance: 0, limit: null, unit: null, source: 'configuration' });

  it('says the reading beside the planned value or the limit, with its unit', () => {
    expect(outOfLimitWords({ records: parts, outOfLimit: out(5, 6) })).toBe('Parts of line: 5 recorded, the plan says 6.');
    const slope = { ...parts, label: 'Slope', unit: '%' };
    expect(outOfLimitWords({ records: slope, outOfLimit: { ...out(1.4, 0), kind: 'max', planned: null, tolerance: null, limit: 1, unit: '%' } })).toBe('Slope: 1.4 % recorded, over the limit of 1 %.');
    const gust = { ...parts, label: 'Wind gust', unit: 'm/s' };
    expect(outOfLimitWords({ records: gust, outOfLimit: { ...out(14, 0), kind: 'wind', planned: null, tolerance: null, limit: 11, unit: 'm/s', source: 'raising' } })).toBe('Wind gust: 14 m/s recorded, over the raising limit of 11 m/s.');
    expect(outOfLimitWords({ records: parts, outOfLimit: { ...out(0, 6), value: 'six-ish', valueNumber: null } })).toBe('Parts of line: “six-ish” (not a number) recorded, the plan says 6.');
    expect(outOfLimitWords({ records: parts, outOfLimit: null })).toBe('');
  });

  it('shows at a hold what its own stage and the stages it waits for recorded out of limit, back to a hold already released', () => {
    const bad = (id: string) => step(id, { state: 'done', records: parts, outOfLimit: out(5, 6) });
    const b = board([
      stage('a', 1, { state: 'done', steps: [bad('a.1')], hold: hold('a.hold', { state: 'released' }) }),
      stage('b', 2, { state: 'done', dependsOn: ['a'], steps: [bad('b.1')] }),
      stage('c', 3, { state: 'holding', dependsOn: ['b'], steps: [bad('c.1'), step('c.2', { state: 'done' })], hold: hold('c.hold', { state: 'open' }) }),
      stage('d', 4, { state: 'active', steps: [bad('d.1')] }),
    ]);
    expect(outOfLimitBefore(b, b.stages[2]).map((l) => l.stepId)).toEqual(['b.1', 'c.1']);
    expect(outOfLimitAll(b).map((l) => l.words)).toEqual([
      'Stage 1, Parts of line: 5 recorded, the plan says 6.',
      'Stage 2, Parts of line: 5 recorded, the plan says 6.',
      'Stage 3, Parts of line: 5 recorded, the plan says 6.',
      'Stage 4, Parts of line: 5 recorded, the plan says 6.',
    ]);
  });
});
