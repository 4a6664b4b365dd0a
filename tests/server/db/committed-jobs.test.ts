import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { replay } from '../../../shared/board/apply.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import { BOARD_SNAPSHOT_EVERY, CommittedJobs, committedJobs } from '../../../server/db/committed-jobs.js';
import { httpCommand, startedJob } from '../../helpers/board.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';
import request from 'supertest';

/**
 * The job rows kept as committed (server/db/committed-jobs.ts): the board is stored as a snapshot
 * every BOARD_SNAPSHOT_EVERY events, a cold read rebuilds it from the snapshot and the events
 * after it, and nothing a transaction did before it failed is ever kept.
 */
describe('committed job rows', () => {
  let server: TestServer;
  let jobId: string;
  let crew: Awaited<ReturnType<typeof startedJob>>['crew'];
  beforeAll(async () => {
    server = await startTestServer({ env: { HOLDLINE_COMMAND_RATE: '1000' } });
    ({ jobId, crew } = await startedJob(server));
  });
  afterAll(() => server.stop());

  const logOf = async () => jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set('Authorization', `Bearer ${crew.supervisor.token}`)).body).items;
  const snapshotRow = async () => ((await server.context.dataSource.query('SELECT seq FROM job_board WHERE job_id = ?', [jobId])) as { seq: number }[])[0];

  it('stores the board every so many events; a cold read (snapshot + events after it) is the replay of the whole log', async () => {
    const first = (await snapshotRow()).seq;
    for (let i = 0; i < BOARD_SNAPSHOT_EVERY + 5; i++) {
      const { status } = await httpCommand(server, crew.signaller, jobId, { type: 'weather.record', meanMs: 3 + (i % 4), gustMs: 6 + (i % 4), heightM: 10 });
      expect(status).toBe(200);
    }
    const log = await logOf();
    const stored = (await snapshotRow()).seq;
    expect(stored).toBeGreaterThan(first);
    expect(log.length - stored).toBeLessThan(BOARD_SNAPSHOT_EVERY);
    expect(stored).toBeLessThan(log.length);
    const cold = await server.context.queue.run(async () => new CommittedJobs(server.context.dataSource).read(jobId)!);
    expect(cold.lastSeq).toBe(log.length);
    expect(cold.board).toEqual(replay(log));
    const kept = await server.context.queue.run(async () => committedJobs(server.context.dataSource).read(jobId)!);
    expect(kept.board).toEqual(cold.board);
  });

  it('keeps nothing of a transaction that failed after writing the row and a snapshot', async () => {
    const jobs = committedJobs(server.context.dataSource);
    const before = await server.context.queue.run(async () => jobs.read(jobId)!);
    await expect(
      server.context.queue.transaction(async () => {
        const job = jobs.read(jobId)!;
        job.name = 'Renamed in a transaction that fails';
        job.lastSeq += BOARD_SNAPSHOT_EVERY;
        jobs.write(job);
        throw new Error('fails after writing');
      }),
    ).rejects.toThrow('fails after writing');
    const after = await server.context.queue.run(async () => jobs.read(jobId)!);
    expect(after.name).toBe(before.name);
    expect(after.lastSeq).toBe(before.lastSeq);
    const [row] = (await server.context.dataSource.query('SELECT name, last_seq FROM job WHERE id = ?', [jobId])) as { name: string; last_seq: number }[];
    expect(row).toEqual({ name: before.name, last_seq: before.lastSeq });
  });

  it('reads the row again when another writer moved its head', async () => {
    const jobs = committedJobs(server.context.dataSource);
    const before = await server.context.queue.run(async () => jobs.read(jobId)!);
    await server.context.dataSource.query('UPDATE job SET name = ?, head_hash = ? WHERE id = ?', ['Changed elsewhere', 'f'.repeat(64), jobId]);
    const after = await server.context.queue.run(async () => jobs.read(jobId)!);
    expect(after.name).toBe('Changed elsewhere');
    await server.context.dataSource.query('UPDATE job SET name = ?, head_hash = ? WHERE id = ?', [before.name, before.headHash, jobId]);
  });

  it('gives each reader its own copy: changing it changes nothing kept', async () => {
    const jobs = committedJobs(server.context.dataSource);
    const copy = await server.context.queue.run(async () => jobs.read(jobId)!);
    const name = copy.name;
    copy.name = 'Changed on a copy';
    expect((await server.context.queue.run(async () => jobs.read(jobId)!)).name).toBe(name);
  });

  it('keeps the latest events for rejoining screens: the same as the log, none after a cold read until remembered', async () => {
    for (let i = 0; i < 3; i++) expect((await httpCommand(server, crew.signaller, jobId, { type: 'weather.record', meanMs: 2, gustMs: 4, heightM: 10 })).status).toBe(200);
    const log = await logOf();
    const jobs = committedJobs(server.context.dataSource);
    const kept = await server.context.queue.run(async () => (jobs.read(jobId), jobs.recentAfter(jobId, log.length - 3)));
    expect(kept).toEqual(log.slice(-3));
    const cold = new CommittedJobs(server.context.dataSource);
    expect(await server.context.queue.run(async () => (cold.read(jobId), cold.recentAfter(jobId, log.length - 3)))).toBeNull();
    cold.remember(jobId, log.slice(-5));
    expect(cold.recentAfter(jobId, log.length - 3)).toEqual(log.slice(-3));
    expect(cold.recentAfter(jobId, log.length - 6)).toBeNull();
  });
});
