import { describe, expect, it, vi } from 'vitest';
import { BoardFollower, STALE_AFTER_MS, type FollowerTransport } from '../../../shared/board/follower.js';
import { applyEvent } from '../../../shared/board/apply.js';
import type { BoardSnapshot } from '../../../shared/board/types.js';
import { parseJobEvent, type EventData, type JobEventDto, type JobEventType } from '../../../shared/events/log.js';

const jobId = '11111111-1111-4111-8111-111111111111';
const by = { userId: 'u1', name: 'Supervisor', role: 'supervisor' };

function event<T extends JobEventType>(seq: number, type: T, data: EventData<T>): JobEventDto {
  return parseJobEvent({ jobId, seq, type, at: new Date(1_700_000_000_000 + seq * 1000).toISOString(), by, data });
}

/** A log of n events: creation, then renames. */
function log(n: number): JobEventDto[] {
  return [
    event(1, 'job.created', { job: { name: 'Job', site: 'Site', kind: 'erection' }, craneFleetNumber: 'FL-1', crew: [] }),
    ...Array.from({ length: n - 1 }, (_, i) => event(i + 2, 'job.updated', { changes: { name: `Name ${i + 2}` }, planRegenerated: false })),
  ];
}

function snapshotAt(events: JobEventDto[], seq: number): BoardSnapshot {
  const state = events.slice(0, seq).reduce<ReturnType<typeof applyEvent> | null>((s, e) => applyEvent(s, e), null)!;
  return { ...state, presence: [] };
}

function fakeTransport(events: JobEventDto[], snapshotSeq: number): FollowerTransport & { fetches: number[]; joins: (number | undefined)[] } {
  const t = {
    fetches: [] as number[],
    joins: [] as (number | undefined)[],
    async join(_jobId: string, afterSeq?: number) {
      t.joins.push(afterSeq);
      if (afterSeq !== undefined) return { ok: true as const, mode: 'events' as const, events: events.filter((e) => e.seq > afterSeq), seq: events.length };
      const { presence, ...board } = snapshotAt(events, snapshotSeq);
      return { ok: true as const, mode: 'snapshot' as const, board: JSON.stringify(board), presence, seq: snapshotSeq };
    },
    async fetchEvents(_jobId: string, afterSeq: number) {
      t.fetches.push(afterSeq);
      return events.filter((e) => e.seq > afterSeq);
    },
  };
  return t;
}

describe('the board follower', () => {
  it('applies events strictly in seq order and ignores ones it already has', async () => {
    const events = log(5);
    const follower = new BoardFollower(jobId, fakeTransport(events, 3));
    await follower.join();
    follower.onEvent(events[2]);
    follower.onEvent(events[3]);
    follower.onEvent(events[3]);
    follower.onEvent(events[4]);
    expect(follower.seq).toBe(5);
    expect(follower.board?.job.name).toBe('Name 5');
  });

  it('a gap triggers a fetch of exactly what is missing, and the board catches up', async () => {
    const events = log(8);
    const transport = fakeTransport(events, 3);
    const follower = new BoardFollower(jobId, transport);
    await follower.join();
    follower.onEvent(events[6]); // seq 7 arrives while 4-6 are missing
    expect(follower.seq).toBe(3);
    expect(follower.live).toBe(false);
    await vi.waitFor(() => expect(follower.seq).toBe(8));
    expect(transport.fetches).toEqual([3]);
    expect(follower.board?.job.name).toBe('Name 8');
  });

  it('a tick ahead of the board triggers a fetch', async () => {
    const events = log(6);
    const transport = fakeTransport(events, 4);
    const follower = new BoardFollower(jobId, transport);
    await follower.join();
    follower.onTick({ jobId, seq: 6 });
    await vi.waitFor(() => expect(follower.seq).toBe(6));
    expect(transport.fetches).toEqual([4]);
  });

  it('is not live once ticks stop for three seconds, and live again with the next tick', async () => {
    let now = 1_000;
    const events = log(2);
    const follower = new BoardFollower(jobId, fakeTransport(events, 2), { now: () => now });
    await follower.join();
    follower.onTick({ jobId, seq: 2 });
    expect(follower.live).toBe(true);
    now += STALE_AFTER_MS - 1;
    expect(follower.live).toBe(true);
    now += 2;
    expect(follower.live).toBe(false);
    follower.onTick({ jobId, seq: 2 });
    expect(follower.live).toBe(true);
  });

  it('is not live at once when the connection drops', async () => {
    const follower = new BoardFollower(jobId, fakeTransport(log(2), 2));
    await follower.join();
    follower.onTick({ jobId, seq: 2 });
    expect(follower.live).toBe(true);
    follower.onDisconnect();
    expect(follower.live).toBe(false);
  });

  it('after a reconnect it rejoins with the seq it holds and applies only what it missed', async () => {
    const events = log(7);
    const transport = fakeTransport(events, 4);
    const applied: number[] = [];
    const follower = new BoardFollower(jobId, transport, { onEvent: (e) => applied.push(e.seq) });
    await follower.join();
    await follower.join();
    expect(transport.joins).toEqual([undefined, 4]);
    expect(applied).toEqual([5, 6, 7]);
    expect(follower.seq).toBe(7);
  });

  it('keeps presence up to date from deltas', async () => {
    const follower = new BoardFollower(jobId, fakeTransport(log(1), 1));
    await follower.join();
    follower.onPresence({ jobId, joined: [{ userId: 'a', name: 'A', roles: ['rigger'] }, { userId: 'b', name: 'B', roles: ['operator'] }], left: [] });
    follower.onPresence({ jobId, joined: [], left: ['a'] });
    expect(follower.board?.presence.map((p) => p.userId)).toEqual(['b']);
  });
});
