import type { Server } from 'socket.io';
import type { AppContext } from '../context.js';

/** Wires Socket.IO: handshake checks, then the handlers for each connection. */
export function attachSockets(io: Server, context: AppContext): void {
  io.on('connection', (socket) => {
    context.logger.debug({ socketId: socket.id }, 'socket connected');
  });
}
