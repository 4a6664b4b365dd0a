import { z } from 'zod';
import { userSchema } from './users.js';

export const MIN_PASSWORD_LENGTH = 10;

/** Body of POST /api/auth/login. */
export const loginRequestSchema = z.object({
  email: z.string().trim().min(1, 'Enter your e-mail').max(254).pipe(z.email('Enter a valid e-mail')),
  password: z.string().min(1, 'Enter your password').max(200),
});

/** Answer of sign-in, refresh and set-password: a short-lived access token. */
export const sessionSchema = z.object({
  token: z.string(),
  /** ISO time at which the access token expires. */
  expiresAt: z.string(),
  user: userSchema,
  /** The server's IANA time zone: a new job's default site zone, and the zone of times that belong to no job. */
  timeZone: z.string(),
});
export type SessionDto = z.infer<typeof sessionSchema>;

/** A new password, with the only rule the product has: length. */
export const passwordSchema = z
  .string()
  .min(MIN_PASSWORD_LENGTH, `Use at least ${MIN_PASSWORD_LENGTH} characters`)
  .max(200, 'Use at most 200 characters');

/** Body of POST /api/auth/password-reset. */
export const passwordResetRequestSchema = z.object({
  email: z.string().trim().min(1, 'Enter your e-mail').max(254).pipe(z.email('Enter a valid e-mail')),
});

/** Body of POST /api/auth/set-password (from an invitation or reset link). */
export const setPasswordSchema = z.object({
  token: z.string().min(10).max(200),
  password: passwordSchema,
});

/** Answer of GET /api/auth/links/:token: what the link is for, before the person types. */
export const linkInfoSchema = z.object({
  kind: z.enum(['invitation', 'reset']),
  email: z.string(),
  displayName: z.string(),
  expiresAt: z.string(),
});
export type LinkInfo = z.infer<typeof linkInfoSchema>;

