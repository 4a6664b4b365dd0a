import { describe, expect, it } from 'vitest';
import { board, hold, stage, step } from '../../../shared/board/states';
import { closedHeadline } from '../../../../src/words/board';

/** The clock is the caller's (services/time.ts on screen); a fixed one keeps the words checkable. */
const at = (iso: string) => `<${iso}>`;

describe('the closed board’s headline', () => {
  const signOff = (overrides: Parameters<typeof hold>[1]) =>
    stage('handover', 16, { state: 'done', steps: [step('handover.1', { state: 'done' })], hold: hold('handover.hold', { signOff: true, mandatory: true, requiredRoles: ['supervisor', 'operator'], ...overrides }) });
  const acks = [
    { role: 'supervisor' as const, userId: 's', name: 'Rhys Calloway', at: '2026-12-03T10:00:00.000Z' },
    { role: 'operator' as const, userId: 'o', name: 'Tomasz Wierzba', at: '2026-12-03T10:01:00.000Z' },
    { role: 'rigger' as const, userId: 'i', name: 'Priya Raman', at: '2026-12-03T10:02:00.000Z', inspector: true },
  ];

  it('names the inspector (not whoever acknowledged in the same role) and the releasing supervisor with the time', () => {
    const released = signOff({ state: 'released', acknowledgments: acks, releasedBy: { userId: 's2', name: 'Marta Lindqvist', role: 'supervisor', at: '2026-12-03T10:05:00.000Z' } });
    expect(closedHeadline(board([released], 'complete'), at)).toBe('Job complete: signed off by Priya Raman and released by Marta Lindqvist at <2026-12-03T10:05:00.000Z>');
  });

  it('claims no sign-off that the log does not hold', () => {
    // Completed before plans had a sign-off (job.complete): no names.
    expect(closedHeadline(board([stage('lift', 1, { state: 'done', hold: hold('lift.hold', { state: 'released' }) })], 'complete'), at)).toBe('Job complete');
    // A sign-off hold without an inspector's acknowledgment never reads as signed off.
    const noInspector = signOff({ state: 'released', acknowledgments: acks.slice(0, 2), releasedBy: { userId: 's2', name: 'Marta Lindqvist', role: 'supervisor', at: '2026-12-03T10:05:00.000Z' } });
    expect(closedHeadline(board([noInspector], 'complete'), at)).toBe('Job complete');
  });

  it('says a cancelled job is cancelled, with its reason', () => {
    const cancelled = board([signOff({ state: 'waiting' })], 'cancelled');
    expect(closedHeadline(cancelled, at)).toBe('Job cancelled');
    expect(closedHeadline({ ...cancelled, job: { ...cancelled.job, cancelReason: 'Lift moved to next month' } }, at)).toBe('Job cancelled: Lift moved to next month');
  });
});
