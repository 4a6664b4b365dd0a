import type { RequestHandler } from 'express';
import { verifyAccessToken } from '../auth/access-token.js';
import { sessionLive } from '../auth/refresh-tokens.js';
import type { AppContext } from '../context.js';
import type { User } from '../entities/User.js';
import { userById } from '../queries/users.js';
import { accountInactive, HttpError, sessionEnded } from '../errors.js';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    interface Request {
      /** The signed-in person, loaded fresh on every request so deactivation applies at once. */
      actor?: User | null;
      /** Why a presented token was not accepted, for the 401 answer. */
      authProblem?: HttpError;
    }
  }
}

/** Reads `Authorization: Bearer`, never refuses by itself: the policy decides per route. */
export function authenticate(context: AppContext): RequestHandler {
  return async (req, _res, next) => {
    req.actor = null;
    const header = req.get('authorization');
    if (!header) return next();
    const match = /^Bearer (.+)$/.exec(header);
    const claims = match ? verifyAccessToken(match[1], context.secret, context.now()) : null;
    if (!claims) {
      req.authProblem = new HttpError(401, 'token_invalid', 'Your session has expired or is not valid. Sign in again.');
      return next();
    }
    const user = userById(context.dataSource, claims.userId);
    if (!user || !user.active) {
      req.authProblem = accountInactive();
      return next();
    }
    // The token's session must still be live: signed out or deactivated ends it now, not at its expiry.
    if (!(await sessionLive(context.dataSource.manager, claims.sessionId, user.id, context.now()))) {
      req.authProblem = sessionEnded();
      return next();
    }
    req.actor = user;
    next();
  };
}
