import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { setTimeout as sleep } from 'node:timers/promises';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openDatabase } from '../../../server/db/data-source.js';
import { WriteQueue } from '../../../server/db/write-queue.js';

describe('database', () => {
  let dir: string;
  let dataSource: DataSource;

  beforeEach(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-db-'));
    dataSource = await openDatabase(path.join(dir, 'nested', 'h.sqlite'));
  });
  afterEach(async () => {
    if (dataSource.isInitialized) await dataSource.destroy();
    rmSync(dir, { recursive: true, force: true });
  });

  it('opens with WAL, synchronous FULL, foreign keys and a busy timeout, creating the folder', async () => {
    expect(await dataSource.query('PRAGMA journal_mode')).toEqual([{ journal_mode: 'wal' }]);
    expect(await dataSource.query('PRAGMA synchronous')).toEqual([{ synchronous: 2 }]);
    expect(await dataSource.query('PRAGMA foreign_keys')).toEqual([{ foreign_keys: 1 }]);
    expect(await dataSource.query('PRAGMA busy_timeout')).toEqual([{ timeout: 5000 }]);
  });

  it('runs the migrations once, and reopening runs none again', async () => {
    const applied = (await dataSource.query('SELECT name FROM migrations')) as { name: string }[];
    expect(applied.map((m) => m.name)).toContain('CreateUsers1764633600000');
    await dataSource.destroy();
    dataSource = await openDatabase(path.join(dir, 'nested', 'h.sqlite'));
    const again = (await dataSource.query('SELECT name FROM migrations')) as { name: string }[];
    expect(again).toHaveLength(applied.length);
    expect(await dataSource.query('PRAGMA synchronous')).toEqual([{ synchronous: 2 }]);
  });

  it('the write queue runs 50 concurrent transactions, all committed and none interleaved', async () => {
    await dataSource.query('CREATE TABLE counter (id INTEGER PRIMARY KEY, value INTEGER NOT NULL)');
    await dataSource.query('CREATE TABLE trace (n INTEGER PRIMARY KEY AUTOINCREMENT, tx INTEGER NOT NULL, mark TEXT NOT NULL)');
    await dataSource.query('INSERT INTO counter (id, value) VALUES (1, 0)');
    const queue = new WriteQueue(dataSource);

    const results = await Promise.allSettled(
      Array.from({ length: 50 }, (_, tx) =>
        queue.transaction(async (manager) => {
          await manager.query('INSERT INTO trace (tx, mark) VALUES (?, ?)', [tx, 'begin']);
          const [{ value }] = (await manager.query('SELECT value FROM counter WHERE id = 1')) as { value: number }[];
          // Yield to the event loop mid-transaction: without the queue another transaction would start here.
          await sleep(tx % 3);
          await manager.query('UPDATE counter SET value = ? WHERE id = 1', [value + 1]);
          await manager.query('INSERT INTO trace (tx, mark) VALUES (?, ?)', [tx, 'end']);
          return tx;
        }),
      ),
    );

    expect(results.filter((r) => r.status === 'rejected')).toEqual([]);
    expect(await dataSource.query('SELECT value FROM counter')).toEqual([{ value: 50 }]);
    const trace = (await dataSource.query('SELECT tx, mark FROM trace ORDER BY n')) as { tx: number; mark: string }[];
    expect(trace).toHaveLength(100);
    for (let i = 0; i < trace.length; i += 2) {
      expect(trace[i]).toEqual({ tx: i / 2, mark: 'begin' });
      expect(trace[i + 1]).toEqual({ tx: i / 2, mark: 'end' });
    }
    expect(queue.size).toBe(0);
  });

  it('a failing transaction rolls back and does not block the ones queued after it', async () => {
    await dataSource.query('CREATE TABLE item (id INTEGER PRIMARY KEY, name TEXT NOT NULL)');
    const queue = new WriteQueue(dataSource);
    const failing = queue.transaction(async (m) => {
      await m.query("INSERT INTO item (name) VALUES ('lost')");
      throw new Error('refused');
    });
    const next = queue.transaction((m) => m.query("INSERT INTO item (name) VALUES ('kept')"));
    await expect(failing).rejects.toThrow('refused');
    await next;
    expect(await dataSource.query('SELECT name FROM item')).toEqual([{ name: 'kept' }]);
  });

  it('drain waits for queued work', async () => {
    const queue = new WriteQueue(dataSource);
    let done = 0;
    for (let i = 0; i < 5; i++) void queue.run(async () => { await sleep(5); done += 1; });
    await queue.drain();
    expect(done).toBe(5);
  });
});
