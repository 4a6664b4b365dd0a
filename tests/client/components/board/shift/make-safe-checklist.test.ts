import { mount } from '@vue/test-utils';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import MakeSafeChecklist from '../../../../../src/components/board/shift/MakeSafeChecklist.vue';
import { HOLD_TO_CONFIRM_MS } from '../../../../../src/composables/useHoldToConfirm';
import { liveJob, people, quasarStubs, storesWith } from './shift-board';

function mountChecklist(who: (typeof people)[keyof typeof people], readOnly = false) {
  const job = liveJob();
  job.endShift();
  const { pinia, store } = storesWith(job.state, who);
  const send = vi.spyOn(store, 'send').mockResolvedValue({ ok: false, error: { code: 'test', message: 'Not sent in this test.' } });
  const wrapper = mount(MakeSafeChecklist, { props: { board: job.state, readOnly }, global: { plugins: [pinia], stubs: quasarStubs } });
  return { wrapper, send, job };
}

describe('the make-safe checklist', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  it('gives a crew member one target per item of their role, and none for the others', () => {
    const { wrapper, job } = mountChecklist(people.rita);
    const items = job.state.shift!.makeSafe!.items;
    for (const item of items) {
      const tick = wrapper.find(`[data-testid="make-safe-tick-${item.id}"]`);
      expect(tick.exists(), item.id).toBe(item.roles.includes('rigger'));
    }
    // Every item reads with the roles that may tick it.
    expect(wrapper.get('[data-testid="make-safe-item-engineOff"]').text()).toContain('For operator');
  });

  it('never ticks on a tap or a short press; a full press-and-hold ticks the item under it', async () => {
    const { wrapper, send } = mountChecklist(people.rita);
    const tick = wrapper.get('[data-testid="make-safe-tick-guyLines"]');
    // The item is named in full for a screen reader; the button itself says what holding does.
    expect(tick.attributes('aria-label')).toContain(wrapper.get('[data-testid="make-safe-item-guyLines"] .text').text());
    expect(tick.text()).toContain('Hold: done');
    await tick.trigger('click');
    await tick.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS / 2);
    await tick.trigger('pointerup', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS * 2);
    expect(send).not.toHaveBeenCalled();
    await tick.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 100);
    expect(send.mock.calls.map((c) => c[0])).toEqual([{ type: 'shift.item.done', itemId: 'guyLines' }]);
  });

  it('lets go of a hold when another person’s tick moves the pressed button, so nothing is ticked by a press that moved', async () => {
    const { wrapper, send, job } = mountChecklist(people.rita);
    const tick = wrapper.get('[data-testid="make-safe-tick-guyLines"]');
    await tick.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS / 2);
    // Where the button sits on the screen: read once before the list changes (300 px), then after it (240 px).
    let reads = 0;
    (tick.element as HTMLElement).getBoundingClientRect = () => ({ top: reads++ === 0 ? 300 : 240 }) as DOMRect;
    // Otto ticks an item meanwhile and the list reflows under Rita's finger.
    await wrapper.setProps({ board: job.apply('shift.item.done', { itemId: 'engineOff', role: 'operator', note: null, madeSafe: false }, { by: people.otto }) });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS * 2);
    expect(send).not.toHaveBeenCalled();
    // A fresh, full hold on the item then ticks it.
    await tick.trigger('pointerdown', { pointerId: 2 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 100);
    expect(send.mock.calls.map((c) => c[0])).toEqual([{ type: 'shift.item.done', itemId: 'guyLines' }]);
  });

  it('keeps a hold whose button stayed put while others tick, so a crew ticking together does not interrupt each other', async () => {
    const { wrapper, send, job } = mountChecklist(people.rita);
    const tick = wrapper.get('[data-testid="make-safe-tick-guyLines"]');
    (tick.element as HTMLElement).getBoundingClientRect = () => ({ top: 300 }) as DOMRect;
    await tick.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS / 2);
    await wrapper.setProps({ board: job.apply('shift.item.done', { itemId: 'engineOff', role: 'operator', note: null, madeSafe: false }, { by: people.otto }) });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS);
    expect(send.mock.calls.map((c) => c[0])).toEqual([{ type: 'shift.item.done', itemId: 'guyLines' }]);
  });

  it('asks for the note where the item needs one and sends it with the item; Enter in the note does not tick', async () => {
    const { wrapper, send } = mountChecklist(people.sue);
    const tick = wrapper.get('[data-testid="make-safe-tick-keyHeld"]');
    expect(tick.attributes('disabled')).toBeDefined();
    const note = wrapper.get('[data-testid="make-safe-note-keyHeld"]');
    await note.setValue('In the site office key safe');
    expect(tick.attributes('disabled')).toBeUndefined();
    await note.trigger('keydown', { key: 'Enter' });
    expect(wrapper.find('[data-testid="make-safe-item-keyHeld"] form').exists()).toBe(false);
    expect(send).not.toHaveBeenCalled();
    await tick.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 100);
    expect(send).toHaveBeenCalledWith({ type: 'shift.item.done', itemId: 'keyHeld', note: 'In the site office key safe' });
    await vi.waitFor(() => expect(wrapper.text()).toContain('Not sent in this test.'));
  });

  it('offers no control on a read-only view (the site display)', () => {
    const { wrapper } = mountChecklist(people.rita, true);
    expect(wrapper.findAll('button')).toHaveLength(0);
  });
});
