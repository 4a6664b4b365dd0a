import os from 'node:os';
import { Worker } from 'node:worker_threads';
import type { PdfTask } from './tasks.js';
import type { PdfAnswer, PdfRequest } from './worker.js';

interface Pending {
  id: number;
  task: PdfTask;
  resolve: (pdf: Buffer) => void;
  reject: (error: Error) => void;
}

interface Slot {
  worker: Worker;
  busy: Pending | null;
}

/**
 * Renders PDFs in worker threads, so a download never holds up the board: pdfkit and the SVG
 * drawings are synchronous and took 3.5-3.8 s of the event loop for one sheet. Workers start on
 * the first task and stay (starting one costs about a second of loading); an idle worker does not
 * keep the process alive. A task that fails, or a worker that dies, rejects only its own task.
 */
export class PdfWorkerPool {
  private readonly slots: Slot[] = [];
  private readonly queue: Pending[] = [];
  private nextId = 1;
  private readonly threadIds = new Set<number>();

  constructor(readonly size: number) {}

  /** Renders one PDF in a worker thread. */
  render(task: PdfTask): Promise<Buffer> {
    return new Promise((resolve, reject) => {
      this.queue.push({ id: this.nextId++, task, resolve, reject });
      this.pump();
    });
  }

  /** Thread ids that have rendered a PDF, so a test can see the work left the main thread. */
  get renderedOn(): ReadonlySet<number> {
    return this.threadIds;
  }

  private pump(): void {
    while (this.queue.length) {
      let slot = this.slots.find((s) => !s.busy);
      if (!slot && this.slots.length < this.size) slot = this.start();
      if (!slot) return;
      const pending = this.queue.shift()!;
      slot.busy = pending;
      slot.worker.ref();
      const request: PdfRequest = { id: pending.id, task: pending.task };
      slot.worker.postMessage(request);
    }
  }

  private start(): Slot {
    const worker = new Worker(new URL('./worker-boot.mjs', import.meta.url));
    const slot: Slot = { worker, busy: null };
    worker.on('message', (answer: PdfAnswer) => {
      const pending = slot.busy;
      slot.busy = null;
      worker.unref();
      if (pending && pending.id === answer.id) {
        if (answer.ok) {
          this.threadIds.add(answer.threadId);
          pending.resolve(Buffer.from(answer.pdf.buffer, answer.pdf.byteOffset, answer.pdf.byteLength));
        } else pending.reject(new Error(`PDF rendering failed in its worker: ${answer.message}`));
      }
      this.pump();
    });
    const drop = (error: Error) => {
      const i = this.slots.indexOf(slot);
      if (i >= 0) this.slots.splice(i, 1);
      slot.busy?.reject(error);
      slot.busy = null;
      this.pump();
    };
    worker.on('error', (error) => drop(error));
    worker.on('exit', (code) => drop(new Error(`The PDF worker stopped (exit code ${code}).`)));
    this.slots.push(slot);
    return slot;
  }

  /** Stops every worker; tasks still queued are refused. */
  async close(): Promise<void> {
    for (const p of this.queue.splice(0)) p.reject(new Error('The PDF workers were closed.'));
    await Promise.all(this.slots.splice(0).map((s) => s.worker.terminate()));
  }
}

// One worker fewer than the cores, so the event loop keeps a core of its own; at least one.
const defaultSize = Math.max(1, Math.min(4, os.availableParallelism() - 1));

/** The server's pool. */
export const pdfPool = new PdfWorkerPool(defaultSize);

/** Renders a PDF off the event loop. */
export function renderPdf(task: PdfTask): Promise<Buffer> {
  return pdfPool.render(task);
}
