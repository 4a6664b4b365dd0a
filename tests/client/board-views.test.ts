import { describe, expect, it } from 'vitest';
import type { BoardHold, BoardStage, BoardState, BoardStep } from '../../shared/board/types';
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
});
