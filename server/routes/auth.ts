import { Router, type Request } from 'express';
import { rateLimit } from 'express-rate-limit';
import { loginRequestSchema, passwordResetRequestSchema, setPasswordSchema } from '../../shared/schemas/auth.js';
import { clearRefreshCookie, readRefreshCookie, setRefreshCookie } from '../auth/cookies.js';
import { findUsableLink } from '../auth/sign-in-links.js';
import { refreshSession, setPasswordFromLink, signIn, signOut } from '../commands/sessions.js';
import { requestPasswordReset } from '../commands/users.js';
import type { AppContext } from '../context.js';
import { HttpError, parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { presentUser } from '../presenters/user.js';
import { sha256Hex } from '../auth/hash.js';

/** Failed sign-ins allowed per e-mail and per address within the window. */
export const SIGN_IN_LIMIT = 10;
export const SIGN_IN_WINDOW_MS = 15 * 60 * 1000;

function limiter(keyOf: ((req: Request) => string) | undefined) {
  return rateLimit({
    windowMs: SIGN_IN_WINDOW_MS,
    limit: SIGN_IN_LIMIT,
    // Only failures count: a crew signing in on shared tablets must never lock itself out.
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    ...(keyOf ? { keyGenerator: keyOf } : {}),
    handler: (_req, _res, next) =>
      next(new HttpError(429, 'rate_limited', 'Too many failed sign-ins. Wait 15 minutes and try again, or reset your password.')),
  });
}

/** Sign-in, refresh, sign-out, the current person, and the e-mailed links. */
export function authRouter(context: AppContext): Router {
  const router = Router();
  const secure = context.config.publicUrl.startsWith('https:');
  const ipOf = (req: Request) => req.ip ?? null;

  // Keyed by e-mail (hashed, so the limiter's memory holds no addresses) and by client address.
  const byEmail = limiter((req) => {
    const email: unknown = (req.body as { email?: unknown } | undefined)?.email;
    return 'email:' + sha256Hex(typeof email === 'string' ? email.trim().toLowerCase() : '');
  });
  const byAddress = limiter(undefined);

  router.post('/auth/login', byAddress, byEmail, async (req, res) => {
    const body = parseOrThrow(loginRequestSchema, req.body, 'sign-in');
    const { session, refresh } = await signIn(context, body.email, body.password, ipOf(req));
    setRefreshCookie(res, refresh, secure);
    res.json(session);
  });

  router.post('/auth/refresh', async (req, res) => {
    try {
      const { session, refresh } = await refreshSession(context, readRefreshCookie(req), ipOf(req));
      setRefreshCookie(res, refresh, secure);
      res.json(session);
    } catch (error) {
      clearRefreshCookie(res, secure);
      throw error;
    }
  });

  router.post('/auth/logout', async (req, res) => {
    await signOut(context, readRefreshCookie(req), ipOf(req));
    clearRefreshCookie(res, secure);
    res.status(204).end();
  });

  router.get('/auth/me', (req, res) => {
    authorize(req.actor ?? null, 'session.read', {}, req.authProblem);
    res.json({ user: presentUser(req.actor!) });
  });

  router.post('/auth/password-reset', byAddress, async (req, res) => {
    const body = parseOrThrow(passwordResetRequestSchema, req.body, 'reset request');
    await requestPasswordReset(context, body.email);
    res.status(202).json({ message: 'If that e-mail belongs to an active account, a reset link is on its way. It works for 1 hour.' });
  });

  router.get('/auth/links/:token', async (req, res) => {
    const { link, user } = await findUsableLink(context.dataSource.manager, req.params.token, context.now());
    res.json({ kind: link.kind, email: user.email, displayName: user.displayName, expiresAt: link.expiresAt });
  });

  router.post('/auth/set-password', byAddress, async (req, res) => {
    const body = parseOrThrow(setPasswordSchema, req.body, 'new password');
    const { session, refresh } = await setPasswordFromLink(context, body.token, body.password, ipOf(req));
    setRefreshCookie(res, refresh, secure);
    res.json(session);
  });

  return router;
}
