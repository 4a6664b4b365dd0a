import { describe, expect, it } from 'vitest';
import { checkNewEventData, parseJobEvent } from '../../../shared/events/log.js';

const envelope = { jobId: 'j', seq: 4, at: '2026-12-01T08:00:00.000Z', by: { userId: 'u', name: 'Rigger', role: 'rigger' } };

describe('the typed event log', () => {
  it('reads the shapes older versions wrote: fields added later are absent, not refused', () => {
    // Written before readings carried their height and their comparison (2026-12-03).
    const step = parseJobEvent({ ...envelope, type: 'step.completed', data: { stageId: 's', stepId: 's.1', value: '6', photoId: null } });
    expect(step.type === 'step.completed' && step.data.outOfLimit).toBeUndefined();
    const wind = parseJobEvent({
      ...envelope,
      type: 'weather.recorded',
      data: { reading: { meanMs: 5, gustMs: 8, lightning: false, poorVisibility: false, ice: false }, phase: 'assembly', limit: null, stop: null, overLimit: null },
    });
    expect(wind.type === 'weather.recorded' && wind.data.reading.heightM).toBeUndefined();
    const reopened = parseJobEvent({ ...envelope, type: 'step.reopened', data: { stageId: 's', stepId: 's.1', clearedAcknowledgments: 0 } });
    expect(reopened.type).toBe('step.reopened');
    const failed = parseJobEvent({ ...envelope, type: 'hold.check.failed', data: { stageId: 's', holdId: 'h', role: 'operator', photoId: 'p', fields: ['parts'] } });
    expect(failed.type === 'hold.check.failed' && failed.data.failuresSinceReview).toBeUndefined();
  });

  it('keeps the effects the writer adds and drops what no version declared', () => {
    const e = parseJobEvent({ ...envelope, type: 'hold.released', data: { stageId: 's', holdId: 'h', effects: { holds: [{ id: 'h', state: 'released' }] }, stray: 1 } });
    expect(e.data).toEqual({ stageId: 's', holdId: 'h', effects: { holds: [{ id: 'h', state: 'released' }] } });
  });

  it('refuses an event of no known type, or data of the wrong type', () => {
    expect(() => parseJobEvent({ ...envelope, type: 'board.somethingNew', data: {} })).toThrow();
    expect(() => parseJobEvent({ ...envelope, type: 'hold.acknowledged', data: { stageId: 's', holdId: 'h', role: 'crane driver', photoId: null, values: null } })).toThrow();
    expect(() => parseJobEvent({ ...envelope, type: 'briefing.acknowledged', data: { planVersion: '2' } })).toThrow();
  });

  it('refuses a new event whose data carries a field its schema does not declare', () => {
    expect(() => checkNewEventData({ type: 'job.resumed', role: 'supervisor', data: { reason: 'Wind dropped' } })).not.toThrow();
    // A handler that writes a field the reducer and the record would never read is a bug, found here before the hash.
    const stray = JSON.parse('{"reason":"Wind dropped","resumedBy":"x"}') as { reason: string };
    expect(() => checkNewEventData({ type: 'job.resumed', role: 'supervisor', data: stray })).toThrow();
    // Also deeper down: a field inside a declared object would be hashed but never read back.
    const nested = JSON.parse('{"changes":{"name":"Renamed","colour":"red"},"planRegenerated":false}') as { changes: { name: string }; planRegenerated: boolean };
    expect(() => checkNewEventData({ type: 'job.updated', role: 'supervisor', data: { changes: { name: 'Renamed' }, planRegenerated: false } })).not.toThrow();
    expect(() => checkNewEventData({ type: 'job.updated', role: 'supervisor', data: nested })).toThrow(/does not declare/);
  });
});
