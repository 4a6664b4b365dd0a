import type { BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { verifySchema } from '../../shared/schemas/jobs.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';

const LIVE_JOB = 'Transformer T2 lift: boom erection';
const PAST_JOB = 'Depot trial erection, 21 m';

/**
 * The log's hash where people compare it with paper: the job's event log verifies and shows the
 * final hash, checks a hash typed from a printed record, and the board's history shows the head.
 */
describe('the log hash on screen', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let token: string;
  const ids = {} as Record<string, string>;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[] = [];

  async function open(path: string, viewport: { width: number; height: number }): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport });
    contexts.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${path}: ${error.message}`));
    await signInThroughForm(page, `${server.url}${path}`, 'supervisor@holdline.test', DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname === path.split('?')[0]);
    return page;
  }

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    for (const j of jobs.body.items as { id: string; name: string }[]) ids[j.name] = j.id;
  }, 180_000);
  afterEach(async () => {
    for (const context of contexts.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  for (const [label, viewport] of [['390', viewports.phone], ['1280', viewports.desktop]] as const) {
    it(`the event log verifies, shows the final hash and checks a hash from paper (${label} px)`, async () => {
      const jobId = ids[PAST_JOB];
      const answer = verifySchema.parse((await request(server.app).get(`/api/jobs/${jobId}/record/verify`).set({ Authorization: `Bearer ${token}` }).expect(200)).body);
      const page = await open(`/jobs/${jobId}?tab=log`, viewport);
      await page.getByRole('button', { name: 'Verify record' }).click();
      await page.getByText(`Record intact: ${answer.checked} events checked`).waitFor();
      // The hash shows short; a tap shows it whole.
      await page.getByRole('button', { name: new RegExp(answer.finalHash!) }).first().click();
      await page.getByText(answer.finalHash!).first().waitFor();

      const field = page.getByLabel('Hash from a printed record or an e-mail');
      await field.fill('12345');
      await page.getByRole('button', { name: 'Check this hash' }).click();
      await page.getByText('A hash is 64 characters, 0-9 and a-f.').waitFor();

      await field.fill('f'.repeat(64));
      await page.getByRole('button', { name: 'Check this hash' }).click();
      await page.getByText('This log does NOT lead to that hash.', { exact: false }).waitFor();

      // Typed from paper: in capitals, in groups.
      await field.fill(answer.finalHash!.toUpperCase().replace(/(.{16})/g, '$1 '));
      await page.getByRole('button', { name: 'Check this hash' }).click();
      await page.getByText(`it is the hash of event ${answer.checked}`, { exact: false }).waitFor();
      await screenshot(page, `log-hash-event-log-${label}`);
    }, 120_000);

    it(`the board's history shows the log's head hash with its event (${label} px)`, async () => {
      const jobId = ids[LIVE_JOB];
      const job = (await request(server.app).get(`/api/jobs/${jobId}`).set({ Authorization: `Bearer ${token}` }).expect(200)).body.job as { lastSeq: number; headHash: string };
      const page = await open(`/jobs/${jobId}/board`, viewport);
      await page.getByText(`Log hash at event ${job.lastSeq}`).waitFor();
      const head = page.locator('.head-hash');
      await head.scrollIntoViewIfNeeded();
      expect(await head.getByRole('button', { name: new RegExp(job.headHash) }).count()).toBe(1);
      await screenshot(page, `log-hash-board-${label}`);
    }, 120_000);
  }
});
