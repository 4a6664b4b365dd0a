import type { EntityManager } from 'typeorm';
import type { SessionDto } from '../../shared/schemas/auth.js';
import { signAccessToken, type AccessClaims } from '../auth/access-token.js';
import { hashPassword, verifyPassword } from '../auth/passwords.js';
import { issueRefreshToken, revokeByToken, revokeOthersForUser, revokeSession, rotateRefreshToken, type IssuedRefresh } from '../auth/refresh-tokens.js';
import { findUsableLink } from '../auth/sign-in-links.js';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
import { accountInactive, HttpError, sessionEnded } from '../errors.js';
import { presentUser } from '../presenters/user.js';
import { recordSignInAudit } from './audit.js';

export interface SignedIn {
  session: SessionDto;
  refresh: IssuedRefresh;
}

const badCredentials = () => new HttpError(401, 'bad_credentials', 'That e-mail and password do not match an account. Check both and try again.');
const refreshRefused = sessionEnded;

/** What a signed-out socket is told before it is closed. */
export const SIGNED_OUT_REASON = 'You signed out on this device. Sign in again to continue.';

function sessionFor(context: AppContext, user: User, refresh: IssuedRefresh, now: Date): SessionDto {
  const { token, expiresAt } = signAccessToken({ userId: user.id, sessionId: refresh.sessionId }, context.secret, now);
  return { token, expiresAt, user: presentUser(user), timeZone: context.config.timeZone };
}

/** Checks a password and starts a session; a wrong e-mail and a wrong password look the same. */
export async function signIn(context: AppContext, email: string, password: string, ip: string | null): Promise<SignedIn> {
  const normalized = email.trim().toLowerCase();
  // Read and compare outside the write queue: bcrypt is slow and must not hold up board commands.
  const user = await context.dataSource.manager.findOneBy(User, { email: normalized });
  const matches = await verifyPassword(password, user?.passwordHash ?? null);
  const now = context.now();
  const outcome = await context.queue.transaction(async (manager): Promise<{ error: HttpError } | { signedIn: SignedIn }> => {
    if (!user || !matches) {
      await recordSignInAudit(manager, { kind: 'sign_in_failed', email: normalized, userId: user?.id, ip }, now);
      return { error: badCredentials() };
    }
    if (!user.active) {
      await recordSignInAudit(manager, { kind: 'sign_in_inactive', email: normalized, userId: user.id, ip }, now);
      return { error: accountInactive() };
    }
    await recordSignInAudit(manager, { kind: 'sign_in', email: normalized, userId: user.id, ip }, now);
    const refresh = await issueRefreshToken(manager, user.id, now);
    return { signedIn: { session: sessionFor(context, user, refresh, now), refresh } };
  });
  // Refusals are answered after the commit so that their audit line is kept.
  if ('error' in outcome) throw outcome.error;
  return outcome.signedIn;
}

/** Rotates a refresh token into a new session; refusals are audited. */
export async function refreshSession(context: AppContext, token: string | undefined, ip: string | null): Promise<SignedIn> {
  const now = context.now();
  const outcome = await context.queue.transaction(async (manager): Promise<{ error: HttpError } | { signedIn: SignedIn }> => {
    if (!token) return { error: refreshRefused() };
    const rotated = await rotateRefreshToken(manager, token, context.secret, now);
    if (!rotated.ok) {
      const kind = rotated.reason === 'reused' ? 'refresh_reuse' : 'refresh_refused';
      await recordSignInAudit(manager, { kind, userId: rotated.userId, ip, detail: rotated.reason }, now);
      return { error: refreshRefused() };
    }
    const user = await manager.findOneBy(User, { id: rotated.issued.userId });
    if (!user || !user.active) {
      await recordSignInAudit(manager, { kind: 'refresh_refused', userId: rotated.issued.userId, ip, detail: 'inactive' }, now);
      return { error: refreshRefused() };
    }
    return { signedIn: { session: sessionFor(context, user, rotated.issued, now), refresh: rotated.issued } };
  });
  if ('error' in outcome) throw outcome.error;
  return outcome.signedIn;
}

/**
 * Ends the session the refresh token belongs to, and the one the access token names (a client
 * that signs out with only its access token, no cookie): their refresh tokens at once, their
 * access tokens on their next use (each names its session), and their open sockets now, told why.
 * The access token must be valid (signed by us, not expired); it can only end its own session.
 */
export async function signOut(context: AppContext, presented: { refreshToken?: string; access?: AccessClaims | null }, ip: string | null): Promise<void> {
  const { refreshToken, access } = presented;
  if (!refreshToken && !access) return;
  const now = context.now();
  const ended = await context.queue.transaction(async (manager) => {
    const sessions: { userId: string; sessionId: string }[] = [];
    const byCookie = refreshToken ? await revokeByToken(manager, refreshToken, now) : null;
    if (byCookie) sessions.push(byCookie);
    const byAccess = access ? await revokeSession(manager, access.sessionId, access.userId, now) : null;
    if (byAccess && byAccess.sessionId !== byCookie?.sessionId) sessions.push(byAccess);
    for (const session of sessions) await recordSignInAudit(manager, { kind: 'sign_out', userId: session.userId, ip }, now);
    return sessions;
  });
  // After the commit, as every broadcast: a socket is never told of a sign-out that did not happen.
  for (const session of ended) context.publisher.endSession(session.sessionId, SIGNED_OUT_REASON);
}

/**
 * Sets a password from an invitation or reset link, uses the link up and signs the person in.
 * Every other session of the person ends: whoever knew the old password is signed out.
 */
export async function setPasswordFromLink(context: AppContext, token: string, password: string, ip: string | null): Promise<SignedIn> {
  const passwordHash = await hashPassword(password);
  const now = context.now();
  const signedIn = await context.queue.transaction(async (manager: EntityManager) => {
    const { link, user } = await findUsableLink(manager, token, now);
    await manager.update(User, { id: user.id }, { passwordHash, updatedAt: now.toISOString() });
    link.usedAt = now.toISOString();
    await manager.save(link);
    await recordSignInAudit(manager, { kind: 'password_set', email: user.email, userId: user.id, ip, detail: link.kind }, now);
    user.passwordHash = passwordHash;
    const refresh = await issueRefreshToken(manager, user.id, now);
    await revokeOthersForUser(manager, user.id, refresh.sessionId, now);
    return { session: sessionFor(context, user, refresh, now), refresh };
  });
  context.publisher.endSessionsExcept(signedIn.refresh.userId, signedIn.refresh.sessionId, 'Your password was changed. Sign in again with the new password.');
  return signedIn;
}
