import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, signInThroughForm, type LaunchedBrowser } from './browser.js';

/**
 * The supervisor's revision form on the console, in a real browser on the demo's live job: it loads
 * the plan in force through the plan store, sends a revision with a replacement step, and the board
 * shows the new version and the new step from the server's event.
 */
describe('revising the plan from the console', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === 'Transformer T2 lift: boom erection')!.id;
  }, 120_000);
  afterAll(async () => {
    await chromium?.close();
    await server?.close();
  });

  it('starts a revision from the plan in force, sends it, and the board shows version 2 with the new step', async () => {
    const context = await chromium.browser.newContext({ viewport: { width: 1280, height: 900 } });
    const page = await context.newPage();
    const errors: string[] = [];
    page.on('pageerror', (e) => errors.push(e.message));
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/console`, 'supervisor@holdline.test', DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith('/console'));
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    await page.getByRole('button', { name: 'Start a revision from the current plan' }).click();
    await page.getByLabel('Reason for the revision (goes in the record)').waitFor();
    await page.getByLabel('Step wording').fill('Check the keeper plates on every guy line pin again');
    await page.getByLabel('Reason for the revision (goes in the record)').fill('Extra keeper check asked for by the site');
    await screenshot(page, 'board-revision-form-laptop');
    await page.getByRole('button', { name: 'Send the revised plan' }).click();
    await page.getByText(/Plan version 2 is on the board/).waitFor({ timeout: 10_000 });
    await page.locator('.stage-card').getByText('Check the keeper plates on every guy line pin again').first().waitFor({ timeout: 10_000 });
    await screenshot(page, 'board-revision-sent-laptop');
    // Version 2 has its own briefing: the panel loads it through the plan store and offers that version's, not the first.
    const briefing = page.getByTestId('briefing');
    await briefing.getByText('Briefing for plan version 2').waitFor({ timeout: 10_000 });
    await briefing.locator('summary').waitFor({ timeout: 10_000 });
    await screenshot(page, 'board-revision-briefing-laptop');
    const acknowledge = briefing.getByRole('button', { name: 'Acknowledge the briefing' });
    expect(await acknowledge.isEnabled()).toBe(true);
    await acknowledge.click();
    await expect.poll(() => page.getByTestId('briefing').count(), { timeout: 10_000 }).toBe(0);
    expect(errors).toEqual([]);
    await context.close();
  }, 120_000);
});
