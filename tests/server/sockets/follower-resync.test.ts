import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BoardFollower } from '../../../shared/board/follower.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import { BoardClient, completeSteps, startedJob, type CrewByRole } from '../../helpers/board.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/** The client's follower against the real server: a dropped connection shows within 3 s and resync is exact. */
describe('the board follower on a real connection', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let jobId: string;

  beforeAll(async () => {
    server = await startTestServer();
    ({ crew, jobId } = await startedJob(server));
  });
  afterAll(() => server.stop());

  function follow(client: BoardClient) {
    const follower = new BoardFollower(jobId, {
      join: (id, afterSeq) => client.join(id, afterSeq),
      fetchEvents: async (id, afterSeq) =>
        jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${id}/events?after=${afterSeq}`).set('Authorization', `Bearer ${crew.operator.token}`)).body).items,
    });
    client.socket.on('board:event', (e) => follower.onEvent(e));
    client.socket.on('board:tick', (t) => follower.onTick(t));
    return follower;
  }

  it('knows within 3 seconds that ticks stopped, and after rejoining holds exactly the server’s board', async () => {
    const client = new BoardClient(server.url, crew.operator.token);
    const follower = follow(client);
    await follower.join();
    await new Promise((r) => setTimeout(r, 1200));
    expect(follower.live).toBe(true);

    const cutAt = Date.now();
    client.socket.disconnect();
    while (follower.live) {
      expect(Date.now() - cutAt).toBeLessThan(3500);
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(Date.now() - cutAt).toBeGreaterThanOrEqual(2000);

    await completeSteps(server, crew, jobId, 'er-ground');
    client.socket.connect();
    await follower.join();
    const { presence: _ignored, ...server_ } = (await request(server.app).get(`/api/jobs/${jobId}/board`).set('Authorization', `Bearer ${crew.operator.token}`)).body;
    const { presence: _mine, ...mine } = follower.board!;
    expect(mine).toEqual(server_);
    client.close();
  });
});
