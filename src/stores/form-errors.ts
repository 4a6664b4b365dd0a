import type { FieldError } from '../../shared/schemas/errors';

/**
 * The one way every store keeps a form's field errors: keyed by the full path the server names
 * ("heaviestLoad.radiusM", "photoIds.0"), read through `fieldErrorOf`, so a control finds the
 * message for itself or for anything under it, whichever side (device or server) refused.
 */

/** Field errors keyed by the full path; the first message per path is kept. */
export type FieldErrors = Partial<Record<string, string>>;

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
