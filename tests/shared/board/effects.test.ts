import { describe, expect, it } from 'vitest';
import { applyEvent, replay } from '../../../shared/board/apply.js';
import { boardEffects } from '../../../shared/board/effects.js';
import type { BoardState } from '../../../shared/board/types.js';
import { eventLog, people } from './events.js';
import { smallPlan, testWindLimits } from './board-plan.js';

/** What the writer records as an event's effects: the job, stage and hold states that changed. */
describe('boardEffects', () => {
  const crew: BoardState['crew'] = [{ userId: people.sue.userId, name: people.sue.name, role: 'supervisor' }];
  function ready() {
    const log = eventLog();
    log.next('job.created', { job: { name: 'J', site: 'S', kind: 'erection' }, craneFleetNumber: 'CR-07', crew });
    log.next('configuration.set', { windLimits: testWindLimits });
    log.next('job.ready', { planVersion: 1, plan: smallPlan() });
    return { log, state: replay(log.events)! };
  }

  it('the first event has nothing to compare with; an event that changes no state has no effects', () => {
    const { log, state } = ready();
    expect(boardEffects(null, replay(log.events.slice(0, 1))!)).toBeNull();
    const briefed = applyEvent(state, log.next('briefing.acknowledged', { planVersion: 1 }));
    expect(boardEffects(state, briefed)).toBeNull();
  });

  it('the plan arriving on a board without stages is not listed stage by stage', () => {
    const { log } = ready();
    const before = replay(log.events.slice(0, 2))!;
    const after = replay(log.events)!;
    expect(boardEffects(before, after)).toEqual({ job: { state: 'ready' } });
  });

  it('a start names the job state and the stages it activated, not the ones still locked', () => {
    const { log, state } = ready();
    const live = applyEvent(state, log.next('job.started', {}));
    expect(boardEffects(state, live)).toEqual({ job: { state: 'live' }, stages: [{ id: 'ground', state: 'active' }] });
  });

  it('a release names its hold, its stage and every stage it let start, without the job when its state stays', () => {
    const { log } = ready();
    let state = applyEvent(replay(log.events)!, log.next('job.started', {}));
    for (const stepId of ['ground.slope', 'ground.mats', 'ground.photo']) {
      state = applyEvent(state, log.next('step.completed', { stageId: 'ground', stepId, value: stepId === 'ground.slope' ? '0.2' : null, photoId: null }, { by: people.rita }));
    }
    state = applyEvent(state, log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'rigger' }, { by: people.rita }));
    const before = state;
    const acknowledged = applyEvent(before, log.next('hold.acknowledged', { stageId: 'ground', holdId: 'ground.hold', role: 'operator' }, { by: people.otto }));
    expect(boardEffects(before, acknowledged)).toEqual({ holds: [{ id: 'ground.hold', state: 'acknowledged' }] });
    const released = applyEvent(acknowledged, log.next('hold.released', { stageId: 'ground', holdId: 'ground.hold' }));
    expect(boardEffects(acknowledged, released)).toEqual({
      stages: [
        { id: 'ground', state: 'done' },
        { id: 'assemble', state: 'active' },
        { id: 'ballast', state: 'active' },
      ],
      holds: [{ id: 'ground.hold', state: 'released' }],
    });
  });
});
