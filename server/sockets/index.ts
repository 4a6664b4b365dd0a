import type { AppContext } from '../context.js';
import { createBoardHub } from './board.js';
import { handshakeAuth, registerSessionHandlers, type HoldlineServer } from './auth.js';
import type { BoardPublisher } from './publisher.js';

/** Wires Socket.IO: handshake checks, then the handlers for each connection. Returns a stopper for the ticks. */
export function attachSockets(io: HoldlineServer, context: AppContext, publisher: BoardPublisher): () => void {
  const hub = createBoardHub(context, publisher);
  io.use(handshakeAuth(context));
  io.on('connection', (socket) => {
    registerSessionHandlers(context, socket);
    hub.register(socket);
  });
  return hub.stop;
}
