import { describe, expect, it } from 'vitest';
import { useJobsStore } from '../../../src/stores/jobs';
import { useSessionStore } from '../../../src/stores/session';
import { buildJob, JOB_ID, json, mockFetchWithStores } from '../api-fakes';

const user = { id: 'u1', email: 'rhys@holdline.test', displayName: 'Rhys Calloway', qualifications: ['supervisor'], isAdmin: false, active: true, canInspect: false, hasPassword: true, createdAt: '2026-10-01T07:00:00.000Z' };

/** Which zone each screen's times are shown in: the job's, else the server's from the session answer. */
describe('the zone a time is shown in', () => {
  const fetchMock = mockFetchWithStores();

  it('the session answer sets the server’s zone, the default for a new job and for times of no job', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { token: 't', expiresAt: new Date(Date.now() + 600_000).toISOString(), user, timeZone: 'America/Chicago' }));
    const session = useSessionStore();
    await session.login('rhys@holdline.test', 'correct-horse-battery');
    expect(session.serverTimeZone).toBe('America/Chicago');
    // A job not loaded yet: the server's zone.
    expect(useJobsStore().timeZoneOf(JOB_ID)).toBe('America/Chicago');
  });

  it('a loaded job’s own zone wins over the server’s', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { token: 't', expiresAt: new Date(Date.now() + 600_000).toISOString(), user, timeZone: 'America/Chicago' }));
    await useSessionStore().login('rhys@holdline.test', 'correct-horse-battery');
    fetchMock.mockResolvedValueOnce(json(200, { job: buildJob({ timeZone: 'Pacific/Auckland' }) }));
    const jobs = useJobsStore();
    await jobs.loadJob(JOB_ID);
    expect(jobs.timeZoneOf(JOB_ID)).toBe('Pacific/Auckland');
  });
});
