import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import type { DataSource } from 'typeorm';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { replay } from '../../../shared/board/apply.js';
import { openDatabase } from '../../../server/db/data-source.js';
import { Job } from '../../../server/entities/Job.js';
import { JobEvent } from '../../../server/entities/JobEvent.js';
import { verifyJobChain } from '../../../server/events/chain.js';
import { presentJobEvent } from '../../../server/presenters/job-event.js';

/**
 * A database written by the demo seed of the version before the event log was typed (commit
 * fc53c1c): the stored events must still read through the typed schema, give back the board
 * the old server stored (plus what later versions derive from the same events), and still verify.
 */
describe('events stored before the log was typed', () => {
  let dir: string;
  let dataSource: DataSource;
  beforeAll(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-oldlog-'));
    const file = path.join(dir, 'holdline.sqlite');
    writeFileSync(file, gunzipSync(readFileSync(path.resolve(import.meta.dirname, '../../fixtures/demo-db-before-typed-events.sqlite.gz'))));
    dataSource = await openDatabase(file);
  });
  afterAll(async () => {
    if (dataSource?.isInitialized) await dataSource.destroy();
    rmSync(dir, { recursive: true, force: true });
  });

  it('every stored event parses, replays to the stored board and still verifies', async () => {
    const jobs = await dataSource.manager.find(Job);
    expect(jobs.length).toBeGreaterThanOrEqual(3);
    let count = 0;
    for (const job of jobs) {
      const rows = await dataSource.manager.find(JobEvent, { where: { jobId: job.id }, order: { seq: 'ASC' } });
      const events = rows.map((row) => presentJobEvent(row));
      count += events.length;
      expect(events.map((e) => e.seq)).toEqual(rows.map((_, i) => i + 1));
      // The old server stored no shifts and no acting supervisor (issue 17): the replay adds them
      // (a started job is in its first shift, run by whoever started it); the rest is as stored.
      const { shift, actingSupervisor, ...asBefore } = replay(events)!;
      // The board the old server kept on the job row, moved as it was into job_board by the migration BoardSnapshots.
      const [snapshot] = (await dataSource.query('SELECT seq, board FROM job_board WHERE job_id = ?', [job.id])) as { seq: number; board: string }[];
      const stored: unknown = JSON.parse(snapshot.board);
      expect(snapshot.seq).toBe(job.lastSeq);
      expect(asBefore).toEqual(stored);
      expect(stored).not.toHaveProperty('shift');
      expect(stored).not.toHaveProperty('actingSupervisor');
      const started = events.find((e) => e.type === 'job.started');
      if (started) {
        expect(shift).toMatchObject({ number: 1, startedAt: started.at });
        expect(actingSupervisor).toEqual(started.by.role === 'supervisor' ? { userId: started.by.userId, name: started.by.name, since: started.at } : null);
      } else {
        expect(shift).toBeUndefined();
        expect(actingSupervisor).toBeUndefined();
      }
      expect(await verifyJobChain(dataSource.manager, job.id)).toMatchObject({ valid: true, checked: rows.length, firstBadSeq: null });
    }
    expect(count).toBe(287);
  });

  it('undoing the migration BoardSnapshots puts each board back on its job row, brought up to the last event', async () => {
    const jobs = await dataSource.manager.find(Job);
    const expected = new Map<string, unknown>();
    for (const job of jobs) {
      const [snapshot] = (await dataSource.query('SELECT board FROM job_board WHERE job_id = ?', [job.id])) as { board: string }[];
      expected.set(job.id, JSON.parse(snapshot.board));
    }
    // One job's snapshot ten events behind its log, as a running server leaves it: undoing must apply those ten.
    const behind = jobs.find((j) => j.lastSeq > 20)!;
    const events = (await dataSource.manager.find(JobEvent, { where: { jobId: behind.id }, order: { seq: 'ASC' } })).map((r) => presentJobEvent(r));
    await dataSource.query('UPDATE job_board SET seq = ?, board = ? WHERE job_id = ?', [behind.lastSeq - 10, JSON.stringify(replay(events.slice(0, -10))), behind.id]);
    expected.set(behind.id, replay(events));
    // As runMigrations does (TypeORM's beforeMigration): rebuilding the job table to add a column must not check the rows that refer to it.
    await dataSource.query('PRAGMA foreign_keys = OFF');
    // Undone newest first, down to and including BoardSnapshots: later migrations sit on top of it.
    for (;;) {
      const [last] = (await dataSource.query('SELECT name FROM migrations ORDER BY timestamp DESC, id DESC LIMIT 1')) as { name: string }[];
      await dataSource.undoLastMigration({ transaction: 'each' });
      if (last.name.startsWith('BoardSnapshots')) break;
    }
    await dataSource.query('PRAGMA foreign_keys = ON');
    try {
      for (const job of jobs) {
        const [row] = (await dataSource.query('SELECT board FROM job WHERE id = ?', [job.id])) as { board: string }[];
        expect(JSON.parse(row.board)).toEqual(expected.get(job.id));
      }
    } finally {
      await dataSource.runMigrations({ transaction: 'each' });
    }
  });
});
