import request from 'supertest';
import type { BoardSnapshot } from '../../shared/board/types.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, type LaunchedBrowser } from './browser.js';

/** The demo's live job, waiting at a hold: the board the browser tests of the board views work on. */
export const LIVE_JOB = 'Transformer T2 lift: boom erection';

export interface LiveDemo {
  server: TestServer;
  chromium: LaunchedBrowser;
  jobId: string;
  /** A supervisor's bearer token, for reading and setting up the job over the API. */
  supervisorToken: string;
}

/**
 * A test server with the built client and the demo seeded (the test server forces HOLDLINE_DEMO
 * off, and the demo is seeded by server/index.ts, not the app), a browser, and the live job.
 */
export async function startLiveDemo(): Promise<LiveDemo> {
  const server = await startTestServer({ withClient: true });
  await seedDemoIfEmpty(server.context);
  const chromium = await launchBrowser();
  const login = await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200);
  const supervisorToken = login.body.token as string;
  const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${supervisorToken}` }).expect(200);
  const jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === LIVE_JOB)!.id;
  return { server, chromium, jobId, supervisorToken };
}

/** The live job's board as the supervisor reads it now. */
export async function boardOf(demo: LiveDemo): Promise<BoardSnapshot> {
  return (await request(demo.server.app).get(`/api/jobs/${demo.jobId}/board`).set({ Authorization: `Bearer ${demo.supervisorToken}` }).expect(200)).body as BoardSnapshot;
}
