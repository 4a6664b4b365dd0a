import { mkdirSync, readFileSync } from 'node:fs';
import type { Browser, Page } from 'playwright-core';
import sharp from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { TEST_PASSWORD } from '../helpers/factories.js';
import { signedInUser, type SignedInUser } from '../helpers/auth.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import path from 'node:path';
import { launchBrowser, signInThroughForm, SCREENSHOT_DIR, screenshot, viewports, type LaunchedBrowser } from './browser.js';

type Viewport = (typeof viewports)[keyof typeof viewports];

/** Signs in through the real form and lands on `next`. */
async function signIn(browser: Browser, baseUrl: string, viewport: Viewport, email: string, next: string): Promise<Page> {
  const context = await browser.newContext({ viewport });
  const page = await context.newPage();
  await signInThroughForm(page, `${baseUrl}${next}`, email, TEST_PASSWORD);
  await page.waitForURL((url) => url.pathname === next.split('?')[0]);
  return page;
}

/** What is on screen now: a dialog is fixed to the viewport, so a full-page shot would hide it. */
async function viewShot(page: Page, name: string): Promise<void> {
  await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running'));
  mkdirSync(SCREENSHOT_DIR, { recursive: true });
  await page.screenshot({ path: path.join(SCREENSHOT_DIR, `${name}.png`) });
}

describe('fleet screens', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let supervisor: SignedInUser;
  let rigger: SignedInUser;
  let unitId: string;
  let modelId: string;
  const serials = new Map<string, string>();

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    chromium = await launchBrowser();
    // The test server has no demo data: the fleet is built here through the real HTTP API.
    supervisor = await signedInUser(server, { qualifications: ['supervisor'], email: 'ines.varga@crew.test' });
    rigger = await signedInUser(server, { qualifications: ['rigger'], email: 'tomas.reyes@crew.test' });
    const auth = { Authorization: `Bearer ${supervisor.token}` };
    const arrangement = JSON.parse(readFileSync(new URL('../../server/demo/data/crane-model.json', import.meta.url), 'utf8')) as unknown;
    const imported = await request(server.app).post('/api/crane-models/import').set(auth).send(arrangement as object).expect(201);
    modelId = imported.body.model.id as string;
    const unit = await request(server.app).post('/api/crane-units').set(auth).send({ fleetNumber: 'TX-04', modelId, location: 'East laydown' }).expect(201);
    unitId = unit.body.unit.id as string;
    const parts: [string, string][] = [
      ['TX-BASE-01', 'base'],
      ['TX-INS12-01', 'ins12'],
      ['TX-INS12-02', 'ins12'],
      ['TX-INS3-01', 'ins3'],
      ['TX-TIP-01', 'tip'],
    ];
    for (const [serial, typeId] of parts) {
      const res = await request(server.app).post('/api/components').set(auth).send({ serial, kind: 'section', typeId, modelId, unitId, location: 'East laydown' }).expect(201);
      serials.set(serial, res.body.component.id as string);
    }
    // One insert found damaged earlier: quarantined before anyone opens the screens.
    await request(server.app)
      .post(`/api/components/${serials.get('TX-INS12-02')}/inspections`)
      .set(auth)
      .send({ result: 'damaged', notes: 'Top chord dented 2 m from the foot end', photoIds: [] })
      .expect(201);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('shows the quarantined insert as quarantined on the component list at phone width', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.phone, rigger.user.email, '/fleet/components');
    const card = page.locator('.component-card', { hasText: 'TX-INS12-02' });
    await expect.poll(() => card.isVisible()).toBe(true);
    await expect.poll(() => page.getByText('5 components').isVisible()).toBe(true);
    expect(await card.getAttribute('class')).toContain('quarantined');
    expect(await card.locator('.component-status').textContent()).toContain('Quarantined');
    expect(await page.locator('.component-card', { hasText: 'TX-INS12-01' }).locator('.component-status').textContent()).toContain('Serviceable');
    expect(await page.getByRole('status').filter({ hasText: '1 component quarantined' }).isVisible()).toBe(true);
    // Quarantined parts sort first, so they are the first thing seen.
    expect(await page.locator('.component-card .serial').first().textContent()).toBe('TX-INS12-02');
    await screenshot(page, 'fleet-components-phone');
    await page.context().close();
  });

  it('lets a rigger record a damage finding with a photo from the phone form', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.phone, rigger.user.email, `/fleet/components/${serials.get('TX-INS12-01')}`);
    await expect.poll(() => page.getByRole('heading', { name: 'TX-INS12-01' }).isVisible()).toBe(true);
    // A rigger records inspections but does not change the fleet.
    expect(await page.getByRole('button', { name: 'Retire component' }).count()).toBe(0);
    await page.getByRole('button', { name: 'Record inspection' }).click();
    const dialog = page.getByRole('dialog');
    await expect.poll(() => dialog.getByRole('radio', { name: /Damaged/ }).isVisible()).toBe(true);
    expect(await dialog.getByText("Guidance; the manufacturer's criteria govern.").isVisible()).toBe(true);
    expect(await dialog.getByText('Bent or missing lacings').isVisible()).toBe(true);
    const submit = dialog.getByRole('button', { name: 'Record inspection' });
    expect(await submit.isDisabled()).toBe(true);

    // Every target a gloved hand needs is at least 48 px tall.
    for (const name of [/Serviceable/, /Damaged/, /Repaired/]) {
      const box = await dialog.getByRole('radio', { name }).boundingBox();
      expect(box?.height).toBeGreaterThanOrEqual(48);
    }

    await dialog.getByRole('radio', { name: /Damaged/ }).click();
    expect(await dialog.getByRole('radio', { name: /Damaged/ }).getAttribute('aria-checked')).toBe('true');
    await submit.click();
    await expect.poll(() => dialog.getByText('Describe the damage found').isVisible()).toBe(true);

    await dialog.getByLabel(/Notes/).fill('Lacing bent at the third bay, left side');
    await expect.poll(() => dialog.getByText('Describe the damage found').count()).toBe(0);
    const png = await sharp({ create: { width: 640, height: 480, channels: 3, background: { r: 180, g: 110, b: 50 } } }).png().toBuffer();
    await dialog.locator('input[type=file]').setInputFiles({ name: 'lacing.png', mimeType: 'image/png', buffer: png });
    await expect.poll(() => dialog.getByText('Uploaded').isVisible()).toBe(true);
    expect(await dialog.getByRole('button', { name: 'Remove photo lacing.png' }).isVisible()).toBe(true);
    expect(await submit.isEnabled()).toBe(true);
    const removeBox = await dialog.getByRole('button', { name: 'Remove photo lacing.png' }).boundingBox();
    expect(removeBox?.height).toBeGreaterThanOrEqual(48);
    await viewShot(page, 'fleet-inspection-phone');

    await submit.click();
    await expect.poll(() => dialog.count()).toBe(0);
    await expect.poll(() => page.locator('.component-status', { hasText: 'Quarantined' }).first().isVisible()).toBe(true);
    expect(await page.getByText('Quarantined: do not use.').isVisible()).toBe(true);
    const entry = page.locator('.history li').first();
    expect(await entry.textContent()).toContain('Lacing bent at the third bay, left side');
    await expect.poll(() => entry.locator('img').evaluate((img) => (img as HTMLImageElement).naturalWidth)).toBeGreaterThan(0);
    await screenshot(page, 'fleet-component-after-phone');
    await page.context().close();

    // The server holds the finding, its photo and the quarantine.
    const detail = await request(server.app).get(`/api/components/${serials.get('TX-INS12-01')}`).set({ Authorization: `Bearer ${supervisor.token}` }).expect(200);
    expect(detail.body.component.status).toBe('quarantined');
    expect(detail.body.inspections[0]).toMatchObject({ result: 'damaged', notes: 'Lacing bent at the third bay, left side' });
    expect(detail.body.inspections[0].photos).toHaveLength(1);
  });

  it('filters the component list by status on a desktop and shows the inspection form there', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.desktop, supervisor.user.email, '/fleet/components');
    const table = page.locator('.component-table');
    await expect.poll(() => table.locator('tbody tr').count()).toBe(5);
    await page.getByLabel('Status').click();
    await page.getByRole('option', { name: 'Quarantined' }).click();
    await page.waitForURL(/status=quarantined/);
    await expect.poll(() => table.locator('tbody tr').count()).toBe(2);
    expect(await table.locator('tbody tr.row-quarantined').count()).toBe(2);
    await page.waitForFunction(() => document.getAnimations().every((a) => a.playState !== 'running'));
    await screenshot(page, 'fleet-components-desktop');

    await page.getByRole('link', { name: 'TX-INS12-02' }).click();
    await page.getByRole('button', { name: 'Record inspection' }).click();
    await expect.poll(() => page.getByRole('dialog').getByRole('radio', { name: /Repaired/ }).isVisible()).toBe(true);
    await viewShot(page, 'fleet-inspection-desktop');
    await page.context().close();
  });

  it('draws the unit boom and names the quarantined inserts at tablet width', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.tablet, supervisor.user.email, `/fleet/units/${unitId}`);
    await expect.poll(() => page.getByRole('heading', { name: 'TX-04' }).isVisible()).toBe(true);
    expect(await page.getByText("The manufacturer's arrangement data and manual govern.").isVisible()).toBe(true);
    await page.getByRole('radio', { name: '42 m' }).click();
    const drawing = page.locator('.boom-drawing svg');
    await expect.poll(() => drawing.count()).toBe(1);
    const texts = await drawing.locator('text').allTextContents();
    expect(texts).toContain('QUARANTINED');
    expect(texts).toContain('TX-INS12-02');
    expect(texts).toContain('Base 8 m');
    expect(await page.getByText('Cannot be built from the parts at hand.').isVisible()).toBe(true);
    expect(await page.locator('.reasons').textContent()).toContain('TX-INS12-02');
    await screenshot(page, 'fleet-unit-tablet');
    await page.context().close();
  });

  it('saves the model’s arrangement file as JSON named for its id', async () => {
    const raw = JSON.parse(readFileSync(new URL('../../server/demo/data/crane-model.json', import.meta.url), 'utf8')) as { id: string; sectionTypes: unknown[] };
    const page = await signIn(chromium.browser, server.url, viewports.desktop, supervisor.user.email, `/fleet/models/${modelId}`);
    const button = page.getByRole('button', { name: 'Download arrangement file' });
    await expect.poll(() => button.isVisible()).toBe(true);
    const downloading = page.waitForEvent('download');
    await button.click();
    const download = await downloading;
    expect(download.suggestedFilename()).toBe(`${raw.id}.json`);
    const saved = await download.path();
    const file = JSON.parse(readFileSync(saved, 'utf8')) as { id: string; sectionTypes: unknown[] };
    expect(file.id).toBe(raw.id);
    expect(file.sectionTypes).toHaveLength(raw.sectionTypes.length);
    expect(await page.getByRole('alert').count()).toBe(0);
    await page.context().close();
  });
});
