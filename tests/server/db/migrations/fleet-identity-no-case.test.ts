import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gunzipSync } from 'node:zlib';
import Database from 'better-sqlite3';
import type { DataSource } from 'typeorm';
import { afterEach, describe, expect, it } from 'vitest';
import { openDatabase } from '../../../../server/db/data-source.js';

/**
 * Migration FleetIdentityNoCase on a database seeded by an earlier version (the demo fleet: FL-07,
 * FL-12, AC-03 and their parts): it adds unique indexes that ignore letter case, and stops with
 * the clashing rows named when two already differ only by case, since which is the real crane is
 * for a person to decide.
 */
describe('migration FleetIdentityNoCase', () => {
  let dir: string;
  let dataSource: DataSource | undefined;
  afterEach(async () => {
    if (dataSource?.isInitialized) await dataSource.destroy();
    rmSync(dir, { recursive: true, force: true });
  });

  function oldDatabase(edit?: (db: Database.Database) => void): string {
    dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-nocase-'));
    const file = path.join(dir, 'holdline.sqlite');
    writeFileSync(file, gunzipSync(readFileSync(path.resolve(import.meta.dirname, '../../../fixtures/demo-db-before-typed-events.sqlite.gz'))));
    if (edit) {
      const db = new Database(file);
      edit(db);
      db.close();
    }
    return file;
  }

  it('adds case-blind unique indexes to an existing fleet, which then refuse a case variant', async () => {
    dataSource = await openDatabase(oldDatabase());
    const indexes = (await dataSource.query("SELECT name, sql FROM sqlite_master WHERE type = 'index' AND name LIKE '%nocase'")) as { name: string; sql: string }[];
    expect(indexes.map((i) => i.name).sort()).toEqual(['IDX_assist_crane_fleet_number_nocase', 'IDX_component_serial_nocase', 'IDX_crane_unit_fleet_number_nocase']);
    expect(indexes.every((i) => /UNIQUE INDEX .* COLLATE NOCASE\)$/.test(i.sql))).toBe(true);
    await expect(dataSource.query("UPDATE crane_unit SET fleet_number = 'fl-07' WHERE fleet_number = 'FL-12'")).rejects.toThrow(/UNIQUE constraint failed/);
  });

  it('stops, naming both rows, when two fleet numbers already differ only by case', async () => {
    const file = oldDatabase((db) => {
      db.prepare("INSERT INTO crane_unit (id, fleet_number, model_id, serial_number, location, notes, created_at, updated_at) SELECT '00000000-0000-4000-8000-0000000000aa', 'fl-07', model_id, serial_number, location, notes, created_at, updated_at FROM crane_unit WHERE fleet_number = 'FL-07'").run();
    });
    await expect(openDatabase(file)).rejects.toThrow(/crane units with fleet numbers "FL-07" and "fl-07"/);
  });
});
