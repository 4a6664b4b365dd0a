import type { MailAttachment } from './mailer.js';

/**
 * Where the completion e-mail's record PDF comes from: the job's record rendered for its id, or
 * null when there is none to attach (the e-mail then says where to download it).
 */
export type RecordPdfSource = (jobId: string) => Promise<MailAttachment | null>;

/** Used until the record PDF renderer is wired in: nothing is attached and the e-mail says so. */
export const noRecordPdf: RecordPdfSource = () => Promise.resolve(null);
