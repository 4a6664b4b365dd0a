import { io, type Socket } from 'socket.io-client';
import type { ClientToServerEvents, ServerToClientEvents } from '../../shared/events/socket';

export type HoldlineSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

let socket: HoldlineSocket | null = null;
let tokenOf: () => string | null = () => null;

/**
 * The one Socket.IO connection of this tab. `auth` is a function, so every (re)connection
 * handshakes with the freshest access token the session store holds.
 */
export function connectSocket(getToken: () => string | null): HoldlineSocket {
  tokenOf = getToken;
  if (socket) return socket;
  socket = io({
    autoConnect: true,
    transports: ['websocket'],
    reconnectionDelay: 500,
    reconnectionDelayMax: 3_000,
    // A site network can swallow a connection attempt without refusing it: give up and retry soon.
    timeout: 5_000,
    auth: (cb) => cb({ token: tokenOf() }),
  });
  return socket;
}

/** Hands a refreshed token to the live connection so it keeps its right to send commands. */
export function renewSocketToken(token: string): void {
  if (!socket?.connected) return;
  socket.emit('session:renew', { token }, (answer) => {
    // A refused renewal means the session is no longer valid for this connection: reconnect with the new handshake.
    if (!answer.ok) socket?.disconnect().connect();
  });
}

/** Closes the connection (sign-out). */
export function disconnectSocket(): void {
  socket?.disconnect();
  socket = null;
}
