import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { launchBrowser, screenshot, viewports, type LaunchedBrowser } from './browser.js';
import { startTestServer, type TestServer } from '../helpers/server.js';

describe('sign-in page', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    chromium = await launchBrowser();
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('renders with the product name at phone width, fonts from our own host', async () => {
    const context = await chromium.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    const foreign: string[] = [];
    page.on('request', (r) => {
      if (!r.url().startsWith(server.url) && !r.url().startsWith('data:')) foreign.push(r.url());
    });
    await page.goto(`${server.url}/jobs`);
    await page.waitForURL(/\/sign-in/);
    await expect.poll(() => page.getByRole('heading', { name: 'Sign in' }).isVisible()).toBe(true);
    expect(await page.locator('.brand-name').first().textContent()).toBe('Holdline');
    expect(await page.getByRole('button', { name: 'Sign in' }).isVisible()).toBe(true);
    await page.evaluate(() => document.fonts.ready);
    expect(await page.evaluate(() => document.fonts.check('16px Roboto'))).toBe(true);
    await screenshot(page, 'sign-in-phone');
    expect(foreign).toEqual([]);
    await context.close();
  });

  it('names what is missing under each field, in the schema’s words, before asking the server', async () => {
    const context = await chromium.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    const logins: string[] = [];
    page.on('request', (r) => {
      if (r.url().endsWith('/api/auth/login')) logins.push(r.url());
    });
    await page.goto(`${server.url}/sign-in`);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect.poll(() => page.getByText('Enter your e-mail').isVisible()).toBe(true);
    expect(await page.getByText('Enter your password').isVisible()).toBe(true);
    await page.getByLabel('E-mail').fill('not an address');
    await page.getByLabel('Password', { exact: true }).fill('something');
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect.poll(() => page.getByText('Enter a valid e-mail').isVisible()).toBe(true);
    await expect.poll(() => page.getByText('Enter your password').isVisible()).toBe(false);
    // Quasar fades the message in; the picture is for a person to look at, so let it finish.
    await page.waitForTimeout(400);
    await screenshot(page, 'sign-in-field-errors-phone');
    expect(logins).toEqual([]);
    await context.close();
  });
});
