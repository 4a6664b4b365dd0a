import { describe, expect, it } from 'vitest';
import type { UserDto } from '../../../shared/schemas/users';
import { useSessionStore } from '../../../src/stores/session';
import { json, mockFetchWithStores } from '../api-fakes';

const person: UserDto = {
  id: 'u-units',
  email: 'rigger@hire.test',
  displayName: 'Rigger',
  qualifications: ['rigger'],
  isAdmin: false,
  active: true,
  canInspect: false,
  hasPassword: true,
  createdAt: '2026-11-02T07:30:00.000Z',
  units: 'metric',
};

describe('session store: the person’s units', () => {
  const fetchMock = mockFetchWithStores();

  it('is metric before anyone signs in and follows the signed-in person', () => {
    const session = useSessionStore();
    expect(session.units).toBe('metric');
    session.user = { ...person, units: 'us' };
    expect(session.units).toBe('us');
    // 200 kPa = 29.007 psi, rounded up (NIST SP 811 (2008) B.8: 1 psi = 6.894 757 kPa, from memory).
    expect(session.quantities.pressure(200, 'up')).toBe('29.1 psi');
  });

  it('saves a change through PATCH /api/users/:id/preferences and takes the answer as the person', async () => {
    const session = useSessionStore();
    session.user = person;
    fetchMock.mockResolvedValueOnce(json(200, { user: { ...person, units: 'us' } }));
    await session.setUnits('us');
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/users/u-units/preferences');
    expect(init?.method).toBe('PATCH');
    expect(JSON.parse(String(init?.body))).toEqual({ units: 'us' });
    expect(session.units).toBe('us');
    expect(session.quantities.wind(10, 'up')).toBe('22.4 mph');
  });

  it('keeps the person as they were when the server refuses', async () => {
    const session = useSessionStore();
    session.user = person;
    fetchMock.mockResolvedValueOnce(json(400, { error: { code: 'validation', message: 'The settings has invalid fields.', fields: [{ path: 'units', message: 'Choose metric or US customary units' }] } }));
    await expect(session.setUnits('us')).rejects.toThrow();
    expect(session.units).toBe('metric');
  });
});
