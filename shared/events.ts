/** Acknowledgment of every client-to-server event: success with data, or a readable refusal. */
export type Ack<T = Record<string, never>> =
  | ({ ok: true } & T)
  | { ok: false; error: { code: string; message: string; fields?: { path: string; message: string }[] } };

/** Events the server sends. */
export interface ServerToClientEvents {
  /** The session behind this socket ended (deactivated, signed out); the socket is closed next. */
  'session:ended': (payload: { reason: string }) => void;
}

/** Events the client sends. */
export interface ClientToServerEvents {
  /** Hands a refreshed access token to a live socket so it keeps its right to send commands. */
  'session:renew': (payload: { token: string }, ack: (answer: Ack<{ expiresAt: string }>) => void) => void;
}

/** Refusal messages of the Socket.IO handshake (Error.message on the client's connect_error). */
export const handshakeErrors = {
  unauthenticated: 'unauthenticated',
  inactive: 'account_inactive',
} as const;
