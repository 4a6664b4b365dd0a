import { createPinia, setActivePinia, type Pinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';
import { mount } from '@vue/test-utils';
import type { BoardSnapshot } from '../../../shared/board/types';
import { parseJobEvent } from '../../../shared/events/log';
import NotLiveCover from '../../../src/components/board/NotLiveCover.vue';
import { useBoardStore } from '../../../src/stores/board';
import { BLOCKED_WORDS, NOT_LIVE_WORDS } from '../../../src/words/board';
import { JOB_ID } from '../api-fakes';

/**
 * The one Socket.IO client, faked: a join answers the board's snapshot, a command answers what the
 * test says, and the test delivers what the server would send (ticks, `server:restarting`, a
 * dropped and restored connection).
 */
const fake = vi.hoisted(() => {
  type Handler = (payload?: unknown) => void;
  const handlers = new Map<string, Set<Handler>>();
  let snapshot: unknown = null;
  const commands: { commandId: string; type: string }[] = [];
  let answerCommand: (command: { commandId: string; type: string }) => unknown = () => ({ ok: false, error: { code: 'internal', message: 'unset' } });
  const socket = {
    connected: true,
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
    timeout() {
      return {
        emitWithAck: async (event: string, payload: { command?: { commandId: string; type: string } }) => {
          if (event === 'board:command') {
            commands.push(payload.command!);
            return answerCommand(payload.command!);
          }
          const { presence, ...board } = snapshot as { seq: number; presence: unknown[] };
          return { ok: true, mode: 'snapshot', board: JSON.stringify(board), presence, seq: board.seq };
        },
      };
    },
  };
  return {
    socket,
    commands,
    setSnapshot(next: unknown) {
      snapshot = next;
    },
    answerWith(fn: (command: { commandId: string; type: string }) => unknown) {
      answerCommand = fn;
    },
    deliver(event: string, payload?: unknown) {
      for (const handler of [...(handlers.get(event) ?? [])]) handler(payload);
    },
    reset() {
      handlers.clear();
      commands.length = 0;
    },
  };
});

vi.mock('../../../src/services/socket', async (importOriginal) => ({ ...(await importOriginal<object>()), connectSocket: () => fake.socket }));

function liveBoard(seq: number): BoardSnapshot {
  return {
    seq,
    job: { id: JOB_ID, name: 'Boom erection for the pump house', site: 'Riverside works', kind: 'erection', state: 'live', craneFleetNumber: 'CC-11', stop: null, lastResume: null, cancelReason: null },
    planVersion: 1,
    stages: [],
    crew: [],
    briefed: [],
    weather: null,
    windLimits: null,
    defects: [],
    presence: [],
  } as BoardSnapshot;
}

/** The server's answer to a recorded stop: the event, as the server sends it. */
function stopRecorded() {
  const at = new Date().toISOString();
  const event = parseJobEvent({ jobId: JOB_ID, seq: 6, type: 'job.stopped', at, by: { userId: 'u-rig', name: 'Rhea Vance', role: 'rigger' }, data: { reason: null, pressedAt: at, alreadyStopped: false } });
  return { ok: true, seq: 6, event };
}

const restartingRefusal = { ok: false, error: { code: 'server_restarting', message: 'The server is restarting: this was not recorded.' } };
const flush = () => new Promise((resolve) => setTimeout(resolve, 0));

describe('the board when the server restarts', () => {
  let pinia: Pinia;
  beforeEach(() => {
    pinia = createPinia();
    setActivePinia(pinia);
    fake.reset();
    fake.setSnapshot(liveBoard(5));
    localStorage.clear();
  });
  afterEach(() => {
    useBoardStore().close();
    vi.restoreAllMocks();
  });

  it('goes not live at the notice, says "server restarting" rather than a connection problem, and comes back by itself', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    expect(board.live).toBe(true);
    expect(board.blockReason('weather.record')).toBe('');

    fake.deliver('server:restarting', { at: new Date().toISOString() });
    // At once, without waiting for the ticks to be missed: the server takes no command now.
    expect(board.live).toBe(false);
    expect(board.restartingSince).not.toBeNull();
    expect(board.blockReason('weather.record')).toBe(BLOCKED_WORDS.restarting);
    expect(BLOCKED_WORDS.restarting).not.toBe(BLOCKED_WORDS.notLive);

    // The cover over the board names the restart, and still says not to rely on the board.
    const cover = mount(NotLiveCover, { props: { lastSyncAt: Date.now(), fleetNumber: 'CC-11', jobName: 'Boom erection' }, global: { plugins: [pinia], stubs: { 'q-spinner': true } } });
    expect(cover.get('[data-testid="not-live-title"]').text()).toBe(NOT_LIVE_WORDS.restartingTitle);
    expect(cover.text()).toContain(NOT_LIVE_WORDS.stale);
    expect(cover.text()).toContain(NOT_LIVE_WORDS.restarting);

    // The connection drops and returns (the server is back): the store rejoins and is live again.
    fake.deliver('disconnect', 'transport close');
    expect(board.live).toBe(false);
    fake.setSnapshot(liveBoard(7));
    fake.deliver('connect');
    await flush();
    expect(board.live).toBe(true);
    expect(board.board?.seq).toBe(7);
    expect(board.restartingSince).toBeNull();
    expect(board.blockReason('weather.record')).toBe('');
    await cover.vm.$nextTick();
    expect(cover.get('[data-testid="not-live-title"]').text()).toBe(NOT_LIVE_WORDS.title);
    cover.unmount();
  });

  it('takes a server_restarting refusal for the notice, when the refusal comes first', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    fake.answerWith(() => restartingRefusal);
    const answer = await board.send({ type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 });
    expect(answer).toMatchObject({ ok: false, error: { code: 'server_restarting' } });
    expect(board.live).toBe(false);
    expect(board.blockReason('weather.record')).toBe(BLOCKED_WORDS.restarting);
  });

  it('keeps a stop the restarting server refused and sends it again, with the same id, once the board is live', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    fake.answerWith(() => restartingRefusal);
    // null: kept, as a stop pressed while offline is (the stop control shows it queued).
    expect(await board.stop()).toBeNull();
    expect(board.queuedStop).not.toBeNull();
    const firstId = fake.commands[0]!.commandId;
    expect(board.queuedStop?.commandId).toBe(firstId);
    expect(JSON.parse(localStorage.getItem('holdline.queuedStop')!)).toMatchObject({ commandId: firstId, jobId: JOB_ID });

    fake.deliver('disconnect', 'transport close');
    fake.answerWith(stopRecorded);
    fake.deliver('connect');
    await flush();
    await flush();
    expect(fake.commands.map((c) => [c.type, c.commandId])).toEqual([
      ['job.stop', firstId],
      ['job.stop', firstId],
    ]);
    expect(board.queuedStop).toBeNull();
    expect(localStorage.getItem('holdline.queuedStop')).toBeNull();
  });

  it('keeps a stop the server could not write and tries it again every few seconds while the board stays live', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    fake.answerWith(() => ({ ok: false, error: { code: 'storage_busy', message: 'The database is busy with another task: nothing was recorded.' } }));
    expect(await board.stop()).toBeNull();
    // Nothing moved on the board: it waits for the server's event, which did not come.
    expect(board.live).toBe(true);
    expect(board.board?.seq).toBe(5);
    expect(board.stopped).toBe(false);
    const firstId = fake.commands[0]!.commandId;

    // A tick within the retry gap sends nothing; one after it sends the same stop again.
    const start = Date.now();
    const clock = vi.spyOn(Date, 'now').mockReturnValue(start + 1000);
    fake.deliver('board:tick', { jobId: JOB_ID, seq: 5 });
    await flush();
    expect(fake.commands).toHaveLength(1);
    fake.answerWith(stopRecorded);
    clock.mockReturnValue(start + 6000);
    fake.deliver('board:tick', { jobId: JOB_ID, seq: 5 });
    await flush();
    expect(fake.commands.map((c) => c.commandId)).toEqual([firstId, firstId]);
    expect(board.queuedStop).toBeNull();
  });

  it('lets a stop refused for a rule of the board go, as before (it was answered, not lost)', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    fake.answerWith(() => ({ ok: false, error: { code: 'job_closed', message: 'The job is complete.' } }));
    expect(await board.stop()).toMatchObject({ ok: false, error: { code: 'job_closed' } });
    expect(board.queuedStop).toBeNull();
  });

  it('keeps a stop refused for this device’s stop rate (the server takes 3 stops at once, then one a second) and sends it again', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    fake.answerWith(() => ({ ok: false, error: { code: 'too_many_commands', message: 'Stop was sent more than 3 times within a few seconds from this device; the earlier presses are recorded. Wait a second and press stop again if the job is not shown as stopped; the refused presses were not recorded.' } }));
    expect(await board.stop()).toBeNull();
    const firstId = fake.commands[0]!.commandId;
    expect(board.queuedStop).toMatchObject({ commandId: firstId });
    // The next tick after the retry gap sends the same stop again; recorded, it is no longer kept.
    fake.answerWith(stopRecorded);
    const clock = vi.spyOn(Date, 'now').mockReturnValue(Date.now() + 6000);
    fake.deliver('board:tick', { jobId: JOB_ID, seq: 5 });
    await flush();
    clock.mockRestore();
    expect(fake.commands.map((c) => [c.type, c.commandId])).toEqual([
      ['job.stop', firstId],
      ['job.stop', firstId],
    ]);
    expect(board.queuedStop).toBeNull();
  });
});
