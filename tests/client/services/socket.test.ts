import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest';

/**
 * The one Socket.IO client over a faked socket.io-client: after the server closes the connection
 * on purpose (a lapsed token) or refuses the handshake's token, it refreshes and connects again;
 * after the server says the session ended, it signs out and never reconnects.
 */
const fake = vi.hoisted(() => {
  type Handler = (...args: unknown[]) => void;
  const handlers = new Map<string, Handler[]>();
  const socket = {
    connected: false,
    active: false,
    connects: 0,
    on(event: string, handler: Handler) {
      handlers.set(event, [...(handlers.get(event) ?? []), handler]);
      return socket;
    },
    connect() {
      socket.connects += 1;
      return socket;
    },
    disconnect() {
      socket.connected = false;
      return socket;
    },
  };
  return {
    socket,
    deliver(event: string, ...args: unknown[]) {
      for (const handler of handlers.get(event) ?? []) handler(...args);
    },
    reset() {
      handlers.clear();
      socket.connected = false;
      socket.active = false;
      socket.connects = 0;
    },
  };
});

vi.mock('socket.io-client', () => ({ io: () => fake.socket }));

async function freshModule() {
  vi.resetModules();
  fake.reset();
  return import('../../../src/services/socket');
}

/** Lets the promise chains of the handlers run. */
const settle = () => new Promise((resolve) => setTimeout(resolve, 0));

describe('the live connection and the session', () => {
  beforeEach(() => {
    vi.useFakeTimers({ toFake: ['Date'] });
  });
  afterEach(() => {
    vi.useRealTimers();
  });

  it('refreshes and connects again after the server closed the connection for a lapsed token', async () => {
    const { connectSocket, setSocketSession } = await freshModule();
    const refresh = vi.fn(async () => true);
    const ended = vi.fn();
    setSocketSession({ refresh, ended });
    connectSocket(() => 'token');
    fake.deliver('disconnect', 'io server disconnect');
    await settle();
    expect(refresh).toHaveBeenCalledTimes(1);
    expect(fake.socket.connects).toBe(1);
    expect(ended).not.toHaveBeenCalled();
    // A network drop is Socket.IO's own to retry: no refresh for it.
    fake.deliver('disconnect', 'transport close');
    await settle();
    expect(refresh).toHaveBeenCalledTimes(1);
  });

  it('refreshes and tries again once when the handshake is refused for its token, and stays down when the refresh is refused', async () => {
    const { connectSocket, setSocketSession } = await freshModule();
    let answer = true;
    const refresh = vi.fn(async () => answer);
    setSocketSession({ refresh, ended: vi.fn() });
    connectSocket(() => 'old-token');
    fake.deliver('connect_error', new Error('unauthenticated'));
    await settle();
    expect(fake.socket.connects).toBe(1);

    vi.setSystemTime(Date.now() + 10_000);
    answer = false;
    fake.deliver('connect_error', new Error('unauthenticated'));
    await settle();
    expect(refresh).toHaveBeenCalledTimes(2);
    expect(fake.socket.connects).toBe(1);

    // A deactivated account's refusal is not a token to refresh.
    vi.setSystemTime(Date.now() + 10_000);
    fake.deliver('connect_error', new Error('account_inactive'));
    await settle();
    expect(refresh).toHaveBeenCalledTimes(2);
  });

  it('signs out and never reconnects when the server says the session ended', async () => {
    const { connectSocket, setSocketSession } = await freshModule();
    const refresh = vi.fn(async () => true);
    const ended = vi.fn();
    setSocketSession({ refresh, ended });
    connectSocket(() => 'token');
    fake.deliver('session:ended', { reason: 'You signed out on this device. Sign in again to continue.' });
    fake.deliver('disconnect', 'io server disconnect');
    await settle();
    expect(ended).toHaveBeenCalledWith('You signed out on this device. Sign in again to continue.');
    expect(refresh).not.toHaveBeenCalled();
    expect(fake.socket.connects).toBe(0);
  });
});
