import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { Plan, PlanHold, PlanStage, PlanStep } from '../../shared/schemas/plan';
import { comparePlans, moveStage, newPlanId, removeHold, removeStage, usePlanStore } from '../../src/stores/plan';
import { buildJob, JOB_ID, json } from './helpers';

function step(id: string, text: string, overrides: Partial<PlanStep> = {}): PlanStep {
  return { id, text, allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null, ...overrides };
}

function hold(id: string, overrides: Partial<PlanHold> = {}): PlanHold {
  return { id, title: 'Checked', instruction: 'Look at it yourself.', requiredRoles: ['supervisor'], releasingRole: 'supervisor', mandatory: false, valueCheck: null, ...overrides };
}

function stage(id: string, overrides: Partial<PlanStage> = {}): PlanStage {
  return { id, title: `Stage ${id}`, summary: '', dependsOn: [], cautions: [], involvesCraneMovement: false, steps: [step(`${id}.a`, `First step of ${id}`)], hold: null, ...overrides };
}

/** Three stages in a chain; the first has a mandatory hold with a value check, the second an ordinary one. */
function plan(): Plan {
  return {
    kind: 'erection',
    stages: [
      stage('ground', {
        hold: hold('ground.hold', {
          mandatory: true,
          requiredRoles: ['supervisor', 'operator', 'signaller'],
          valueCheck: { fields: [{ field: 'boomLengthM', expected: '18' }] },
        }),
      }),
      stage('upper', { dependsOn: ['ground'], steps: [step('upper.a', 'Set the gauge'), step('upper.b', 'Fit counterweight')], hold: hold('upper.hold') }),
      stage('laydown', { dependsOn: ['upper'] }),
    ],
    briefing: { title: 'Toolbox talk', sections: [{ heading: 'The job', items: ['An 18 m boom.'] }] },
  };
}

function envelope(p: Plan = plan(), overrides: Record<string, unknown> = {}) {
  return { version: 0, locked: false, stale: false, plan: p, problems: [], ...overrides };
}

const job = buildJob;

/** Every id of the plan, with repeats: a duplicate shows as a longer list than the set. */
function allIds(p: Plan): string[] {
  return p.stages.flatMap((s) => [s.id, ...s.steps.map((x) => x.id), ...(s.hold ? [s.hold.id] : [])]);
}

type FetchArgs = [input: string, init?: RequestInit];

describe('plan store', () => {
  let fetchMock: ReturnType<typeof vi.fn<(...args: FetchArgs) => Promise<Response>>>;

  beforeEach(() => {
    setActivePinia(createPinia());
    fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => {
    vi.unstubAllGlobals();
  });

  async function loaded() {
    const store = usePlanStore();
    fetchMock.mockResolvedValueOnce(json(200, envelope()));
    await store.loadPlan(JOB_ID);
    return store;
  }

  it('keeps the draft and every field error when the server refuses a save', async () => {
    const store = await loaded();
    store.drafts[JOB_ID].stages[1].steps[0].text = 'Set the crawler gauge to 7 m';
    store.drafts[JOB_ID].stages[0].hold!.requiredRoles = ['supervisor', 'operator'];
    expect(store.isDirty(JOB_ID)).toBe(true);

    fetchMock.mockResolvedValueOnce(
      json(409, {
        error: {
          code: 'mandatory_hold',
          message: 'Mandatory holds and their required roles cannot be removed.',
          fields: [
            { path: 'stages.0.hold.requiredRoles', message: 'The mandatory hold “Checked” no longer asks the signaller to acknowledge.' },
            { path: 'stages.0.hold.valueCheck', message: 'Put the check back as generated.' },
          ],
        },
      }),
    );
    const saved = await store.savePlan(JOB_ID);

    expect(saved).toBe(false);
    const [url, init] = fetchMock.mock.calls[1];
    expect(url).toBe(`/api/jobs/${JOB_ID}/plan`);
    expect(init?.method).toBe('PUT');
    expect(JSON.parse(String(init?.body)).stages[1].steps[0].text).toBe('Set the crawler gauge to 7 m');
    expect(store.formOf(JOB_ID).problem).toBe('Mandatory holds and their required roles cannot be removed.');
    expect(store.errorOf(JOB_ID, 'stages.0.hold.requiredRoles')).toContain('no longer asks the signaller');
    expect(store.errorOf(JOB_ID, 'stages.0.hold.valueCheck')).toBe('Put the check back as generated.');
    // A stage finds the errors of the fields under it; another stage has none.
    expect(store.errorOf(JOB_ID, 'stages.0')).not.toBe('');
    expect(store.errorOf(JOB_ID, 'stages.1')).toBe('');
    expect(store.formOf(JOB_ID).saving).toBe(false);
    // The edits are still there to fix, and still unsaved.
    expect(store.drafts[JOB_ID].stages[1].steps[0].text).toBe('Set the crawler gauge to 7 m');
    expect(store.isDirty(JOB_ID)).toBe(true);
    expect(store.envelopes[JOB_ID].plan.stages[1].steps[0].text).toBe('Set the gauge');
  });

  it('names a blank step on the device without asking the server', async () => {
    const store = await loaded();
    store.drafts[JOB_ID].stages[2].steps[0].text = '   ';
    expect(await store.savePlan(JOB_ID)).toBe(false);
    expect(fetchMock).toHaveBeenCalledTimes(1);
    expect(store.errorOf(JOB_ID, 'stages.2.steps.0.text')).toBe('Fill this in');
    expect(store.formOf(JOB_ID).problem).toContain('Some fields need fixing');
  });

  it('saves, reads the plan back with its problems, and the draft is clean again', async () => {
    const store = await loaded();
    store.drafts[JOB_ID].stages[2].title = 'Lay-down of the sections';
    const afterSave = plan();
    afterSave.stages[2].title = 'Lay-down of the sections';
    fetchMock.mockImplementation(async (input) => {
      if (input.endsWith('/plan')) return json(200, envelope(afterSave, { problems: [{ code: 'holds_need_more_people', message: 'Add a signaller.', path: 'stages.0.hold.requiredRoles' }] }));
      if (input.endsWith('/readiness')) return json(200, { ready: false, reasons: [] });
      throw new Error(`unexpected ${input}`);
    });
    fetchMock.mockResolvedValueOnce(json(200, { job: job({ updatedAt: '2026-10-01T08:00:00.000Z' }) }));

    expect(await store.savePlan(JOB_ID)).toBe(true);
    expect(store.isDirty(JOB_ID)).toBe(false);
    expect(store.envelopes[JOB_ID].problems.map((p) => p.code)).toEqual(['holds_need_more_people']);
    expect(store.formOf(JOB_ID).fieldErrors).toEqual({});
  });

  it('keeps ids unique when stages and steps are added, moved and removed', async () => {
    const store = await loaded();
    const p = store.drafts[JOB_ID];
    store.addStage(JOB_ID, 0);
    store.addStage(JOB_ID, 0);
    store.addStep(JOB_ID, 1);
    store.addStep(JOB_ID, 2, 0);
    store.addHold(JOB_ID, 1);
    expect(store.moveStage(JOB_ID, 1, 1).ok).toBe(true);
    expect(store.moveStep(JOB_ID, 3, 1, -1).ok).toBe(true);
    expect(p.stages[3].steps.map((s) => s.id)).toEqual(['upper.b', 'upper.a']);
    expect(store.removeStep(JOB_ID, 3, 0).ok).toBe(true);
    store.addStage(JOB_ID, p.stages.length - 1);

    const ids = allIds(p);
    expect(new Set(ids).size).toBe(ids.length);
    expect(ids.every((id) => /^[A-Za-z0-9_.:-]+$/.test(id))).toBe(true);
    expect(p.stages).toHaveLength(6);
    expect(p.stages.filter((s) => s.id.startsWith('custom-'))).toHaveLength(3);
    // New stages start after the stage above the place they were added; moving one keeps that.
    expect(p.stages[1].dependsOn).toEqual(['ground']);
    expect(p.stages[2].dependsOn).toEqual(['ground']);
    expect(p.stages[5].dependsOn).toEqual(['laydown']);
    expect(p.stages[2].hold?.id).toMatch(/^custom-/);
  });

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

  it('moves stages without going past either end, and keeps what each waits for', () => {
    const p = plan();
    expect(moveStage(p, 0, -1)).toEqual({ ok: false, reason: 'This is already the first stage.' });
    expect(moveStage(p, 2, 1).ok).toBe(false);
    expect(moveStage(p, 2, -1).ok).toBe(true);
    expect(p.stages.map((s) => s.id)).toEqual(['ground', 'laydown', 'upper']);
    expect(p.stages[1].dependsOn).toEqual(['upper']);
  });

  it('never removes a mandatory hold or its stage, and says why', async () => {
    const store = await loaded();
    const p = store.drafts[JOB_ID];

    const stageResult = store.removeStage(JOB_ID, 0);
    expect(stageResult.ok).toBe(false);
    expect(!stageResult.ok && stageResult.reason).toContain('mandatory');
    const holdResult = store.removeHold(JOB_ID, 0);
    expect(holdResult.ok).toBe(false);
    expect(store.removeValueCheckField(JOB_ID, 0, 0).ok).toBe(false);
    expect(store.setHoldRole(JOB_ID, 0, 'signaller', false).ok).toBe(false);
    expect(p.stages[0].hold?.requiredRoles).toEqual(['supervisor', 'operator', 'signaller']);
    expect(store.lockedRoles(JOB_ID, 0)).toEqual(['supervisor', 'operator', 'signaller']);
    // A role added since the last save can be taken away again.
    expect(store.setHoldRole(JOB_ID, 0, 'rigger', true).ok).toBe(true);
    expect(store.setHoldRole(JOB_ID, 0, 'rigger', false).ok).toBe(true);
    expect(p.stages[0].hold?.mandatory).toBe(true);
    expect(p.stages[0].hold?.valueCheck?.fields).toHaveLength(1);
    expect(p.stages).toHaveLength(3);
    expect(store.isDirty(JOB_ID)).toBe(false);

    // The pure helpers refuse in the same way.
    const other = plan();
    expect(removeHold(other, 0).ok).toBe(false);
    expect(removeStage(other, 0).ok).toBe(false);
    expect(other.stages[0].hold).not.toBeNull();
  });

  it('removes an ordinary hold and stage; later stages wait for what the removed one waited for', async () => {
    const store = await loaded();
    const p = store.drafts[JOB_ID];
    expect(store.removeHold(JOB_ID, 1).ok).toBe(true);
    expect(p.stages[1].hold).toBeNull();
    expect(store.removeStage(JOB_ID, 1).ok).toBe(true);
    expect(p.stages.map((s) => s.id)).toEqual(['ground', 'laydown']);
    expect(p.stages[1].dependsOn).toEqual(['ground']);
  });

  it('keeps every reason the server gives when it refuses to make the job ready', async () => {
    const store = await loaded();
    fetchMock.mockResolvedValueOnce(
      json(409, {
        error: {
          code: 'not_ready',
          message: 'The job cannot leave planning yet.',
          fields: [
            { path: 'crew_signaller', message: 'The crew has no signaller. Add at least one.' },
            { path: 'plan_cycle', message: 'Stages “A” and “B” wait for each other in a circle.' },
            { path: 'plan_stale', message: 'The plan was made for an earlier configuration.' },
          ],
        },
      }),
    );
    expect(await store.makeReady(JOB_ID)).toBe(false);
    expect(store.readyRefusals[JOB_ID].map((r) => r.code)).toEqual(['crew_signaller', 'plan_cycle', 'plan_stale']);
    expect(store.readying.has(JOB_ID)).toBe(false);
  });

  it('takes the job as ready and the plan as locked version 1 when the server agrees', async () => {
    const store = await loaded();
    fetchMock.mockImplementation(async (input) => {
      if (input.endsWith('/plan')) return json(200, envelope(plan(), { version: 1, locked: true }));
      if (input.endsWith('/plan/versions'))
        return json(200, { items: [{ version: 1, createdAt: '2026-10-01T09:00:00.000Z', createdBy: { userId: 'u1', name: 'Maren Holt' }, reason: 'locked at ready', plan: plan() }] });
      if (input.endsWith('/readiness')) return json(200, { ready: false, reasons: [{ code: 'invalid_state', message: 'The job is ready, not planning.' }] });
      throw new Error(`unexpected ${input}`);
    });
    fetchMock.mockResolvedValueOnce(json(200, { job: job({ state: 'ready', planVersion: 1 }) }));

    expect(await store.makeReady(JOB_ID)).toBe(true);
    expect(store.envelopes[JOB_ID].locked).toBe(true);
    expect(store.envelopes[JOB_ID].version).toBe(1);
    expect(store.versions[JOB_ID].map((v) => v.version)).toEqual([1]);
    expect(store.readyRefusals[JOB_ID]).toBeUndefined();
    // A locked plan is never "unsaved", whatever the draft holds.
    store.drafts[JOB_ID].stages[0].title = 'Changed';
    expect(store.isDirty(JOB_ID)).toBe(false);
  });

  it('treats a job without a saved configuration as having no plan yet, not as a failure', async () => {
    const store = usePlanStore();
    fetchMock.mockResolvedValueOnce(json(404, { error: { code: 'no_plan', message: 'There is no plan yet.' } }));
    await store.loadPlan(JOB_ID);
    expect(store.missing.has(JOB_ID)).toBe(true);
    expect(store.problemOf(`plan:${JOB_ID}`)).toBe('');
  });
});

describe('comparing two versions', () => {
  it('finds added, removed and changed steps and stages by id and text', () => {
    const older = plan();
    const newer = plan();
    // Step text changed, a step removed, a step added, a step's roles changed.
    newer.stages[1].steps[0].text = 'Set the crawler gauge to 7 m';
    newer.stages[1].steps.splice(1, 1);
    newer.stages[2].steps.push(step('custom-1', 'Photograph every keeper'));
    newer.stages[0].steps[0].allowedRoles = ['rigger', 'supervisor'];
    // A stage added, one removed is simulated by a new one in place of laydown's id.
    newer.stages.push(stage('custom-stage', { title: 'Extra check', dependsOn: ['laydown'], steps: [] }));
    newer.stages[1].hold = null;

    const c = comparePlans(older, newer);

    expect(c.same).toBe(false);
    expect(c.steps.added.map((s) => s.stepId)).toEqual(['custom-1']);
    expect(c.steps.added[0].stageTitle).toBe('Stage laydown');
    expect(c.steps.removed.map((s) => s.stepId)).toEqual(['upper.b']);
    expect(c.steps.removed[0].text).toBe('Fit counterweight');
    expect(c.steps.changed).toEqual([
      { stepId: 'ground.a', stageTitle: 'Stage ground', text: 'First step of ground', what: ['roles'] },
      { stepId: 'upper.a', stageTitle: 'Stage upper', text: 'Set the crawler gauge to 7 m', before: 'Set the gauge', what: ['text'] },
    ]);
    expect(c.stages.added.map((s) => s.stageId)).toEqual(['custom-stage']);
    expect(c.stages.removed).toEqual([]);
    expect(c.stages.changed).toEqual([{ stageId: 'upper', title: 'Stage upper', what: ['hold removed'] }]);
  });

  it('finds a removed stage and a moved one, and nothing in two equal plans', () => {
    const older = plan();
    const newer = plan();
    expect(comparePlans(older, newer).same).toBe(true);

    newer.stages.splice(1, 1);
    newer.stages.reverse();
    const c = comparePlans(older, newer);
    expect(c.stages.removed.map((s) => s.stageId)).toEqual(['upper']);
    expect(c.steps.removed.map((s) => s.stepId)).toEqual(['upper.a', 'upper.b']);
    // Both remaining stages swapped places: each is marked as moved.
    expect(c.stages.changed.map((s) => [s.stageId, s.what])).toEqual([
      ['laydown', ['place in the order']],
      ['ground', ['place in the order']],
    ]);
  });

  it('marks a step that moved to another stage', () => {
    const older = plan();
    const newer = plan();
    const [moved] = newer.stages[1].steps.splice(1, 1);
    newer.stages[2].steps.push(moved);
    const c = comparePlans(older, newer);
    expect(c.steps.changed).toEqual([{ stepId: 'upper.b', stageTitle: 'Stage laydown', text: 'Fit counterweight', what: ['stage'] }]);
    expect(c.steps.added).toEqual([]);
    expect(c.steps.removed).toEqual([]);
  });
});
