import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { JobEventDto } from '../../../shared/events/log';
import { fetchEventsAfter } from '../../../src/services/events';
import { JOB_ID, json } from '../api-fakes';

type FetchArgs = [input: string, init?: RequestInit];

const event = (seq: number): JobEventDto => ({
  jobId: JOB_ID,
  seq,
  type: 'job.updated',
  at: '2026-10-01T07:00:00.000Z',
  by: { userId: '0b9a8c7d-6e5f-4a3b-9c2d-1e0f9a8b7c6d', name: 'Maren Holt', role: 'supervisor' },
  data: { changes: { site: 'Pad 3' }, planRegenerated: false },
});

describe('reading a job’s events over HTTP', () => {
  let fetchMock: ReturnType<typeof vi.fn<(...args: FetchArgs) => Promise<Response>>>;
  beforeEach(() => {
    fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => vi.unstubAllGlobals());

  it('asks page after page until the log’s last seq, so a gap longer than one page is filled whole', async () => {
    fetchMock
      .mockResolvedValueOnce(json(200, { items: [event(4), event(5)], lastSeq: 8 }))
      .mockResolvedValueOnce(json(200, { items: [event(6), event(7)], lastSeq: 8 }))
      .mockResolvedValueOnce(json(200, { items: [event(8)], lastSeq: 8 }));
    expect((await fetchEventsAfter(JOB_ID, 3)).map((e) => e.seq)).toEqual([4, 5, 6, 7, 8]);
    expect(fetchMock.mock.calls.map(([u]) => u)).toEqual([`/api/jobs/${JOB_ID}/events?after=3`, `/api/jobs/${JOB_ID}/events?after=5`, `/api/jobs/${JOB_ID}/events?after=7`]);
  });

  it('stops at a page with nothing new: the last events may be ones this person is not shown', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: [event(2)], lastSeq: 4 })).mockResolvedValueOnce(json(200, { items: [], lastSeq: 4 }));
    expect((await fetchEventsAfter(JOB_ID, 1)).map((e) => e.seq)).toEqual([2]);
    expect(fetchMock).toHaveBeenCalledTimes(2);
  });

  it('passes a failed page on to the caller instead of answering a short list', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: [event(2)], lastSeq: 4 })).mockResolvedValueOnce(json(500, { error: { code: 'internal', message: 'Something went wrong on the server.' } }));
    await expect(fetchEventsAfter(JOB_ID, 1)).rejects.toThrow();
  });
});
