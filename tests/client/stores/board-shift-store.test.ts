import { describe, expect, it } from 'vitest';
import { BLOCKED_WORDS } from '../../../src/words/board';
import { liveJob, people, storesWith } from '../components/board/shift/shift-board';

// What the board store tells every control before a tap: the server's own sets of commands per
// state (shared/schemas/commands.ts), so no work button is left blue to fail.
describe('the board store through a shift', () => {
  it('offers work while the shift is working, and only the make-safe commands while it ends', () => {
    const job = liveJob();
    let { store } = storesWith(job.state, people.rita);
    expect(store.blockReason('step.complete')).toBe('');
    job.endShift();
    ({ store } = storesWith(job.state, people.rita));
    expect(store.blockReason('step.complete')).toBe(BLOCKED_WORDS.makingSafe);
    expect(store.blockReason('hold.acknowledge')).toBe(BLOCKED_WORDS.makingSafe);
    expect(store.blockReason('shift.item.done')).toBe('');
    expect(store.blockReason('job.stop')).toBe('');
  });

  it('accepts nothing but the start-of-shift commands once made safe, and asks for the next shift’s briefing first', () => {
    const job = liveJob();
    job.endShift();
    job.tickAll();
    let { store } = storesWith(job.state, people.otto);
    expect(store.blockReason('step.complete')).toBe(BLOCKED_WORDS.madeSafe);
    // Not a command a made-safe job accepts: the stop is by radio and signal.
    expect(store.blockReason('job.stop')).toBe(BLOCKED_WORDS.madeSafe);
    // Briefed for shift 1 only: the shift-2 acknowledgment waits for the briefing.
    expect(store.briefed).toBe(false);
    expect(store.blockReason('shift.acknowledge')).toBe(BLOCKED_WORDS.notBriefed);
    expect(store.blockReason('briefing.acknowledge')).toBe('');
    expect(store.blockReason('weather.record')).toBe('');
    job.apply('briefing.acknowledged', { planVersion: 1, shift: 2 }, { by: people.otto });
    ({ store } = storesWith(job.state, people.otto));
    expect(store.briefed).toBe(true);
    expect(store.blockReason('shift.acknowledge')).toBe('');
  });

  it('knows the acting supervisor: the one who started the job, then whoever acknowledged the handover', () => {
    const job = liveJob();
    expect(storesWith(job.state, people.sue).store.isActing).toBe(true);
    expect(storesWith(job.state, people.ned).store.isActing).toBe(false);
    // An operator is never the acting supervisor.
    expect(storesWith(job.state, people.otto).store.isActing).toBe(false);
    job.apply('handover.written', { shift: 1, to: null, done: [], open: [], defects: [], overrides: [], hazards: 'none', note: '' });
    job.apply('handover.acknowledged', { handoverSeq: job.state.handovers!.at(-1)!.seq, from: { userId: people.sue.userId, name: people.sue.name } }, { by: people.ned });
    expect(storesWith(job.state, people.sue).store.isActing).toBe(false);
    expect(storesWith(job.state, people.ned).store.isActing).toBe(true);
  });

  it('offers the acting supervisor’s commands (release, resume, skip, end and start of shift, handover) to the acting supervisor only', () => {
    const job = liveJob();
    const sue = storesWith(job.state, people.sue).store;
    const ned = storesWith(job.state, people.ned).store;
    for (const type of ['hold.release', 'job.resume', 'stage.skip', 'shift.end', 'handover.write'] as const) {
      expect(sue.blockReason(type)).not.toBe(BLOCKED_WORDS.notActing(people.sue.name));
      expect(ned.blockReason(type)).toBe(BLOCKED_WORDS.notActing(people.sue.name));
    }
    // Acknowledging a handover is how the other supervisor takes over: never blocked for not acting.
    expect(ned.blockReason('handover.acknowledge')).toBe('');
  });

  it('keeps a crew member added mid-job from acting until they acknowledge the briefing', () => {
    const job = liveJob();
    const newcomer = people.ola;
    job.apply('crew.set', { crew: [...job.state.crew, { userId: newcomer.userId, name: newcomer.name, role: 'operator' }] });
    let { store } = storesWith(job.state, newcomer);
    expect(store.blockReason('step.complete')).toBe(BLOCKED_WORDS.notBriefed);
    expect(store.blockReason('job.stop')).toBe('');
    job.apply('briefing.acknowledged', { planVersion: 1, shift: 1 }, { by: newcomer });
    ({ store } = storesWith(job.state, newcomer));
    expect(store.blockReason('step.complete')).toBe('');
  });
});
