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
      expect(asBefore).toEqual(job.board);
      expect(job.board).not.toHaveProperty('shift');
      expect(job.board).not.toHaveProperty('actingSupervisor');
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
});
