import AxeBuilder from '@axe-core/playwright';
import type { BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { SAVED_BOARD_WORDS, WAKE_LOCK_WORDS } from '../../src/words/offline.js';
import type { TestServer } from '../helpers/server.js';
import { screenshot, SCREENSHOT_DIR, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';
import { boardOf, startLiveDemo } from './live-demo.js';
import path from 'node:path';

/** The preamble's tablet: a rigger's 820 x 1180 tablet in portrait. */
const TABLET = { width: 820, height: 1180 };

/** Uncaught errors of every page, so a view that breaks while rendering offline fails the test. */
const pageErrors: string[] = [];

function watchErrors(page: Page): void {
  page.on('pageerror', (error) => pageErrors.push(error.message));
  page.on('console', (message) => {
    // Requests refused while the test has cut the network (the session check, the socket) are expected.
    const expected = message.text().startsWith('Failed to load resource') || message.text().includes('ERR_INTERNET_DISCONNECTED') || message.text().includes('WebSocket connection to');
    if (message.text().includes('[Vue warn]') || (message.type() === 'error' && !expected)) pageErrors.push(message.text());
  });
}

describe('the installed app with no network', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  let stageTitle: string;
  let fleetNumber: string;
  let supervisorToken: string;

  const boardNow = () => boardOf({ server, chromium, jobId, supervisorToken });

  beforeAll(async () => {
    ({ server, chromium, jobId, supervisorToken } = await startLiveDemo());
    const board = await boardNow();
    stageTitle = board.stages.find((s) => s.state === 'holding')!.title;
    fleetNumber = board.job.craneFleetNumber;
  });
  afterEach(() => {
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('serves the service worker and the manifest to be checked every time, under the content security policy', async () => {
    const sw = await request(server.app).get('/sw.js').expect(200);
    expect(sw.headers['cache-control']).toBe('no-cache');
    expect(sw.headers['content-type']).toMatch(/javascript/);
    expect(sw.headers['content-security-policy']).toContain("worker-src 'self'");
    // The precache list holds the shell, and the navigation fallback leaves the API and the socket to the network.
    expect(sw.text).toContain('"index.html"');
    expect(sw.text).toMatch(/denylist:\[\/\^\\\/api\\\/\/,\/\^\\\/socket\\\.io\\\/\/\]/);
    const manifest = await request(server.app).get('/manifest.webmanifest').expect(200);
    expect(manifest.headers['cache-control']).toBe('no-cache');
    const parsed = JSON.parse(manifest.text) as { name: string; icons: { src: string; purpose: string }[] };
    expect(parsed.name).toBe('Holdline');
    for (const icon of parsed.icons) await request(server.app).get(icon.src).expect(200);
    expect(parsed.icons.some((i) => i.purpose === 'maskable')).toBe(true);
  });

  it('reloads the cab with no network and shows the last board, not live with its age; live again when the network returns; sign-out forgets it', async () => {
    // The service worker is blocked in the other browser tests (tests/e2e/browser.ts); this one is about it.
    const context: BrowserContext = await chromium.browser.newContext({ viewport: viewports.phone, serviceWorkers: 'allow' });
    const page = await context.newPage();
    watchErrors(page);
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/cab`, 'operator@holdline.test', DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith('/cab'));
    await page.getByText(stageTitle).first().waitFor();
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    // The service worker is installed (its precache filled) and active before the network goes.
    expect(await page.evaluate(async () => (await navigator.serviceWorker.ready).active?.scriptURL)).toBe(`${server.url}/sw.js`);
    // The live board is kept on the device.
    await expect
      .poll(() => page.evaluate((id) => (JSON.parse(localStorage.getItem('holdline.savedBoards') ?? '[]') as { jobId: string }[]).some((e) => e.jobId === id), jobId))
      .toBe(true);
    const keptSeq = (await boardNow()).seq;

    await context.setOffline(true);
    await page.reload();
    // Not sent to the sign-in page: the shell came from the service worker, the board from the device.
    const band = page.getByTestId('saved-board');
    await band.waitFor({ timeout: 15_000 });
    expect(new URL(page.url()).pathname).toBe(`/jobs/${jobId}/cab`);
    expect(await band.textContent()).toMatch(/NOT LIVE\s*— shows the board as of \d\d:\d\d \(UTC[+-]\d\d:\d\d\), less than a minute ago/);
    expect(await page.getByTestId('saved-board-signed-out').textContent()).toContain(SAVED_BOARD_WORDS.notSignedIn('Tomasz Wierzba'));
    expect(await page.getByText(stageTitle).first().isVisible()).toBe(true);
    expect(await page.locator('.board-header .fleet').textContent()).toBe(fleetNumber);
    // The full cover is for a board that drops while open; a saved board is there to be read.
    expect(await page.getByTestId('not-live').count()).toBe(0);
    await screenshot(page, 'offline-cab-saved-board-phone');
    await page.setViewportSize(TABLET);
    await screenshot(page, 'offline-cab-saved-board-tablet');
    await page.setViewportSize(viewports.phone);
    // Readable in the rain: the band and its lines pass the cab's AAA contrast, in day and night.
    for (const theme of ['day', 'night']) {
      await page.evaluate((t) => localStorage.setItem('holdline.theme', t), theme);
      await page.reload();
      await band.waitFor({ timeout: 15_000 });
      const axe = await new AxeBuilder({ page }).include('[data-testid="saved-board"]').include('[data-testid="saved-board-details"]').withRules(['color-contrast', 'color-contrast-enhanced']).analyze();
      expect(axe.violations.map((v) => `${theme} ${v.id}: ${v.nodes.map((n) => n.target.join(' ')).join(', ')}`)).toEqual([]);
    }
    await screenshot(page, 'offline-cab-saved-board-night-phone');
    await page.evaluate(() => localStorage.setItem('holdline.theme', 'day'));
    await page.reload();
    await band.waitFor({ timeout: 15_000 });
    // Scrolled down to the wind panel, the band stays in sight under the header (what the screen shows, not the whole page).
    await page.getByTestId('wind-record').scrollIntoViewIfNeeded();
    const header = await page.locator('.board-header').boundingBox();
    const stuck = await band.boundingBox();
    expect(stuck!.y).toBeGreaterThanOrEqual(header!.height - 2);
    expect(stuck!.y).toBeLessThan(header!.height + 20);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'offline-cab-saved-board-scrolled-phone.png') });
    await page.evaluate(() => window.scrollTo(0, 0));
    // The operator's own acknowledgment shows, and nothing that sends pretends to work: every button of the board is shut, with the reason.
    const holdButtons = page.locator('.cab-block .hold-card button');
    expect(await holdButtons.count()).toBeGreaterThan(0);
    for (const button of await holdButtons.all()) expect(await button.isDisabled()).toBe(true);
    expect(await page.getByText(SAVED_BOARD_WORDS.blocked).first().isVisible()).toBe(true);
    expect(await page.getByTestId('wind-record').isDisabled()).toBe(true);

    // Its age is never shown younger than it is: 12 min 12 s reads "13 min ago".
    await page.evaluate((id) => {
      const entries = JSON.parse(localStorage.getItem('holdline.savedBoards') ?? '[]') as { jobId: string; liveAt: number }[];
      for (const e of entries) if (e.jobId === id) e.liveAt = Date.now() - (12 * 60 + 12) * 1000;
      localStorage.setItem('holdline.savedBoards', JSON.stringify(entries));
    }, jobId);
    // The app opened offline at its start page (launched from the home screen) goes to the board it last showed.
    await page.goto(`${server.url}/`);
    await band.waitFor({ timeout: 15_000 });
    expect(new URL(page.url()).pathname).toBe(`/jobs/${jobId}/cab`);
    expect(await page.getByTestId('saved-board-age').textContent()).toContain('13 min ago');
    // The job's QR code, scanned offline, opens the same saved board.
    await page.goto(`${server.url}/jobs/${jobId}/open`);
    await band.waitFor({ timeout: 15_000 });
    expect(new URL(page.url()).pathname).toBe(`/jobs/${jobId}/cab`);
    await screenshot(page, 'offline-cab-saved-board-13-min-phone');

    // The network returns: the session comes back from its cookie and the live board replaces the saved one.
    await context.setOffline(false);
    await band.waitFor({ state: 'detached', timeout: 20_000 });
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    expect(await page.getByText(stageTitle).first().isVisible()).toBe(true);
    expect(await page.locator('.cab-block .hold-card button').first().isDisabled()).toBe(false);
    await expect
      .poll(() => page.evaluate((id) => (JSON.parse(localStorage.getItem('holdline.savedBoards') ?? '[]') as { jobId: string; seq: number }[]).find((e) => e.jobId === id)?.seq, jobId))
      .toBeGreaterThanOrEqual(keptSeq);
    await screenshot(page, 'offline-cab-live-again-phone');

    // Signing out forgets every saved board on this device.
    await page.goto(`${server.url}/jobs`);
    await page.getByRole('button', { name: 'Account' }).click();
    await page.getByText('Sign out').click();
    await page.waitForURL(/\/sign-in/);
    expect(await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('holdline.savedBoard')))).toEqual([]);
    // And offline again, the board is no longer there to open: the sign-in page is.
    await context.setOffline(true);
    await page.goto(`${server.url}/jobs/${jobId}/cab`);
    await page.waitForURL(/\/sign-in/);
    expect(await page.getByTestId('saved-board').count()).toBe(0);
    await context.close();
  });

  it('says plainly on every board view when the screen may sleep', async () => {
    const context = await chromium.browser.newContext({ viewport: viewports.phone });
    // A phone whose battery saver refuses the lock.
    await context.addInitScript(() => {
      Object.defineProperty(navigator, 'wakeLock', { value: { request: () => Promise.reject(new DOMException('Battery saver is on', 'NotAllowedError')) }, configurable: true });
    });
    const page = await context.newPage();
    watchErrors(page);
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/rigger`, 'rigger@holdline.test', DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith('/rigger'));
    await page.getByText(stageTitle).first().waitFor();
    expect(await page.getByTestId('wake-lock-failed').textContent()).toContain(WAKE_LOCK_WORDS.failed);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'board-rigger-wake-lock-refused-phone.png') });
    await context.close();

    // Where the browser grants it, nothing is said.
    const granted = await chromium.browser.newContext({ viewport: viewports.phone });
    await granted.addInitScript(() => {
      const sentinel = { released: false, release: () => Promise.resolve(), addEventListener: () => undefined };
      Object.defineProperty(navigator, 'wakeLock', { value: { request: () => Promise.resolve(sentinel) }, configurable: true });
    });
    const other = await granted.newPage();
    watchErrors(other);
    await signInThroughForm(other, `${server.url}/jobs/${jobId}/rigger`, 'rigger@holdline.test', DEMO_PASSWORD);
    await other.waitForURL((url) => url.pathname.endsWith('/rigger'));
    await other.getByText(stageTitle).first().waitFor();
    expect(await other.getByTestId('wake-lock-failed').count()).toBe(0);
    await granted.close();
  });
});
