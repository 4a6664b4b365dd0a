import { z } from 'zod';
import { jobKindSchema, jobStateSchema, verifySchema } from './jobs.js';

/** Which of a job's dates the Records screen's date range looks at. */
export const recordDateFields = ['updated', 'ended'] as const;
export const recordDateFieldSchema = z.enum(recordDateFields);
export type RecordDateField = z.infer<typeof recordDateFieldSchema>;

/** Most rows one page of the Records screen may ask for. */
export const RECORDS_PAGE_SIZE_MAX = 100;

// A field left empty in a query string arrives as "": it means "no filter", not a bad value.
const optional = <S extends z.ZodType>(schema: S) => z.preprocess((value) => (value === '' ? undefined : value), schema.optional());
// An instant, normalised to the stored form (toISOString, UTC) so the database compares strings alike.
const instant = z.iso.datetime({ offset: true, message: 'a date and time (ISO 8601)' }).transform((value) => new Date(value).toISOString());

/** Query of GET /api/records: filters, then the page asked for. */
export const recordsQuerySchema = z
  .object({
    state: optional(jobStateSchema),
    craneUnitId: optional(z.uuid('Choose a crane unit from the list')),
    /** Part of the site's name, any case. */
    site: optional(z.string().trim().max(200, 'Type at most 200 characters')),
    /** From this instant, inclusive. */
    from: optional(instant),
    /** Up to this instant, inclusive. */
    to: optional(instant),
    /** `updated`: the job's last change; `ended`: when it was completed or cancelled (jobs not ended are left out). */
    dateField: optional(recordDateFieldSchema).transform((value) => value ?? 'updated'),
    page: optional(z.coerce.number().int().min(1, 'Pages start at 1')).transform((value) => value ?? 1),
    pageSize: optional(z.coerce.number().int().min(1, 'At least 1 row a page').max(RECORDS_PAGE_SIZE_MAX, `At most ${RECORDS_PAGE_SIZE_MAX} rows a page`)).transform(
      (value) => value ?? 25,
    ),
  })
  .refine((q) => !q.from || !q.to || q.from <= q.to, { path: ['to'], message: 'The end of the date range is before its start' });
export type RecordsQuery = z.infer<typeof recordsQuerySchema>;
/** What a client puts in the query string (every field optional, dates as ISO strings). */
export type RecordsQueryInput = z.input<typeof recordsQuerySchema>;

/** A job's chain as checked when the list was asked for. */
export const recordVerificationSchema = verifySchema.omit({ expected: true });
export type RecordVerification = z.infer<typeof recordVerificationSchema>;

/** One row of the Records screen. */
export const recordRowSchema = z.object({
  id: z.string(),
  name: z.string(),
  site: z.string(),
  kind: jobKindSchema,
  state: jobStateSchema,
  /** The site's IANA time zone: the row's times are shown in it. */
  timeZone: z.string(),
  craneUnitId: z.string(),
  craneFleetNumber: z.string(),
  createdAt: z.string(),
  updatedAt: z.string(),
  /** When the job was completed or cancelled (its log's last ending event); null while it runs. */
  endedAt: z.string().nullable(),
  /** Events in the log. */
  lastSeq: z.number().int(),
  /** The job's head hash as stored: proven only when `verification.valid`. */
  finalHash: z.string(),
  verification: recordVerificationSchema,
});
export type RecordRow = z.infer<typeof recordRowSchema>;

/** Answer of GET /api/records: one page, newest first, and how many jobs match in all. */
export const recordListSchema = z.object({
  items: z.array(recordRowSchema),
  total: z.number().int().min(0),
  page: z.number().int().min(1),
  pageSize: z.number().int().min(1),
});
export type RecordList = z.infer<typeof recordListSchema>;
