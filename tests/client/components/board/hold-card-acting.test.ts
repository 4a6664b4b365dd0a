import { mount } from '@vue/test-utils';
import { describe, expect, it } from 'vitest';
import HoldCard from '../../../../src/components/board/HoldCard.vue';
import { liveJob, people, quasarStubs, storesWith } from './shift/shift-board';

/** The ground stage's hold, opened by its steps and acknowledged by the roles it asks for. */
function acknowledgedHold() {
  const job = liveJob();
  const ground = job.state.stages[0];
  for (const s of ground.steps) job.apply('step.completed', { stageId: ground.id, stepId: s.id, value: s.records ? '0.5' : null, photoId: s.requiresPhoto ? 'a0a0a0a0-0000-4000-8000-0000000000f1' : null }, { by: people.rita });
  job.apply('hold.acknowledged', { stageId: ground.id, holdId: ground.hold!.id, role: 'rigger' }, { by: people.rita });
  job.apply('hold.acknowledged', { stageId: ground.id, holdId: ground.hold!.id, role: 'operator' }, { by: people.otto });
  return job;
}

function mountCard(job: ReturnType<typeof liveJob>, who: (typeof people)[keyof typeof people]) {
  const { pinia } = storesWith(job.state, who);
  const stage = job.state.stages[0];
  // The release dialog has its own tests; here only whether the release is offered matters.
  return mount(HoldCard, { props: { stage, hold: stage.hold!, canRelease: true }, global: { plugins: [pinia], stubs: { ...quasarStubs, ReleaseDialog: true, ToneBadge: true } } });
}

describe('who releases a hold', () => {
  it('offers the release to the acting supervisor only; another supervisor is told who releases', () => {
    const job = acknowledgedHold();
    const holdId = job.state.stages[0].hold!.id;
    const sue = mountCard(job, people.sue);
    expect(sue.find(`[data-testid="release-${holdId}"]`).exists()).toBe(true);
    expect(sue.find(`[data-testid="release-not-acting-${holdId}"]`).exists()).toBe(false);
    const ned = mountCard(job, people.ned);
    expect(ned.find(`[data-testid="release-${holdId}"]`).exists()).toBe(false);
    expect(ned.get(`[data-testid="release-not-acting-${holdId}"]`).text()).toBe('Only the acting supervisor (Sue Marsh) releases holds.');
  });

  it('says on the card why an acknowledgment was taken back when its author left the crew', () => {
    const job = acknowledgedHold();
    const stage = job.state.stages[0];
    job.apply('crew.set', { crew: job.state.crew.filter((m) => m.userId !== people.rita.userId), withdrawn: [{ stageId: stage.id, holdId: stage.hold!.id, userId: people.rita.userId, name: people.rita.name, role: 'rigger' }] });
    const card = mountCard(job, people.otto);
    expect(card.get(`[data-testid="reopened-${stage.hold!.id}"]`).text()).toContain('Rita Venn left the crew or changed role');
    expect(card.get(`[data-testid="ack-${stage.hold!.id}-rigger"]`).text()).toContain('not yet acknowledged');
  });
});
