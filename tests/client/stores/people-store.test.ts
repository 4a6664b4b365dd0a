import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import type { UserDto } from '../../../shared/schemas/users';
import { filterPeople, personStatus, usePeopleStore, useTestInboxStore } from '../../../src/stores/people';
import { json, mockFetchWithStores } from '../api-fakes';

function person(overrides: Partial<UserDto>): UserDto {
  return {
    id: 'u-' + Math.random().toString(36).slice(2, 8),
    email: 'someone@example.test',
    displayName: 'Someone',
    qualifications: ['rigger'],
    isAdmin: false,
    canInspect: false,
    active: true,
    hasPassword: true,
    createdAt: '2026-11-02T07:30:00.000Z',
    units: 'metric',
    ...overrides,
  };
}

const crew = [
  person({ id: 'a', displayName: 'Dara Whitcombe', email: 'dara@hire.test', qualifications: ['supervisor', 'signaller'] }),
  person({ id: 'b', displayName: 'Jonah Mbeki', email: 'jonah.mbeki@hire.test', qualifications: ['operator'] }),
  person({ id: 'c', displayName: 'Lise Arnaud', email: 'l.arnaud@hire.test', hasPassword: false }),
];


describe('people store', () => {
  const fetchMock = mockFetchWithStores();

  it('loads the list from GET /api/users and tracks loading', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: crew }));
    const store = usePeopleStore();
    const loading = store.load();
    expect(store.loading).toBe(true);
    await loading;
    expect(store.loading).toBe(false);
    expect(store.loaded).toBe(true);
    expect(store.loadProblem).toBe('');
    expect(store.people.map((p) => p.displayName)).toEqual(['Dara Whitcombe', 'Jonah Mbeki', 'Lise Arnaud']);
    expect(fetchMock).toHaveBeenCalledTimes(1);
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/users');
    expect(init?.method).toBe('GET');
  });

  it('shares one request between callers who load at the same time', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: crew }));
    const store = usePeopleStore();
    await Promise.all([store.load(), store.load()]);
    expect(fetchMock).toHaveBeenCalledTimes(1);
  });

  it('keeps the server message when loading is refused, and an answer of the wrong shape is refused too', async () => {
    fetchMock.mockResolvedValueOnce(json(403, { error: { code: 'forbidden', message: 'Only administrators can manage people.' } }));
    const store = usePeopleStore();
    await store.load();
    expect(store.loadProblem).toBe('Only administrators can manage people.');
    expect(store.people).toEqual([]);

    fetchMock.mockResolvedValueOnce(json(200, { items: [{ id: 'x' }] }));
    await store.load();
    expect(store.loadProblem).toMatch(/does not understand/);
    expect(store.loaded).toBe(false);
  });

  it('filters by name or e-mail, ignoring case and surrounding spaces', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: crew }));
    const store = usePeopleStore();
    await store.load();
    expect(store.visible).toHaveLength(3);

    store.search = '  MBEKI ';
    expect(store.visible.map((p) => p.id)).toEqual(['b']);

    store.search = 'l.arnaud@';
    expect(store.visible.map((p) => p.id)).toEqual(['c']);

    store.search = 'hire.test';
    expect(store.visible).toHaveLength(3);

    store.search = 'nobody';
    expect(store.visible).toEqual([]);

    store.search = '';
    expect(store.visible).toHaveLength(3);
    expect(filterPeople(crew, 'dara')).toHaveLength(1);
  });

  it('keeps the errors per field when the server refuses an invitation', async () => {
    fetchMock.mockResolvedValueOnce(
      json(400, {
        error: {
          code: 'validation',
          message: 'The request has invalid fields.',
          fields: [
            { path: 'email', message: 'Use a company e-mail address' },
            { path: 'qualifications.1', message: 'Pick each qualification once' },
            { path: 'qualifications.2', message: 'A second message for the same field' },
          ],
        },
      }),
    );
    const store = usePeopleStore();
    const result = await store.invite({ email: 'new.rigger@hire.test', displayName: 'Ola Brenner', qualifications: ['rigger', 'signaller'], isAdmin: false });

    expect(result).toBeNull();
    expect(store.saving).toBe(false);
    expect(store.fieldErrors).toEqual({ email: 'Use a company e-mail address', 'qualifications.1': 'Pick each qualification once', 'qualifications.2': 'A second message for the same field' });
    // The qualifications control shows the first message of any of its entries.
    expect(store.errorOf('qualifications')).toBe('Pick each qualification once');
    expect(store.errorOf('displayName')).toBe('');
    expect(store.saveProblem).toBe('The request has invalid fields.');
    expect(store.people).toEqual([]);
    const [url, init] = fetchMock.mock.calls[0];
    expect(url).toBe('/api/users');
    expect(init?.method).toBe('POST');
    expect(JSON.parse(String(init?.body))).toEqual({ email: 'new.rigger@hire.test', displayName: 'Ola Brenner', qualifications: ['rigger', 'signaller'], isAdmin: false });

    store.resetForm();
    expect(store.fieldErrors).toEqual({});
    expect(store.saveProblem).toBe('');
  });

  it('puts a taken e-mail on the e-mail field', async () => {
    fetchMock.mockResolvedValueOnce(json(409, { error: { code: 'email_taken', message: 'Someone already uses that e-mail.' } }));
    const store = usePeopleStore();
    expect(await store.invite({ email: 'dara@hire.test', displayName: 'Dara Again' })).toBeNull();
    expect(store.fieldErrors).toEqual({ email: 'Someone already uses that e-mail.' });
  });

  it('checks the invitation with the shared schema before sending it', async () => {
    const store = usePeopleStore();
    expect(await store.invite({ email: 'not an e-mail', displayName: '   ' })).toBeNull();
    expect(fetchMock).not.toHaveBeenCalled();
    expect(store.errorOf('email')).toBe('Enter a valid e-mail');
    expect(store.errorOf('displayName')).toBe('Enter a name');
  });

  it('adds an invited person to the list as pending', async () => {
    const invited = person({ id: 'n', displayName: 'Ola Brenner', email: 'ola@hire.test', hasPassword: false });
    fetchMock.mockResolvedValueOnce(json(201, { user: invited }));
    const store = usePeopleStore();
    const result = await store.invite({ email: 'ola@hire.test', displayName: 'Ola Brenner', qualifications: ['rigger'] });
    expect(result?.id).toBe('n');
    expect(store.people.map((p) => p.id)).toEqual(['n']);
    expect(personStatus(store.people[0])).toBe('pending');
  });

  it('replaces the person after a change and keeps a refusal such as the last admin', async () => {
    fetchMock.mockResolvedValueOnce(json(200, { items: crew }));
    const store = usePeopleStore();
    await store.load();

    fetchMock.mockResolvedValueOnce(json(200, { user: { ...crew[1], active: false } }));
    const changed = await store.setActive('b', false);
    expect(changed?.active).toBe(false);
    expect(personStatus(store.people.find((p) => p.id === 'b')!)).toBe('deactivated');
    const [url, init] = fetchMock.mock.calls[1];
    expect(url).toBe('/api/users/b');
    expect(init?.method).toBe('PATCH');
    expect(JSON.parse(String(init?.body))).toEqual({ active: false });

    fetchMock.mockResolvedValueOnce(json(409, { error: { code: 'last_admin', message: 'Holdline needs at least one active administrator.' } }));
    expect(await store.update('a', { isAdmin: false })).toBeNull();
    expect(store.saveProblem).toBe('Holdline needs at least one active administrator.');
    expect(store.people.find((p) => p.id === 'a')?.isAdmin).toBe(false);
  });
});

describe('test inbox store', () => {
  beforeEach(() => setActivePinia(createPinia()));
  afterEach(() => vi.unstubAllGlobals());

  it('marks the inbox unavailable when the server has none', async () => {
    vi.stubGlobal('fetch', vi.fn(async () => json(404, { error: { code: 'not_found', message: 'No API route GET /dev/inbox.' } })));
    const inbox = useTestInboxStore();
    await inbox.load();
    expect(inbox.available).toBe(false);
    expect(inbox.problem).toBe('');
  });

  it('lists the messages newest first', async () => {
    const message = (id: string, at: string) => ({ id, at, to: ['ola@hire.test'], subject: 'Your Holdline invitation', text: 'Open http://localhost/set-password?token=abc' });
    vi.stubGlobal('fetch', vi.fn(async () => json(200, { items: [message('1', '2026-11-02T07:00:00.000Z'), message('2', '2026-11-02T08:00:00.000Z')] })));
    const inbox = useTestInboxStore();
    await inbox.load();
    expect(inbox.available).toBe(true);
    expect(inbox.messages.map((m) => m.id)).toEqual(['2', '1']);
  });
});
