// The PDF worker threads load their TypeScript both ways the code runs: under Vitest (this file)
// and under tsx, as `npm start` and `npm run server` run the server (a child process).
import { execFileSync } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import { threadId } from 'node:worker_threads';
import { describe, expect, it } from 'vitest';
import { PdfWorkerPool } from '../../../server/pdf/pool.js';
import { smallPlan } from '../../shared/board/board-plan.js';

const job = { name: 'Worker check', site: 'Test yard', craneFleetNumber: 'TC-1', timeZone: 'UTC' };

describe('PDF worker threads', { timeout: 120_000 }, () => {
  it('render under Vitest on a thread other than the test’s, and a failing task rejects only itself', async () => {
    const pool = new PdfWorkerPool(1);
    try {
      const pdf = await pool.render({ kind: 'plan', job, plan: smallPlan(), version: 1, printedAt: '2026-03-02T10:00:00.000Z' });
      expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
      expect([...pool.renderedOn]).toHaveLength(1);
      expect([...pool.renderedOn]).not.toContain(threadId);
      // A plan without stages' arrays cannot be drawn: the worker answers with the error.
      const broken = { ...smallPlan(), stages: null as never };
      await expect(pool.render({ kind: 'plan', job, plan: broken, version: 1, printedAt: '2026-03-02T10:00:00.000Z' })).rejects.toThrow(/PDF rendering failed in its worker/);
      const again = await pool.render({ kind: 'plan', job, plan: smallPlan(), version: 2, printedAt: '2026-03-02T10:00:00.000Z' });
      expect(again.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    } finally {
      await pool.close();
    }
  });

  it.runIf(process.platform === 'linux')('run at a lower CPU priority than the event loop (nice 10 on the worker thread alone)', async () => {
    const niceOf = (tid: string) => {
      const stat = readFileSync(`/proc/self/task/${tid}/stat`, 'utf8');
      // After "pid (comm) " the state is field 3; nice is field 19.
      return Number(stat.slice(stat.lastIndexOf(')') + 2).split(' ')[19 - 3]);
    };
    const before = new Set(readdirSync('/proc/self/task'));
    const pool = new PdfWorkerPool(1);
    try {
      await pool.render({ kind: 'plan', job, plan: smallPlan(), version: 1, printedAt: '2026-03-02T10:00:00.000Z' });
      const mine = niceOf(String(process.pid));
      const lowered = readdirSync('/proc/self/task').filter((tid) => !before.has(tid) && niceOf(tid) === Math.min(19, mine + 10));
      expect(niceOf(String(process.pid))).toBe(mine);
      expect(lowered.length).toBeGreaterThan(0);
    } finally {
      await pool.close();
    }
  });

  it('render under tsx, as the server runs', () => {
    const root = path.resolve(import.meta.dirname, '..', '..', '..');
    const out = execFileSync(process.execPath, ['--import', 'tsx', 'tests/server/pdf/pdf-under-tsx.script.ts'], { cwd: root, encoding: 'utf8', timeout: 100_000 });
    const answer = JSON.parse(out.trim().split('\n').at(-1)!) as { head: string; mainThread: number; renderedOn: number[] };
    expect(answer.head).toBe('%PDF-');
    expect(answer.renderedOn.length).toBe(1);
    expect(answer.renderedOn).not.toContain(answer.mainThread);
  });
});
