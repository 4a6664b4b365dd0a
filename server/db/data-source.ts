import 'reflect-metadata';
import { chmodSync, closeSync, existsSync, mkdirSync, openSync, statSync } from 'node:fs';
import path from 'node:path';
import { DataSource } from 'typeorm';
import type BetterSqlite3 from 'better-sqlite3';
import { entities } from '../entities/index.js';
import { migrations } from './migrations/index.js';

/** Opens the SQLite file with the pragmas Holdline relies on and runs pending migrations. */
export async function openDatabase(databasePath: string): Promise<DataSource> {
  if (databasePath !== ':memory:') keepPrivate(databasePath);
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
  if (databasePath !== ':memory:') keepPrivate(databasePath);
  await checkPragmas(dataSource);
  await dataSource.runMigrations({ transaction: 'each' });
  return dataSource;
}

/**
 * The database holds password and refresh-token hashes and every record: it is for the server's
 * user alone. A folder created here is 0700 (an existing one, such as /tmp, is left as it is); a
 * new file is created 0600 before SQLite opens it (SQLite gives its -wal and -shm files the
 * database file's mode), and after opening the three lose every group and other permission, which
 * also tightens a file an earlier version left readable to others. The owner's bits are kept, so
 * a file made read-only stays read-only.
 */
export function keepPrivate(databasePath: string): void {
  mkdirSync(path.dirname(databasePath), { recursive: true, mode: 0o700 });
  if (!existsSync(databasePath)) closeSync(openSync(databasePath, 'wx', 0o600));
  for (const file of [databasePath, `${databasePath}-wal`, `${databasePath}-shm`]) {
    if (!existsSync(file)) continue;
    const mode = statSync(file).mode & 0o777;
    if (mode & 0o077) chmodSync(file, mode & 0o700);
  }
}

/** Refuses to run on a connection whose durability settings did not take. */
export async function checkPragmas(dataSource: DataSource): Promise<void> {
  const [sync] = (await dataSource.query('PRAGMA synchronous')) as { synchronous: number }[];
  const [fk] = (await dataSource.query('PRAGMA foreign_keys')) as { foreign_keys: number }[];
  if (sync?.synchronous !== 2) throw new Error(`PRAGMA synchronous is ${sync?.synchronous}, expected 2 (FULL)`);
  if (fk?.foreign_keys !== 1) throw new Error('PRAGMA foreign_keys is off');
}
