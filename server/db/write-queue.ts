import type { DataSource, EntityManager } from 'typeorm';

/**
 * One FIFO queue for every transaction and every read that must not see half-done work.
 * better-sqlite3 shares one connection: two TypeORM transactions started together collide
 * ("cannot start a transaction within a transaction") and a read during an open transaction
 * sees its uncommitted rows, so all of them take turns here.
 */
export class WriteQueue {
  private tail: Promise<unknown> = Promise.resolve();
  private waiting = 0;

  constructor(private readonly dataSource: DataSource) {}

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

  /** Runs `work` inside one transaction, in turn. */
  transaction<T>(work: (manager: EntityManager) => Promise<T>): Promise<T> {
    return this.run(() => this.dataSource.transaction(work));
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
