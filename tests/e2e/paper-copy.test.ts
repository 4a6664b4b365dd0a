import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync } from 'node:fs';
import path from 'node:path';
import type { BrowserContext, Download, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { JobSummary } from '../../shared/schemas/jobs.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';

const LIVE_JOB = 'Transformer T2 lift: boom erection';
const LABEL = 'Paper copy from here on';

/** The paper copy on the job's page and in the board's menus, on the demo's live erection. */
describe('the paper copy button', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[] = [];
  const saved = path.resolve('test-results', 'paper-copy-e2e');
  mkdirSync(saved, { recursive: true });

  async function open(where: string, viewport: { width: number; height: number }, email = 'supervisor@holdline.test'): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport, acceptDownloads: true });
    contexts.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${where}: ${error.message}`));
    await signInThroughForm(page, `${server.url}${where}`, email, DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname === where);
    return page;
  }

  /** The saved PDF's words. */
  async function wordsOf(download: Download, name: string): Promise<string> {
    const file = path.join(saved, name);
    await download.saveAs(file);
    expect(readFileSync(file).subarray(0, 5).toString()).toBe('%PDF-');
    return execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
  }

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const list = (await request(server.app).get('/api/jobs').set('Authorization', `Bearer ${token}`).expect(200)).body.items as JobSummary[];
    jobId = list.find((j) => j.name === LIVE_JOB)!.id;
  }, 180_000);
  afterEach(async () => {
    for (const context of contexts.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('on the job page on a phone: saves the paper copy with the supervisor’s page', async () => {
    const page = await open(`/jobs/${jobId}`, viewports.phone);
    const button = page.getByRole('button', { name: `${LABEL}: ${LIVE_JOB}` });
    await button.waitFor();
    await screenshot(page, 'paper-copy-job-phone');
    const [download] = await Promise.all([page.waitForEvent('download'), button.click()]);
    expect(download.suggestedFilename()).toMatch(/paper-copy\.pdf$/);
    const words = await wordsOf(download, 'job-page.pdf');
    expect(words).toContain('PAPER COPY');
    expect(words).toContain(LIVE_JOB);
    expect(words).toContain('Supervisor’s page: value-check figures');
  });

  it('in the board’s "More" menu on a tablet, for a rigger: saved without the value-check figures', async () => {
    const page = await open(`/jobs/${jobId}/rigger`, { width: 820, height: 1180 }, 'rigger@holdline.test');
    await page.getByRole('button', { name: 'More' }).click();
    const item = page.getByRole('menuitem', { name: `${LABEL}: ${LIVE_JOB}` }).or(page.locator('.q-menu .q-item', { hasText: LABEL }));
    await item.first().waitFor();
    await screenshot(page, 'paper-copy-board-menu-tablet');
    const [download] = await Promise.all([page.waitForEvent('download'), item.first().click()]);
    const words = await wordsOf(download, 'rigger-menu.pdf');
    expect(words).toContain('PAPER COPY');
    expect(words).not.toContain('Supervisor’s page');
  });

  it('in the wide board header’s tools; a refused download is said on screen', async () => {
    const page = await open(`/jobs/${jobId}/console`, { width: 1600, height: 900 });
    const tool = page.getByRole('button', { name: `${LABEL}: ${LIVE_JOB}` });
    await tool.waitFor({ timeout: 15_000 });
    await screenshot(page, 'paper-copy-board-header-wide');
    await page.route('**/paper.pdf', (route) => route.fulfill({ status: 503, contentType: 'application/json', body: JSON.stringify({ error: { code: 'storage_busy', message: 'The server is busy.' } }) }));
    await tool.click();
    const alert = page.locator('.q-notification', { hasText: 'The paper copy could not be downloaded.' });
    await alert.waitFor();
    expect(await alert.innerText()).toContain('The server is busy.');
    await page.waitForTimeout(600); // Quasar's fade-in, for a readable screenshot
    await screenshot(page, 'paper-copy-failed-wide');
  });
});
