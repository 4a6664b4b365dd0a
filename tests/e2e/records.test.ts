import AxeBuilder from '@axe-core/playwright';
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { recordListSchema, type RecordRow } from '../../shared/schemas/records.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { insertUser, TEST_PASSWORD } from '../helpers/factories.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, SCREENSHOT_DIR, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';

const PAST_JOB = 'Depot trial erection, 21 m';
const LIVE_JOB = 'Transformer T2 lift: boom erection';
/** Internal event names (job.created, step.completed...) never reach a reader of the record. */
const EVENT_NAME = /\b(job|crew|configuration|override|plan|briefing|step|hold|stage|weather|defect)\.[a-z]/;

/** What the screen shows now (a record page's whole log is many screens long). */
async function viewShot(page: Page, name: string): Promise<void> {
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`) });
}

/** What axe (WCAG 2 A and AA rules) finds wrong on the page now, one line per element. */
async function axeProblems(page: Page): Promise<string[]> {
  // The layout's side navigation (a q-list of links, aria-required-children) is not this screen's: left to its owner.
  const result = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa']).exclude('.q-drawer').analyze();
  return result.violations.flatMap((v) => v.nodes.map((n) => `${v.id}: ${n.target.join(' ')} ${n.failureSummary ?? ''}`));
}

/** The Records screen and one job's record page, on a phone and a desktop, on the demo. */
describe('records', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[] = [];
  let rows: RecordRow[] = [];
  const rowOf = (name: string) => rows.find((r) => r.name === name)!;

  async function open(path: string, viewport: { width: number; height: number }, email = 'supervisor@holdline.test', password = DEMO_PASSWORD): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport, acceptDownloads: true });
    contexts.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${path}: ${error.message}`));
    await signInThroughForm(page, `${server.url}${path}`, email, password);
    await page.waitForURL((url) => url.pathname === path);
    return page;
  }

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    rows = recordListSchema.parse((await request(server.app).get('/api/records').set({ Authorization: `Bearer ${token}` }).expect(200)).body).items;
  }, 180_000);
  afterEach(async () => {
    for (const context of contexts.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('on a desktop: every job with its chain in words, the final hash in full on tap, site and date filters, a download and a failed one', async () => {
    // The demo's four jobs: the trial, the two-shift erection, the live erection and the dismantling.
    expect(rows).toHaveLength(4);
    const page = await open('/records', viewports.desktop);
    const table = page.locator('.records-table');
    await expect.poll(() => table.locator('tbody tr').count(), { timeout: 15_000 }).toBe(4);
    expect(await table.getByText('Chain verified', { exact: true }).count()).toBe(4);
    // Never colour alone: each chain badge carries its icon.
    expect(await table.locator('.chain-status .q-icon').count()).toBe(4);
    await screenshot(page, 'records-desktop');
    expect(await axeProblems(page)).toEqual([]);

    const past = rowOf(PAST_JOB);
    const pastRow = table.locator('tbody tr', { hasText: PAST_JOB });
    const hashButton = pastRow.locator('.final-hash button.hash');
    expect(await hashButton.innerText()).toBe(`${past.finalHash.slice(0, 10)}…${past.finalHash.slice(-6)}`);
    await hashButton.click();
    expect(await hashButton.innerText()).toBe(past.finalHash);

    // A real download: the events CSV of the finished job.
    const fileMenu = async () => pastRow.getByRole('button', { name: `Downloads: ${PAST_JOB}` }).click();
    await fileMenu();
    const [csv] = await Promise.all([page.waitForEvent('download'), page.getByLabel(`Events CSV: ${PAST_JOB}`).click()]);
    expect(csv.suggestedFilename()).toMatch(/events\.csv$/);
    const saved = readFileSync((await csv.path())!, 'utf8').replace(/^\uFEFF/, '').split(/\r?\n/).filter(Boolean);
    expect(saved[0]).toMatch(/^seq,time/);
    expect(saved.length).toBeGreaterThanOrEqual(past.lastSeq + 1);

    // A download the server refuses says which file and why, in view.
    await page.route('**/api/jobs/*/record.pdf', (route) => route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'busy', message: 'The printer is busy.' } }) }));
    await fileMenu();
    await page.getByLabel(`Record PDF: ${PAST_JOB}`).click();
    const alert = page.getByRole('alert').filter({ hasText: 'could not be downloaded' });
    await alert.waitFor();
    expect(await alert.innerText()).toContain('Record PDF could not be downloaded. The printer is busy.');
    await screenshot(page, 'records-desktop-download-failed');

    await page.getByLabel('Site contains').fill('fenwold');
    await expect.poll(() => table.locator('tbody tr').count()).toBe(1);
    expect(await table.locator('tbody tr').innerText()).toContain(PAST_JOB);
    await page.getByLabel('Site contains').fill('nowhere at all');
    await page.getByText('No job matches these filters').waitFor();
    await page.getByRole('button', { name: 'Clear filters' }).click();
    await expect.poll(() => table.locator('tbody tr').count()).toBe(4);

    // Dates by when a job ended: only the finished trial has ended.
    await page.getByLabel('Dates by').click();
    await page.getByRole('option', { name: 'Completed or cancelled' }).click();
    await expect.poll(() => table.locator('tbody tr').count()).toBe(1);
    expect(await table.locator('tbody tr').innerText()).toContain(PAST_JOB);
    // From today on this device's calendar, by last change: the jobs the demo drives today (the two-shift job's last
    // change, two hours ago, counts only when that was still today), not the trial that ended days before.
    await page.getByLabel('Dates by').click();
    await page.getByRole('option', { name: 'Last change' }).click();
    const today = await page.evaluate(() => {
      const d = new Date();
      return `${d.getFullYear()}-${String(d.getMonth() + 1).padStart(2, '0')}-${String(d.getDate()).padStart(2, '0')}`;
    });
    await page.getByLabel('From').fill(today);
    const midnight = new Date(`${today}T00:00`).getTime();
    await expect.poll(() => table.locator('tbody tr').count()).toBe(rows.filter((r) => Date.parse(r.updatedAt) >= midnight).length);
    expect(await table.innerText()).not.toContain(PAST_JOB);
    await page.getByRole('button', { name: 'Clear filters' }).click();
    await expect.poll(() => table.locator('tbody tr').count()).toBe(4);
  });

  it('on a phone: cards with the chain, the hash and the downloads in reach, nothing wider than the screen', async () => {
    const page = await open('/records', viewports.phone);
    const cards = page.locator('.record-card');
    await expect.poll(() => cards.count(), { timeout: 15_000 }).toBe(4);
    expect(await page.getByText('Chain verified', { exact: true }).count()).toBe(4);
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
    // The first record is in view without scrolling past the filters, which open on a tap.
    expect((await cards.first().boundingBox())!.y).toBeLessThan(viewports.phone.height - 200);
    expect(await page.getByLabel('Site contains').isVisible()).toBe(false);
    await page.getByRole('button', { name: 'Filters' }).click();
    await page.getByLabel('Site contains').fill('harrowmere');
    await expect.poll(() => cards.count()).toBe(2);
    await page.getByRole('button', { name: 'Hide filters' }).click();
    expect(await page.getByRole('button', { name: 'Filters (1 set)' }).isVisible()).toBe(true);
    for (const button of await cards.first().getByRole('button').all()) {
      const box = await button.boundingBox();
      expect(box!.height).toBeGreaterThanOrEqual(40);
    }
    await screenshot(page, 'records-phone');
    expect(await axeProblems(page)).toEqual([]);
  });

  it('a person in no crew sees the empty state in words; a list that cannot load says so and offers another try', async () => {
    const outsider = await server.context.queue.transaction((m) => insertUser(m, { qualifications: ['rigger'] }));
    const page = await open('/records', viewports.phone, outsider.email, TEST_PASSWORD);
    await page.getByText('No records to show you yet.', { exact: false }).waitFor({ timeout: 15_000 });
    expect(await page.locator('.record-card').count()).toBe(0);
    await screenshot(page, 'records-phone-empty');

    let refuse = true;
    await page.route('**/api/records?*', (route) =>
      refuse ? route.fulfill({ status: 500, contentType: 'application/json', body: JSON.stringify({ error: { code: 'internal', message: 'The server could not answer.' } }) }) : route.continue(),
    );
    await page.reload();
    const alert = page.getByRole('alert').filter({ hasText: 'Records could not be loaded' });
    await alert.waitFor({ timeout: 15_000 });
    expect(await alert.innerText()).toContain('The server could not answer.');
    // Not a spinner that never ends beside the error.
    await page.getByText('Nothing to show until the records load.').waitFor();
    expect(await page.getByText('Loading records and checking each chain').count()).toBe(0);
    await screenshot(page, 'records-phone-error');
    refuse = false;
    await alert.getByRole('button', { name: 'Try again' }).click();
    await alert.waitFor({ state: 'detached' });
    await page.getByText('No records to show you yet.', { exact: false }).waitFor();
  });

  it('a job’s record page: proof at the top, the log newest first in sentences with who and when, and the photos', async () => {
    const past = rowOf(PAST_JOB);
    for (const [name, viewport] of [
      ['phone', viewports.phone],
      ['desktop', viewports.desktop],
    ] as const) {
      const page = await open(`/jobs/${past.id}/record`, viewport);
      await page.getByText('Chain verified', { exact: true }).waitFor({ timeout: 15_000 });
      const entries = page.locator('.timeline > li');
      await expect.poll(() => entries.count(), { timeout: 15_000 }).toBe(past.lastSeq);
      expect(await entries.first().locator('.seq').innerText()).toBe(`Event ${past.lastSeq}`);
      expect(await entries.last().locator('.seq').innerText()).toBe('Event 1');
      const text = await page.locator('.timeline').innerText();
      expect(text).not.toMatch(EVENT_NAME);
      expect(text).not.toContain('does not describe yet');
      // The final sign-off by the qualified inspector is marked in words.
      expect(await page.locator('.timeline .sign-off').count()).toBeGreaterThan(0);
      expect(await page.locator('.state-line').innerText()).toMatch(/Completed .+, by /);
      // Photos recorded on the board show as thumbnails once loaded.
      await expect.poll(() => page.locator('.timeline .photo-thumb img').count(), { timeout: 15_000 }).toBeGreaterThan(0);
      await page.locator('.final-hash button.hash').click();
      expect(await page.locator('.final-hash button.hash').innerText()).toBe(past.finalHash);
      if (name === 'phone') expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(390);
      await page.evaluate(() => window.scrollTo(0, 0));
      await viewShot(page, `record-page-${name}-top`);
      if (name === 'phone') expect(await axeProblems(page)).toEqual([]);
      await page.locator('.timeline .photo-thumb img').first().scrollIntoViewIfNeeded();
      await viewShot(page, `record-page-${name}-photo`);
    }
  });

  it('a record changed behind the server shows as broken at that event, in words, on the list and on its page', async () => {
    const live = rowOf(LIVE_JOB);
    const { manager } = server.context.dataSource;
    await server.context.queue.run(() => manager.query(`UPDATE job_event SET by_name = 'Someone else' WHERE job_id = ? AND seq = 3`, [live.id]));
    const page = await open('/records', viewports.desktop);
    await page.getByText('Chain broken at event 3', { exact: true }).waitFor({ timeout: 15_000 });
    // The demo's other three jobs still verify.
    expect(await page.getByText('Chain verified', { exact: true }).count()).toBe(3);
    await page.getByRole('link', { name: LIVE_JOB }).click();
    await page.waitForURL(`**/jobs/${live.id}/record`);
    await page.getByText('Chain broken at event 3', { exact: true }).waitFor();
    expect(await page.locator('.proof').innerText()).toContain('Do not rely on this record');
    // The event where the chain breaks, and every later one, are marked in the timeline.
    await page.locator('.timeline li', { hasText: 'The chain breaks here' }).waitFor();
    expect(await page.locator('.timeline li', { hasText: 'The chain breaks here' }).locator('.seq').innerText()).toBe('Event 3');
    expect(await page.locator('.timeline li.unproven').count()).toBe(live.lastSeq - 2);
    await viewShot(page, 'record-page-broken-desktop');
  });
});
