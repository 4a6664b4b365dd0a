import { mount } from '@vue/test-utils';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import EndShiftControl from '../../../../../src/components/board/shift/EndShiftControl.vue';
import { HOLD_TO_CONFIRM_MS } from '../../../../../src/composables/useHoldToConfirm';
import { liveJob, people, quasarStubs, storesWith } from './shift-board';

function mountControl(who: (typeof people)[keyof typeof people], job = liveJob()) {
  const { pinia, store } = storesWith(job.state, who);
  const send = vi.spyOn(store, 'send').mockResolvedValue({ ok: false, error: { code: 'test', message: 'Not sent in this test.' } });
  const wrapper = mount(EndShiftControl, { props: { board: job.state }, global: { plugins: [pinia], stubs: quasarStubs } });
  return { wrapper, send };
}

describe('ending the shift', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  it('tells a supervisor who is not acting who ends the shift, with no control', () => {
    const { wrapper } = mountControl(people.ned);
    expect(wrapper.get('[data-testid="end-shift-not-acting"]').text()).toBe('Only the acting supervisor (Sue Marsh) ends the shift.');
    expect(wrapper.find('[data-testid="end-shift-open"]').exists()).toBe(false);
  });

  it('says why the shift cannot end while a hold is partly acknowledged, and keeps the control off', () => {
    const job = liveJob();
    const ground = job.state.stages[0];
    for (const s of ground.steps) job.apply('step.completed', { stageId: ground.id, stepId: s.id, value: s.records ? '0.5' : null, photoId: s.requiresPhoto ? 'a0a0a0a0-0000-4000-8000-0000000000f1' : null }, { by: people.rita });
    job.apply('hold.acknowledged', { stageId: ground.id, holdId: ground.hold!.id, role: 'rigger' }, { by: people.rita });
    const { wrapper } = mountControl(people.sue, job);
    expect(wrapper.get('[data-testid="end-shift-blockers"]').text()).toContain('“Ground ready” is partly acknowledged (Rita Venn)');
    expect(wrapper.get('[data-testid="end-shift-open"]').attributes('disabled')).toBeDefined();
  });

  it('sends shift.end only after the confirmation is held for the whole 1.5 s, never on a tap', async () => {
    const { wrapper, send } = mountControl(people.sue);
    await wrapper.get('[data-testid="end-shift-open"]').trigger('click');
    const hold = wrapper.get('[data-testid="end-shift-hold"]');
    // The dialog lists the checklist the shift will draw.
    expect(wrapper.get('[data-testid="end-shift-dialog"]').text()).toContain('Exclusion zone closed');
    await hold.trigger('click');
    await hold.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS - 200);
    await hold.trigger('pointerup', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(2000);
    expect(send).not.toHaveBeenCalled();
    await hold.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 100);
    expect(send).toHaveBeenCalledTimes(1);
    expect(send.mock.calls[0][0]).toEqual({ type: 'shift.end' });
  });
});
