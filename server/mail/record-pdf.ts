import type { AppContext } from '../context.js';
import { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';
import { User } from '../entities/User.js';
import { crewRolesOf } from '../queries/crew.js';
import { recordPdfFor } from '../routes/record-pdf.js';
import { completingSeq } from './completion.js';
import type { MailAttachment } from './mailer.js';

/**
 * Where the completion e-mail's record PDF comes from: the job's record rendered for its id, or
 * null when there is none to attach (the e-mail then says where to download it).
 */
export type RecordPdfSource = (jobId: string) => Promise<MailAttachment | null>;

/** Attaches nothing; the e-mail says where the record is. For tests of that wording. */
export const noRecordPdf: RecordPdfSource = () => Promise.resolve(null);

/**
 * The record the distribution list receives: the same PDF as `GET /api/jobs/:id/record.pdf`
 * (the same renderer, worker threads and cache by final hash), read as the crew reads it: as the
 * person whose command completed the job, with the failed blind-check fields that only the job's
 * planners see left out, since the list may reach people outside the crew.
 */
export function recordPdfFromRenderer(context: AppContext): RecordPdfSource {
  return async (jobId) => {
    const { manager } = context.dataSource;
    const job = await manager.findOneBy(Job, { id: jobId });
    if (!job) return null;
    const seq = await completingSeq(manager, jobId);
    const completing = seq === null ? null : await manager.findOneBy(JobEvent, { jobId, seq });
    const actor = completing ? await manager.findOneBy(User, { id: completing.byUserId }) : null;
    if (!actor) return null;
    const crewRoles = await crewRolesOf(manager, jobId, actor.id);
    const content = await recordPdfFor(context, { job, actor, crewRoles, planner: false });
    // Named as the record.pdf download names it.
    return { filename: `record-${job.id.slice(0, 8)}.pdf`, contentType: 'application/pdf', content };
  };
}

