import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import type { DataSource } from 'typeorm';
import { afterEach, describe, expect, it } from 'vitest';
import { openDatabase } from '../../../../server/db/data-source.js';
import { Job } from '../../../../server/entities/Job.js';

/**
 * Jobs stored before a job had a site time zone take the server's zone when the migration runs
 * (HOLDLINE_TIME_ZONE when set, else the process's): the zone their times were read in until then.
 */
describe('migration JobTimeZone', () => {
  let dir: string;
  let dataSource: DataSource | undefined;
  const before = process.env.HOLDLINE_TIME_ZONE;
  afterEach(async () => {
    if (dataSource?.isInitialized) await dataSource.destroy();
    rmSync(dir, { recursive: true, force: true });
    if (before === undefined) delete process.env.HOLDLINE_TIME_ZONE;
    else process.env.HOLDLINE_TIME_ZONE = before;
  });

  async function openOldDatabase(): Promise<DataSource> {
    dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-tz-'));
    const file = path.join(dir, 'holdline.sqlite');
    // A database seeded by an earlier version, with jobs and no time_zone column.
    writeFileSync(file, gunzipSync(readFileSync(path.resolve(import.meta.dirname, '../../../fixtures/demo-db-before-typed-events.sqlite.gz'))));
    return openDatabase(file);
  }

  it('gives every existing job the zone HOLDLINE_TIME_ZONE names', async () => {
    process.env.HOLDLINE_TIME_ZONE = 'America/Chicago';
    dataSource = await openOldDatabase();
    const jobs = await dataSource.manager.find(Job);
    expect(jobs.length).toBeGreaterThanOrEqual(3);
    expect(new Set(jobs.map((j) => j.timeZone))).toEqual(new Set(['America/Chicago']));
  });

  it('without the setting, the zone the process runs in', async () => {
    delete process.env.HOLDLINE_TIME_ZONE;
    dataSource = await openOldDatabase();
    const jobs = await dataSource.manager.find(Job);
    expect(new Set(jobs.map((j) => j.timeZone))).toEqual(new Set([Intl.DateTimeFormat().resolvedOptions().timeZone]));
  });
});
