import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { promisify } from 'node:util';
import Database from 'better-sqlite3';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { eventHash, GENESIS_HASH } from '../../../shared/events/chain.js';
import { verifySchema } from '../../../shared/schemas/jobs.js';
import { DEMO_PASSWORD } from '../../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../../server/demo/seed.js';
import { storedEvents } from '../../../server/events/chain.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, '../../..');

/** Runs `npm run verify-record` as a person would; answers its exit code and what it printed. */
async function verifyRecordCli(file: string, ...extra: string[]): Promise<{ code: number; out: string }> {
  try {
    const { stdout } = await run('npm', ['run', '-s', 'verify-record', '--', file, ...extra], { cwd: root });
    return { code: 0, out: stdout };
  } catch (error) {
    const failed = error as { code: number; stdout: string };
    return { code: failed.code, out: failed.stdout };
  }
}

const finalHashOf = (out: string) => /Final hash: ([0-9a-f]{64})/.exec(out)?.[1] ?? null;

interface Row {
  id: number;
  seq: number;
  job_id: string;
  command_id: string;
  type: string;
  by_user_id: string;
  by_name: string;
  role: string;
  at: string;
  data: string;
  prev_hash: string;
  hash: string;
}

/**
 * The demo's trial erection is driven through every stage by the same commands the crew send,
 * so its log is a real one. Each tampering test works on a fresh copy of the demo database, as an
 * attacker with the file would.
 */
describe('the job log chain on a driven job', () => {
  let server: TestServer;
  let token: string;
  let jobId: string;
  let lastSeq: number;
  let work: string;

  const db = () => new Database(server.config.databasePath);
  const verify = async (expect?: string) =>
    verifySchema.parse((await request(server.app).get(`/api/jobs/${jobId}/record/verify`).query(expect ? { expect } : {}).set({ Authorization: `Bearer ${token}` }).expect(200)).body);
  const exportLog = async (name: string) => {
    const res = await request(server.app).get(`/api/jobs/${jobId}/events.jsonl`).set({ Authorization: `Bearer ${token}` }).buffer(true).parse((r, cb) => {
      let text = '';
      r.on('data', (c: Buffer) => (text += c.toString('utf8')));
      r.on('end', () => cb(null, text));
    }).expect(200);
    const file = path.join(work, name);
    writeFileSync(file, res.body as string);
    return file;
  };

  /** Every change below is undone by restoring these rows, so tests do not leak into each other. */
  let original: Row[];
  const restore = () => {
    const d = db();
    d.transaction(() => {
      d.prepare('DELETE FROM job_event WHERE job_id = ?').run(jobId);
      const insert = d.prepare('INSERT INTO job_event (id, job_id, seq, command_id, command_hash, type, by_user_id, by_name, role, at, data, prev_hash, hash) VALUES (@id, @job_id, @seq, @command_id, @command_hash, @type, @by_user_id, @by_name, @role, @at, @data, @prev_hash, @hash)');
      for (const row of original) insert.run(row);
    })();
    d.close();
  };

  beforeAll(async () => {
    work = mkdtempSync(path.join(os.tmpdir(), 'holdline-chain-'));
    server = await startTestServer();
    await seedDemoIfEmpty(server.context);
    const login = await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200);
    token = login.body.token as string;
    const jobs = (await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200)).body.items as { id: string; name: string; state: string }[];
    const trial = jobs.find((j) => j.name === 'Depot trial erection, 21 m')!;
    // Driven to its post-assembly sign-off, whose release completed it.
    expect(trial.state).toBe('complete');
    jobId = trial.id;
    const d = db();
    original = d.prepare('SELECT * FROM job_event WHERE job_id = ? ORDER BY seq').all(jobId) as Row[];
    d.close();
    lastSeq = original.length;
  }, 120_000);
  afterAll(async () => {
    await server?.stop();
    rmSync(work, { recursive: true, force: true });
  });

  it('verifies on the driven job, and the checker run on the exported file gives the same final hash', async () => {
    // A driven erection has well over a hundred events (briefings, steps, holds, weather).
    expect(lastSeq).toBeGreaterThan(100);
    const answer = await verify();
    expect(answer).toMatchObject({ valid: true, checked: lastSeq, firstBadSeq: null });
    expect(answer.finalHash).toBe(original[original.length - 1].hash);
    const file = await exportLog('intact.jsonl');
    const cli = await verifyRecordCli(file);
    expect(cli.code).toBe(0);
    expect(finalHashOf(cli.out)).toBe(answer.finalHash);
    const withExpect = await verifyRecordCli(file, '--expect', original[10].hash.toUpperCase());
    expect(withExpect.code).toBe(0);
    expect(withExpect.out).toContain(`it is the hash of event ${original[10].seq}`);
  }, 60_000);

  it('an event changed in SQLite is caught at its seq, by the route and by the checker', async () => {
    const d = db();
    const target = original[41];
    const data = JSON.parse(target.data) as Record<string, unknown>;
    d.prepare('UPDATE job_event SET data = ? WHERE id = ?').run(JSON.stringify({ ...data, reason: 'changed afterwards' }), target.id);
    d.close();
    try {
      expect(await verify()).toEqual({ valid: false, checked: target.seq - 1, firstBadSeq: target.seq, finalHash: null });
      const cli = await verifyRecordCli(await exportLog('edited.jsonl'));
      expect(cli.code).toBe(1);
      expect(cli.out).toContain(`BROKEN at event ${target.seq}`);
    } finally {
      restore();
    }
    expect((await verify()).valid).toBe(true);
  }, 60_000);

  it('a deleted event is caught at its seq; a deleted last event by the job row', async () => {
    const d = db();
    d.prepare('DELETE FROM job_event WHERE id = ?').run(original[60].id);
    d.close();
    try {
      expect(await verify()).toMatchObject({ valid: false, checked: 60, firstBadSeq: 61 });
    } finally {
      restore();
    }
    const d2 = db();
    d2.prepare('DELETE FROM job_event WHERE id = ?').run(original[lastSeq - 1].id);
    d2.close();
    try {
      expect(await verify()).toMatchObject({ valid: false, checked: lastSeq - 1, firstBadSeq: lastSeq });
      // The file alone cannot know a tail was cut; the hash kept outside can.
      const file = await exportLog('cut.jsonl');
      const cli = await verifyRecordCli(file, '--expect', original[lastSeq - 1].hash);
      expect(cli.code).toBe(1);
      expect(cli.out).toContain('does NOT lead to');
    } finally {
      restore();
    }
  }, 60_000);

  it('two swapped events are caught at the first of them', async () => {
    const d = db();
    const [a, b] = [original[20], original[30]];
    d.transaction(() => {
      d.prepare('UPDATE job_event SET seq = -1 WHERE id = ?').run(a.id);
      d.prepare('UPDATE job_event SET seq = ? WHERE id = ?').run(a.seq, b.id);
      d.prepare('UPDATE job_event SET seq = ? WHERE id = ?').run(b.seq, a.id);
    })();
    d.close();
    try {
      expect(await verify()).toMatchObject({ valid: false, checked: a.seq - 1, firstBadSeq: a.seq });
    } finally {
      restore();
    }
  });

  it('a chain rewritten consistently after an edit passes the plain check but not the hash taken before the edit', async () => {
    const emailed = (await verify()).finalHash!;
    expect(emailed).toMatch(/^[0-9a-f]{64}$/);
    // The attacker changes one event and recomputes every hash after it, the job row's head too.
    const d = db();
    const rows = d.prepare('SELECT * FROM job_event WHERE job_id = ? ORDER BY seq').all(jobId) as Row[];
    const edited = rows[50];
    edited.by_name = 'Someone else';
    let prev = GENESIS_HASH;
    d.transaction(() => {
      for (const row of rows) {
        const hash = eventHash(prev, {
          jobId: row.job_id, seq: row.seq, commandId: row.command_id, type: row.type, byUserId: row.by_user_id,
          byName: row.by_name, role: row.role, at: row.at, data: JSON.parse(row.data) as Record<string, unknown>,
        });
        d.prepare('UPDATE job_event SET by_name = ?, prev_hash = ?, hash = ? WHERE id = ?').run(row.by_name, prev, hash, row.id);
        prev = hash;
      }
      d.prepare('UPDATE job SET head_hash = ? WHERE id = ?').run(prev, jobId);
    })();
    d.close();
    try {
      const plain = await verify();
      expect(plain).toMatchObject({ valid: true, checked: lastSeq, firstBadSeq: null });
      expect(plain.finalHash).not.toBe(emailed);
      expect((await verify(emailed)).expected).toEqual({ hash: emailed, found: false, seq: null });
      // A hash from before the edited event still leads: the log up to it is untouched.
      expect((await verify(original[40].hash)).expected).toEqual({ hash: original[40].hash, found: true, seq: 41 });

      const file = await exportLog('rewritten.jsonl');
      const alone = await verifyRecordCli(file);
      expect(alone.code).toBe(0);
      expect(finalHashOf(alone.out)).toBe(plain.finalHash);
      const against = await verifyRecordCli(file, '--expect', emailed);
      expect(against.code).toBe(1);
      expect(against.out).toContain(`does NOT lead to ${emailed}`);
    } finally {
      restore();
      const d2 = db();
      d2.prepare('UPDATE job SET head_hash = ? WHERE id = ?').run(emailed, jobId);
      d2.close();
    }
    expect((await verify(emailed)).expected?.found).toBe(true);
  }, 60_000);

  it('the database walk reads every event once, in order, across pages', async () => {
    const manager = server.context.dataSource.manager;
    const seqsOf = async (pageSize: number, until?: number) => {
      const seen: number[] = [];
      for await (const row of storedEvents(manager, jobId, until, pageSize)) seen.push(row.seq);
      return seen;
    };
    const all = original.map((r) => r.seq);
    expect(await seqsOf(7)).toEqual(all);
    expect(await seqsOf(1)).toEqual(all);
    expect(await seqsOf(lastSeq)).toEqual(all);
    expect(await seqsOf(7, 50)).toEqual(all.slice(0, 50));
  });

  it('the checker refuses a wrong call with exit code 2', async () => {
    expect((await verifyRecordCli(path.join(work, 'missing.jsonl'))).code).toBe(2);
    expect((await verifyRecordCli(path.join(work, 'x.jsonl'), '--expect', 'not-a-hash')).code).toBe(2);
  }, 30_000);
});
