import type { AppContext } from '../context.js';
import { createBoardHub } from './board.js';
import { handshakeAuth, registerSessionHandlers, watchTokenExpiry, type HoldlineServer } from './auth.js';
import { guardSocketInput } from './limits.js';
import type { BoardPublisher } from './publisher.js';

/** Wires Socket.IO: handshake checks, then the handlers for each connection. Returns a stopper for the ticks. */
export function attachSockets(io: HoldlineServer, context: AppContext, publisher: BoardPublisher): () => void {
  const hub = createBoardHub(context, publisher);
  io.use(handshakeAuth(context));
  io.on('connection', (socket) => {
    // First: the rate and the payload's cleaning apply to every message of every handler below.
    guardSocketInput(context, socket);
    registerSessionHandlers(context, socket);
    hub.register(socket);
  });
  const stopExpiry = watchTokenExpiry(io, context);
  return () => {
    hub.stop();
    stopExpiry();
  };
}
