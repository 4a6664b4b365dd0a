import { mount } from '@vue/test-utils';
import { describe, expect, it, vi } from 'vitest';
import HandoverPanel from '../../../../../src/components/board/shift/HandoverPanel.vue';
import { liveJob, people, quasarStubs, storesWith } from './shift-board';

function mountPanel(job: ReturnType<typeof liveJob>, who: (typeof people)[keyof typeof people], readOnly = false) {
  const { pinia, store } = storesWith(job.state, who);
  const send = vi.spyOn(store, 'send').mockResolvedValue({ ok: false, error: { code: 'test', message: 'Not sent in this test.' } });
  const wrapper = mount(HandoverPanel, { props: { board: job.state, readOnly }, global: { plugins: [pinia], stubs: quasarStubs } });
  return { wrapper, send };
}

/** Shift 1 ending, Sue's note written for the next supervisor. */
function withNote() {
  const job = liveJob();
  job.endShift();
  job.apply('handover.written', { shift: 1, to: { userId: people.ned.userId, name: people.ned.name }, done: ['Site, ground and communications'], open: ['Boom assembly: 3 of 7 steps to do'], defects: [], overrides: [], hazards: 'Barriers on the east side moved by the client', note: 'Start with the guy lines.' });
  return job;
}

describe('the handover', () => {
  it('opens the acting supervisor’s form once the shift ends, with what the board lists, and sends hazards and note', async () => {
    const job = liveJob();
    job.endShift();
    const { wrapper, send } = mountPanel(job, people.sue);
    const form = wrapper.get('[data-testid="handover-form"]');
    // The stage in progress is listed for the writer from the board.
    expect(form.text()).toContain(`${job.state.stages[0].title}: ${job.state.stages[0].steps.length} of ${job.state.stages[0].steps.length} steps to do`);
    const write = wrapper.get('[data-testid="handover-write"]');
    expect(write.attributes('disabled')).toBeDefined();
    await wrapper.get('[data-testid="handover-hazards"]').setValue('Barriers on the east side moved by the client');
    await wrapper.get('[data-testid="handover-note"]').setValue('Start with the guy lines.');
    await form.trigger('submit');
    expect(send.mock.calls.map((c) => c[0])).toEqual([{ type: 'handover.write', hazards: 'Barriers on the east side moved by the client', note: 'Start with the guy lines.' }]);
  });

  it('asks another supervisor to acknowledge the note; its writer and the crew only read it', async () => {
    const job = withNote();
    const ned = mountPanel(job, people.ned);
    expect(ned.wrapper.get('[data-testid="handover-latest"]').text()).toContain('Barriers on the east side moved by the client');
    expect(ned.wrapper.find('[data-testid="handover-form"]').exists()).toBe(false);
    await ned.wrapper.get('[data-testid="handover-acknowledge"]').trigger('click');
    expect(ned.send.mock.calls.map((c) => c[0])).toEqual([{ type: 'handover.acknowledge' }]);

    const sue = mountPanel(job, people.sue);
    expect(sue.wrapper.find('[data-testid="handover-acknowledge"]').exists()).toBe(false);
    expect(sue.wrapper.text()).toContain('You wrote this note: another supervisor acknowledges it.');
    // Her note waits to be read: the form stays closed until she asks for it.
    expect(sue.wrapper.find('[data-testid="handover-form"]').exists()).toBe(false);

    const otto = mountPanel(job, people.otto);
    expect(otto.wrapper.findAll('button')).toHaveLength(0);
    expect(otto.wrapper.text()).toContain('for Ned Orr');
  });

  it('says who read it once acknowledged, with no control left', () => {
    const job = withNote();
    job.apply('handover.acknowledged', { handoverSeq: job.state.handovers!.at(-1)!.seq, from: { userId: people.sue.userId, name: people.sue.name } }, { by: people.ned });
    const { wrapper } = mountPanel(job, people.ned, true);
    expect(wrapper.get('[data-testid="handover-acknowledged"]').text()).toContain('Read and acknowledged by Ned Orr');
    expect(wrapper.findAll('button')).toHaveLength(0);
  });
});
