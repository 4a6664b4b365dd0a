import type { z } from 'zod';
import type { FieldError } from '../../shared/schemas/errors';

/**
 * The one way every store keeps a form's field errors: keyed by the full path the server names
 * ("heaviestLoad.radiusM", "photoIds.0"), read through `fieldErrorOf`, so a control finds the
 * message for itself or for anything under it, whichever side (device or server) refused.
 */

/** Field errors keyed by the full path; the first message per path is kept. */
export type FieldErrors = Partial<Record<string, string>>;

/** Zod's own wording for its generic checks; a message a schema wrote itself never starts like these. */
const GENERIC_MESSAGE = /^(Invalid|Too small|Too big)/;

/** A message for people from a zod issue: the schema's own words, or plain ones for zod's generic checks. */
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

/** Zod issues as the server would name them. */
export function fieldsFromZod(error: z.ZodError): FieldError[] {
  return error.issues.map((i) => ({ path: i.path.map(String).join('.'), message: readableIssue(i) }));
}

/** Field errors by full path, first message per path; a refusal of the whole body sits under "(body)". */
export function fieldErrorsFrom(fields: readonly FieldError[]): FieldErrors {
  const out: FieldErrors = {};
  for (const f of fields) out[f.path || '(body)'] ??= f.message;
  return out;
}

/** The message for a field: its own path, or the first message of anything under it. */
export function fieldErrorOf(errors: FieldErrors, path: string): string {
  const own = errors[path];
  if (own) return own;
  const prefix = `${path}.`;
  for (const [key, message] of Object.entries(errors)) if (key.startsWith(prefix) && message) return message;
  return '';
}

/** The errors without those of one field and anything under it, once the person has changed it. */
export function withoutFieldError(errors: FieldErrors, path: string): FieldErrors {
  const prefix = `${path}.`;
  return Object.fromEntries(Object.entries(errors).filter(([key]) => key !== path && !key.startsWith(prefix)));
}
