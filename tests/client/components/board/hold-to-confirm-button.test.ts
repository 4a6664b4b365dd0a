import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import HoldToConfirmButton from '../../../../src/components/board/HoldToConfirmButton.vue';
import StopControl from '../../../../src/components/board/StopControl.vue';
import { HOLD_TO_CONFIRM_MS } from '../../../../src/composables/useHoldToConfirm';
import { useBoardStore } from '../../../../src/stores/board';

/** The release and resume button: only a hold of the whole 1.5 s lets work go on. */
describe('press-and-hold to release or resume', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  const mountButton = (props: Record<string, unknown> = {}) => mount(HoldToConfirmButton, { props: { label: 'Hold to release', testid: 'hold', ...props } });

  it('ignores a tap and a press let go early; confirms once after a full hold', async () => {
    const wrapper = mountButton();
    const button = wrapper.get('[data-testid="hold"]');
    await button.trigger('click');
    await button.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS - 200);
    await button.trigger('pointerup', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(3000);
    expect(wrapper.emitted('confirm')).toBeUndefined();

    await button.trigger('pointerdown', { pointerId: 1 });
    expect(button.text()).toContain('Keep holding');
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 50);
    await vi.advanceTimersByTimeAsync(3000);
    expect(wrapper.emitted('confirm')).toHaveLength(1);
  });

  it('does nothing while disabled or while the last press is being sent', async () => {
    for (const props of [{ disabled: true }, { busy: true }]) {
      const wrapper = mountButton(props);
      const button = wrapper.get('[data-testid="hold"]');
      await button.trigger('pointerdown', { pointerId: 1 });
      await button.trigger('keydown', { key: ' ' });
      await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS * 2);
      expect(wrapper.emitted('confirm')).toBeUndefined();
    }
  });

  it('works from the keyboard by holding Space', async () => {
    const wrapper = mountButton();
    const button = wrapper.get('[data-testid="hold"]');
    await button.trigger('keydown', { key: ' ' });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 50);
    expect(wrapper.emitted('confirm')).toHaveLength(1);
  });
});

describe('stop control while the job is already stopped', () => {
  it('says the job is already stopped and that holding adds this person’s stop', async () => {
    const pinia = createPinia();
    setActivePinia(pinia);
    const store = useBoardStore();
    const wrapper = mount(StopControl, { props: { compact: true }, global: { plugins: [pinia], stubs: { 'q-icon': true, StopReasonPicker: true } } });
    expect(wrapper.text()).toContain('Hold for ALL STOP');
    store.board = {
      seq: 1,
      job: { id: 'j', name: 'Job', site: 'Site', kind: 'erection', state: 'stopped', craneFleetNumber: 'FL-07', stop: { raisedBy: { userId: 'u', name: 'Callum Frey', role: 'rigger' }, pressedAt: '', at: '', reason: null, alsoPressedBy: [] }, lastResume: null, cancelReason: null },
      planVersion: 1,
      stages: [],
      crew: [],
      briefed: [],
      weather: null,
      windLimits: null,
      defects: [],
      presence: [],
    };
    await wrapper.vm.$nextTick();
    expect(wrapper.get('[data-testid="stop-control"]').text()).toContain('Job already stopped');
    expect(wrapper.get('[data-testid="stop-control"]').text()).toContain('Hold 1.5 s to add your stop');
  });
});
