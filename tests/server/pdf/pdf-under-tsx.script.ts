// Run by tests/server/pdf/pool.test.ts with `tsx`, as `npm start` runs the server: renders one
// plan PDF through the worker pool and prints where it was rendered.
import { threadId } from 'node:worker_threads';
import { pdfPool, renderPdf } from '../../../server/pdf/pool.js';
import { smallPlan } from '../../shared/board/board-plan.js';

const job = { name: 'Worker check', site: 'Test yard', craneFleetNumber: 'TC-1', timeZone: 'UTC' };
const pdf = await renderPdf({ kind: 'plan', job, plan: smallPlan(), version: 1, printedAt: '2026-03-02T10:00:00.000Z' });
console.log(JSON.stringify({ head: pdf.subarray(0, 5).toString('latin1'), bytes: pdf.length, mainThread: threadId, renderedOn: [...pdfPool.renderedOn] }));
await pdfPool.close();
