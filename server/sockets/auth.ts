import type { Server, Socket } from 'socket.io';
import { handshakeErrors, type ClientToServerEvents, type ServerToClientEvents } from '../../shared/events/socket.js';
import { verifyAccessToken } from '../auth/access-token.js';
import { sessionLive } from '../auth/refresh-tokens.js';
import type { AppContext } from '../context.js';
import { userById } from '../queries/users.js';
import { accountInactive, HttpError, refusalOf, sessionEnded } from '../errors.js';
import { can } from '../policies/index.js';

export interface SocketData {
  userId: string;
  /** The sign-in (refresh-token family) the socket's token belongs to; signing out there closes the socket. */
  sessionId: string;
  /** Expiry of the access token the socket holds, seconds since the epoch. */
  tokenExp: number;
}

export type HoldlineServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
export type HoldlineSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** The room every socket of one person joins, so deactivation can reach them all. */
export const userRoom = (userId: string) => `user:${userId}`;
/** The room of one sign-in's sockets, so signing out on a device closes exactly them. */
export const sessionRoom = (sessionId: string) => `session:${sessionId}`;

/** How often the server looks for sockets whose access token has lapsed. */
export const EXPIRY_SWEEP_MS = 1000;

class HandshakeError extends Error {
  data: { message: string };
  constructor(code: string, message: string) {
    super(code);
    this.data = { message };
  }
}

/** Refuses a handshake without a valid access token of a live session of an active person. */
export function handshakeAuth(context: AppContext) {
  return async (socket: HoldlineSocket, next: (err?: Error) => void) => {
    const token: unknown = socket.handshake.auth?.token;
    const claims = typeof token === 'string' ? verifyAccessToken(token, context.secret, context.now()) : null;
    if (!claims) return next(new HandshakeError(handshakeErrors.unauthenticated, 'Sign in to connect to the live board.'));
    const user = userById(context.dataSource, claims.userId);
    if (!user || !can(user, 'socket.connect')) return next(new HandshakeError(handshakeErrors.inactive, accountInactive().message));
    socket.data.userId = user.id;
    socket.data.sessionId = claims.sessionId;
    socket.data.tokenExp = claims.exp;
    // Rooms first, then the session's check: a sign-out committed after the check still reaches this socket.
    await socket.join([userRoom(user.id), sessionRoom(claims.sessionId)]);
    if (!(await sessionLive(context.dataSource.manager, claims.sessionId, user.id, context.now()))) {
      return next(new HandshakeError(handshakeErrors.unauthenticated, sessionEnded().message));
    }
    next();
  };
}

/** True while the access token the socket holds is still valid. */
export function socketTokenValid(socket: HoldlineSocket, now: Date): boolean {
  return socket.data.tokenExp * 1000 > now.getTime();
}

/**
 * Checked before every join, follow and command: the socket's token has not lapsed and its
 * session has not ended. On a refusal the socket is closed once the answer has gone out: after
 * a lapse the client refreshes its token and reconnects; after a sign-out it is told why.
 */
export async function checkSocketSession(context: AppContext, socket: HoldlineSocket): Promise<void> {
  if (!socketTokenValid(socket, context.now())) {
    setImmediate(() => socket.disconnect(true));
    throw new HttpError(401, 'token_expired', 'Your session needs renewing before you can act. Reconnecting…');
  }
  if (!(await sessionLive(context.dataSource.manager, socket.data.sessionId, socket.data.userId, context.now()))) {
    // A deactivated person gets the one answer to a deactivated account, as over HTTP.
    const user = userById(context.dataSource, socket.data.userId);
    const ended = user?.active ? sessionEnded() : accountInactive();
    socket.emit('session:ended', { reason: ended.message });
    setImmediate(() => socket.disconnect(true));
    throw ended;
  }
}

/**
 * Closes every socket whose access token has lapsed and was not renewed, so nobody keeps
 * receiving a board on a token that ended. The client refreshes and reconnects by itself
 * (src/services/socket.ts). Reads the app's clock, so tests can move it. Returns a stopper.
 */
export function watchTokenExpiry(io: HoldlineServer, context: AppContext): () => void {
  const timer = setInterval(() => {
    const now = context.now();
    for (const socket of io.of('/').sockets.values()) {
      if (!socketTokenValid(socket, now)) socket.disconnect(true);
    }
  }, EXPIRY_SWEEP_MS);
  timer.unref();
  return () => clearInterval(timer);
}

/** `session:renew`: a fresh token of the same session extends the socket's right to act. */
export function registerSessionHandlers(context: AppContext, socket: HoldlineSocket): void {
  socket.on('session:renew', async (payload, ack) => {
    if (typeof ack !== 'function') return;
    try {
      const token = typeof payload?.token === 'string' ? payload.token : '';
      const claims = verifyAccessToken(token, context.secret, context.now());
      // Another sign-in's token is refused: the client reconnects with a new handshake, which joins that session's room.
      if (!claims || claims.userId !== socket.data.userId || claims.sessionId !== socket.data.sessionId) {
        throw new HttpError(401, 'token_invalid', 'That session token is not valid for this connection.');
      }
      const user = userById(context.dataSource, claims.userId);
      // The same row as the handshake: a person deactivated since connecting is let go.
      if (!user || !can(user, 'socket.connect')) {
        ack(refusalOf(accountInactive(), context.logger, { event: 'session:renew' }));
        socket.disconnect(true);
        return;
      }
      if (!(await sessionLive(context.dataSource.manager, claims.sessionId, user.id, context.now()))) {
        ack(refusalOf(sessionEnded(), context.logger, { event: 'session:renew' }));
        socket.disconnect(true);
        return;
      }
      socket.data.tokenExp = claims.exp;
      ack({ ok: true, expiresAt: new Date(claims.exp * 1000).toISOString() });
    } catch (error) {
      ack(refusalOf(error, context.logger, { event: 'session:renew', userId: socket.data.userId }));
    }
  });
}
