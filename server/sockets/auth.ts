import type { Server, Socket } from 'socket.io';
import { handshakeErrors, type ClientToServerEvents, type ServerToClientEvents } from '../../shared/events/socket.js';
import { verifyAccessToken } from '../auth/access-token.js';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
import { accountInactive, HttpError, refusalOf } from '../errors.js';
import { can } from '../policies/index.js';

export interface SocketData {
  userId: string;
  /** Expiry of the access token the socket holds, seconds since the epoch. */
  tokenExp: number;
}

export type HoldlineServer = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
export type HoldlineSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** The room every socket of one person joins, so deactivation can reach them all. */
export const userRoom = (userId: string) => `user:${userId}`;

class HandshakeError extends Error {
  data: { message: string };
  constructor(code: string, message: string) {
    super(code);
    this.data = { message };
  }
}

/** Refuses a handshake without a valid access token for an active person. */
export function handshakeAuth(context: AppContext) {
  return async (socket: HoldlineSocket, next: (err?: Error) => void) => {
    const token: unknown = socket.handshake.auth?.token;
    const claims = typeof token === 'string' ? verifyAccessToken(token, context.secret, context.now()) : null;
    if (!claims) return next(new HandshakeError(handshakeErrors.unauthenticated, 'Sign in to connect to the live board.'));
    const user = await context.dataSource.manager.findOneBy(User, { id: claims.userId });
    if (!user || !can(user, 'socket.connect')) return next(new HandshakeError(handshakeErrors.inactive, accountInactive().message));
    socket.data.userId = user.id;
    socket.data.tokenExp = claims.exp;
    await socket.join(userRoom(user.id));
    next();
  };
}

/** True while the access token the socket holds is still valid; commands check this first. */
export function socketTokenValid(socket: HoldlineSocket, now: Date): boolean {
  return socket.data.tokenExp * 1000 > now.getTime();
}

/** `session:renew`: a fresh token for the same person extends the socket's right to act. */
export function registerSessionHandlers(context: AppContext, socket: HoldlineSocket): void {
  socket.on('session:renew', async (payload, ack) => {
    if (typeof ack !== 'function') return;
    try {
      const token = typeof payload?.token === 'string' ? payload.token : '';
      const claims = verifyAccessToken(token, context.secret, context.now());
      if (!claims || claims.userId !== socket.data.userId) throw new HttpError(401, 'token_invalid', 'That session token is not valid for this connection.');
      const user = await context.dataSource.manager.findOneBy(User, { id: claims.userId });
      // The same row as the handshake: a person deactivated since connecting is let go.
      if (!user || !can(user, 'socket.connect')) {
        ack(refusalOf(accountInactive(), context.logger, { event: 'session:renew' }));
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
