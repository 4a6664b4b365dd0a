import Database from 'better-sqlite3';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { openDatabase } from '../../../server/db/data-source.js';
import { faultKindOfCode, rawConnection, storageFaultOf } from '../../../server/db/faults.js';
import { WriteQueue } from '../../../server/db/write-queue.js';
import { toHttpError } from '../../../server/errors.js';
import { createLogger } from '../../../server/logger.js';
import { healthSchema } from '../../../shared/schemas/health.js';
import { BoardClient, calmWeather, httpCommand, startedJob, type CrewByRole } from '../../helpers/board.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Disk and I/O faults, forced on the real SQLite file under a running server: a command refused by
 * SQLite is answered 503 with its own code over the socket and over HTTP, leaves every table as it
 * was, is never broadcast, and the server writes again as soon as the fault clears. GET
 * /api/health reports the fault from the failed write until the next write commits.
 */
describe('storage faults', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let jobId: string;
  /** Sends the commands. */
  let rigger: BoardClient;
  /** Watches the board: it must see nothing while writes fail. */
  let watcher: BoardClient;

  beforeAll(async () => {
    server = await startTestServer();
    ({ crew, jobId } = await startedJob(server));
    rigger = new BoardClient(server.url, crew.rigger.token);
    watcher = new BoardClient(server.url, crew.operator.token);
    expect(await rigger.join(jobId)).toMatchObject({ ok: true });
    expect(await watcher.join(jobId)).toMatchObject({ ok: true });
  }, 60_000);
  afterAll(async () => {
    rigger?.close();
    watcher?.close();
    await server?.stop();
  });

  /** Runs SQL on the server's own connection, in the queue's turn (as a pragma must, between transactions). */
  const onServerConnection = (sql: string) => server.context.queue.run(() => server.context.dataSource.query(sql));

  /** Every table's rows, read through a second connection to the same file: what is on disk, not what the server believes. */
  function everything(): Record<string, unknown[]> {
    const db = new Database(path.join(server.dataDir, 'holdline.sqlite'), { readonly: true });
    try {
      const tables = db.prepare("SELECT name FROM sqlite_master WHERE type = 'table' ORDER BY name").all() as { name: string }[];
      return Object.fromEntries(tables.map(({ name }) => [name, db.prepare(`SELECT * FROM "${name}" ORDER BY rowid`).all()]));
    } finally {
      db.close();
    }
  }

  async function health() {
    const res = await request(server.app).get('/api/health');
    return { status: res.status, body: healthSchema.parse(res.body) };
  }

  /** The last seq the watcher's board has heard of (events and ticks). */
  const lastSeq = () => Math.max(0, ...watcher.events.map((e) => e.seq));

  /**
   * Forces a fault, sends one command over each transport, checks the refusal and that nothing
   * moved, clears the fault and checks that the same command is then recorded and broadcast.
   */
  async function refusedThenServed(code: string, words: RegExp, force: () => Promise<void>, clear: () => Promise<void>) {
    await force();
    const seqBefore = (await request(server.app).get(`/api/jobs/${jobId}/board`).set('Authorization', `Bearer ${crew.operator.token}`).expect(200)).body.seq as number;
    if (seqBefore > 0) await watcher.waitForSeq(seqBefore);
    const before = everything();
    const heard = watcher.events.length;

    const bySocket = await rigger.command(jobId, calmWeather);
    expect(bySocket).toMatchObject({ ok: false, error: { code } });
    if (!bySocket.ok) expect(bySocket.error.message).toMatch(words);
    const byHttp = await httpCommand(server, crew.rigger, jobId, calmWeather);
    expect(byHttp.status).toBe(503);
    expect(byHttp.body.error?.code).toBe(code);
    expect(byHttp.body.error?.message).toMatch(words);
    // No SQL and no stack trace reach the crew.
    expect(JSON.stringify(byHttp.body)).not.toMatch(/INSERT|UPDATE|SELECT|SqliteError|at .*\.ts/);

    // Nothing half-written: every table as it was, the job's row and its log included.
    expect(everything()).toEqual(before);
    expect(watcher.events.length).toBe(heard);

    // The health route says so, with a non-200 status, until a write commits.
    const faulted = await health();
    expect(faulted.status).toBe(503);
    expect(faulted.body.status).toBe('faulted');
    expect(faulted.body.storage).toMatchObject({ ok: false, lastFault: { code } });
    expect(faulted.body.storage.since).not.toBeNull();
    // A read alone does not clear it: the board still opens, the fault stands.
    await request(server.app).get(`/api/jobs/${jobId}/board`).set('Authorization', `Bearer ${crew.operator.token}`).expect(200);
    expect((await health()).status).toBe(503);

    await clear();
    const served = await rigger.command(jobId, calmWeather);
    expect(served).toMatchObject({ ok: true, seq: seqBefore + 1 });
    await watcher.waitForSeq(seqBefore + 1);
    // Nothing was broadcast for the refused commands: a socket delivers in order, so anything sent
    // for them would have come before this event; the watcher heard this one event and no other.
    expect(watcher.events.length).toBe(heard + 1);
    expect(lastSeq()).toBe(seqBefore + 1);
    const cleared = await health();
    expect(cleared.status).toBe(200);
    expect(cleared.body).toMatchObject({ status: 'ok', storage: { ok: true, since: null, lastFault: { code } } });
    expect(cleared.body.storage.clearedAt).not.toBeNull();
    // The server keeps serving over HTTP too.
    expect((await httpCommand(server, crew.rigger, jobId, calmWeather)).status).toBe(200);
  }

  it('answers a full disk (SQLITE_FULL from a tiny max_page_count) with storage_full, writes nothing, and serves again', async () => {
    await refusedThenServed(
      'storage_full',
      /disk is full: nothing was recorded/,
      async () => {
        // No free page left inside the file and no room to grow it: the next write that needs a page fails.
        await onServerConnection('VACUUM');
        const [{ page_count: pages }] = (await onServerConnection('PRAGMA page_count')) as { page_count: number }[];
        await onServerConnection(`PRAGMA max_page_count = ${pages}`);
        // A command writes one event row: it fits in the room left on the table's last pages until
        // one needs a new page. From then on every such write fails the same way.
        for (let i = 0; ; i++) {
          const { status, body } = await httpCommand(server, crew.rigger, jobId, calmWeather);
          if (status === 503 && body.error?.code === 'storage_full') break;
          expect(status, `command ${i} before the file filled up`).toBe(200);
          expect(i).toBeLessThan(500);
        }
      },
      async () => {
        await onServerConnection('PRAGMA max_page_count = 1073741823');
      },
    );
  });

  it('answers a database another writer holds (SQLITE_BUSY) with storage_busy, writes nothing, and serves once it lets go', async () => {
    const other = new Database(path.join(server.dataDir, 'holdline.sqlite'));
    try {
      await refusedThenServed(
        'storage_busy',
        /busy .*nothing was recorded/,
        async () => {
          // Waiting 5 s for the lock would hold the test up; the answer is the same after 50 ms.
          await onServerConnection('PRAGMA busy_timeout = 50');
          other.exec('BEGIN IMMEDIATE');
        },
        async () => {
          other.exec('ROLLBACK');
          await onServerConnection('PRAGMA busy_timeout = 5000');
        },
      );
    } finally {
      other.close();
    }
  });

  it('answers a database that cannot be written (SQLITE_READONLY, the connection made query-only) with storage_readonly, and serves again', async () => {
    // The server runs as root here, so a read-only file mode would not stop it; query_only makes
    // SQLite itself refuse every write with SQLITE_READONLY, as a read-only file does.
    await refusedThenServed(
      'storage_readonly',
      /read-only\): nothing was recorded/,
      () => onServerConnection('PRAGMA query_only = 1').then(() => undefined),
      () => onServerConnection('PRAGMA query_only = 0').then(() => undefined),
    );
  });

  it('names each kind of SQLite result code and words an I/O error on the safe side', () => {
    // Extended result codes as SQLite names them (sqlite.org, "Result and Error Codes", rescode.html).
    expect(['SQLITE_FULL', 'SQLITE_BUSY', 'SQLITE_BUSY_SNAPSHOT', 'SQLITE_LOCKED', 'SQLITE_READONLY_DBMOVED', 'SQLITE_IOERR_WRITE', 'SQLITE_IOERR_FSYNC', 'SQLITE_CORRUPT', 'SQLITE_CONSTRAINT_UNIQUE', 'SQLITE_ERROR'].map(faultKindOfCode)).toEqual([
      'full',
      'busy',
      'busy',
      'busy',
      'readonly',
      'failed',
      'failed',
      'failed',
      null,
      null,
    ]);
    // A real SqliteError from better-sqlite3, as the driver throws it, becomes a 503 without SQL.
    const logger = createLogger('silent');
    const ioError = toHttpError(new Database.SqliteError('disk I/O error', 'SQLITE_IOERR_WRITE'), logger, {});
    expect(ioError.status).toBe(503);
    expect(ioError.code).toBe('storage_failed');
    // A failed fsync can fail the commit itself: the words do not promise that nothing was recorded.
    expect(ioError.message).not.toMatch(/nothing was recorded/);
    expect(ioError.message).toMatch(/not confirmed. Check the board/);
    // The same faults from the file system (a photo written to a full disk): /dev/full answers every write with ENOSPC.
    let fileError: unknown;
    try {
      writeFileSync('/dev/full', 'photo bytes');
    } catch (error) {
      fileError = error;
    }
    expect(fileError).toMatchObject({ code: 'ENOSPC' });
    expect(toHttpError(fileError, logger, {})).toMatchObject({ status: 503, code: 'storage_full' });
    // A constraint is a bug or a refusal of its own, never a storage fault.
    expect(storageFaultOf(new Database.SqliteError('UNIQUE constraint failed', 'SQLITE_CONSTRAINT_UNIQUE'))).toBeNull();
  });

  it('keeps the one connection usable after SQLite rolled a failed transaction back by itself', async () => {
    // SQLite may cancel a whole transaction on SQLITE_FULL, SQLITE_IOERR or SQLITE_BUSY (sqlite.org,
    // "Transaction", "Response To Errors Within A Transaction"). TypeORM's ROLLBACK then fails and
    // its counters stay "in a transaction": its next transaction would be a SAVEPOINT that a failure
    // leaves open, and every later commit would go nowhere. The queue puts the connection right.
    const dir = mkdtempSync(path.join(os.tmpdir(), 'holdline-faults-'));
    const file = path.join(dir, 'h.sqlite');
    const dataSource = await openDatabase(file);
    try {
      const queue = new WriteQueue(dataSource);
      const raw = rawConnection(dataSource)!;
      await queue.transaction((m) => m.query('CREATE TABLE scratch (n INTEGER)'));
      await expect(
        queue.transaction(async (m) => {
          await m.query('INSERT INTO scratch (n) VALUES (1)');
          raw.exec('ROLLBACK'); // what SQLite does by itself on such an error
          throw new Database.SqliteError('database or disk is full', 'SQLITE_FULL');
        }),
      ).rejects.toMatchObject({ code: 'SQLITE_FULL' });
      expect(queue.storage.status).toMatchObject({ ok: false, lastFault: { code: 'storage_full', systemCode: 'SQLITE_FULL' } });
      // A refusal after a write: rolled back, and the connection is not left inside a transaction.
      await expect(
        queue.transaction(async (m) => {
          await m.query('INSERT INTO scratch (n) VALUES (2)');
          throw new Error('refused by a rule');
        }),
      ).rejects.toThrow('refused by a rule');
      expect(raw.inTransaction).toBe(false);
      // A good write commits: another connection to the file sees it, and only it.
      await queue.transaction((m) => m.query('INSERT INTO scratch (n) VALUES (3)'));
      const other = new Database(file, { readonly: true });
      expect(other.prepare('SELECT n FROM scratch ORDER BY n').all()).toEqual([{ n: 3 }]);
      other.close();
      expect(queue.storage.status.ok).toBe(true);
    } finally {
      await dataSource.destroy();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
