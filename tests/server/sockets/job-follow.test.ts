import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { JobSummaryUpdate } from '../../../shared/events/socket.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { BoardClient, signedInCrew } from '../../helpers/board.js';
import { seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob, type Crew } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/** A list page follows the jobs it shows: each change reaches it without opening the board, and only for jobs the person may read. */
describe('following job list lines live', () => {
  let server: TestServer;
  let crew: Crew;
  let outsider: SignedInUser;
  let unitId: string;
  const clients: BoardClient[] = [];
  const follower = async (who: SignedInUser) => {
    const c = new BoardClient(server.url, who.token);
    clients.push(c);
    await c.connected();
    const summaries: JobSummaryUpdate[] = [];
    c.socket.on('jobs:summary', (s) => summaries.push(s));
    return { c, summaries };
  };

  beforeAll(async () => {
    server = await startTestServer();
    crew = await signedInCrew(server);
    outsider = await signedInUser(server, { qualifications: ['rigger'] });
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    unitId = (await seedModelAndUnit(server, admin.token)).unit.id;
  });
  afterAll(async () => {
    for (const c of clients) c.close();
    await server.stop();
  });

  it('a crew member following the list sees a change made by someone else; a person outside the crew follows nothing', async () => {
    const job = await plannedJob(server, crew, unitId, 'Followed job');
    const rigger = await follower(crew.rigger);
    const stranger = await follower(outsider);
    expect(await rigger.c.socket.emitWithAck('jobs:follow', { jobIds: [job.id] })).toEqual({ ok: true, following: [job.id] });
    expect(await stranger.c.socket.emitWithAck('jobs:follow', { jobIds: [job.id] })).toEqual({ ok: true, following: [] });

    await request(server.app).patch(`/api/jobs/${job.id}`).set({ Authorization: `Bearer ${crew.supervisor.token}` }).send({ name: 'Followed job, renamed' }).expect(200);
    const until = Date.now() + 5000;
    while (!rigger.summaries.length && Date.now() < until) await new Promise((r) => setTimeout(r, 10));
    expect(rigger.summaries.at(-1)).toMatchObject({ jobId: job.id, name: 'Followed job, renamed', state: 'planning' });
    expect(rigger.summaries.at(-1)!.lastSeq).toBeGreaterThan(job.lastSeq);
    expect(stranger.summaries).toEqual([]);
  });

  it('refuses a malformed list with a message, and a list too long', async () => {
    const { c } = await follower(crew.rigger);
    expect(await c.socket.emitWithAck('jobs:follow', { jobIds: ['not-a-uuid'] })).toMatchObject({ ok: false, error: { code: 'validation' } });
    const tooMany = Array.from({ length: 201 }, () => crypto.randomUUID());
    expect(await c.socket.emitWithAck('jobs:follow', { jobIds: tooMany })).toMatchObject({ ok: false, error: { code: 'validation' } });
  });
});
