import type { Browser, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEST_PASSWORD } from '../helpers/factories.js';
import { signedInUser, type SignedInUser } from '../helpers/auth.js';
import { addParts18m, seedModelAndUnit } from '../helpers/fleet.js';
import { configuration18m } from '../helpers/jobs.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, signInThroughForm, screenshot, viewports, type LaunchedBrowser } from './browser.js';

const pageErrors: string[] = [];

async function signIn(browser: Browser, baseUrl: string, email: string, next: string): Promise<Page> {
  const page = await (await browser.newContext({ viewport: viewports.phone })).newPage();
  page.on('pageerror', (error) => pageErrors.push(error.message));
  await signInThroughForm(page, `${baseUrl}${next}`, email, TEST_PASSWORD);
  await page.waitForURL((url) => url.pathname === next.split('?')[0]);
  return page;
}

function figureRow(page: Page, label: string) {
  return page.locator('.planner-results .figure-row', { has: page.locator('.figure-label', { hasText: label }) }).first();
}

describe('planner: the lowest hook position', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let supervisor: SignedInUser;
  let jobId: string;

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    chromium = await launchBrowser();
    supervisor = await signedInUser(server, { qualifications: ['supervisor'], email: 'ines.varga@crew.test' });
    const { model, unit } = await seedModelAndUnit(server, supervisor.token, 'CC-21');
    await addParts18m(server, supervisor.token, model.id, unit.id, 'CC21');
    const auth = { Authorization: `Bearer ${supervisor.token}` };
    jobId = (await request(server.app).post('/api/jobs').set(auth).send({ name: 'Valve pit lift', site: 'Pumping station', craneUnitId: unit.id, kind: 'erection' }).expect(201)).body.job.id as string;
    await request(server.app).put(`/api/jobs/${jobId}/configuration`).set(auth).send(configuration18m(unit.id)).expect(200);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('a hook below ground on a phone: fewer wraps as the depth is typed, a failure that cannot be overridden when the rope runs out, saved and checked by the server', async () => {
    const page = await signIn(chromium.browser, server.url, supervisor.user.email, `/jobs/${jobId}?tab=planner`);
    const wraps = figureRow(page, 'Wraps left on the drum');
    // Demo data, 18 m, HB120 × 6, hook at ground level: tip 2.6 + 18 = 20.6 m; 6 × 20.6 + (6.5 + 18) = 148.1 m paid out;
    // (640 − 148.1) ÷ (π × 0.64) = 244.65 wraps, shown rounded down (two full wraps at the lowest hook position: ASME B30.5-2018 §5-1.3.1(a)(2)(-a))
    await expect.poll(async () => (await wraps.locator('.figure-value').textContent()) ?? '').toBe('244.6 wraps (at least 2)');

    const hook = page.getByRole('group', { name: 'Lowest hook position' });
    await hook.getByRole('button', { name: 'Below ground' }).click();
    const depth = page.getByLabel('Depth of the hook below ground');
    await depth.fill('20');
    // 20 m down a pit: 6 × 40.6 + 24.5 = 268.1 m paid out → 371.9 ÷ 2.010619 = 184.97 wraps, shown rounded down
    await expect.poll(async () => (await wraps.locator('.figure-value').textContent()) ?? '').toBe('184.9 wraps (at least 2)');
    await hook.scrollIntoViewIfNeeded();
    await screenshot(page, 'planner-hook-below-ground-phone');

    // 150 m down a shaft: 6 × 170.6 + 24.5 = 1,048.1 m, more than the 640 m on the drum.
    await depth.fill('150');
    await expect.poll(async () => (await wraps.locator('.figure-value').textContent()) ?? '').toBe('0.0 wraps, fewer than 2');
    expect(await wraps.getByText(/Cannot be overridden/).isVisible()).toBe(true);
    await wraps.scrollIntoViewIfNeeded();
    await screenshot(page, 'planner-hook-wraps-fail-phone');

    await depth.fill('20');
    await expect.poll(async () => (await wraps.locator('.figure-value').textContent()) ?? '').toBe('184.9 wraps (at least 2)');
    await page.getByRole('button', { name: 'Save configuration' }).click();
    await expect.poll(() => page.locator('.planner-results').getByText('Checked by the server').isVisible()).toBe(true);
    expect(await page.getByText("The server's figures match those computed on this device.").isVisible()).toBe(true);
    const saved = await request(server.app).get(`/api/jobs/${jobId}`).set({ Authorization: `Bearer ${supervisor.token}` }).expect(200);
    expect(saved.body.job.configuration.mainHook.lowestHookPositionM).toBe(-20);
    expect(saved.body.job.figures.find((f: { key: string }) => f.key === 'rope.wraps').value).toBe('184.9 wraps (at least 2)');

    // Back to ground level: the distance field goes and the figure returns.
    await hook.getByRole('button', { name: 'Ground level' }).click();
    expect(await depth.isVisible()).toBe(false);
    await expect.poll(async () => (await wraps.locator('.figure-value').textContent()) ?? '').toBe('244.6 wraps (at least 2)');
    expect(pageErrors).toEqual([]);
    await page.context().close();
  });
});
