import type { Browser, BrowserContext, Page } from 'playwright-core';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import type { TestServer } from '../helpers/server.js';
import { screenshot, viewports, type LaunchedBrowser, signInThroughForm } from './browser.js';
import { boardOf, LIVE_JOB, startLiveDemo } from './live-demo.js';

type Viewport = { width: number; height: number };

const sizes: [string, Viewport][] = [
  ['phone', viewports.phone],
  ['laptop', viewports.desktop],
  ['tv', viewports.display],
];

/** Uncaught errors of every page, so a view that breaks while rendering fails the test. */
const pageErrors: string[] = [];

/** Signs in through the real form, starting at `start`, and waits until the path (not the sign-in's `next`) matches `landing`. */
async function signIn(browser: Browser, baseUrl: string, email: string, start: string, landing: RegExp, viewport: Viewport = viewports.phone): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  page.on('pageerror', (error) => pageErrors.push(`${email} ${start}: ${error.message}`));
  page.on('console', (message) => {
    // A refused session check before signing in, and the socket failing while the test has cut the network, are expected.
    const expected = message.text().startsWith('Failed to load resource') || message.text().includes('ERR_INTERNET_DISCONNECTED');
    if (message.text().includes('[Vue warn]') || (message.type() === 'error' && !expected)) pageErrors.push(`${email}: ${message.text()}`);
  });
  await signInThroughForm(page, `${baseUrl}${start}`, email, DEMO_PASSWORD);
  await page.waitForURL((url) => landing.test(url.pathname));
  return { context, page };
}

describe('live board views', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  let holdId: string;
  let stageTitle: string;
  let fleetNumber: string;
  let supervisorToken: string;

  const boardNow = () => boardOf({ server, chromium, jobId, supervisorToken });

  beforeAll(async () => {
    ({ server, chromium, jobId, supervisorToken } = await startLiveDemo());
    const board = await boardNow();
    const holding = board.stages.find((s) => s.state === 'holding')!;
    holdId = holding.hold!.id;
    stageTitle = holding.title;
    fleetNumber = board.job.craneFleetNumber;
  });
  afterEach(() => {
    const errors = pageErrors.splice(0);
    expect(errors).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('takes the signaller from the jobs list to the signaller view, where one tap acknowledges the waiting hold', async () => {
    const { context, page } = await signIn(chromium.browser, server.url, 'signaller@holdline.test', '/jobs', /\/jobs$/);
    await page.getByRole('link', { name: new RegExp(LIVE_JOB.replace(/[:]/g, '.')) }).first().click();
    await page.waitForURL(`**/jobs/${jobId}/signaller`);
    const hold = page.getByTestId(`hold-${holdId}`);
    await hold.waitFor();
    expect(await page.locator('.board-header .fleet').textContent()).toBe(fleetNumber);
    expect(await page.getByText('Move only on the signaller’s signal.').first().isVisible()).toBe(true);
    expect(await page.getByRole('link', { name: 'Whole board' }).isVisible()).toBe(true);
    // The operator answered during the demo; the signaller's row still waits.
    expect(await hold.getByTestId(`ack-${holdId}-operator`).textContent()).toContain('acknowledged by Tomasz Wierzba');
    const row = hold.getByTestId(`ack-${holdId}-signaller`);
    expect(await row.textContent()).toContain('not yet acknowledged');
    await screenshot(page, 'board-signaller-before-ack-phone');
    await row.getByRole('button', { name: 'Acknowledge as signaller' }).click();
    await expect.poll(() => row.textContent()).toContain('acknowledged by Aisha Ndlovu');
    expect(await hold.textContent()).toContain('Acknowledged: waiting for release');
    // The server holds the same: acknowledged by both, not released by anyone on this screen.
    const after = (await boardNow()).stages.find((s) => s.hold?.id === holdId)!.hold!;
    expect(after.state).toBe('acknowledged');
    expect(after.acknowledgments.map((a) => a.role).sort()).toEqual(['operator', 'signaller']);
    // Withdraw is one tap too, and the hold answers again.
    expect(await row.getByRole('button', { name: 'Withdraw' }).isVisible()).toBe(true);
    await context.close();
  });

  const people: [view: string, email: string][] = [
    ['cab', 'operator@holdline.test'],
    ['signaller', 'signaller@holdline.test'],
    ['rigger', 'rigger@holdline.test'],
    ['console', 'supervisor@holdline.test'],
    ['board', 'viewer@holdline.test'],
    ['display', 'viewer@holdline.test'],
  ];

  for (const [view, email] of people) {
    it(`shows the ${view} view at phone, laptop and TV size in day and night`, async () => {
      const { context, page } = await signIn(chromium.browser, server.url, email, `/jobs/${jobId}/${view}`, new RegExp(`/jobs/${jobId}/${view}$`));
      for (const [size, viewport] of sizes) {
        for (const theme of ['day', 'night'] as const) {
          await page.setViewportSize(viewport);
          await page.evaluate((name) => localStorage.setItem('holdline.theme', name), theme);
          await page.reload();
          await page.getByText(stageTitle).first().waitFor();
          await page.locator('.board-header .fleet').waitFor();
          expect(await page.locator('.board-header .fleet').textContent()).toBe(fleetNumber);
          expect(await page.getByTestId('not-live').count()).toBe(0);
          expect(await page.evaluate(() => document.body.classList.contains('body--dark'))).toBe(theme === 'night');
          // Every view of someone attached to the job carries the stop control, a viewer's too; the TV carries none.
          expect(await page.getByTestId('stop-control').count()).toBe(view === 'display' ? 0 : 1);
          // Nothing may be wider than the screen.
          expect(await page.evaluate(() => document.documentElement.scrollWidth <= window.innerWidth)).toBe(true);
          await screenshot(page, `board-${view}-${size}-${theme}`);
        }
      }
      if (view !== 'display') expect(await page.getByText('Holdline is a coordination board, not a safety device.').isVisible()).toBe(true);
      await context.close();
    });
  }

  it('covers the cab when the board is not live, queues a stop pressed meanwhile, and sends it when the connection returns', async () => {
    const cab = await signIn(chromium.browser, server.url, 'operator@holdline.test', `/jobs/${jobId}/cab`, /\/cab$/);
    const signaller = await signIn(chromium.browser, server.url, 'signaller@holdline.test', `/jobs/${jobId}/signaller`, /\/signaller$/);
    const page = cab.page;
    await page.getByText(stageTitle).first().waitFor();
    await signaller.page.getByText(stageTitle).first().waitFor();

    await cab.context.setOffline(true);
    const cover = page.getByTestId('not-live');
    await cover.waitFor({ timeout: 10_000 });
    expect(await cover.textContent()).toContain('Last update at');
    await screenshot(page, 'board-cab-not-live-phone');

    // Press and hold: the stop is queued with the time it was pressed while the board is not live.
    const stop = page.getByTestId('stop-control');
    await stop.hover();
    await page.mouse.down();
    await page.getByTestId('queued-stop').waitFor({ timeout: 5_000 });
    await page.mouse.up();
    expect(await page.getByTestId('queued-stop').textContent()).toContain('Stop not sent, use radio and signal');
    await screenshot(page, 'board-cab-queued-stop-phone');
    expect((await boardNow()).job.state).toBe('live');

    await cab.context.setOffline(false);
    await page.getByTestId('stopped-state').waitFor({ timeout: 15_000 });
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    expect(await page.getByTestId('queued-stop').count()).toBe(0);
    const board = await boardNow();
    expect(board.job.state).toBe('stopped');
    expect(board.job.stop?.raisedBy.name).toBe('Tomasz Wierzba');
    // Every other view turns to the stopped state as well.
    await signaller.page.getByTestId('stopped-state').waitFor();
    await screenshot(page, 'board-cab-stopped-phone');
    await screenshot(signaller.page, 'board-signaller-stopped-phone');

    // Whoever pressed stop records its cause; the signaller, who did not, is not offered the choice.
    expect(await signaller.page.getByRole('button', { name: 'Person in the exclusion zone' }).count()).toBe(0);
    await page.getByRole('button', { name: 'Person in the exclusion zone' }).click();
    await expect.poll(() => signaller.page.getByTestId('stopped-state').textContent()).toContain('Reason: Person in the exclusion zone');
    await expect.poll(() => page.getByTestId('stopped-state').textContent()).toContain('Reason: Person in the exclusion zone');
    await cab.context.close();
    await signaller.context.close();
  });
});
