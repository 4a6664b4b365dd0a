import { createPinia, setActivePinia } from 'pinia';
import { afterEach, beforeEach, describe, expect, it, onTestFinished, vi } from 'vitest';
import { parseJobEvent, type JobEventDto } from '../../../shared/events/log';
import type { BoardSnapshot } from '../../../shared/board/types';
import type { JobSummary } from '../../../shared/schemas/jobs';
import { useBoardStore } from '../../../src/stores/board';
import { BURST_MS } from '../../../src/stores/bursts';
import { useJobsStore } from '../../../src/stores/jobs';
import { usePlanStore } from '../../../src/stores/plan';
import { buildJob, JOB_ID, json, UNIT_ID } from '../api-fakes';
import { plan } from '../../shared/plan/small-plan';

/**
 * A stand-in for the one Socket.IO client: it answers a join with a snapshot and lets the test
 * deliver `board:event`s as the server would. The stores under test see only the board store.
 */
const fake = vi.hoisted(() => {
  type Handler = (payload: unknown) => void;
  const handlers = new Map<string, Set<Handler>>();
  let snapshot: unknown = null;
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
      const { presence, ...board } = snapshot as { seq: number; presence: unknown[] };
      return { emitWithAck: async () => ({ ok: true, mode: 'snapshot', board: JSON.stringify(board), presence, seq: board.seq }) };
    },
  };
  return {
    socket,
    setSnapshot(next: unknown) {
      snapshot = next;
    },
    deliver(event: string, payload: unknown) {
      for (const handler of handlers.get(event) ?? []) handler(payload);
    },
    reset() {
      handlers.clear();
    },
  };
});

vi.mock('../../../src/services/socket', async (importOriginal) => ({ ...(await importOriginal<object>()), connectSocket: () => fake.socket }));

const by: JobEventDto['by'] = { userId: 'u-sup', name: 'Maren Holt', role: 'supervisor' };

/** The board of a ready job with plan version 1, as the server's snapshot gives it. */
function readyBoard(seq: number): BoardSnapshot {
  return {
    seq,
    job: { id: JOB_ID, name: 'Boom erection for the pump house', site: 'Riverside works', kind: 'erection', state: 'ready', craneFleetNumber: 'CC-11', stop: null, lastResume: null, cancelReason: null },
    planVersion: 1,
    stages: [],
    crew: [{ userId: by.userId, name: by.name, role: 'supervisor' }],
    briefed: [],
    weather: null,
    windLimits: null,
    defects: [],
    presence: [],
  };
}

function summary(overrides: Partial<JobSummary> = {}): JobSummary {
  return {
    id: JOB_ID,
    name: 'Boom erection for the pump house',
    site: 'Riverside works',
    craneUnitId: UNIT_ID,
    craneFleetNumber: 'CC-11',
    kind: 'erection',
    state: 'ready',
    timeZone: 'Europe/Warsaw',
    planVersion: 1,
    updatedAt: '2026-10-01T07:00:00.000Z',
    myRoles: ['supervisor'],
    ...overrides,
  };
}

const at = (seq: number) => new Date(Date.parse('2026-10-02T07:00:00.000Z') + seq * 60_000).toISOString();
const started = (seq: number): JobEventDto => parseJobEvent({ jobId: JOB_ID, seq, type: 'job.started', at: at(seq), by, data: {} });
const stopped = (seq: number): JobEventDto => parseJobEvent({ jobId: JOB_ID, seq, type: 'job.stopped', at: at(seq), by, data: { reason: null, pressedAt: at(seq), alreadyStopped: false } });
const renamed = (seq: number, name: string): JobEventDto => parseJobEvent({ jobId: JOB_ID, seq, type: 'job.updated', at: at(seq), by, data: { changes: { name }, planRegenerated: false } });

type FetchArgs = [input: string, init?: RequestInit];
const wait = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

describe('stores that follow the open board', () => {
  let fetchMock: ReturnType<typeof vi.fn<(...args: FetchArgs) => Promise<Response>>>;

  beforeEach(() => {
    setActivePinia(createPinia());
    fake.reset();
    fake.setSnapshot(readyBoard(5));
    fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => {
    useBoardStore().close();
    vi.unstubAllGlobals();
  });

  it('moves the job list and the open job to live and then stopped on the board’s events, with no request of their own', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(200, { items: [summary(), summary({ id: 'other-job', name: 'Another job' })] }));
    await jobs.loadList();
    fetchMock.mockResolvedValueOnce(json(200, { job: buildJob({ state: 'ready', planVersion: 1, lastSeq: 5 }) }));
    await jobs.loadJob(JOB_ID);
    const board = useBoardStore();
    await board.open(JOB_ID);
    const requestsBefore = fetchMock.mock.calls.length;

    fake.deliver('board:event', started(6));
    expect(jobs.items.find((j) => j.id === JOB_ID)?.state).toBe('live');
    expect(jobs.details[JOB_ID].state).toBe('live');
    expect(jobs.details[JOB_ID].lastSeq).toBe(6);

    fake.deliver('board:event', stopped(7));
    expect(jobs.items.find((j) => j.id === JOB_ID)).toMatchObject({ state: 'stopped', updatedAt: at(7) });
    expect(jobs.details[JOB_ID].state).toBe('stopped');
    // The other job's line is left as it was.
    expect(jobs.items.find((j) => j.id === 'other-job')?.state).toBe('ready');

    await wait(BURST_MS + 100);
    expect(fetchMock.mock.calls.length).toBe(requestsBefore);
  });

  it('closes the board with the server’s words when the person is taken off the crew, and ignores another job’s notice', async () => {
    const board = useBoardStore();
    await board.open(JOB_ID);
    expect(board.board?.job.id).toBe(JOB_ID);
    fake.deliver('board:removed', { jobId: 'another-job', reason: 'Not this board.' });
    expect(board.board?.job.id).toBe(JOB_ID);
    const reason = 'Maren Holt changed the crew of “Boom erection for the pump house”: you are no longer on its crew, so its live board is closed for you.';
    fake.deliver('board:removed', { jobId: JOB_ID, reason });
    expect(board.board).toBeNull();
    expect(board.live).toBe(false);
    expect(board.error).toBe(reason);
    // Nothing more reaches the closed board.
    fake.deliver('board:event', started(6));
    expect(board.board).toBeNull();
  });

  it('ignores an event the board already has, and reads the open job back once for a burst of changes the board does not carry', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(200, { items: [summary()] }));
    await jobs.loadList();
    fetchMock.mockResolvedValueOnce(json(200, { job: buildJob({ state: 'ready', planVersion: 1, lastSeq: 5 }) }));
    await jobs.loadJob(JOB_ID);
    await useBoardStore().open(JOB_ID);
    const requestsBefore = fetchMock.mock.calls.length;

    fake.deliver('board:event', renamed(5, 'An event the board already applied'));
    expect(jobs.items[0].name).toBe('Boom erection for the pump house');

    fetchMock.mockResolvedValue(json(200, { job: buildJob({ name: 'Pump house, second lift', distribution: ['office@hire.test'], state: 'ready', planVersion: 1, lastSeq: 7 }) }));
    fake.deliver('board:event', renamed(6, 'Pump house, first lift'));
    fake.deliver('board:event', renamed(7, 'Pump house, second lift'));
    // The name comes from the board at once; the distribution list only the server knows.
    expect(jobs.items[0].name).toBe('Pump house, second lift');
    await wait(BURST_MS + 100);
    const readBack = fetchMock.mock.calls.slice(requestsBefore).map(([url]) => url);
    expect(readBack).toEqual([`/api/jobs/${JOB_ID}`]);
    expect(jobs.details[JOB_ID].distribution).toEqual(['office@hire.test']);
  });

  it('adds a live event to the shown event log, and keeps it when a page that was already on its way arrives', async () => {
    const jobs = useJobsStore();
    const briefed = parseJobEvent({ jobId: JOB_ID, seq: 5, type: 'briefing.acknowledged', at: at(5), by, data: { planVersion: 1 } });
    fetchMock.mockResolvedValueOnce(json(200, { items: [briefed], lastSeq: 5 }));
    await jobs.loadEvents(JOB_ID);
    await useBoardStore().open(JOB_ID);

    let answer: (response: Response) => void = () => undefined;
    fetchMock.mockReturnValueOnce(new Promise<Response>((resolve) => (answer = resolve)));
    const loading = jobs.loadEvents(JOB_ID);
    fake.deliver('board:event', started(6));
    expect(jobs.events[JOB_ID].map((e) => e.seq)).toEqual([5, 6]);
    // The page was asked for before event 6 was committed.
    answer(json(200, { items: [], lastSeq: 5 }));
    await loading;
    expect(jobs.events[JOB_ID].map((e) => e.seq)).toEqual([5, 6]);
  });

  it('reads the shown plan back once after a revision on the board', async () => {
    const planStore = usePlanStore();
    const envelope = (version: number) => ({ version, locked: true, stale: false, plan: plan(), problems: [] });
    fetchMock.mockResolvedValueOnce(json(200, envelope(1)));
    await planStore.loadPlan(JOB_ID);
    await useBoardStore().open(JOB_ID);
    fake.deliver('board:event', started(6));
    const requestsBefore = fetchMock.mock.calls.length;

    fetchMock.mockResolvedValue(json(200, envelope(2)));
    const revised = parseJobEvent({ jobId: JOB_ID, seq: 7, type: 'plan.revised', at: at(7), by, data: { planVersion: 2, plan: plan(), reason: 'Defect: bent lacing' } });
    fake.deliver('board:event', revised);
    await wait(BURST_MS + 100);
    expect(fetchMock.mock.calls.slice(requestsBefore).map(([url]) => url)).toEqual([`/api/jobs/${JOB_ID}/plan`]);
    expect(planStore.envelopes[JOB_ID].version).toBe(2);
  });

  it('leaves a draft with unsaved edits alone when another device edits the plan, and reads a clean one back', async () => {
    const planStore = usePlanStore();
    const envelope = { version: 0, locked: false, stale: false, plan: plan(), problems: [] };
    fetchMock.mockResolvedValueOnce(json(200, envelope));
    await planStore.loadPlan(JOB_ID);
    await useBoardStore().open(JOB_ID);
    const requestsBefore = fetchMock.mock.calls.length;
    const edited = (seq: number): JobEventDto => parseJobEvent({ jobId: JOB_ID, seq, type: 'plan.edited', at: at(seq), by, data: { plan: plan(), problems: [] } });

    planStore.drafts[JOB_ID].stages[0].title = 'Ground and exclusion zone, checked twice';
    fake.deliver('board:event', edited(6));
    await wait(BURST_MS + 100);
    expect(fetchMock.mock.calls.length).toBe(requestsBefore);
    expect(planStore.drafts[JOB_ID].stages[0].title).toBe('Ground and exclusion zone, checked twice');

    planStore.discardDraft(JOB_ID);
    fetchMock.mockResolvedValue(json(200, envelope));
    fake.deliver('board:event', edited(7));
    await wait(BURST_MS + 100);
    expect(fetchMock.mock.calls.slice(requestsBefore).map(([url]) => url)).toEqual([`/api/jobs/${JOB_ID}/plan`]);
  });
});

describe('job lines followed without their board', () => {
  let fetchMock: ReturnType<typeof vi.fn<(...args: FetchArgs) => Promise<Response>>>;

  beforeEach(() => {
    setActivePinia(createPinia());
    fake.reset();
    fetchMock = vi.fn<(...args: FetchArgs) => Promise<Response>>();
    vi.stubGlobal('fetch', fetchMock);
  });
  afterEach(() => vi.unstubAllGlobals());

  it('the list line takes a job stopped by someone else, and the open job is read back once', async () => {
    const jobs = useJobsStore();
    fetchMock.mockResolvedValueOnce(json(200, { items: [summary({ state: 'live' })] }));
    await jobs.loadList();
    fetchMock.mockResolvedValueOnce(json(200, { job: buildJob({ state: 'live', lastSeq: 7 }) }));
    await jobs.loadJob(JOB_ID);
    const emitted: unknown[] = [];
    const plainEmit = fake.socket.emit;
    onTestFinished(() => {
      fake.socket.emit = plainEmit;
    });
    fake.socket.emit = ((event: string, payload: unknown) => {
      emitted.push([event, payload]);
      return fake.socket;
    }) as typeof fake.socket.emit;
    jobs.followLive();
    expect(emitted).toEqual([['jobs:follow', { jobIds: [JOB_ID] }]]);

    fetchMock.mockResolvedValueOnce(json(200, { job: buildJob({ state: 'stopped', lastSeq: 8 }) }));
    fake.deliver('jobs:summary', { jobId: JOB_ID, name: 'Boom erection for the pump house', site: 'Riverside works', state: 'stopped', timeZone: 'Europe/Warsaw', planVersion: 1, lastSeq: 8, updatedAt: at(8) });
    expect(jobs.items[0].state).toBe('stopped');
    expect(jobs.details[JOB_ID].state).toBe('stopped');
    await wait(BURST_MS + 50);
    expect(fetchMock).toHaveBeenCalledTimes(3);
    // An update the page already holds (an older seq) reads nothing back.
    fake.deliver('jobs:summary', { jobId: JOB_ID, name: 'x', site: 'y', state: 'stopped', timeZone: 'Europe/Warsaw', planVersion: 1, lastSeq: 8, updatedAt: at(8) });
    await wait(BURST_MS + 50);
    expect(fetchMock).toHaveBeenCalledTimes(3);
  });
});
