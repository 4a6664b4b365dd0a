import { mount } from '@vue/test-utils';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { SHIFT_START_HOLD_ID } from '../../../../../shared/board/shifts';
import ShiftStartHold from '../../../../../src/components/board/shift/ShiftStartHold.vue';
import { HOLD_TO_CONFIRM_MS } from '../../../../../src/composables/useHoldToConfirm';
import { liveJob, people, quasarStubs, storesWith } from './shift-board';

/** A job made safe at the end of shift 1; `brief` acknowledge the briefing for shift 2. */
function madeSafe(brief: (typeof people)[keyof typeof people][] = []) {
  const job = liveJob();
  job.endShift();
  job.tickAll();
  for (const who of brief) job.apply('briefing.acknowledged', { planVersion: 1, shift: 2 }, { by: who });
  return job;
}

function mountHold(job: ReturnType<typeof liveJob>, who: (typeof people)[keyof typeof people], opts: { canInspect?: boolean; readOnly?: boolean } = {}) {
  const { pinia, store } = storesWith(job.state, who, { canInspect: opts.canInspect });
  const send = vi.spyOn(store, 'send').mockResolvedValue({ ok: false, error: { code: 'test', message: 'Not sent in this test.' } });
  // The wind panel has its own controls and tests; here it only has to be there.
  const wrapper = mount(ShiftStartHold, { props: { board: job.state, readOnly: opts.readOnly }, global: { plugins: [pinia], stubs: { ...quasarStubs, WeatherPanel: { template: '<section data-testid="weather-stub" />' } } } });
  return { wrapper, send };
}

const everyone = [people.sue, people.otto, people.rita, people.sam, people.ned];

describe('the start-of-shift hold', () => {
  beforeEach(() => vi.useFakeTimers());
  afterEach(() => vi.useRealTimers());

  it('asks the operator, once briefed for the next shift, for their acknowledgment, and keeps it off before', () => {
    const before = mountHold(madeSafe(), people.otto);
    expect(before.wrapper.get('[data-testid="shift-ack-operator"]').attributes('disabled')).toBeDefined();
    expect(before.wrapper.text()).toContain('Acknowledge the briefing for this shift first');
    const after = mountHold(madeSafe([people.otto]), people.otto);
    expect(after.wrapper.get('[data-testid="shift-ack-operator"]').attributes('disabled')).toBeUndefined();
    // The operator is never offered the supervisor's slot, nor the start.
    expect(after.wrapper.find('[data-testid="shift-ack-supervisor"]').exists()).toBe(false);
    expect(after.wrapper.find('[data-testid="shift-start-button"]').exists()).toBe(false);
  });

  it('offers the shift inspection only to a crew member marked qualified to inspect', () => {
    expect(mountHold(madeSafe([people.rita]), people.rita).wrapper.find('[data-testid="shift-inspect"]').exists()).toBe(false);
    const qualified = mountHold(madeSafe([people.rita]), people.rita, { canInspect: true });
    expect(qualified.wrapper.get('[data-testid="shift-inspect"]').attributes('disabled')).toBeDefined();
  });

  it('lists what is missing by name, and tells a supervisor who is not acting who starts the shift', () => {
    const { wrapper } = mountHold(madeSafe([people.sue]), people.ned);
    const missing = wrapper.get('[data-testid="shift-start-missing"]').text();
    expect(missing).toContain('The shift inspection by a competent person.');
    expect(missing).toContain('The operator’s acknowledgment.');
    expect(missing).toContain('from Otto Brand, Rita Venn, Sam Pike, Ned Orr');
    expect(wrapper.get('[data-testid="shift-start-not-acting"]').text()).toBe('Only the acting supervisor (Sue Marsh) starts the next shift.');
  });

  it('lets the acting supervisor start the next shift by press-and-hold only once nothing is missing', async () => {
    const job = madeSafe(everyone);
    job.apply('shift.inspected', { shift: 1, note: 'Walked the boom: as left.' }, { by: people.rita });
    job.apply('shift.start.acknowledged', { shift: 1, role: 'operator' }, { by: people.otto });
    job.apply('shift.start.acknowledged', { shift: 1, role: 'supervisor' }, { by: people.sue });
    const readingAt = Date.parse(job.state.briefed.at(-1)!.at) + 60_000;
    job.apply('weather.recorded', { reading: { meanMs: 4, gustMs: 6, heightM: 10, lightning: false, poorVisibility: false, ice: false }, stop: null }, { by: people.sam, at: new Date(readingAt).toISOString() });
    vi.setSystemTime(readingAt + 60_000);
    const { wrapper, send } = mountHold(job, people.sue);
    expect(wrapper.get('[data-testid="shift-start-missing"]').text()).toContain('Everything the start-of-shift hold needs is in place.');
    const start = wrapper.get('[data-testid="shift-start-button"]');
    expect(start.text()).toContain('Hold to start shift 2');
    await start.trigger('click');
    expect(send).not.toHaveBeenCalled();
    await start.trigger('pointerdown', { pointerId: 1 });
    await vi.advanceTimersByTimeAsync(HOLD_TO_CONFIRM_MS + 100);
    expect(send.mock.calls.map((c) => c[0])).toEqual([{ type: 'shift.start' }]);
  });

  it('keeps the start off while the wind reading is older than the job’s setting', () => {
    const job = madeSafe(everyone);
    job.apply('shift.inspected', { shift: 1, note: 'Walked the boom: as left.' }, { by: people.rita });
    job.apply('shift.start.acknowledged', { shift: 1, role: 'operator' }, { by: people.otto });
    job.apply('shift.start.acknowledged', { shift: 1, role: 'supervisor' }, { by: people.sue });
    const readingAt = Date.parse(job.state.briefed.at(-1)!.at) + 60_000;
    job.apply('weather.recorded', { reading: { meanMs: 4, gustMs: 6, heightM: 10, lightning: false, poorVisibility: false, ice: false }, stop: null }, { by: people.sam, at: new Date(readingAt).toISOString() });
    // The job's setting is 10 minutes (liveJob's configuration): eleven minutes later the reading is too old.
    vi.setSystemTime(readingAt + 11 * 60_000);
    const { wrapper } = mountHold(job, people.sue);
    // One sentence, one full stop.
    expect(wrapper.get('[data-testid="shift-start-missing"]').text()).toContain('Record a new weather reading: the last one is older than 10 minutes.');
    expect(wrapper.get('[data-testid="shift-start-missing"]').text()).not.toContain('..');
    expect(wrapper.get('[data-testid="shift-start-button"]').attributes('disabled')).toBeDefined();
  });

  it('says why an acknowledgment was taken back by a crew change, on every view, until the shift starts', () => {
    const job = madeSafe(everyone);
    job.apply('shift.start.acknowledged', { shift: 1, role: 'operator' }, { by: people.otto });
    // Before anything is taken back the hold says nothing about it.
    expect(mountHold(job, people.sue).wrapper.find('[data-testid="shift-start-reopened"]').exists()).toBe(false);
    const at = '2026-03-02T18:30:00.000Z';
    job.apply('crew.set', { crew: [], withdrawn: [{ stageId: null, holdId: SHIFT_START_HOLD_ID, userId: people.otto.userId, name: people.otto.name, role: 'operator' }] }, { at });
    for (const view of [mountHold(job, people.sue), mountHold(job, people.rita, { readOnly: true })]) {
      const note = view.wrapper.get('[data-testid="shift-start-reopened"]').text();
      expect(note).toContain('Otto Brand left the crew or changed role');
      // The time in the site's zone with its offset, as every time on the board.
      expect(note).toMatch(/18:30.*UTC/);
      expect(view.wrapper.get('[data-testid="shift-start-operator"]').text()).toContain('not yet acknowledged');
    }
  });

  it('shows the hold with no control on a read-only view', () => {
    const { wrapper } = mountHold(madeSafe(everyone), people.sue, { readOnly: true });
    expect(wrapper.findAll('button')).toHaveLength(0);
  });
});
