import { describe, expect, it } from 'vitest';
import {
  ageWords,
  boardStatus,
  currentStages,
  focusStage,
  myOpenSteps,
  nextStep,
  holdsForMe,
  outOfLimitLines,
  outOfLimitWords,
  pendingAcknowledgments,
  radioCheckOf,
  stageTitles,
} from '../../../shared/board/status.js';
import { outOfLimitBeforeHold, outOfLimitSteps, readingsBlockingRelease } from '../../../shared/board/readings.js';
import { board, hold, stage, step } from './states.js';

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

  it('never reads a board that is ending its shift or made safe as open or holding', () => {
    const makingSafe = { ...board(stages), shift: { number: 1, phase: 'making_safe' as const, startedAt: null, makeSafe: null, start: null } };
    expect(boardStatus(makingSafe)).toBe('making-safe');
    // A stop pressed while making safe still says stopped first.
    expect(boardStatus({ ...makingSafe, job: { ...makingSafe.job, state: 'stopped' } })).toBe('stopped');
    expect(boardStatus(board(stages, 'made_safe'))).toBe('made-safe');
  });

  it('reminds of the radio check where the plan has one or the crane moves', () => {
    expect(radioCheckOf(stage('s', 1, { steps: [step('s.radio-check', { state: 'done' })] }))).toEqual({ done: true });
    expect(radioCheckOf(stage('s', 1, { steps: [step('s.radio-check')] }))).toEqual({ done: false });
    expect(radioCheckOf(stage('s', 1, { involvesCraneMovement: true }))).toEqual({ done: false });
    expect(radioCheckOf(stage('s', 1, { steps: [step('s.pins')] }))).toBeNull();
  });
});

describe('stage names for dependencies', () => {
  it('names each stage by its place in the plan and its title', () => {
    const titles = stageTitles(board([stage('site', 1), stage('reeving', 8, { title: 'Reeve the main hoist' })]));
    expect(titles.get('reeving')).toBe('8. Reeve the main hoist');
    expect(titles.get('site')).toBe('1. Stage site');
    expect(titles.has('raise')).toBe(false);
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

  it('gives the cab the holds the person may still acknowledge or withdraw, not those another person answered for their role', () => {
    const ack = (role: 'operator' | 'signaller', userId: string) => ({ role, userId, name: userId, at: '2025-01-01T10:00:00Z' });
    const b = board([
      stage('a', 1, { state: 'holding', hold: hold('a.hold', { state: 'open' }) }),
      stage('b', 2, { state: 'holding', hold: hold('b.hold', { state: 'acknowledged', acknowledgments: [ack('operator', 'u-op'), ack('signaller', 'u-sig')] }) }),
      stage('c', 3, { state: 'holding', hold: hold('c.hold', { state: 'open', acknowledgments: [ack('operator', 'u-op2')] }) }),
      stage('d', 4, { state: 'done', hold: hold('d.hold', { state: 'released', acknowledgments: [ack('operator', 'u-op')] }) }),
    ]);
    expect(holdsForMe(b, 'u-op', ['operator']).map((s) => s.id)).toEqual(['a', 'b']);
    expect(holdsForMe(b, 'u-rig', ['rigger'])).toEqual([]);
    // The signaller's view asks under that role alone: a hold this person answered as operator is not listed there.
    expect(holdsForMe(b, 'u-op', ['signaller']).map((s) => s.id)).toEqual(['a', 'c']);
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

describe('how old a reading is', () => {
  it('gives the age of a reading in minutes and hours', () => {
    const now = Date.parse('2025-01-01T12:00:00Z');
    expect(ageWords('2025-01-01T11:59:40Z', now)).toBe('just now');
    expect(ageWords('2025-01-01T11:56:00Z', now)).toBe('4 min ago');
    expect(ageWords('2025-01-01T09:55:00Z', now)).toBe('2 h 5 min ago');
  });

  it('says the age is unknown for a time it cannot read, rather than guessing', () => {
    expect(ageWords('not a time', Date.parse('2025-01-01T12:00:00Z'))).toBe('unknown age');
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

  it('shows at a hold what its own stage and every stage it waits for recorded out of limit, past holds already released', () => {
    const bad = (id: string) => step(id, { state: 'done', records: parts, outOfLimit: out(5, 6) });
    const b = board([
      stage('a', 1, { state: 'done', steps: [bad('a.1')], hold: hold('a.hold', { state: 'released' }) }),
      stage('b', 2, { state: 'done', dependsOn: ['a'], steps: [bad('b.1')] }),
      stage('c', 3, { state: 'holding', dependsOn: ['b'], steps: [bad('c.1'), step('c.2', { state: 'done' })], hold: hold('c.hold', { state: 'open' }) }),
      stage('d', 4, { state: 'active', steps: [bad('d.1')] }),
    ]);
    expect(outOfLimitLines(outOfLimitBeforeHold(b, 'c')).map((l) => l.stepId)).toEqual(['a.1', 'b.1', 'c.1']);
    expect(outOfLimitLines(outOfLimitSteps(b)).map((l) => l.words)).toEqual([
      'Stage 1, Parts of line: 5 recorded, the plan says 6.',
      'Stage 2, Parts of line: 5 recorded, the plan says 6.',
      'Stage 3, Parts of line: 5 recorded, the plan says 6.',
      'Stage 4, Parts of line: 5 recorded, the plan says 6.',
    ]);
  });
  it('lists at a mandatory hold the reading an upstream optional hold let pass, the same step the server refuses the release for', () => {
    // Before issue 15 the hold card stopped its walk at a released hold and offered a release the server refused with out_of_limit.
    const b = board([
      stage('a', 1, { state: 'done', steps: [step('a.1', { state: 'done', records: parts, outOfLimit: out(5, 6) })], hold: hold('a.hold', { state: 'released', mandatory: false }) }),
      stage('b', 2, { state: 'holding', dependsOn: ['a'], steps: [step('b.1', { state: 'done' })], hold: hold('b.hold', { state: 'acknowledged', mandatory: true }) }),
    ]);
    const shown = outOfLimitLines(outOfLimitBeforeHold(b, 'b'));
    expect(shown.map((l) => [l.stepId, l.words])).toEqual([['a.1', 'Stage 1, Parts of line: 5 recorded, the plan says 6.']]);
    expect(readingsBlockingRelease(b, 'b').map((e) => e.stepId)).toEqual(shown.map((l) => l.stepId));
  });
});
