import { z } from 'zod';

/** What an e-mail sent for the record is about. */
export const outboxKinds = ['completion', 'hold_reminder', 'shift_anchor'] as const;
export type OutboxKind = (typeof outboxKinds)[number];

/**
 * Where a queued e-mail stands: `pending` waits for its next try, `sent` was accepted by the mail
 * server, `failed` gave up after its last try, `cancelled` was no longer wanted when its turn came
 * (a reminder for a hold that had moved on).
 */
export const outboxStates = ['pending', 'sent', 'failed', 'cancelled'] as const;
export type OutboxState = (typeof outboxStates)[number];

/** An e-mail the app could not deliver (yet), as the admin sees it. */
export const mailProblemSchema = z.object({
  id: z.string(),
  kind: z.enum(outboxKinds),
  state: z.enum(outboxStates),
  to: z.string(),
  subject: z.string(),
  jobId: z.string().nullable(),
  attempts: z.number().int(),
  /** The mail server's or the connection's last answer. */
  lastError: z.string().nullable(),
  createdAt: z.string(),
  lastAttemptAt: z.string().nullable(),
  /** When the next try is due; null once it has given up. */
  nextAttemptAt: z.string().nullable(),
});
export type MailProblem = z.infer<typeof mailProblemSchema>;
export const mailProblemListSchema = z.object({ items: z.array(mailProblemSchema) });

/** How long a hold may wait for an absent crew member before they are e-mailed (minutes; per job). */
export const HOLD_REMINDER_DEFAULT_MINUTES = 10;
export const holdReminderMinutesSchema = z
  .number({ error: 'Enter a number of minutes' })
  .int('Enter whole minutes')
  .min(1, 'Enter 1 minute or more')
  .max(120, 'Enter 120 minutes or less');
