import { describe, expect, it, vi } from 'vitest';
import { useSessionStore, whenSessionEnded } from '../../../src/stores/session';
import { json, mockFetchWithStores } from '../api-fakes';

vi.mock('../../../src/services/socket', () => ({ disconnectSocket: vi.fn(), renewSocketToken: vi.fn(), setSocketSession: vi.fn() }));

const session = {
  token: 'access-token',
  expiresAt: new Date(Date.now() + 15 * 60 * 1000).toISOString(),
  user: { id: 'u-1', email: 'rigger@example.test', displayName: 'Rigger One', qualifications: ['rigger'], isAdmin: false, canInspect: false, active: true, hasPassword: true, createdAt: '2026-12-01T08:00:00.000Z' },
  timeZone: 'UTC',
};

/** The session store when the server refuses its refresh: signed out, and sent to the sign-in page only when it was signed in. */
describe('the session store when its session has ended elsewhere', () => {
  const fetchMock = mockFetchWithStores();

  it('a refused refresh of a signed-in session signs out and hands over to the sign-in page with the server’s words', async () => {
    const ended = vi.fn();
    whenSessionEnded(ended);
    const store = useSessionStore();
    fetchMock.mockResolvedValueOnce(json(200, session));
    await store.login('rigger@example.test', 'a-password-long-enough');
    expect(store.signedIn).toBe(true);

    fetchMock.mockResolvedValueOnce(json(401, { error: { code: 'session_ended', message: 'Your session has ended. Sign in again.' } }));
    expect(await store.refresh()).toBe(false);
    expect(store.signedIn).toBe(false);
    expect(store.endedReason).toBe('Your session has ended. Sign in again.');
    expect(ended).toHaveBeenCalledTimes(1);
  });

  it('a page opened without a session is not sent anywhere by its first refresh', async () => {
    const ended = vi.fn();
    whenSessionEnded(ended);
    const store = useSessionStore();
    fetchMock.mockResolvedValueOnce(json(401, { error: { code: 'session_ended', message: 'Your session has ended. Sign in again.' } }));
    await store.restore();
    expect(ended).not.toHaveBeenCalled();
    expect(store.endedReason).toBe('');
  });
});
