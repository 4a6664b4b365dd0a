import { mount } from '@vue/test-utils';
import { describe, expect, it, vi } from 'vitest';
import MakeSafeChecklist from '../../../../../src/components/board/shift/MakeSafeChecklist.vue';
import { liveJob, people, quasarStubs, storesWith } from './shift-board';

function mountChecklist(who: (typeof people)[keyof typeof people], readOnly = false) {
  const job = liveJob();
  job.endShift();
  const { pinia, store } = storesWith(job.state, who);
  const send = vi.spyOn(store, 'send').mockResolvedValue({ ok: false, error: { code: 'test', message: 'Not sent in this test.' } });
  const wrapper = mount(MakeSafeChecklist, { props: { board: job.state, readOnly }, global: { plugins: [pinia], stubs: quasarStubs } });
  return { wrapper, send, board: job.state };
}

describe('the make-safe checklist', () => {
  it('gives a crew member one target per item of their role, and none for the others', () => {
    const { wrapper, board } = mountChecklist(people.rita);
    const items = board.shift!.makeSafe!.items;
    for (const item of items) {
      const tick = wrapper.find(`[data-testid="make-safe-tick-${item.id}"]`);
      expect(tick.exists(), item.id).toBe(item.roles.includes('rigger'));
    }
    // Every item reads with the roles that may tick it.
    expect(wrapper.get('[data-testid="make-safe-item-engineOff"]').text()).toContain('For operator');
  });

  it('asks for the note where the item needs one and sends it with the item', async () => {
    const { wrapper, send } = mountChecklist(people.sue);
    const tick = wrapper.get('[data-testid="make-safe-tick-keyHeld"]');
    expect(tick.attributes('disabled')).toBeDefined();
    await wrapper.get('[data-testid="make-safe-note-keyHeld"]').setValue('In the site office key safe');
    expect(tick.attributes('disabled')).toBeUndefined();
    await wrapper.get('[data-testid="make-safe-item-keyHeld"] form').trigger('submit');
    expect(send).toHaveBeenCalledWith({ type: 'shift.item.done', itemId: 'keyHeld', note: 'In the site office key safe' });
    await vi.waitFor(() => expect(wrapper.text()).toContain('Not sent in this test.'));
  });

  it('offers no control on a read-only view (the site display)', () => {
    const { wrapper } = mountChecklist(people.rita, true);
    expect(wrapper.findAll('button')).toHaveLength(0);
  });
});
