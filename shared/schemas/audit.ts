import { z } from 'zod';

/** What the sign-in audit records (and every change an administrator makes to people and crews); never a password or a token. */
export const signInAuditKinds = [
  'sign_in',
  'sign_in_failed',
  'sign_in_inactive',
  'sign_out',
  'refresh_refused',
  'refresh_reuse',
  'password_set',
  'deactivated',
  'reactivated',
  // Administrators' changes: an account's details, rights or qualifications; an invitation; a crew.
  'user_changed',
  'user_invited',
  'crew_changed',
] as const;
export const signInAuditKindSchema = z.enum(signInAuditKinds);
export type SignInAuditKind = z.infer<typeof signInAuditKindSchema>;

export const signInAuditEntrySchema = z.object({
  id: z.number(),
  at: z.string(),
  kind: signInAuditKindSchema,
  email: z.string().nullable(),
  userId: z.string().nullable(),
  displayName: z.string().nullable(),
  ip: z.string().nullable(),
  detail: z.string().nullable(),
});
export type SignInAuditEntry = z.infer<typeof signInAuditEntrySchema>;
export const signInAuditListSchema = z.object({ items: z.array(signInAuditEntrySchema) });

/** A message caught by the local fake mail server (demo mode). */
export const inboxMessageSchema = z.object({
  id: z.string(),
  at: z.string(),
  to: z.array(z.string()),
  subject: z.string(),
  text: z.string(),
  /** Files that came with it (the record PDF); older stored messages have none. */
  attachments: z.array(z.object({ filename: z.string(), contentType: z.string(), size: z.number().int() })).default([]),
});
export type InboxMessage = z.infer<typeof inboxMessageSchema>;
export const inboxListSchema = z.object({ items: z.array(inboxMessageSchema) });
