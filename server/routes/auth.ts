import { Router, type Request, type Response } from 'express';
import { rateLimit } from 'express-rate-limit';
import { loginRequestSchema, passwordResetRequestSchema, setPasswordSchema } from '../../shared/schemas/auth.js';
import { verifyAccessToken } from '../auth/access-token.js';
import { clearRefreshCookie, readRefreshCookie, setRefreshCookie } from '../auth/cookies.js';
import { findUsableLink } from '../auth/sign-in-links.js';
import { ResetLimiter, SignInThrottle } from '../auth/throttle.js';
import { refreshSession, setPasswordFromLink, signIn, signOut } from '../commands/sessions.js';
import { requestPasswordReset } from '../commands/users.js';
import type { AppContext } from '../context.js';
import { HttpError, parseOrThrow } from '../errors.js';
import { authorize } from '../policies/index.js';
import { presentUser } from '../presenters/user.js';

/** Failed password settings allowed per address within the window (link tokens are 256 bits: this only stops noise). */
export const SET_PASSWORD_LIMIT = 10;
export const SET_PASSWORD_WINDOW_MS = 15 * 60 * 1000;

/** The one answer to a reset request, whether or not an e-mail went out. */
export const RESET_ANSWER = 'If that e-mail belongs to an active account, a reset link is on its way. It works for 1 hour.';

/** A wait in words: "12 seconds", "1 minute", "15 minutes". */
export function waitWords(ms: number): string {
  const seconds = Math.max(1, Math.ceil(ms / 1000));
  if (seconds < 60) return seconds === 1 ? '1 second' : `${seconds} seconds`;
  const minutes = Math.ceil(seconds / 60);
  return minutes === 1 ? '1 minute' : `${minutes} minutes`;
}

/** 429 with Retry-After (whole seconds, rounded up) and a sentence saying how long to wait. */
function tooManyFailures(res: Response, waitMs: number): HttpError {
  res.set('Retry-After', String(Math.max(1, Math.ceil(waitMs / 1000))));
  return new HttpError(429, 'rate_limited', `Too many failed sign-ins for this account from here. Wait ${waitWords(waitMs)} and try again, or reset your password.`);
}

/** Sign-in, refresh, sign-out, the current person, and the e-mailed links. */
export function authRouter(context: AppContext): Router {
  const router = Router();
  // Secure cookies when the public address is https, or when the request came through an https proxy we trust.
  const secureFor = (req: Request) => context.config.publicUrl.startsWith('https:') || req.secure;
  const ipOf = (req: Request) => req.ip ?? null;
  const throttle = new SignInThrottle();
  const resets = new ResetLimiter();
  const setPasswordLimit = rateLimit({
    windowMs: SET_PASSWORD_WINDOW_MS,
    limit: SET_PASSWORD_LIMIT,
    skipSuccessfulRequests: true,
    standardHeaders: 'draft-7',
    legacyHeaders: false,
    handler: (_req, _res, next) => next(new HttpError(429, 'rate_limited', 'Too many tries with links that do not work. Wait 15 minutes and try again.')),
  });

  router.post('/auth/login', async (req, res) => {
    const body = parseOrThrow(loginRequestSchema, req.body, 'sign-in');
    const address = ipOf(req) ?? 'unknown';
    const now = context.now();
    const waitMs = throttle.waitMs(body.email, address, now);
    if (waitMs > 0) throw tooManyFailures(res, waitMs);
    const attempt = throttle.begin(body.email, address, now);
    try {
      const { session, refresh } = await signIn(context, body.email, body.password, ipOf(req));
      attempt.succeeded();
      setRefreshCookie(res, refresh, secureFor(req));
      res.json(session);
    } catch (error) {
      // Only a wrong e-mail or password stays counted.
      if (!(error instanceof HttpError && error.code === 'bad_credentials')) attempt.withdrawn();
      throw error;
    }
  });

  router.post('/auth/refresh', async (req, res) => {
    try {
      const { session, refresh } = await refreshSession(context, readRefreshCookie(req), ipOf(req));
      setRefreshCookie(res, refresh, secureFor(req));
      res.json(session);
    } catch (error) {
      clearRefreshCookie(res, secureFor(req));
      throw error;
    }
  });

  router.post('/auth/logout', async (req, res) => {
    // The access token alone signs out too: the session it names ends (a revoked refresh row, checked on every use).
    const bearer = /^Bearer (.+)$/.exec(req.get('authorization') ?? '');
    const access = bearer ? verifyAccessToken(bearer[1], context.secret, context.now()) : null;
    await signOut(context, { refreshToken: readRefreshCookie(req), access }, ipOf(req));
    clearRefreshCookie(res, secureFor(req));
    res.status(204).end();
  });

  router.get('/auth/me', (req, res) => {
    authorize(req.actor ?? null, 'session.read', {}, req.authProblem);
    res.json({ user: presentUser(req.actor!) });
  });

  router.post('/auth/password-reset', async (req, res) => {
    const body = parseOrThrow(passwordResetRequestSchema, req.body, 'reset request');
    // Over the limit for the account or the address, nothing is sent and the answer is the same.
    // Only an e-mail that goes out counts against the account (see ResetLimiter).
    const ticket = resets.allow(body.email, ipOf(req) ?? 'unknown', context.now());
    if (ticket && !(await requestPasswordReset(context, body.email))) ticket.notSent();
    res.status(202).json({ message: RESET_ANSWER });
  });

  router.get('/auth/links/:token', async (req, res) => {
    const { link, user } = await findUsableLink(context.dataSource.manager, req.params.token, context.now());
    res.json({ kind: link.kind, email: user.email, displayName: user.displayName, expiresAt: link.expiresAt });
  });

  router.post('/auth/set-password', setPasswordLimit, async (req, res) => {
    const body = parseOrThrow(setPasswordSchema, req.body, 'new password');
    const { session, refresh } = await setPasswordFromLink(context, body.token, body.password, ipOf(req));
    setRefreshCookie(res, refresh, secureFor(req));
    res.json(session);
  });

  return router;
}
