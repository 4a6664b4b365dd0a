import { randomUUID } from 'node:crypto';
import SocketMock from 'socket.io-mock';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { CommandAnswer, JoinAnswer } from '../../../shared/events/socket.js';
import { User } from '../../../server/entities/User.js';
import type { HoldlineServer, HoldlineSocket } from '../../../server/sockets/auth.js';
import { createBoardHub } from '../../../server/sockets/board.js';
import { BoardPublisher } from '../../../server/sockets/publisher.js';
import { sessionIdOf, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * The board's socket handlers driven through a mocked socket, without a network: validation and
 * policy refusals answer in the acknowledgment and change nothing.
 */
describe('board socket handlers (socket.io-mock)', () => {
  let server: TestServer;
  let rigger: SignedInUser;
  let hub: ReturnType<typeof createBoardHub>;
  const broadcasts: unknown[] = [];
  const fakeIo = { to: () => ({ emit: (...args: unknown[]) => broadcasts.push(args) }) } as unknown as HoldlineServer;

  function mockSocketFor(who: SignedInUser, tokenExp = Math.floor(Date.now() / 1000) + 600) {
    const socket = new SocketMock() as unknown as HoldlineSocket & { socketClient: { emit(event: string, payload: unknown, ack: (answer: unknown) => void): void } };
    (socket as unknown as { data: unknown }).data = { userId: who.user.id, sessionId: sessionIdOf(who.token), tokenExp };
    (socket as unknown as { id: string }).id = randomUUID();
    hub.register(socket);
    return socket;
  }
  const send = <T>(socket: ReturnType<typeof mockSocketFor>, event: string, payload: unknown) =>
    new Promise<T>((resolve) => socket.socketClient.emit(event, payload, (answer: unknown) => resolve(answer as T)));

  beforeAll(async () => {
    server = await startTestServer();
    rigger = await signedInUser(server, { qualifications: ['rigger'] });
    hub = createBoardHub(server.context, new BoardPublisher(fakeIo));
  });
  afterAll(async () => {
    hub.stop();
    await server.stop();
  });

  it('refuses a malformed command with every failing field', async () => {
    const socket = mockSocketFor(rigger);
    const answer = await send<CommandAnswer>(socket, 'board:command', { jobId: 'nope', command: { type: 'hold.acknowledge', commandId: 'x' } });
    expect(answer.ok).toBe(false);
    if (!answer.ok) {
      expect(answer.error.code).toBe('validation');
      expect(answer.error.fields?.map((f) => f.path).sort()).toEqual(['command.commandId', 'command.holdId', 'command.role', 'jobId']);
    }
  });

  it('refuses an unknown command type', async () => {
    const socket = mockSocketFor(rigger);
    const answer = await send<CommandAnswer>(socket, 'board:command', { jobId: randomUUID(), command: { type: 'crane.raise', commandId: randomUUID() } });
    expect(answer).toMatchObject({ ok: false, error: { code: 'validation' } });
  });

  it('refuses commands once the access token has expired', async () => {
    const socket = mockSocketFor(rigger, Math.floor(Date.now() / 1000) - 1);
    const answer = await send<CommandAnswer>(socket, 'board:command', { jobId: randomUUID(), command: { type: 'job.stop', commandId: randomUUID(), pressedAt: new Date().toISOString() } });
    expect(answer).toMatchObject({ ok: false, error: { code: 'token_expired' } });
  });

  it('answers a command on an unknown job with not found, and a join on it too', async () => {
    const socket = mockSocketFor(rigger);
    const answer = await send<CommandAnswer>(socket, 'board:command', { jobId: randomUUID(), command: { type: 'job.stop', commandId: randomUUID(), pressedAt: new Date().toISOString() } });
    expect(answer).toMatchObject({ ok: false, error: { code: 'not_found' } });
    const join = await send<JoinAnswer>(socket, 'board:join', { jobId: randomUUID() });
    expect(join).toMatchObject({ ok: false, error: { code: 'not_found' } });
    const badJoin = await send<JoinAnswer>(socket, 'board:join', { jobId: 42 });
    expect(badJoin).toMatchObject({ ok: false, error: { code: 'validation' } });
    expect(broadcasts).toEqual([]);
  });

  it('words a schema failure as the client does, not in zod’s own words', async () => {
    const socket = mockSocketFor(rigger);
    const answer = await send<JoinAnswer>(socket, 'board:join', { jobId: 'nope' });
    // The form's wording for an id that is not one (shared/schemas/errors.ts), where zod itself says "Invalid UUID".
    expect(answer).toMatchObject({ ok: false, error: { code: 'validation', fields: [{ path: 'jobId', message: 'Choose one' }] } });
  });

  it('answers a person deactivated while connected as HTTP does, on every handler', async () => {
    const person = await signedInUser(server, { qualifications: ['rigger'] });
    const socket = mockSocketFor(person);
    await server.context.queue.transaction((m) => m.update(User, { id: person.user.id }, { active: false }));
    const http = await request(server.app).get('/api/auth/me').set('Authorization', `Bearer ${person.token}`).expect(401);
    expect(http.body.error.code).toBe('account_inactive');
    const command = await send<CommandAnswer>(socket, 'board:command', { jobId: randomUUID(), command: { type: 'job.stop', commandId: randomUUID(), pressedAt: new Date().toISOString() } });
    const join = await send<JoinAnswer>(socket, 'board:join', { jobId: randomUUID() });
    const follow = await send<unknown>(socket, 'jobs:follow', { jobIds: [randomUUID()] });
    for (const answer of [command, join, follow]) expect(answer).toEqual({ ok: false, error: http.body.error });
  });
});
