import { describe, expect, it } from 'vitest';
import { board, hold, stage, step } from '../../../shared/board/states';
import type { BoardState } from '../../../../shared/board/types';
import { openJobTarget, viewForRoles, viewsForRoles } from '../../../../src/components/board/views';
import { describeChange } from '../../../../src/words/board';

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

  it('opens ready, live, stopped and made-safe jobs on the board and the rest on the planning page', () => {
    expect(openJobTarget({ id: 'j', state: 'live', myRoles: ['operator'] })).toEqual({ name: 'cab', params: { id: 'j' } });
    // A made-safe job waits for its start-of-shift hold, which lives on the board.
    expect(openJobTarget({ id: 'j', state: 'made_safe', myRoles: ['operator'] })).toEqual({ name: 'cab', params: { id: 'j' } });
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

});
