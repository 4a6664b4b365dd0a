import { describe, expect, it } from 'vitest';
import {
  acknowledgmentsLeaving,
  briefingShift,
  handoverFacts,
  isActingSupervisor,
  isBriefed,
  makeSafeChecklist,
  rolesLeftUncovered,
  shiftEndBlockers,
  shiftOf,
  shiftStartMissing,
  SHIFT_START_HOLD_ID,
  unbriefedCrew,
  withdrawAcknowledgments,
  workPhase,
} from '../../../shared/board/shifts.js';
import type { BoardState, ShiftState } from '../../../shared/board/types.js';
import { board, hold, stage, step } from './states.js';
import { testWindLimits } from './board-plan.js';

/**
 * The pure rules of shifts (shared/board/shifts.ts) on small invented boards. The make-safe items
 * expected here are written out by hand from shared/plan/templates/shift.ts, so a change to which
 * items a phase draws shows here (common practice, no source: the checks a crew makes before
 * leaving a boom for the night).
 */

const T = Date.parse('2026-03-02T18:00:00.000Z');
const at = (minutesAfter: number) => new Date(T + minutesAfter * 60_000).toISOString();
const crew: BoardState['crew'] = [
  { userId: 'u-sue', name: 'Sue Marsh', role: 'supervisor' },
  { userId: 'u-otto', name: 'Otto Brand', role: 'operator' },
  { userId: 'u-rita', name: 'Rita Venn', role: 'rigger' },
  { userId: 'u-rita', name: 'Rita Venn', role: 'signaller' },
];
const sign = (userId: string, name: string, minutesAfter = 0) => ({ userId, name, at: at(minutesAfter) });

/** A board made safe at the end of shift 1, its start-of-shift hold as given. */
function madeSafe(start: ShiftState['start'] = { inspection: null, operator: null, supervisor: null }): BoardState {
  return {
    ...board([stage('ground', 1, { state: 'done' }), stage('upper', 2, { state: 'active', involvesCraneMovement: true, steps: [step('upper.1')] })], 'made_safe'),
    crew,
    windLimits: testWindLimits,
    weatherFreshMinutes: 15,
    shift: { number: 1, phase: 'made_safe', startedAt: at(-600), makeSafe: null, start },
    actingSupervisor: { userId: 'u-sue', name: 'Sue Marsh', since: at(-600) },
  };
}
const calm = (minutesAfter: number): BoardState['weather'] => ({ meanMs: 3, gustMs: 5, lightning: false, poorVisibility: false, ice: false, heightM: 10, at: at(minutesAfter), by: { userId: 'u-rita', name: 'Rita Venn' } });

describe('which shift and who is briefed for it', () => {
  it('a board from before shifts is in its first shift, working', () => {
    expect(shiftOf(board([]))).toEqual({ number: 1, phase: 'working', startedAt: null, makeSafe: null, start: null });
  });

  it('while the job is made safe people are briefed for the next shift; otherwise for the one under way', () => {
    const live = { ...board([]), shift: { number: 3, phase: 'working' as const, startedAt: null, makeSafe: null, start: null } };
    expect(briefingShift(live)).toBe(3);
    expect(briefingShift({ ...live, job: { ...live.job, state: 'made_safe' } })).toBe(3 + 1);
  });

  it('briefed means this plan version and this shift; an old entry without a shift counts as shift 1', () => {
    const b: BoardState = { ...board([]), crew, planVersion: 2, briefed: [{ userId: 'u-otto', name: 'Otto Brand', planVersion: 2, at: at(0) }] };
    expect(isBriefed(b, 'u-otto')).toBe(true);
    expect(isBriefed({ ...b, planVersion: 3 }, 'u-otto')).toBe(false);
    const shift2 = { ...b, shift: { number: 2, phase: 'working' as const, startedAt: null, makeSafe: null, start: null } };
    expect(isBriefed(shift2, 'u-otto')).toBe(false);
    expect(isBriefed({ ...shift2, briefed: [{ ...b.briefed[0], shift: 2 }] }, 'u-otto')).toBe(true);
    // Made safe after shift 1: the shift-1 briefing no longer lets anyone act.
    expect(isBriefed({ ...b, job: { ...b.job, state: 'made_safe' }, shift: { number: 1, phase: 'made_safe', startedAt: null, makeSafe: null, start: null } }, 'u-otto')).toBe(false);
  });

  it('lists each unbriefed person once, whatever roles they hold; a viewer, who cannot acknowledge a briefing, is not asked', () => {
    const withViewer = [...crew, { userId: 'u-vic', name: 'Vic Lowe', role: 'viewer' as const }];
    const b: BoardState = { ...board([]), crew: withViewer, briefed: [{ userId: 'u-otto', name: 'Otto Brand', planVersion: 1, at: at(0), shift: 1 }] };
    expect(unbriefedCrew(b)).toEqual([
      { userId: 'u-sue', name: 'Sue Marsh' },
      { userId: 'u-rita', name: 'Rita Venn' },
    ]);
  });

  it('only the acting supervisor acts as one; a board from before the role lets any supervisor act', () => {
    const b = madeSafe();
    expect(isActingSupervisor(b, 'u-sue')).toBe(true);
    expect(isActingSupervisor(b, 'u-ned')).toBe(false);
    expect(isActingSupervisor({ ...b, actingSupervisor: undefined }, 'u-ned')).toBe(true);
    expect(isActingSupervisor({ ...b, actingSupervisor: null }, 'u-ned')).toBe(true);
  });
});

describe('the make-safe checklist for the phase of the work', () => {
  /** A stage that moves the boom: declared by the plan, or (`legacy`) known only by its id as in older plans. */
  const raise = (state: 'active' | 'holding' | 'done', id = 'lift-boom', legacy = false) => stage(id, 5, { state, ...(legacy ? {} : { boom: 'moves' as const }) });

  it('erection: on the ground until the raise is done, then boom up; an older plan’s raise is known by its id', () => {
    expect(workPhase(board([raise('active')]))).toBe('boom-on-ground');
    expect(workPhase(board([raise('done')]))).toBe('boom-up');
    // Every step of the raise done, its hold (the function tests) not yet released: the boom is up all the same.
    expect(workPhase(board([raise('holding')]))).toBe('boom-up');
    expect(workPhase(board([raise('done', 'er-raise', true)]))).toBe('boom-up');
    // A stage that only readies the boom moves nothing.
    expect(workPhase(board([stage('ready', 4, { state: 'done', boom: 'prepares' })]))).toBe('boom-on-ground');
  });

  it('dismantling: boom up until the lowering is done, then lowered', () => {
    const dismantling = (stages: ReturnType<typeof stage>[]) => ({ ...board(stages), job: { ...board([]).job, kind: 'dismantling' as const } });
    expect(workPhase(dismantling([raise('active', 'dm-lower', true)]))).toBe('boom-up');
    expect(workPhase(dismantling([raise('done', 'dm-lower', true)]))).toBe('boom-lowered');
    expect(workPhase(dismantling([raise('holding', 'dm-lower', true)]))).toBe('boom-lowered');
  });

  it('draws each phase’s items, each with its roles and whether it asks for a note', () => {
    const ids = (b: BoardState) => makeSafeChecklist(b).items.map((i) => i.id);
    expect(ids(board([raise('active')]))).toEqual(['blocking', 'noHangingSection', 'hookBlocks', 'counterweight', 'guyLines', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
    expect(ids(board([raise('done')]))).toEqual(['hookBlocks', 'counterweight', 'boomParked', 'guyLines', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
    const dm = (state: 'active' | 'done') => ({ ...board([raise(state, 'dm-lower')]), job: { ...board([]).job, kind: 'dismantling' as const } });
    expect(ids(dm('active'))).toEqual(['pinsSupported', 'hookBlocks', 'counterweight', 'boomParked', 'guyLines', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
    expect(ids(dm('done'))).toEqual(['pinsSupported', 'sectionsStowed', 'hookBlocks', 'counterweight', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
    const list = makeSafeChecklist(dm('done'));
    expect(list.workPhase).toBe('boom-lowered');
    expect(list.items[0]).toEqual({ id: 'pinsSupported', text: expect.stringMatching(/^No pin removed from a section that is not supported/), roles: ['rigger'], asksNote: false });
    expect(list.items.filter((i) => i.asksNote).map((i) => [i.id, i.roles])).toEqual([
      ['keyHeld', ['supervisor']],
      ['forecast', ['supervisor']],
    ]);
  });
});

describe('when a shift may end', () => {
  it('not while a hold is partly acknowledged, nor while a stage that moves the crane is part-way done', () => {
    const partly = stage('ground', 1, { state: 'holding', hold: hold('ground.hold', { state: 'open', title: 'Ground ready', acknowledgments: [{ role: 'operator', userId: 'u-otto', name: 'Otto Brand', at: at(0) }] }) });
    const moving = stage('upper', 2, { state: 'active', title: 'Upper works', involvesCraneMovement: true, steps: [step('u1', { state: 'done' }), step('u2')] });
    expect(shiftEndBlockers(board([partly, moving]))).toEqual([
      '“Ground ready” is partly acknowledged (Otto Brand): release it, or have them withdraw, before the shift ends.',
      '“Upper works” moves the crane and is part-way done: finish the movement or bring it to a safe stop first.',
    ]);
  });

  it('may end at a hold nobody has acknowledged, before a movement starts, and while stopped', () => {
    const open = stage('ground', 1, { state: 'holding', hold: hold('ground.hold', { state: 'open' }) });
    const notBegun = stage('upper', 2, { state: 'active', involvesCraneMovement: true, steps: [step('u1'), step('u2')] });
    const ground = stage('tidy', 3, { state: 'active', steps: [step('t1', { state: 'done' }), step('t2')] });
    expect(shiftEndBlockers(board([open, notBegun, ground]))).toEqual([]);
    expect(shiftEndBlockers(board([open, notBegun, ground], 'stopped'))).toEqual([]);
  });

  it('a raise part-way done blocks even where the plan did not mark the stage as moving the crane', () => {
    const raising = stage('lift-boom', 5, { state: 'active', boom: 'moves', title: 'Raise', steps: [step('r1', { state: 'done' }), step('r2')] });
    expect(shiftEndBlockers(board([raising]))).toHaveLength(1);
  });

  it('not twice, and not on a job that is not under way', () => {
    const ending = { ...board([]), shift: { number: 1, phase: 'making_safe' as const, startedAt: null, makeSafe: null, start: null } };
    expect(shiftEndBlockers(ending)).toEqual(['The shift is already ending: finish the make-safe checklist.']);
    expect(shiftEndBlockers(board([], 'ready'))).toEqual(['The job is ready; only a job under way can end a shift.']);
  });
});

describe('what the start-of-shift hold still needs', () => {
  const nowMs = Date.parse(at(10));
  const everyoneBriefed = (b: BoardState): BoardState => ({ ...b, briefed: [...new Set(b.crew.map((m) => m.userId))].map((userId) => ({ userId, name: userId, planVersion: b.planVersion, at: at(5), shift: 2 })) });

  it('nothing on a job that is not made safe', () => {
    expect(shiftStartMissing(board([]), nowMs)).toEqual([{ kind: 'state', text: 'The job is not made safe: there is no shift to start.' }]);
  });

  it('each part in turn: the inspection, both acknowledgments, a fresh reading within the limit, and everyone’s briefing for the new shift', () => {
    const empty = madeSafe();
    expect(shiftStartMissing(empty, nowMs).map((m) => m.kind)).toEqual(['inspection', 'acknowledgment', 'acknowledgment', 'weather', 'briefing']);
    expect(shiftStartMissing(empty, nowMs).at(-1)!.text).toBe('the briefing for plan version 1, shift 2, from Sue Marsh, Otto Brand, Rita Venn');
    const signed = madeSafe({ inspection: { ...sign('u-rita', 'Rita Venn'), note: 'As left' }, operator: sign('u-otto', 'Otto Brand'), supervisor: sign('u-sue', 'Sue Marsh') });
    const ready = everyoneBriefed({ ...signed, weather: calm(0) });
    expect(shiftStartMissing(ready, nowMs)).toEqual([]);
    // The reading is 10 minutes old at nowMs; just over 6 minutes later it is past the job's 15.
    expect(shiftStartMissing(ready, nowMs + 6 * 60_000 + 1).map((m) => m.kind)).toEqual(['weather']);
    expect(shiftStartMissing({ ...ready, weather: { ...calm(0)!, gustMs: 17, meanMs: 9 } }, nowMs).map((m) => m.kind)).toEqual(['weather']);
  });

  it('a supervisor’s acknowledgment counts only from the acting supervisor: one given before the role passed does not', () => {
    const signed = madeSafe({ inspection: { ...sign('u-rita', 'Rita Venn'), note: 'As left' }, operator: sign('u-otto', 'Otto Brand'), supervisor: sign('u-sue', 'Sue Marsh') });
    const handedOver = everyoneBriefed({ ...signed, weather: calm(0), actingSupervisor: { userId: 'u-ned', name: 'Ned Orr', since: at(1) } });
    expect(shiftStartMissing(handedOver, nowMs)).toEqual([{ kind: 'acknowledgment', text: 'the acting supervisor’s acknowledgment' }]);
  });
});

describe('the handover note’s lists', () => {
  it('done (and skipped) stages, open stages with what is left or the hold they wait at, and defects saying which block their stage', () => {
    const b: BoardState = {
      ...board([
        stage('ground', 1, { title: 'Ground', state: 'done' }),
        stage('aux', 2, { title: 'Auxiliary head', state: 'skipped' }),
        stage('upper', 3, { title: 'Upper works', state: 'active', steps: [step('u1', { state: 'done' }), step('u2'), step('u3')] }),
        stage('check', 4, { title: 'Boom check', state: 'holding', hold: hold('check.hold', { title: 'Sections checked', state: 'open' }), blockedBy: { description: 'Cracked lacing', at: at(0), by: 'Rita Venn' } }),
        stage('raise', 5, { title: 'Raise', state: 'locked' }),
      ]),
      defects: [
        { id: 'd1', description: 'Cracked lacing', componentId: null, stageId: 'check', photoId: null, at: at(0), by: 'Rita Venn' },
        { id: 'd2', description: 'Worn sling tag', componentId: null, stageId: null, photoId: null, at: at(1), by: 'Otto Brand' },
      ],
    };
    expect(handoverFacts(b)).toEqual({
      done: ['Ground', 'Auxiliary head (skipped)'],
      open: ['Upper works: 2 of 3 steps to do', 'Boom check: at its hold “Sections checked” (open)'],
      defects: ['Cracked lacing (reported by Rita Venn, blocks its stage)', 'Worn sling tag (reported by Otto Brand)'],
    });
  });
});

describe('acknowledgments that leave with a crew change', () => {
  const acks = [
    { role: 'operator' as const, userId: 'u-otto', name: 'Otto Brand', at: at(0) },
    { role: 'rigger' as const, userId: 'u-rita', name: 'Rita Venn', at: at(1) },
  ];
  const withHolds = (): BoardState => ({
    ...board([
      stage('a', 1, { state: 'holding', hold: hold('a.hold', { state: 'acknowledged', requiredRoles: ['operator', 'rigger'], acknowledgments: structuredClone(acks) }) }),
      stage('b', 2, { state: 'done', hold: hold('b.hold', { state: 'released', requiredRoles: ['operator', 'rigger'], acknowledgments: structuredClone(acks) }) }),
    ]),
    crew,
  });

  it('lists those of people no longer in that role on holds not released; an inspector’s whose person left the crew; the start-of-shift hold’s too', () => {
    const b = withHolds();
    b.stages[0].hold!.acknowledgments.push({ role: 'supervisor', userId: 'u-sue', name: 'Sue Marsh', at: at(2), inspector: true });
    // Otto leaves; Sue stays in the crew but no longer as supervisor (an inspector's acknowledgment stays with the person).
    const stillIn = (userId: string, role: string | null) => userId !== 'u-otto' && (role === null || userId !== 'u-sue' || role !== 'supervisor');
    expect(acknowledgmentsLeaving(b, stillIn)).toEqual([{ stageId: 'a', holdId: 'a.hold', userId: 'u-otto', name: 'Otto Brand', role: 'operator' }]);
    const safe = madeSafe({ inspection: { ...sign('u-otto', 'Otto Brand'), note: 'As left' }, operator: sign('u-otto', 'Otto Brand'), supervisor: sign('u-sue', 'Sue Marsh') });
    expect(acknowledgmentsLeaving(safe, (userId) => userId !== 'u-otto')).toEqual([
      { stageId: null, holdId: SHIFT_START_HOLD_ID, userId: 'u-otto', name: 'Otto Brand', role: 'inspector' },
      { stageId: null, holdId: SHIFT_START_HOLD_ID, userId: 'u-otto', name: 'Otto Brand', role: 'operator' },
    ]);
  });

  it('takes them off, re-opens an acknowledged hold and says why; a released hold keeps its record', () => {
    const b = withHolds();
    const leaving = [{ stageId: 'a', holdId: 'a.hold', userId: 'u-otto', name: 'Otto Brand', role: 'operator' }, { stageId: 'b', holdId: 'b.hold', userId: 'u-otto', name: 'Otto Brand', role: 'operator' }];
    withdrawAcknowledgments(b, leaving, 'Otto Brand left the crew', at(30));
    expect(b.stages[0].hold).toMatchObject({ state: 'open', acknowledgments: [acks[1]], reopenedBecause: { reason: 'Otto Brand left the crew', at: at(30) } });
    expect(b.stages[1].hold).toMatchObject({ state: 'released', acknowledgments: acks });
    expect(b.stages[1].hold!.reopenedBecause).toBeUndefined();
  });

  it('a withdrawal in one role leaves the same person’s acknowledgment in another; the start-of-shift signatures go too', () => {
    const b = withHolds();
    withdrawAcknowledgments(b, [{ stageId: 'a', holdId: 'a.hold', userId: 'u-rita', name: 'Rita Venn', role: 'signaller' }], 'changed role', at(30));
    expect(b.stages[0].hold).toMatchObject({ state: 'acknowledged', acknowledgments: acks });
    const safe = madeSafe({ inspection: { ...sign('u-otto', 'Otto Brand'), note: 'As left' }, operator: sign('u-otto', 'Otto Brand'), supervisor: sign('u-sue', 'Sue Marsh') });
    withdrawAcknowledgments(safe, [{ stageId: null, holdId: SHIFT_START_HOLD_ID, userId: 'u-otto', name: 'Otto Brand', role: 'operator' }], 'Otto Brand’s account was disabled', at(30));
    expect(safe.shift!.start).toMatchObject({ inspection: { userId: 'u-otto' }, operator: null, supervisor: { userId: 'u-sue' } });
  });

  it('a crew may not leave a role an open hold, or the start-of-shift hold, needs with nobody', () => {
    const b = withHolds();
    expect(rolesLeftUncovered(b, [{ userId: 'u-otto', role: 'operator' }])).toEqual([{ role: 'rigger', hold: 'Hold a.hold' }]);
    expect(rolesLeftUncovered(b, [{ userId: 'u-otto', role: 'operator' }, { userId: 'u-rita', role: 'rigger' }])).toEqual([]);
    expect(rolesLeftUncovered(madeSafe(), [{ userId: 'u-rita', role: 'rigger' }])).toEqual([
      { role: 'operator', hold: 'the start-of-shift hold' },
      { role: 'supervisor', hold: 'the start-of-shift hold' },
    ]);
  });

  it('while making safe, a crew may not leave an unticked make-safe item with nobody who may tick it', () => {
    const making: BoardState = {
      ...withHolds(),
      shift: {
        number: 1,
        phase: 'making_safe',
        startedAt: at(-600),
        start: null,
        makeSafe: {
          begunBy: sign('u-sue', 'Sue Marsh'),
          workPhase: 'boom-on-ground',
          madeSafe: null,
          items: [
            { id: 'noHangingSection', text: 'No section hangs on a pin.', roles: ['rigger'], asksNote: false, doneBy: null },
            { id: 'engineOff', text: 'Engine off.', roles: ['operator'], asksNote: false, doneBy: { ...sign('u-otto', 'Otto Brand'), role: 'operator', note: null } },
          ],
        },
      },
    };
    const withoutRigger = rolesLeftUncovered(making, [{ userId: 'u-otto', role: 'operator' }]);
    expect(withoutRigger).toContainEqual({ role: 'rigger', hold: 'the make-safe item “No section hangs on a pin.”' });
    // A ticked item needs nobody any more.
    expect(withoutRigger.some((u) => u.hold.includes('Engine off'))).toBe(false);
  });
});
