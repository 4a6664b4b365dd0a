import { io, type Socket } from 'socket.io-client';
import { handshakeErrors, type ClientToServerEvents, type ServerToClientEvents } from '../../shared/events/socket';

export type HoldlineSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/** What the session store lends the socket: a refresh, and what to do when the server ends the session. */
export interface SocketSession {
  /** Exchanges the refresh cookie for a new access token; true when one is available. */
  refresh(): Promise<boolean>;
  /** The server ended this sign-in (signed out on this device, deactivated): sign out here too. */
  ended(reason: string): void;
}

let socket: HoldlineSocket | null = null;
let tokenOf: () => string | null = () => null;
let session: SocketSession | null = null;
/** Set when the server said the session ended: no reconnection follows. */
let endedByServer = false;
/** When the last refresh-and-reconnect began, and the shortest gap between two. */
let lastRetryAt = 0;
const RETRY_GAP_MS = 3_000;

/** The session store registers itself here, as it does with the API client. */
export function setSocketSession(source: SocketSession): void {
  session = source;
}

/**
 * After the server closed the connection itself (the access token lapsed, another session's token)
 * or refused the handshake's token: refresh, then connect again with the new token. Socket.IO does
 * not reconnect by itself after either. A refused refresh signs the person out (the session store).
 */
async function refreshAndReconnect(s: HoldlineSocket): Promise<void> {
  if (endedByServer || !session || socket !== s) return;
  // At most one try every few seconds, so a refusal that keeps coming cannot spin.
  const wait = lastRetryAt + RETRY_GAP_MS - Date.now();
  lastRetryAt = Math.max(Date.now(), lastRetryAt + RETRY_GAP_MS);
  if (wait > 0) await new Promise((resolve) => setTimeout(resolve, wait));
  if (endedByServer || socket !== s || s.connected) return;
  const refreshed = await session.refresh();
  if (refreshed && socket === s && !s.connected && !endedByServer) s.connect();
}

/**
 * The one Socket.IO connection of this tab. `auth` is a function, so every (re)connection
 * handshakes with the freshest access token the session store holds.
 */
export function connectSocket(getToken: () => string | null): HoldlineSocket {
  tokenOf = getToken;
  if (socket) return socket;
  endedByServer = false;
  const s: HoldlineSocket = io({
    autoConnect: true,
    transports: ['websocket'],
    reconnectionDelay: 500,
    reconnectionDelayMax: 3_000,
    // A site network can swallow a connection attempt without refusing it: give up and retry soon.
    timeout: 5_000,
    auth: (cb) => cb({ token: tokenOf() }),
  });
  s.on('session:ended', ({ reason }) => {
    endedByServer = true;
    session?.ended(reason);
  });
  s.on('disconnect', (reason) => {
    // 'io server disconnect': the server closed this connection on purpose (its token lapsed).
    if (reason === 'io server disconnect') void refreshAndReconnect(s);
  });
  s.on('connect_error', (error) => {
    // A handshake refused for its token is not retried by Socket.IO: refresh first, then retry once.
    if (!s.active && error.message === handshakeErrors.unauthenticated) void refreshAndReconnect(s);
  });
  socket = s;
  return s;
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
