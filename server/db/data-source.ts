import 'reflect-metadata';
import { mkdirSync } from 'node:fs';
import path from 'node:path';
import { DataSource } from 'typeorm';
import type BetterSqlite3 from 'better-sqlite3';
import { entities } from '../entities/index.js';
import { migrations } from './migrations/index.js';

/** Opens the SQLite file with the pragmas Holdline relies on and runs pending migrations. */
export async function openDatabase(databasePath: string): Promise<DataSource> {
  if (databasePath !== ':memory:') mkdirSync(path.dirname(databasePath), { recursive: true });
  const dataSource = new DataSource({
    type: 'better-sqlite3',
    database: databasePath,
    entities,
    migrations,
    migrationsRun: false,
    synchronize: false,
    logging: false,
    prepareDatabase: (db: BetterSqlite3.Database) => {
      db.pragma('journal_mode = WAL');
      // A reopened WAL database defaults to NORMAL; a crew's acknowledgments must survive power loss.
      db.pragma('synchronous = FULL');
      db.pragma('foreign_keys = ON');
      db.pragma('busy_timeout = 5000');
    },
  });
  await dataSource.initialize();
  await checkPragmas(dataSource);
  await dataSource.runMigrations({ transaction: 'each' });
  return dataSource;
}

/** Refuses to run on a connection whose durability settings did not take. */
export async function checkPragmas(dataSource: DataSource): Promise<void> {
  const [sync] = (await dataSource.query('PRAGMA synchronous')) as { synchronous: number }[];
  const [fk] = (await dataSource.query('PRAGMA foreign_keys')) as { foreign_keys: number }[];
  if (sync?.synchronous !== 2) throw new Error(`PRAGMA synchronous is ${sync?.synchronous}, expected 2 (FULL)`);
  if (fk?.foreign_keys !== 1) throw new Error('PRAGMA foreign_keys is off');
}
