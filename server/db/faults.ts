import type BetterSqlite3 from 'better-sqlite3';
import type { DataSource } from 'typeorm';

/**
 * What SQLite told us when it could not write: the disk is full, another writer holds the lock,
 * the database cannot be written at all, or the disk itself failed. Each is answered 503 with a
 * code of its own (server/errors.ts) and reported by GET /api/health until a write succeeds again.
 */
export type StorageFaultKind = 'full' | 'busy' | 'readonly' | 'failed';

export interface StorageFault {
  kind: StorageFaultKind;
  /** The refusal code the crew's screen and the health route show. */
  code: 'storage_full' | 'storage_busy' | 'storage_readonly' | 'storage_failed';
  /** Words for a crew member. */
  message: string;
  /** SQLite's own (extended) result code, or the file system's error code (ENOSPC...), for the log and the administrator. */
  systemCode: string;
}

/**
 * The words for each kind. "Nothing was recorded" is said only where SQLite refused before the
 * transaction could commit (a full disk, a lock, a read-only file): the transaction is rolled back
 * and a test proves no event and no job change remain. A failing disk (SQLITE_IOERR) can fail the
 * commit itself, when it is not certain what reached the disk: that answer says so, on the safe side.
 */
export const storageFaultWords: Record<StorageFaultKind, Omit<StorageFault, 'systemCode' | 'kind'>> = {
  full: { code: 'storage_full', message: "The server's disk is full: nothing was recorded. Tell the site administrator." },
  busy: { code: 'storage_busy', message: 'The database is busy with another task: nothing was recorded. Send it again in a moment.' },
  readonly: { code: 'storage_readonly', message: 'The server cannot write to its database (it is read-only): nothing was recorded. Tell the site administrator.' },
  failed: {
    code: 'storage_failed',
    message: 'The server could not write to its disk, so this was not confirmed. Check the board before you do it again, and tell the site administrator.',
  },
};

/** The kind of a SQLite result code (the extended code, e.g. SQLITE_IOERR_WRITE), or null when it is not a storage fault. */
export function faultKindOfCode(code: string): StorageFaultKind | null {
  if (code === 'SQLITE_FULL' || code.startsWith('SQLITE_FULL_')) return 'full';
  if (/^SQLITE_(BUSY|LOCKED)(_|$)/.test(code)) return 'busy';
  if (/^SQLITE_READONLY(_|$)/.test(code)) return 'readonly';
  if (/^SQLITE_(IOERR|CANTOPEN|CORRUPT|NOTADB|PROTOCOL)(_|$)/.test(code)) return 'failed';
  return null;
}

/** The file system's errors that are the same faults (a photo written to a full or read-only disk). */
const fileSystemFaults = new Map<string, StorageFaultKind>([
  ['ENOSPC', 'full'],
  ['EDQUOT', 'full'],
  ['EROFS', 'readonly'],
  ['EIO', 'failed'],
]);

/**
 * The storage fault behind an error thrown by better-sqlite3 (a SqliteError), by TypeORM around it
 * (a QueryFailedError carrying the driver's error and its `code`) or by the file system (ENOSPC,
 * EROFS, EIO...), or null for anything else.
 */
export function storageFaultOf(err: unknown): StorageFault | null {
  for (const candidate of [err, (err as { driverError?: unknown } | null)?.driverError]) {
    const code = (candidate as { code?: unknown } | null | undefined)?.code;
    if (typeof code !== 'string') continue;
    const kind = code.startsWith('SQLITE_') ? faultKindOfCode(code) : (fileSystemFaults.get(code) ?? null);
    if (kind) return { kind, ...storageFaultWords[kind], systemCode: code };
  }
  return null;
}

/** What GET /api/health says about writing: fine, or the fault that stands and since when. */
export interface StorageStatus {
  ok: boolean;
  /** When the fault that stands began (the first failed write since the last good one); null when ok. */
  since: string | null;
  /** The latest fault, kept after it clears so an administrator can see what happened. */
  lastFault: { code: StorageFault['code']; message: string; systemCode: string; at: string } | null;
  /** When a write last succeeded after a fault; null if none has cleared one yet. */
  clearedAt: string | null;
}

/** Remembers storage faults for the health route: set by a failed write, cleared by the next write that commits. */
export class StorageHealth {
  private current: StorageStatus = { ok: true, since: null, lastFault: null, clearedAt: null };

  constructor(private readonly now: () => Date = () => new Date()) {}

  fault(fault: StorageFault): void {
    const at = this.now().toISOString();
    this.current = {
      ok: false,
      since: this.current.ok ? at : this.current.since,
      lastFault: { code: fault.code, message: fault.message, systemCode: fault.systemCode, at },
      clearedAt: this.current.clearedAt,
    };
  }

  /** A write committed: whatever stood is over. */
  wrote(): void {
    if (this.current.ok) return;
    this.current = { ...this.current, ok: true, since: null, clearedAt: this.now().toISOString() };
  }

  get status(): StorageStatus {
    return { ...this.current, lastFault: this.current.lastFault ? { ...this.current.lastFault } : null };
  }
}

/** The better-sqlite3 connection under a TypeORM data source (one connection, shared). */
export function rawConnection(dataSource: DataSource): BetterSqlite3.Database | null {
  const driver = dataSource.driver as unknown as { databaseConnection?: BetterSqlite3.Database };
  return driver.databaseConnection ?? null;
}

/** Rows changed on the connection since it opened: a transaction that changed nothing is not proof that writing works. */
export function totalChanges(db: BetterSqlite3.Database | null): number | null {
  if (!db?.open) return null;
  // Asked twice per transaction: prepared once per connection.
  let count = changeCounters.get(db);
  if (!count) changeCounters.set(db, (count = db.prepare('SELECT total_changes() AS n')));
  return (count.get() as { n: number }).n;
}
const changeCounters = new WeakMap<BetterSqlite3.Database, BetterSqlite3.Statement>();

/**
 * After a transaction failed, leaves the one shared connection as a new transaction expects it.
 * SQLite may roll a whole transaction back by itself on SQLITE_FULL, SQLITE_IOERR or SQLITE_BUSY;
 * TypeORM's own ROLLBACK then fails ("no transaction is active") before it resets its counters,
 * and its next transaction would start as a SAVEPOINT nested in nothing, whose failure would leave
 * the connection inside a transaction that never commits. Called only from the write queue, when
 * nothing else is in a transaction.
 */
export function settleAfterFailure(dataSource: DataSource): void {
  const db = rawConnection(dataSource);
  if (db?.open && db.inTransaction) {
    try {
      db.exec('ROLLBACK');
    } catch {
      // Already rolled back by SQLite in the meantime: nothing to undo.
    }
  }
  const runner = (dataSource.driver as unknown as { queryRunner?: { isTransactionActive: boolean; transactionDepth: number } }).queryRunner;
  if (runner) {
    runner.isTransactionActive = false;
    runner.transactionDepth = 0;
  }
}
