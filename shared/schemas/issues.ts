/**
 * Turns a zod error into a flat list the server can return and a screen can show beside the
 * field: `{ path: 'arrangements.3.sectionTypeIds.1', message }`.
 */
import type { z } from 'zod';

/** One schema problem with its dotted path ('' for the root). */
export interface SchemaIssue {
  path: string;
  message: string;
}

/** Lists each issue of a zod error with its path joined by dots. */
export function formatSchemaIssues(error: z.ZodError): SchemaIssue[] {
  return error.issues.map((issue) => ({
    path: issue.path.map((segment) => (typeof segment === 'symbol' ? segment.toString() : String(segment))).join('.'),
    message: issue.message,
  }));
}
