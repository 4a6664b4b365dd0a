import AxeBuilder from '@axe-core/playwright';
import type { Browser, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { insertUser, TEST_PASSWORD } from '../helpers/factories.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, signInThroughForm, screenshot, viewports, type LaunchedBrowser } from './browser.js';

type Viewport = (typeof viewports)[keyof typeof viewports];

/** Signs in through the real form; `next` is where the sign-in page sends us afterwards. */
async function signIn(browser: Browser, baseUrl: string, viewport: Viewport, email: string, next: string): Promise<Page> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  await signInThroughForm(page, `${baseUrl}${next}`, email, TEST_PASSWORD);
  return page;
}

/** WCAG AA contrast on what is on screen now; answers the failing rules with their elements. */
async function contrastProblems(page: Page): Promise<string[]> {
  // Colours fade for a moment after a theme change; measure the settled screen, not the fade.
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running'));
  const result = await new AxeBuilder({ page }).withRules(['color-contrast']).analyze();
  return result.violations.flatMap((v) => v.nodes.map((n) => `${v.id}: ${n.target.join(' ')} ${n.failureSummary ?? ''}`));
}

describe('people screen', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    chromium = await launchBrowser();
    // Invented crew; the test server has no demo data.
    await server.context.queue.transaction(async (m) => {
      await insertUser(m, { email: 'freya.castell@crew.test', displayName: 'Freya Castell', qualifications: ['viewer'], isAdmin: true });
      await insertUser(m, { email: 'wendell.osei@crew.test', displayName: 'Wendell Osei', qualifications: ['supervisor', 'signaller'] });
      await insertUser(m, { email: 'b.quist@crew.test', displayName: 'Bram Quist', qualifications: ['operator'] });
      await insertUser(m, { email: 'signe.halvorsen@crew.test', displayName: 'Signe Halvorsen', qualifications: ['rigger'], password: undefined });
      await insertUser(m, { email: 'tove.lund@crew.test', displayName: 'Tove Lund', qualifications: ['rigger', 'signaller'] });
    });
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('signs the supervisor in to the main layout, without the admin section', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.phone, 'wendell.osei@crew.test', '/jobs');
    await page.waitForURL(/\/jobs$/);
    await expect.poll(() => page.getByRole('heading', { name: 'Jobs', exact: true }).isVisible()).toBe(true);
    const nav = page.getByRole('navigation', { name: 'Main' });
    await expect.poll(() => nav.getByRole('link', { name: 'Records' }).isVisible()).toBe(true);
    expect(await nav.getByRole('link', { name: 'People' }).count()).toBe(0);
    await screenshot(page, 'people-supervisor-jobs-phone');

    // The admin screen is closed to a supervisor even by its address: the guard sends them back.
    await page.goto(`${server.url}/people`);
    await page.waitForURL(/\/jobs$/);
    await expect.poll(() => page.getByRole('heading', { name: 'Jobs', exact: true }).isVisible()).toBe(true);
    await page.context().close();
  });

  it('lets the admin find a person by name on a desktop, in the day and night themes', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.desktop, 'freya.castell@crew.test', '/people');
    await page.waitForURL(/\/people$/);
    const table = page.locator('.people-table');
    await expect.poll(() => table.getByText('Signe Halvorsen').isVisible()).toBe(true);
    await expect.poll(() => table.getByText('5 people').isVisible()).toBe(true);
    // Without the demo's fake mail server there is no test inbox, so its tab stays hidden.
    expect(await page.getByRole('tab', { name: 'Sign-in audit' }).isVisible()).toBe(true);
    expect(await page.getByRole('tab', { name: 'Test inbox' }).count()).toBe(0);

    await page.getByLabel('Search people by name or e-mail').fill('halvor');
    await expect.poll(() => table.locator('tbody tr').count()).toBe(1);
    const row = table.locator('tbody tr').first();
    expect(await row.textContent()).toContain('Signe Halvorsen');
    expect(await row.textContent()).toContain('Invitation pending');
    expect(await table.getByText('1 of 5 people').isVisible()).toBe(true);
    expect(await contrastProblems(page)).toEqual([]);
    await screenshot(page, 'people-search-desktop');

    await page.getByRole('button', { name: 'Switch to night theme' }).click();
    await expect.poll(() => page.evaluate(() => document.body.classList.contains('body--dark'))).toBe(true);
    expect(await contrastProblems(page)).toEqual([]);
    await screenshot(page, 'people-search-desktop-night');
    await page.context().close();
  });

  it('lets the admin find a person by e-mail at phone width, as cards', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.phone, 'freya.castell@crew.test', '/people');
    await page.waitForURL(/\/people$/);
    await expect.poll(() => page.getByRole('article', { name: 'Bram Quist' }).isVisible()).toBe(true);
    await page.getByLabel('Search people by name or e-mail').fill('B.QUIST@');
    await expect.poll(() => page.locator('article.person-card').count()).toBe(1);
    const card = page.getByRole('article', { name: 'Bram Quist' });
    expect(await card.textContent()).toContain('Operator');
    expect(await card.textContent()).toContain('Active');
    // The Edit target stays big enough for a gloved thumb.
    const box = await card.getByRole('button', { name: 'Edit Bram Quist' }).boundingBox();
    expect(box?.height).toBeGreaterThanOrEqual(48);
    expect(await contrastProblems(page)).toEqual([]);
    await screenshot(page, 'people-search-phone');

    await page.getByLabel('Search people by name or e-mail').fill('nobody-here');
    await expect.poll(() => page.getByText('No one matches “nobody-here”').isVisible()).toBe(true);
    await page.context().close();
  });
});
