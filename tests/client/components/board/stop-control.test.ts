import { mount } from '@vue/test-utils';
import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import StopControl from '../../../../src/components/board/StopControl.vue';
import { HOLD_TO_CONFIRM_MS } from '../../../../src/composables/useHoldToConfirm';
import { useBoardStore } from '../../../../src/stores/board';

/** The stop control with the store's stop replaced by a spy, so only the gesture is under test. */
function mountStop(answer: Awaited<ReturnType<ReturnType<typeof useBoardStore>['stop']>> = null) {
  const pinia = createPinia();
  setActivePinia(pinia);
  const store = useBoardStore();
  const stop = vi.spyOn(store, 'stop').mockResolvedValue(answer);
  // Quasar's package resolves to its server build under happy-dom; the one icon is stubbed instead.
  const wrapper = mount(StopControl, { global: { plugins: [pinia], stubs: { 'q-icon': true } } });
  return { wrapper, stop, store, button: wrapper.get('[data-testid="stop-control"]') };
}

describe('stop control', () => {
  beforeEach(() => {
    vi.useFakeTimers();
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  it('records a stop only after being held for the whole 1.5 s', async () => {
    const { button, stop } = mountStop();
    await button.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS - 100);
    expect(stop).not.toHaveBeenCalled();
    await vi.advanceTimersByTimeAsync(150);
    expect(stop).toHaveBeenCalledTimes(1);
    // Holding on after it fired does not record a second stop.
    await vi.advanceTimersByTimeAsync(3000);
    expect(stop).toHaveBeenCalledTimes(1);
  });

  it('does nothing when let go early, and the next hold starts again from zero', async () => {
    const { button, stop } = mountStop();
    await button.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(1000);
    await button.trigger('pointerup', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(3000);
    expect(stop).not.toHaveBeenCalled();

    await button.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(1000);
    expect(stop).not.toHaveBeenCalled();
    await vi.advanceTimersByTimeAsync(600);
    expect(stop).toHaveBeenCalledTimes(1);
  });

  it('ignores a tap: a click alone is never a stop', async () => {
    const { button, stop } = mountStop();
    await button.trigger('click');
    await button.trigger('pointerdown', { pointerId: 1 });
    await button.trigger('pointerup', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(3000);
    expect(stop).not.toHaveBeenCalled();
  });

  it('works from the keyboard by holding Space, ignoring key repeat', async () => {
    const { button, stop } = mountStop();
    await button.trigger('keydown', { key: ' ' });
    await vi.advanceTimersByTimeAsync(700);
    // Key repeat while held must not restart the timing.
    await button.trigger('keydown', { key: ' ', repeat: true });
    await vi.advanceTimersByTimeAsync(850);
    expect(stop).toHaveBeenCalledTimes(1);

    await button.trigger('keydown', { key: 'Enter' });
    await vi.advanceTimersByTimeAsync(500);
    await button.trigger('keyup', { key: 'Enter' });
    await vi.advanceTimersByTimeAsync(2000);
    expect(stop).toHaveBeenCalledTimes(1);
  });

  it('says it is not the crane’s stop, and shows a queued stop with the time it was pressed', async () => {
    const { wrapper, store } = mountStop();
    expect(wrapper.text()).toContain('Stop by radio and signal first');
    expect(wrapper.find('[data-testid="queued-stop"]').exists()).toBe(false);
    store.queuedStop = { commandId: 'c', pressedAt: new Date(2025, 0, 1, 14, 7).toISOString() };
    await wrapper.vm.$nextTick();
    const queued = wrapper.get('[data-testid="queued-stop"]');
    expect(queued.text()).toContain('Stop not sent, use radio and signal');
    expect(queued.text()).toContain('14:07');
  });

  it('shows a refusal in plain words', async () => {
    const { button, wrapper } = mountStop({ ok: false, error: { code: 'invalid_state', message: 'The job is ready, not live.' } });
    await button.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 50);
    expect(wrapper.get('[role="alert"]').text()).toContain('The job is ready, not live.');
  });
});
