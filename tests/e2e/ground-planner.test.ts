// The ground part of the planner in a real browser on the demo: the worst slew angle on the
// figures, the pressure-against-slew drawing, the temporary-works designer field, and the
// configuration sheet carrying the same. Screenshots at phone and desktop width are looked at.
import { writeFileSync } from 'node:fs';
import path from 'node:path';
import type { Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { addParts18m, demoArrangement } from '../helpers/fleet.js';
import { configuration18m } from '../helpers/jobs.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, SCREENSHOT_DIR, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';

const DISMANTLING_JOB = 'Transformer T2 lift: boom dismantling';

function figureRow(page: Page, label: string) {
  return page.locator('.planner-results .figure-row', { has: page.locator('.figure-label', { hasText: label }) }).first();
}

describe('planner: ground pressure over the slew range', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let token: string;
  let jobId: string;

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor2@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === DISMANTLING_JOB)!.id;
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  for (const [name, viewport] of [['phone', viewports.phone], ['desktop', viewports.desktop]] as const) {
    it(`shows the worst slew angle and the pressure-against-slew drawing at ${name} width`, async () => {
      const context = await chromium.browser.newContext({ viewport });
      const page = await context.newPage();
      await signInThroughForm(page, `${server.url}/jobs/${jobId}?tab=planner`, 'supervisor2@holdline.test', DEMO_PASSWORD);
      await expect.poll(() => page.getByRole('heading', { name: 'Figures' }).isVisible(), { timeout: 20_000 }).toBe(true);
      const unloaded = figureRow(page, 'Ground pressure: Unloaded, boom at the lifting angle without mats');
      await expect.poll(() => unloaded.locator('.figure-value').textContent(), { timeout: 20_000 }).toMatch(/kPa at \d+° slew, (rigid plane|per track) \(allowable 300 kPa\)/);
      expect(await figureRow(page, 'Weights in the ground pressure').locator('.figure-value').textContent()).toMatch(/Every weight in the crane data is included/);
      await screenshot(page, `ground-planner-${name}`);
      await figureRow(page, 'Ground pressure: Raising').scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `ground-figures-${name}.png`) });
      const drawing = page.getByText('Ground pressure against slew angle, per load case');
      await drawing.scrollIntoViewIfNeeded();
      const svg = page.locator('svg[aria-label^="Ground pressure against slew angle"]');
      await expect.poll(() => svg.count()).toBe(1);
      expect(await svg.locator('polygon[data-worst]').count()).toBe(3);
      await svg.scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `ground-drawing-${name}.png`) });

      // The ground section asks for the designer only for a temporary-works design.
      await page.getByRole('radio', { name: 'Temporary-works design' }).click();
      const designer = page.getByLabel('Temporary-works designer');
      await expect.poll(() => designer.isVisible()).toBe(true);
      await designer.scrollIntoViewIfNeeded();
      await page.screenshot({ path: path.join(SCREENSHOT_DIR, `ground-section-${name}.png`) });
      await context.close();
    });
  }

  it('names every weight the crane data leaves out, on screen and on the sheet, and never shows Pass for ground', async () => {
    // Crane data written before the weights were asked for: no boom-foot position, mast, rope masses or guy-line weights.
    const admin = (await request(server.app).post('/api/auth/login').send({ email: 'admin@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const adminAuth = { Authorization: `Bearer ${admin}` };
    const old = demoArrangement();
    old.id = 'mhw-250l-older-data';
    old.model = 'MHW 250L (older data file)';
    old.machine.boomFoot = null;
    old.machine.mast = null;
    for (const rope of old.ropes) rope.massKgPerM = null;
    for (const a of old.arrangements) for (const g of a.guyLines) g.weightKg = null;
    const model = (await request(server.app).post('/api/crane-models/import').set(adminAuth).send(old).expect(201)).body.model as { id: string };
    const unit = (await request(server.app).post('/api/crane-units').set(adminAuth).send({ fleetNumber: 'FL-31', modelId: model.id, location: 'Depot' }).expect(201)).body.unit as { id: string };
    await addParts18m(server, admin, model.id, unit.id, 'F31');
    const auth = { Authorization: `Bearer ${token}` };
    const job = (await request(server.app).post('/api/jobs').set(auth).send({ name: 'Older crane data check', site: 'Depot yard', craneUnitId: unit.id, kind: 'erection' }).expect(201)).body.job as { id: string };
    const saved = await request(server.app).put(`/api/jobs/${job.id}/configuration`).set(auth).send(configuration18m(unit.id)).expect(200);
    const figures = saved.body.job.figures as { key: string; status: string; value: string }[];
    expect(figures.find((f) => f.key === 'ground.weights')).toMatchObject({ status: 'caution' });
    expect(figures.filter((f) => f.key.startsWith('ground.') && f.status === 'pass')).toEqual([]);

    const context = await chromium.browser.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    await signInThroughForm(page, `${server.url}/jobs/${job.id}?tab=planner`, 'supervisor2@holdline.test', DEMO_PASSWORD);
    const weights = figureRow(page, 'Weights in the ground pressure');
    await expect.poll(() => weights.locator('.figure-value').textContent(), { timeout: 20_000 }).toMatch(/^Not included: the boom foot’s position/);
    await figureRow(page, 'Ground pressure: Raising').scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'ground-not-included-phone.png') });
    await weights.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'ground-not-included-list-phone.png') });
    await context.close();

    const pdf = await request(server.app).get(`/api/jobs/${job.id}/configuration.pdf`).set(auth).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(pdf.status).toBe(200);
    writeFileSync(path.join(SCREENSHOT_DIR, 'ground-not-included-sheet.pdf'), pdf.body as Buffer);
  });

  it('prints the worst angles, the drawing and the designer on the configuration sheet', async () => {
    const auth = { Authorization: `Bearer ${token}` };
    const job = (await request(server.app).get(`/api/jobs/${jobId}`).set(auth).expect(200)).body.job;
    const configuration = {
      ...job.configuration,
      ground: { ...job.configuration.ground, source: { kind: 'temporary_works_design', reference: 'TW-0042 rev C', designer: '' } },
    };
    const refused = await request(server.app).put(`/api/jobs/${jobId}/configuration`).set(auth).send(configuration).expect(400);
    expect(JSON.stringify(refused.body)).toMatch(/ground\.source\.designer/);
    configuration.ground.source.designer = 'P. Marlow, Stanegate Temporary Works';
    await request(server.app).put(`/api/jobs/${jobId}/configuration`).set(auth).send(configuration).expect(200);
    const pdf = await request(server.app).get(`/api/jobs/${jobId}/configuration.pdf`).set(auth).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(pdf.status).toBe(200);
    writeFileSync(path.join(SCREENSHOT_DIR, 'ground-configuration-sheet.pdf'), pdf.body as Buffer);
  });
});
