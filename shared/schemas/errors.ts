import { z } from 'zod';

/** Every /api error body: a stable code, a sentence for people, and each failing field. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    fields: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>['error'];
export type FieldError = NonNullable<ApiError['fields']>[number];

/** Zod's own wording for its generic checks; a message a schema wrote itself never starts like these. */
const GENERIC_MESSAGE = /^(Invalid|Too small|Too big)/;

/**
 * A message for people from a zod issue: the schema's own words, or plain ones for zod's generic
 * checks. The server and the client both word a schema failure through this, so a person reads
 * the same sentence whichever side refused.
 */
export function readableIssue(issue: z.core.$ZodIssue): string {
  if (!GENERIC_MESSAGE.test(issue.message)) return issue.message;
  if (issue.code === 'invalid_type' && issue.expected === 'number') return 'Enter a number';
  if (issue.code === 'too_small' && issue.origin === 'number') return issue.inclusive ? `Enter ${String(issue.minimum)} or more` : `Enter a number above ${String(issue.minimum)}`;
  if (issue.code === 'too_big' && issue.origin === 'number') return `Enter ${String(issue.maximum)} or less`;
  if (issue.code === 'too_small' && issue.origin === 'string') return 'Fill this in';
  if (issue.code === 'too_big' && issue.origin === 'string') return `Use at most ${String(issue.maximum)} characters`;
  if (issue.code === 'invalid_format' && issue.format === 'email') return 'Enter a valid e-mail';
  if (issue.code === 'invalid_format' && issue.format === 'uuid') return 'Choose one';
  return issue.message;
}

/** Zod issues as `fields`, one per failing issue, keyed by the full path; the whole body is "(body)". */
export function fieldsFromZod(error: z.ZodError): FieldError[] {
  return error.issues.map((issue) => ({ path: issue.path.map(String).join('.') || '(body)', message: readableIssue(issue) }));
}
