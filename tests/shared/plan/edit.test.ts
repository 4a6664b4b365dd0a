import { describe, expect, it } from 'vitest';
import {
  addHold,
  addStage,
  addStep,
  lockedHoldRoles,
  moveStage,
  moveStep,
  newPlanId,
  removeHold,
  removeStage,
  removeStep,
  removeValueCheckField,
  revisePlan,
  setHoldRole,
  stageIndexOfPath,
} from '../../../shared/plan/edit.js';
import { planSchema, type Plan } from '../../../shared/schemas/plan.js';
import { allIds, plan, step } from './small-plan.js';

describe('new ids in a plan', () => {
  it('draws a new id until it is free, even when the random source repeats', () => {
    const p = plan();
    const taken = newPlanId(p, () => 0.5);
    p.stages[2].steps.push(step(taken, 'A step whose id the next draw repeats'));
    const draws = [0.5, 0.5, 0.25];
    const next = newPlanId(p, () => draws.shift() ?? 0.75);
    expect(next).not.toBe(taken);
    expect(next).toBe(newPlanId(plan(), () => 0.25));
    expect(draws).toEqual([]);
    expect(next).toMatch(/^custom-[a-z0-9]{8}$/);
  });

  it('keeps every id unique when stages, steps and holds are added, moved and removed', () => {
    const p = plan();
    addStage(p, 0);
    addStage(p, 0);
    addStep(p, 1);
    addStep(p, 2, 0);
    expect(addHold(p, 1).ok).toBe(true);
    expect(moveStage(p, 1, 1).ok).toBe(true);
    expect(moveStep(p, 3, 1, -1).ok).toBe(true);
    expect(p.stages[3].steps.map((s) => s.id)).toEqual(['upper.b', 'upper.a']);
    expect(removeStep(p, 3, 0).ok).toBe(true);
    addStage(p, p.stages.length - 1);

    const ids = allIds(p);
    expect(new Set(ids).size).toBe(ids.length);
    expect(p.stages.filter((s) => s.id.startsWith('custom-'))).toHaveLength(3);
    // New stages start after the stage above the place they were added.
    expect(p.stages[1].dependsOn).toEqual(['ground']);
    expect(p.stages[5].dependsOn).toEqual(['laydown']);
    expect(planSchema.safeParse(p).success).toBe(true);
  });
});

describe('editing a plan', () => {
  it('moves stages without going past either end, and keeps what each waits for', () => {
    const p = plan();
    expect(moveStage(p, 0, -1)).toEqual({ ok: false, reason: 'This is already the first stage.' });
    expect(moveStage(p, 2, 1).ok).toBe(false);
    expect(moveStage(p, 2, -1).ok).toBe(true);
    expect(p.stages.map((s) => s.id)).toEqual(['ground', 'laydown', 'upper']);
    expect(p.stages[1].dependsOn).toEqual(['upper']);
  });

  it('never removes a mandatory hold, its stage or its value check, and says why', () => {
    const p = plan();
    const stageResult = removeStage(p, 0);
    expect(!stageResult.ok && stageResult.reason).toContain('mandatory');
    expect(removeHold(p, 0).ok).toBe(false);
    expect(removeValueCheckField(p, 0, 0).ok).toBe(false);
    expect(p.stages[0].hold?.mandatory).toBe(true);
    expect(p.stages[0].hold?.valueCheck?.fields).toHaveLength(1);
    expect(p.stages).toHaveLength(3);
  });

  it('removes an ordinary stage; the stages that waited for it wait for what it waited for', () => {
    const p = plan();
    expect(removeHold(p, 1).ok).toBe(true);
    expect(p.stages[1].hold).toBeNull();
    expect(removeStage(p, 1).ok).toBe(true);
    expect(p.stages.map((s) => s.id)).toEqual(['ground', 'laydown']);
    expect(p.stages[1].dependsOn).toEqual(['ground']);
  });

  it('adds roles to a mandatory hold but never takes away one the saved plan has', () => {
    const saved = plan();
    const p = plan();
    expect(lockedHoldRoles(saved, p.stages[0].hold!)).toEqual(['supervisor', 'operator', 'signaller']);
    expect(setHoldRole(p, 0, 'signaller', false, saved)).toEqual({ ok: false, reason: 'A mandatory hold’s roles can be added to, never removed.' });
    expect(setHoldRole(p, 0, 'rigger', true, saved).ok).toBe(true);
    // A role added since the last save can be taken away again.
    expect(setHoldRole(p, 0, 'rigger', false, saved).ok).toBe(true);
    expect(p.stages[0].hold?.requiredRoles).toEqual(['supervisor', 'operator', 'signaller']);
    // An ordinary hold locks nothing.
    expect(lockedHoldRoles(saved, p.stages[1].hold!)).toEqual([]);
  });

  it('finds the stage a problem path points at', () => {
    expect(stageIndexOfPath('stages.3.hold.requiredRoles')).toBe(3);
    expect(stageIndexOfPath('stages.12')).toBe(12);
    expect(stageIndexOfPath('stages.x.title')).toBeNull();
    expect(stageIndexOfPath('briefing.title')).toBeNull();
    expect(stageIndexOfPath(undefined)).toBeNull();
  });
});

describe('plan revision after a defect', () => {
  const revisable = (): Plan => ({
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
          { id: 'sections.j1', text: 'Pin joint 1 ', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null },
          { id: 'sections.j2', text: 'Pin joint 2', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null },
        ],
        hold: null,
      },
      { id: 'tip', title: 'Tip', summary: '', dependsOn: ['sections'], cautions: [], involvesCraneMovement: false, steps: [], hold: null },
    ],
  });

  it('removes the chosen steps and appends a replacement with an id from the editor’s id maker, leaving other stages alone', () => {
    const before = revisable();
    const revised = revisePlan(before, { stageId: 'sections', removeStepIds: ['sections.j2'], addStep: { text: 'Fit spare insert, pin joint 2', roles: ['rigger'], requiresPhoto: true } }, () => 0.25);
    const ids = revised.stages[0].steps.map((s) => s.id);
    expect(ids).toEqual(['sections.j1', newPlanId(before, () => 0.25)]);
    expect(ids[1]).toMatch(/^custom-[a-z0-9]{8}$/);
    expect(revised.stages[0].steps[0].text).toBe('Pin joint 1');
    expect(revised.stages[0].steps[1]).toMatchObject({ text: 'Fit spare insert, pin joint 2', requiresPhoto: true, allowedRoles: ['rigger'] });
    expect(revised.stages[1]).toBe(before.stages[1]);
    // The plan it was given is left as it was.
    expect(before.stages[0].steps.map((s) => s.id)).toEqual(['sections.j1', 'sections.j2']);
    expect(planSchema.safeParse(revised).success).toBe(true);
  });

  it('never gives the new step the id of the step it replaces', () => {
    const before = revisable();
    const reused = newPlanId(before, () => 0.5);
    before.stages[0].steps[1].id = reused;
    const draws = [0.5, 0.75];
    const revised = revisePlan(before, { stageId: 'sections', removeStepIds: [reused], addStep: { text: 'Replacement', roles: ['rigger'], requiresPhoto: false } }, () => draws.shift() ?? 0.1);
    const added = revised.stages[0].steps[1].id;
    expect(added).not.toBe(reused);
    expect(draws).toEqual([]);
  });

  it('keeps a new step id within the schema’s 64 characters for a long stage id', () => {
    const longId = 'x'.repeat(62);
    const base = revisable();
    const long: Plan = { ...base, stages: [{ ...base.stages[0], id: longId, steps: [] }] };
    const revised = revisePlan(long, { stageId: longId, removeStepIds: [], addStep: { text: 'New', roles: ['rigger'], requiresPhoto: false } });
    expect(revised.stages[0].steps[0].id.length).toBeLessThanOrEqual(64);
    expect(planSchema.safeParse(revised).success).toBe(true);
  });
});
