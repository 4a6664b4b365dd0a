import { describe, expect, it } from 'vitest';
import type { Plan } from '../../../shared/schemas/plan';
import { usePlanStore } from '../../../src/stores/plan';
import { allIds, plan } from '../../shared/plan/small-plan';
import { buildJob, JOB_ID, json, mockFetchWithStores } from '../api-fakes';

function envelope(p: Plan = plan(), overrides: Record<string, unknown> = {}) {
  return { version: 0, locked: false, stale: false, plan: p, problems: [], ...overrides };
}

const job = buildJob;


describe('plan store', () => {
  const fetchMock = mockFetchWithStores();

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
