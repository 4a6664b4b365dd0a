declare module 'socket.io-mock' {
  /** A server-side socket double; `socketClient.emit` calls the server's handlers. */
  export default class SocketMock {
    socketClient: { emit(event: string, ...args: unknown[]): void };
    on(event: string, handler: (...args: unknown[]) => void): this;
    emit(event: string, payload?: unknown): void;
    join(room: string): void;
    leave(room: string): void;
  }
}
