// A supervisor and an operator who work in US customary units: the supervisor picks them in
// "My settings" and reads the planner's figures in US tons, lbf, ft and psi; the operator reads the
// cab's wind in mph and ft and records a reading in mph that the record keeps in m/s.
// Hand conversions with NIST SP 811 (2008) Appendix B.8 factors (from memory): 1 mi/h = 0.447 04 m/s
// and 1 ft = 0.3048 m, both exact.
import type { Browser, BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import type { TestServer } from '../helpers/server.js';
import path from 'node:path';
import { SCREENSHOT_DIR, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';
import { boardOf, startLiveDemo } from './live-demo.js';

/** The sizes the brief asks to look at: a phone and a portrait tablet. */
const phone = viewports.phone;
const tablet = { width: 820, height: 1180 };

const pageErrors: string[] = [];

async function signIn(browser: Browser, baseUrl: string, email: string, start: string, landing: RegExp, viewport: { width: number; height: number }): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  page.on('pageerror', (error) => pageErrors.push(`${email} ${start}: ${error.message}`));
  page.on('console', (message) => {
    if (message.text().includes('[Vue warn]') || (message.type() === 'error' && !message.text().startsWith('Failed to load resource'))) pageErrors.push(`${email}: ${message.text()}`);
  });
  await signInThroughForm(page, `${baseUrl}${start}`, email, DEMO_PASSWORD);
  await page.waitForURL((url) => landing.test(url.pathname));
  return { context, page };
}

/** What the screen shows now (the viewport), beside the full-page shot: what a person sees without scrolling. */
async function viewShot(page: Page, name: string): Promise<void> {
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}-view.png`) });
}

/** The value line of one figure in the planner's results. */
function figureValue(page: Page, label: string) {
  return page.locator('.planner-results .figure-row', { has: page.locator('.figure-label', { hasText: label }) }).first().locator('.figure-value');
}

describe('a crew working in US customary units', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  let supervisorToken: string;

  const boardNow = () => boardOf({ server, chromium, jobId, supervisorToken });

  beforeAll(async () => {
    ({ server, chromium, jobId, supervisorToken } = await startLiveDemo());
  });
  afterEach(() => {
    const errors = pageErrors.splice(0);
    expect(errors).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('the supervisor picks US customary in My settings and reads the planner in US tons, lbf, ft and psi', async () => {
    const { context, page } = await signIn(chromium.browser, server.url, 'supervisor@holdline.test', `/jobs/${jobId}?tab=planner`, /^\/jobs\/[^/]+$/, tablet);
    await expect.poll(() => figureValue(page, 'Lead-line pull').textContent(), { timeout: 15_000 }).toMatch(/ kN of .* kN permissible$/);

    await page.getByRole('button', { name: 'Account' }).click();
    await page.getByTestId('my-settings').click();
    const dialog = page.getByRole('dialog');
    await dialog.getByText('US customary').waitFor();
    expect(await dialog.textContent()).toContain('US ton, the short ton of 2,000 lb (US tons)');
    await screenshot(page, 'units-settings-tablet');
    await viewShot(page, 'units-settings-tablet');
    await dialog.getByTestId('units-us').click();
    await dialog.getByTestId('settings-save').click();
    await dialog.waitFor({ state: 'hidden' });

    // The same figures, now in the person's units with the unit written out; the server kept metric.
    await expect.poll(() => figureValue(page, 'Lead-line pull').textContent(), { timeout: 10_000 }).toMatch(/^[\d,]+ lbf of [\d,]+ lbf permissible$/);
    expect(await page.getByTestId('planner-units-note').textContent()).toContain('Figures in US customary units (US ton = 2,000 lb)');
    await page.getByTestId('planner-units-note').scrollIntoViewIfNeeded();
    await viewShot(page, 'units-planner-note-tablet');
    expect(await figureValue(page, 'Heaviest lift: share of the crane’s chart').textContent()).toMatch(/\([\d.]+ US tons of [\d.]+ US tons at [\d.]+ ft\)$/);
    expect(await figureValue(page, 'Hook block rating').textContent()).toMatch(/^[\d.]+ US tons of [\d.]+ US tons$/);
    expect(await figureValue(page, 'Ground pressure: Heaviest lift').textContent()).toMatch(/^[\d.]+ psi at \d+° slew, .* \(allowable [\d.]+ psi\)/);
    expect(await figureValue(page, 'Wind limit for raising').textContent()).toMatch(/^gust ≤ [\d.]+ mph, mean ≤ [\d.]+ mph/);
    // Every figure's value is in US units; left in metric on purpose: section and guy-line marks that
    // name their metric length, and the assist crane's chart by its name. The workings under each
    // figure stay in SI, as computed.
    const values = await page.locator('.planner-results .figure-row').evaluateAll((rows) =>
      rows.map((r) => ({ label: r.querySelector('.figure-label')?.textContent ?? '', value: r.querySelector('.figure-value')?.textContent ?? '' })),
    );
    const named = new Set(['Boom make-up', 'Guy-line set', 'Assist-crane chart']);
    expect(values.length).toBeGreaterThan(20);
    expect(values.filter((v) => !named.has(v.label) && /\d (t|kN|kPa|m|m\/s)\b/.test(v.value))).toEqual([]);
    await screenshot(page, 'units-planner-tablet');
    await figureValue(page, 'Lead-line pull').scrollIntoViewIfNeeded();
    await viewShot(page, 'units-planner-tablet');
    await page.setViewportSize(phone);
    await figureValue(page, 'Lead-line pull').scrollIntoViewIfNeeded();
    await screenshot(page, 'units-planner-phone');
    await viewShot(page, 'units-planner-phone');

    const job = await request(server.app).get(`/api/jobs/${jobId}`).set({ Authorization: `Bearer ${supervisorToken}` }).expect(200);
    const stored = (job.body.job.figures as { key: string; value: string }[]).find((f) => f.key === 'rope.leadLinePull')!;
    expect(stored.value).toMatch(/ kN of .* kN permissible$/);
    await context.close();
  });

  it('the operator reads the cab’s wind in mph and ft and records a reading in mph that the record keeps in m/s', async () => {
    const login = await request(server.app).post('/api/auth/login').send({ email: 'operator@holdline.test', password: DEMO_PASSWORD }).expect(200);
    await request(server.app).patch(`/api/users/${login.body.user.id}/preferences`).set({ Authorization: `Bearer ${login.body.token}` }).send({ units: 'us' }).expect(200);

    const { context, page } = await signIn(chromium.browser, server.url, 'operator@holdline.test', `/jobs/${jobId}/cab`, /\/cab$/, phone);
    const panel = page.locator('.weather');
    await panel.waitFor();
    await expect.poll(() => panel.locator('.limit').textContent(), { timeout: 15_000 }).toMatch(/mean [\d.]+ mph, gust [\d.]+ mph/);

    const wind = page.getByTestId('wind-recorder');
    expect(await wind.textContent()).toContain('speeds in mph to 0.1');
    await wind.getByLabel('Mean wind').fill('22');
    await wind.getByLabel('Gust').fill('29');
    await wind.getByLabel('Height of the reading').fill('33');
    await wind.getByTestId('wind-record').click();
    // 22 mph = 9.834 88 m/s → 9.9 (up); 29 mph = 12.964 16 m/s → 13.0 (up); 33 ft = 10.0584 m → 10.0 (down).
    await expect.poll(async () => (await boardNow()).weather, { timeout: 10_000 }).toMatchObject({ meanMs: 9.9, gustMs: 13, heightM: 10 });
    // Read back: 9.9 m/s = 22.146 mph → 22.2 (up); 13 m/s = 29.080 mph → 29.1 (up); 10 m = 32.808 ft → 32.8.
    await expect.poll(() => wind.locator('.done').textContent()).toBe('Recorded: mean 22.2 mph, gust 29.1 mph at 32.8 ft (9.9 m/s, 13 m/s at 10 m).');
    await expect.poll(() => panel.locator('.reading').textContent()).toMatch(/Mean 22\.2 mph\s*Gust 29\.1 mph\s*at 32\.8 ft/);
    await screenshot(page, 'units-cab-phone');
    await panel.scrollIntoViewIfNeeded();
    await viewShot(page, 'units-cab-phone');
    await page.setViewportSize(tablet);
    await screenshot(page, 'units-cab-tablet');
    await panel.scrollIntoViewIfNeeded();
    await viewShot(page, 'units-cab-tablet');
    await context.close();
  });
});
