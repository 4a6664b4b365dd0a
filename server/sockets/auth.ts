import type { Server, Socket } from 'socket.io';
import { handshakeErrors, type ClientToServerEvents, type ServerToClientEvents } from '../../shared/events.js';
import { verifyAccessToken } from '../auth/access-token.js';
import type { AppContext } from '../context.js';
import { User } from '../entities/User.js';
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
    if (!user || !can(user, 'socket.connect')) return next(new HandshakeError(handshakeErrors.inactive, 'This account is deactivated.'));
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
    const token = typeof payload?.token === 'string' ? payload.token : '';
    const claims = verifyAccessToken(token, context.secret, context.now());
    if (!claims || claims.userId !== socket.data.userId) {
      ack({ ok: false, error: { code: 'token_invalid', message: 'That session token is not valid for this connection.' } });
      return;
    }
    const user = await context.dataSource.manager.findOneBy(User, { id: claims.userId });
    if (!user?.active) {
      ack({ ok: false, error: { code: 'account_inactive', message: 'This account is deactivated.' } });
      socket.disconnect(true);
      return;
    }
    socket.data.tokenExp = claims.exp;
    ack({ ok: true, expiresAt: new Date(claims.exp * 1000).toISOString() });
  });
}

/** Ends every socket of a person with a reason. */
export function endSessions(io: HoldlineServer, userId: string, reason: string): void {
  io.to(userRoom(userId)).emit('session:ended', { reason });
  io.in(userRoom(userId)).disconnectSockets(true);
}
