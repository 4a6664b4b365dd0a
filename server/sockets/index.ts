import type { AppContext } from '../context.js';
import { attachBoard } from './board.js';
import { endSessions, handshakeAuth, registerSessionHandlers, type HoldlineServer } from './auth.js';

/** Wires Socket.IO: handshake checks, then the handlers for each connection. Returns a stopper for the ticks. */
export function attachSockets(io: HoldlineServer, context: AppContext): () => void {
  context.realtime.endSessions = (userId, reason) => endSessions(io, userId, reason);
  io.use(handshakeAuth(context));
  io.on('connection', (socket) => {
    registerSessionHandlers(context, socket);
  });
  return attachBoard(io, context);
}
