import type { ConfigurationResults } from '../../shared/planner/types.js';
import type { ArrangementData } from '../../shared/schemas/arrangement.js';
import type { JobDto } from '../../shared/schemas/jobs.js';
import type { Plan } from '../../shared/schemas/plan.js';
import { configurationSheetPdf } from './configuration-sheet.js';
import { paperCopyPdf, type PaperCopyInput } from './paper-copy.js';
import { planChecklistPdf } from './plan-checklist.js';
import { recordPdf, type RecordPdfInput } from './record.js';
import { recordInputFromLog, type RecordLogTask } from './record-input.js';

/** One PDF to render, as plain data a worker thread receives by structured clone. */
export type PdfTask =
  | { kind: 'configuration'; job: JobDto; results: ConfigurationResults | null; arrangement: ArrangementData; printedAt: string }
  | { kind: 'plan'; job: Pick<JobDto, 'name' | 'site' | 'craneFleetNumber' | 'timeZone'>; plan: Plan; version: number; printedAt: string }
  | ({ kind: 'record' } & RecordPdfInput)
  | ({ kind: 'paper' } & PaperCopyInput)
  | RecordLogTask;

/** Renders one task in the calling thread; the worker runs this, and so can a test. */
export function renderTask(task: PdfTask): Promise<Buffer> {
  switch (task.kind) {
    case 'configuration':
      return configurationSheetPdf(task.job, task.results, task.arrangement, new Date(task.printedAt));
    case 'plan':
      return planChecklistPdf(task.job, task.plan, task.version, new Date(task.printedAt));
    case 'record':
      return recordPdf(task);
    case 'paper':
      return paperCopyPdf(task);
    case 'record-log':
      return recordInputFromLog(task).then(recordPdf);
  }
}
