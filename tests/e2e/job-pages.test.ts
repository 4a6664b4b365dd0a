import type { BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';

const LIVE_JOB = 'Transformer T2 lift: boom erection';
const DISMANTLING_JOB = 'Transformer T2 lift: boom dismantling';
const PAST_JOB = 'Depot trial erection, 21 m';

/** Internal event names (job.created, step.completed...) never reach a reader of the history. */
const EVENT_NAME = /\b(job|crew|configuration|override|plan|briefing|step|hold|stage|weather|defect)\.[a-z]/;
/** Two full stops in a row that are not an ellipsis. */
const DOUBLED_STOP = /[^.]\.\.(?!\.)/;

/**
 * The job pages agree with each other and with the job's state (issue 14), on the demo: no "not
 * ready" box past planning, the saved draft plan on the overview, a dismantling job's own words,
 * the history in sentences, and the planner asking before unsaved changes are lost.
 */
describe('job pages', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  const ids = {} as Record<string, string>;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[] = [];

  async function open(path: string, viewport: { width: number; height: number } = viewports.phone): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport });
    contexts.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${path}: ${error.message}`));
    await signInThroughForm(page, `${server.url}${path}`, 'supervisor@holdline.test', DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname === path.split('?')[0]);
    await page.locator('.job-head').waitFor();
    return page;
  }

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    for (const j of jobs.body.items as { id: string; name: string }[]) ids[j.name] = j.id;
  });
  afterEach(async () => {
    for (const context of contexts.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('a live or finished job shows where it stands, never the "ready to leave planning" box', async () => {
    for (const [name, state] of [
      [LIVE_JOB, 'Live'],
      [PAST_JOB, 'Complete'],
    ] as const) {
      const page = await open(`/jobs/${ids[name]}`);
      const where = page.getByTestId('job-where');
      await where.waitFor();
      expect(await where.textContent()).toContain(state);
      expect(await page.getByText('Ready to leave planning?').count()).toBe(0);
      expect(await page.getByText('Not ready:').count()).toBe(0);
      await screenshot(page, `job-overview-${state.toLowerCase()}-phone`);
    }
  });

  it('a dismantling job in planning shows its saved draft plan and speaks of a dismantling record, with no doubled full stops', async () => {
    const page = await open(`/jobs/${ids[DISMANTLING_JOB]}`);
    await page.getByText('Ready to leave planning?').waitFor();
    await expect.poll(() => page.locator('main, .q-page').first().textContent(), { timeout: 10_000 }).toMatch(/Draft saved \(\d+ stages\), not locked yet/);
    const text = (await page.locator('.q-page').first().innerText()) ?? '';
    expect(text).toContain('The dismantling record is e-mailed');
    expect(text).not.toMatch(/erection record/i);
    expect(text).not.toMatch(DOUBLED_STOP);
    await screenshot(page, 'job-overview-dismantling-phone');
    // The plan and its briefing, as generated for the dismantling.
    await page.goto(`${server.url}/jobs/${ids[DISMANTLING_JOB]}?tab=plan`);
    await page.getByText('Stages', { exact: true }).first().waitFor({ timeout: 10_000 });
    const plan = await page.locator('.q-page').first().innerText();
    expect(plan).not.toMatch(/erection record/i);
    expect(plan).not.toMatch(DOUBLED_STOP);
  });

  it('the event log reads as sentences: who did what, with what value, never an internal event name or a list of fields', async () => {
    const page = await open(`/jobs/${ids[LIVE_JOB]}?tab=log`, viewports.desktop);
    const log = page.locator('.event-log .events');
    await log.waitFor({ timeout: 10_000 });
    const text = await log.innerText();
    expect(text).not.toMatch(EVENT_NAME);
    expect(text).not.toMatch(DOUBLED_STOP);
    expect(text).toContain('Locked the plan as version 1');
    expect(text).toMatch(/Recorded the wind: mean \d+(\.\d)? m\/s, gust \d+(\.\d)? m\/s/);
    expect(text).toMatch(/Marked done: .+\. Recorded .+ \d/);
    expect(text).toMatch(/Acknowledged the hold point “.+” as operator\./);
    await screenshot(page, 'job-event-log-laptop');
  });

  it('the planner asks before unsaved configuration changes are lost (another tab, the browser tab), and keeps them when asked to stay; its number labels sit clear of their values on a phone', async () => {
    const page = await open(`/jobs/${ids[DISMANTLING_JOB]}?tab=planner`);
    const parts = page.getByRole('textbox', { name: 'Parts of line' });
    await parts.waitFor({ timeout: 10_000 });
    const saved = await parts.inputValue();
    expect(saved).not.toBe('');

    // The label of a number field with a value sits above the typed number, not over it.
    const clear = await parts.evaluate((input) => {
      const field = input.closest('.q-field')!;
      const label = field.querySelector('.q-field__label')!.getBoundingClientRect();
      const box = input.getBoundingClientRect();
      const textTop = box.top + parseFloat(getComputedStyle(input).paddingTop);
      return label.bottom <= textTop + 1;
    });
    expect(clear).toBe(true);

    // No change: leaving asks nothing.
    await page.getByRole('tab', { name: 'Crew' }).click();
    await page.waitForURL(/tab=crew/);
    await page.getByRole('tab', { name: /Planner|Configuration/ }).click();
    await parts.waitFor();

    // A change, then another tab: the question comes, and staying keeps the change.
    const changed = saved === '8' ? '7' : '8';
    await parts.fill(changed);
    await page.getByRole('tab', { name: 'Crew' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByText('Leave without saving the configuration?').waitFor();
    await screenshot(page, 'job-planner-leave-question-phone');
    await dialog.getByRole('button', { name: 'Stay and save' }).click();
    await dialog.waitFor({ state: 'detached' });
    expect(page.url()).toContain('tab=planner');
    expect(await parts.inputValue()).toBe(changed);

    // Closing the browser tab: the browser's own question.
    const asked = new Promise<string>((resolve) => page.once('dialog', (d) => {
      resolve(d.type());
      void d.dismiss();
    }));
    await page.close({ runBeforeUnload: true });
    expect(await asked).toBe('beforeunload');
    expect(page.isClosed()).toBe(false);

    // Leaving on purpose drops the change: the saved configuration is what comes back.
    await page.getByRole('tab', { name: 'Crew' }).click();
    await dialog.getByRole('button', { name: 'Leave and lose changes' }).click();
    await page.waitForURL(/tab=crew/);
    await page.getByRole('tab', { name: /Planner|Configuration/ }).click();
    await parts.waitFor();
    expect(await parts.inputValue()).toBe(saved);
  });
});
