import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import type { BoardSnapshot } from '../../../shared/board/types';
import SavedBoardBanner from '../../../src/components/board/SavedBoardBanner.vue';
import { readSavedBoard, saveBoard } from '../../../src/services/saved-boards';
import { useBoardStore } from '../../../src/stores/board';
import { useSessionStore } from '../../../src/stores/session';
import { BLOCKED_WORDS } from '../../../src/words/board';
import { SAVED_BOARD_WORDS } from '../../../src/words/offline';
import { JOB_ID } from '../api-fakes';

/** The tab's one socket, faked: connected or not as the test says; a join answers the server's board. */
const fake = vi.hoisted(() => {
  type Handler = (payload?: unknown) => void;
  const handlers = new Map<string, Set<Handler>>();
  let snapshot: unknown = null;
  const socket = {
    connected: false,
    active: true,
    on(event: string, handler: Handler) {
      if (!handlers.has(event)) handlers.set(event, new Set());
      handlers.get(event)!.add(handler);
      return socket;
    },
    off(event: string, handler: Handler) {
      handlers.get(event)?.delete(handler);
      return socket;
    },
    emit() {
      return socket;
    },
    connect() {
      return socket;
    },
    timeout() {
      return {
        emitWithAck: async () => {
          const { presence, ...board } = snapshot as { seq: number; presence: unknown[] };
          return { ok: true, mode: 'snapshot', board: JSON.stringify(board), presence, seq: board.seq };
        },
      };
    },
  };
  return {
    socket,
    setSnapshot(next: unknown) {
      snapshot = next;
    },
    deliver(event: string, payload?: unknown) {
      for (const handler of [...(handlers.get(event) ?? [])]) handler(payload);
    },
    reset() {
      handlers.clear();
      socket.connected = false;
    },
  };
});

vi.mock('../../../src/services/socket', async (importOriginal) => ({ ...(await importOriginal<object>()), connectSocket: () => fake.socket }));

const OPERATOR = { id: 'u-op', email: 'op@example.test', displayName: 'Ola Operator', qualifications: ['operator'], isAdmin: false, active: true, canInspect: false, hasPassword: true, createdAt: '2026-12-01T08:00:00.000Z', units: 'metric' } as const;

function boardAt(seq: number, presence: BoardSnapshot['presence'] = []): BoardSnapshot {
  return {
    seq,
    job: { id: JOB_ID, name: 'Boom erection for the pump house', site: 'Riverside works', kind: 'erection', state: 'live', craneFleetNumber: 'CC-11', stop: null, lastResume: null, cancelReason: null, timeZone: 'Europe/Warsaw' },
    planVersion: 1,
    stages: [],
    crew: [{ userId: OPERATOR.id, name: OPERATOR.displayName, role: 'operator' }],
    briefed: [{ userId: OPERATOR.id, name: OPERATOR.displayName, planVersion: 1, at: '2026-12-04T07:00:00.000Z' }],
    weather: null,
    windLimits: null,
    defects: [],
    presence,
  } as BoardSnapshot;
}

const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

describe('the board kept on the device', () => {
  beforeEach(() => {
    setActivePinia(createPinia());
    fake.reset();
    localStorage.clear();
    // Every session call fails as with no network, unless a test says otherwise.
    vi.stubGlobal('fetch', vi.fn(() => Promise.reject(new TypeError('Failed to fetch'))));
  });
  afterEach(() => {
    useBoardStore().close();
    vi.unstubAllGlobals();
    vi.restoreAllMocks();
  });

  it('saves the live board for whoever sees it, without who was connected', async () => {
    useSessionStore().user = { ...OPERATOR, qualifications: [...OPERATOR.qualifications] };
    fake.socket.connected = true;
    fake.setSnapshot(boardAt(12, [{ userId: 'u-sig', name: 'Sam Signaller', roles: ['signaller'] }]));
    const store = useBoardStore();
    await store.open(JOB_ID);
    store.setView('cab');
    expect(store.live).toBe(true);
    const kept = readSavedBoard(JOB_ID);
    expect(kept).toMatchObject({ seq: 12, userId: OPERATOR.id, userName: OPERATOR.displayName });
    expect(kept!.liveAt).toBeGreaterThan(Date.now() - 5_000);
    expect(kept!.board.presence).toEqual([]);
    expect(kept!.view).toBe('cab');
  });

  it('opened with no session and no server, shows the saved board not live, sends nothing from it, and gives way to the live board', async () => {
    saveBoard({ jobId: JOB_ID, view: 'cab', liveAt: Date.now() - 60_000, userId: OPERATOR.id, userName: OPERATOR.displayName }, boardAt(12));
    const store = useBoardStore();
    void store.open(JOB_ID);
    await flush();
    expect(store.saved).toMatchObject({ jobId: JOB_ID, seq: 12, userName: OPERATOR.displayName });
    expect(store.board?.seq).toBe(12);
    expect(store.live).toBe(false);
    // Whose board it is, though nobody is signed in: their roles and briefing read from it.
    expect(store.viewerId).toBe(OPERATOR.id);
    expect(store.myRoles).toEqual(['operator']);
    expect(store.briefed).toBe(true);
    for (const type of ['hold.acknowledge', 'hold.release', 'step.complete', 'weather.record'] as const) expect(store.blockReason(type)).toBe(SAVED_BOARD_WORDS.blocked);
    expect(SAVED_BOARD_WORDS.blocked).not.toBe(BLOCKED_WORDS.notLive);
    // The stop still queues, as on any board that is not live.
    expect(await store.stop()).toBeNull();
    expect(store.queuedStop).not.toBeNull();

    // The server is back and the socket joins: the live board replaces the saved one.
    fake.setSnapshot(boardAt(15));
    fake.socket.connected = true;
    fake.deliver('connect');
    await flush();
    expect(store.saved).toBeNull();
    expect(store.board?.seq).toBe(15);
  });

  it('signed in and online, waits a few seconds for the live board before showing the saved one, at once when the socket cannot connect', async () => {
    vi.useFakeTimers();
    try {
      useSessionStore().user = { ...OPERATOR, qualifications: [...OPERATOR.qualifications] };
      saveBoard({ jobId: JOB_ID, liveAt: Date.now() - 60_000, userId: OPERATOR.id, userName: OPERATOR.displayName }, boardAt(12));
      const store = useBoardStore();
      void store.open(JOB_ID);
      await vi.advanceTimersByTimeAsync(1000);
      expect(store.saved).toBeNull();
      expect(store.board).toBeNull();
      fake.deliver('connect_error', new Error('websocket error'));
      expect(store.saved?.seq).toBe(12);
    } finally {
      vi.useRealTimers();
    }
  });

  it('never shows another person’s saved board', async () => {
    useSessionStore().user = { ...OPERATOR, id: 'u-other', qualifications: [...OPERATOR.qualifications] };
    saveBoard({ jobId: JOB_ID, liveAt: Date.now() - 60_000, userId: OPERATOR.id, userName: OPERATOR.displayName }, boardAt(12));
    const store = useBoardStore();
    void store.open(JOB_ID);
    fake.deliver('connect_error', new Error('websocket error'));
    expect(store.saved).toBeNull();
    expect(store.board).toBeNull();
  });

  it('the band says NOT LIVE, the site time it shows, how old it is and that nobody is signed in live', () => {
    const liveAt = Date.UTC(2026, 11, 4, 13, 2, 0);
    vi.spyOn(Date, 'now').mockReturnValue(liveAt + 12 * 60_000 + 5_000);
    const entry = { jobId: JOB_ID, view: 'cab', seq: 12, liveAt, userId: OPERATOR.id, userName: OPERATOR.displayName };
    const banner = mount(SavedBoardBanner, { props: { entry, siteTimeZone: 'Europe/Warsaw', signedIn: false }, global: { stubs: { 'q-spinner': true } } });
    // 13:02 UTC is 14:02 in Warsaw in December: UTC+01:00 outside summer time (IANA time zone database, Europe/Warsaw).
    expect(banner.get('[data-testid="saved-board"]').text()).toBe('NOT LIVE — shows the board as of 14:02 (UTC+01:00), 13 min ago');
    expect(banner.get('[data-testid="saved-board-signed-out"]').text()).toBe(SAVED_BOARD_WORDS.notSignedIn('Ola Operator'));
    banner.unmount();
    const signedIn = mount(SavedBoardBanner, { props: { entry, siteTimeZone: 'Europe/Warsaw', signedIn: true }, global: { stubs: { 'q-spinner': true } } });
    expect(signedIn.find('[data-testid="saved-board-signed-out"]').exists()).toBe(false);
    signedIn.unmount();
  });

  it('sign-out forgets the saved boards', async () => {
    saveBoard({ jobId: JOB_ID, liveAt: Date.now(), userId: OPERATOR.id, userName: OPERATOR.displayName }, boardAt(12));
    vi.stubGlobal('fetch', vi.fn(() => Promise.resolve(new Response(null, { status: 204 }))));
    await useSessionStore().logout();
    expect(readSavedBoard(JOB_ID)).toBeNull();
  });
});
