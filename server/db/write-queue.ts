import type { DataSource, EntityManager } from 'typeorm';
import { HttpError } from '../errors.js';
import { rawConnection, settleAfterFailure, StorageHealth, storageFaultOf, totalChanges } from './faults.js';

/** The answer to a write asked for after shutdown began (SIGTERM): nothing was recorded, send it again after the restart. */
export const serverRestarting = () =>
  new HttpError(503, 'server_restarting', 'The server is restarting: this was not recorded. The board reconnects by itself; send it again once the board is live.');

/**
 * One FIFO queue for every transaction and every read that must not see half-done work.
 * better-sqlite3 shares one connection: two TypeORM transactions started together collide
 * ("cannot start a transaction within a transaction") and a read during an open transaction
 * sees its uncommitted rows, so all of them take turns here.
 *
 * It is also where storage faults are seen: a transaction SQLite refuses (disk full, locked by
 * another writer, read-only, I/O error) is rolled back, the connection is left clean for the next
 * one (`settleAfterFailure`) and the fault is kept in `storage` for GET /api/health until a
 * transaction that changes rows commits again.
 */
export class WriteQueue {
  private tail: Promise<unknown> = Promise.resolve();
  private waiting = 0;
  private accepting = true;
  readonly storage: StorageHealth;

  constructor(
    private readonly dataSource: DataSource,
    now: () => Date = () => new Date(),
  ) {
    this.storage = new StorageHealth(now);
  }

  /** Runs `work` after everything queued before it has settled. */
  run<T>(work: () => Promise<T>): Promise<T> {
    this.waiting += 1;
    const result = this.tail.then(work);
    this.tail = result.then(
      () => { this.waiting -= 1; },
      () => { this.waiting -= 1; },
    );
    return result;
  }

  /**
   * Runs `work` inside one transaction, in turn; refused once shutdown has begun. `committed`
   * runs after the commit and before anything queued later, so what it tells others (a kept
   * row, a broadcast) is in commit order; it must not throw (the transaction is already committed).
   */
  transaction<T>(work: (manager: EntityManager) => Promise<T>, committed?: (result: T) => void): Promise<T> {
    if (!this.accepting) return Promise.reject(serverRestarting());
    return this.run(async () => {
      const db = rawConnection(this.dataSource);
      const before = totalChanges(db);
      let result: T;
      try {
        result = await this.dataSource.transaction(work);
      } catch (error) {
        settleAfterFailure(this.dataSource);
        const fault = storageFaultOf(error);
        if (fault) this.storage.fault(fault);
        throw error;
      }
      // Only a transaction that changed rows proves that writing works again.
      if (before !== null && (totalChanges(db) ?? before) > before) this.storage.wrote();
      committed?.(result);
      return result;
    });
  }

  /** True until `stopTaking()`: shutdown refuses new transactions and lets the queued ones finish. */
  get isAccepting(): boolean {
    return this.accepting;
  }

  /** From now on every new transaction is refused with `server_restarting`; what is queued still runs. */
  stopTaking(): void {
    this.accepting = false;
  }

  /** Number of jobs queued or running. */
  get size(): number {
    return this.waiting;
  }

  /** Resolves once everything queued so far has settled (used at shutdown). */
  async drain(): Promise<void> {
    while (this.waiting > 0) await this.tail;
  }
}
