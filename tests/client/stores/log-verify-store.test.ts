import { describe, expect, it } from 'vitest';
import { useJobsStore } from '../../../src/stores/jobs';
import { JOB_ID, json, mockFetchWithStores } from '../api-fakes';

const HASH = 'ab'.repeat(32);

describe('verifying a job’s log from the client', () => {
  const fetchMock = mockFetchWithStores();

  it('asks with the expected hash and keeps whether the log leads to it', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(200, { valid: true, checked: 12, firstBadSeq: null, finalHash: HASH, expected: { hash: 'cd'.repeat(32), found: false, seq: null } }));
    await jobs.verifyRecord(JOB_ID, 'cd'.repeat(32));
    expect(String(fetchMock.mock.calls[0][0])).toContain(`/api/jobs/${JOB_ID}/record/verify?expect=${'cd'.repeat(32)}`);
    expect(jobs.verification[JOB_ID]).toMatchObject({ valid: true, finalHash: HASH, expected: { found: false, seq: null } });
  });

  it('a plain check sends no expected hash', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(200, { valid: false, checked: 4, firstBadSeq: 5, finalHash: null }));
    await jobs.verifyRecord(JOB_ID);
    expect(String(fetchMock.mock.calls[0][0])).toMatch(/\/record\/verify$/);
    expect(jobs.verification[JOB_ID]).toEqual({ valid: false, checked: 4, firstBadSeq: 5, finalHash: null });
  });
});
