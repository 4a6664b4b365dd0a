import AxeBuilder from '@axe-core/playwright';
import type { BrowserContext, Page, WebSocketRoute } from 'playwright-core';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BoardSnapshot } from '../../shared/board/types.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, viewports, type LaunchedBrowser, signInThroughForm } from './browser.js';

const LIVE_JOB = 'Transformer T2 lift: boom erection';
type Who = 'supervisor' | 'operator' | 'signaller' | 'rigger' | 'viewer';
const views: Record<Who, string> = { supervisor: 'console', operator: 'cab', signaller: 'signaller', rigger: 'rigger', viewer: 'board' };

/**
 * The live board in real browsers on the demo's live job: four crew members at once, a cut
 * WebSocket, a stop from the boom reaching the cab, accessibility. No fixed sleeps: every check
 * waits for the page to show what it should.
 */
describe('the live board across devices', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  const tokens = {} as Record<Who, string>;
  const open: { context: BrowserContext; page: Page }[] = [];

  const api = (who: Who) => ({ Authorization: `Bearer ${tokens[who]}` });
  const boardNow = async () => (await request(server.app).get(`/api/jobs/${jobId}/board`).set(api('supervisor')).expect(200)).body as BoardSnapshot;
  const command = (who: Who, body: Record<string, unknown>) =>
    request(server.app).post(`/api/jobs/${jobId}/commands`).set(api(who)).send({ commandId: crypto.randomUUID(), ...body }).expect(200);

  /** Signs a person in through the form and opens their view of the live job. */
  async function openView(who: Who, viewport: { width: number; height: number } = viewports.phone, view = views[who]): Promise<{ context: BrowserContext; page: Page }> {
    const context = await chromium.browser.newContext({ viewport });
    const page = await context.newPage();
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/${view}`, `${who}@holdline.test`, DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith(`/${view}`));
    await page.locator('.board-header .fleet').waitFor();
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    open.push({ context, page });
    return { context, page };
  }
  const announced = (page: Page) => page.locator('[role="status"][aria-live="polite"]').last().textContent();

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    for (const who of Object.keys(views) as Who[]) {
      tokens[who] = (await request(server.app).post('/api/auth/login').send({ email: `${who}@holdline.test`, password: DEMO_PASSWORD }).expect(200)).body.token;
    }
    const jobs = await request(server.app).get('/api/jobs').set(api('supervisor')).expect(200);
    jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === LIVE_JOB)!.id;
  });
  afterAll(async () => {
    for (const { context } of open) await context.close().catch(() => undefined);
    await chromium?.close();
    await server?.stop();
  });

  it('four crew members: the signaller acknowledges, the supervisor releases, the rigger completes a step, and every other screen shows each change', async () => {
    const supervisor = (await openView('supervisor', viewports.tablet)).page;
    const operator = (await openView('operator', viewports.tablet)).page;
    const signaller = (await openView('signaller')).page;
    const rigger = (await openView('rigger')).page;
    const before = await boardNow();
    const tension = before.stages.find((s) => s.id === 'er-tension')!;
    const holdId = tension.hold!.id;
    expect(tension.hold!.acknowledgments.map((a) => a.role)).toEqual(['operator']);

    // The cab's own acknowledgment controls for this hold are big enough for gloves.
    const cabHold = operator.getByTestId(`hold-${holdId}`);
    await cabHold.waitFor();
    const cabButtons = cabHold.locator('button');
    expect(await cabButtons.count()).toBeGreaterThan(0);
    for (let i = 0; i < (await cabButtons.count()); i++) {
      const box = await cabButtons.nth(i).boundingBox();
      expect(Math.min(box!.width, box!.height), `cab hold button ${i}`).toBeGreaterThanOrEqual(64);
    }

    // 1. The signaller acknowledges the waiting hold.
    await signaller.getByTestId(`ack-${holdId}-signaller`).getByRole('button', { name: 'Acknowledge as signaller' }).click();
    for (const page of [supervisor, operator, rigger]) await expect.poll(() => announced(page), { timeout: 10_000 }).toContain('Hold point acknowledged by every role');
    await expect.poll(() => supervisor.getByTestId(`ack-${holdId}-signaller`).textContent()).toContain('Aisha Ndlovu');
    await expect.poll(() => operator.getByTestId(`ack-${holdId}-signaller`).textContent()).toContain('Aisha Ndlovu');

    // 2. The supervisor releases it: the summary first, then a press-and-hold (a tap releases nothing).
    await supervisor.getByTestId(`release-${holdId}`).click();
    const dialog = supervisor.getByTestId(`release-dialog-${holdId}`);
    await dialog.waitFor();
    expect(await dialog.textContent()).toContain('Aisha Ndlovu, signaller');
    await dialog.getByTestId(`release-dialog-${holdId}-hold`).click();
    expect((await boardNow()).stages.find((s) => s.id === 'er-tension')?.hold?.state).toBe('acknowledged');
    await dialog.getByTestId(`release-dialog-${holdId}-hold`).hover();
    await supervisor.mouse.down();
    await dialog.waitFor({ state: 'detached', timeout: 10_000 });
    await supervisor.mouse.up();
    for (const page of [operator, signaller, rigger]) await expect.poll(() => announced(page), { timeout: 10_000 }).toContain('Hold point released');
    await expect.poll(async () => (await boardNow()).stages.find((s) => s.id === 'er-tension')?.state).toBe('done');

    // 3. The rigger completes a step of the reeving stage.
    const reeve = (await boardNow()).stages.find((s) => s.id === 'er-reeve')!;
    const total = reeve.steps.length;
    const doneBefore = reeve.steps.filter((s) => s.state === 'done').length;
    await rigger.getByTestId('complete-er-reeve.block').click();
    const progress = `${doneBefore + 1} of ${total} steps done`;
    await expect.poll(() => supervisor.getByTestId('stage-er-reeve').first().textContent(), { timeout: 10_000 }).toContain(progress);
    await expect.poll(() => signaller.getByTestId('stage-er-reeve').first().textContent(), { timeout: 10_000 }).toContain(progress);
    await expect.poll(() => operator.getByTestId('stage-progress').textContent(), { timeout: 10_000 }).toContain(progress);
    await screenshot(supervisor, 'live-console-after-release-tablet');
    await screenshot(operator, 'live-cab-after-release-tablet');
    for (const { context } of open.splice(0)) await context.close();
  });

  it('axe finds no contrast or naming problems on any view, the cab meets AAA contrast, and its acknowledgment targets are at least 64 px', async () => {
    for (const who of ['operator', 'signaller', 'rigger', 'supervisor', 'viewer'] as Who[]) {
      for (const theme of ['day', 'night']) {
        const { context, page } = await openView(who, viewports.desktop);
        await page.evaluate((t) => localStorage.setItem('holdline.theme', t), theme);
        await page.reload();
        await page.locator('.board-header .fleet').waitFor();
        await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
        const rules = ['color-contrast', 'button-name', 'link-name', 'label', 'image-alt', 'aria-command-name', 'aria-input-field-name', 'aria-toggle-field-name'];
        if (who === 'operator') rules.push('color-contrast-enhanced');
        const result = await new AxeBuilder({ page }).withRules(rules).analyze();
        const problems = result.violations.map((v) => `${who}/${theme} ${v.id}: ${v.nodes.map((n) => n.target.join(' ')).slice(0, 3).join(', ')}`);
        expect(problems).toEqual([]);
        await context.close();
        open.splice(0);
      }
    }
    // The cab's step controls (its hold controls are measured in the first test).
    const { page } = await openView('operator', viewports.tablet);
    const targets = page.locator('.cab button, .cab .q-btn, .cab [role="button"]');
    await page.getByText('Your steps').waitFor();
    await screenshot(page, 'live-cab-targets-tablet');
    const count = await targets.count();
    expect(count).toBeGreaterThan(0);
    for (let i = 0; i < count; i++) {
      const box = await targets.nth(i).boundingBox();
      if (box) expect(Math.min(box.width, box.height), `cab target ${i}`).toBeGreaterThanOrEqual(64);
    }
    for (const { context } of open.splice(0)) await context.close();
  }, 240_000);

  it('a stop raised by the rigger reaches the cab as the stopped state', async () => {
    const cab = (await openView('operator', viewports.tablet)).page;
    const rigger = (await openView('rigger')).page;
    const stop = rigger.getByTestId('stop-control');
    await stop.hover();
    await rigger.mouse.down();
    await rigger.getByTestId('stopped-state').waitFor({ timeout: 10_000 });
    await rigger.mouse.up();
    await cab.getByTestId('stopped-state').waitFor({ timeout: 10_000 });
    expect(await cab.getByTestId('stopped-state').textContent()).toContain('Callum Frey');
    await screenshot(cab, 'live-cab-stopped-by-rigger-tablet');
    // Resume for the next test: a fresh weather reading, then the supervisor's resume with a reason.
    await command('signaller', { type: 'weather.record', meanMs: 4, gustMs: 6, heightM: 10 });
    await command('rigger', { type: 'job.stop.note', reason: 'Tag line caught on a mat' });
    await command('supervisor', { type: 'job.resume', reason: 'Rigger’s tag line cleared; area checked' });
    await cab.getByTestId('stopped-state').waitFor({ state: 'detached', timeout: 10_000 });
    for (const { context } of open.splice(0)) await context.close();
  });

  it('a cut WebSocket shows not live at once with controls disabled; a stop pressed meanwhile is sent with its pressed time when the connection returns, and the board catches up', async () => {
    const context = await chromium.browser.newContext({ viewport: viewports.tablet });
    let cut = false;
    const routes: WebSocketRoute[] = [];
    // Every socket of this page goes through this route; cutting closes both sides and refuses new ones.
    await context.routeWebSocket(/\/socket\.io\//, (ws) => {
      if (cut) {
        void ws.close({ code: 1001, reason: 'cut by the test' });
        return;
      }
      ws.connectToServer();
      routes.push(ws);
    });
    const page = await context.newPage();
    open.push({ context, page });
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/rigger`, 'rigger@holdline.test', DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith('/rigger'));
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    const openStep = (await boardNow()).stages.find((s) => s.id === 'er-reeve')!.steps.find((s) => s.state === 'open' && s.allowedRoles.includes('rigger') && !s.records && !s.requiresPhoto)!;
    await page.getByTestId(`complete-${openStep.id}`).waitFor();

    const cutAt = Date.now();
    cut = true;
    for (const ws of routes.splice(0)) await ws.close({ code: 1001, reason: 'cut by the test' });
    await page.getByTestId('not-live').waitFor({ timeout: 3000 });
    expect(Date.now() - cutAt).toBeLessThan(3000);
    expect(await page.getByTestId(`complete-${openStep.id}`).isDisabled()).toBe(true);
    await screenshot(page, 'live-rigger-not-live-tablet');

    // Meanwhile on site: someone else completes the radio check.
    await command('signaller', { type: 'step.complete', stepId: 'er-reeve.radio-check' });

    // The stop pressed while cut is queued with its time, and says it was not sent.
    const stop = page.getByTestId('stop-control');
    await stop.hover();
    await page.mouse.down();
    await page.getByTestId('queued-stop').waitFor({ timeout: 5000 });
    await page.mouse.up();
    const pressedBy = Date.now();
    expect(await page.getByTestId('queued-stop').textContent()).toContain('Stop not sent, use radio and signal');
    expect((await boardNow()).job.state).toBe('live');
    // A reason picked while the stop waits goes with it.
    await page.getByRole('button', { name: 'Radio lost' }).first().click();
    await page.getByText('Reason kept with the stop: Radio lost').waitFor();
    await screenshot(page, 'live-rigger-queued-stop-tablet');

    cut = false;
    await page.getByTestId('stopped-state').waitFor({ timeout: 25_000 });
    const board = await boardNow();
    expect(board.job.state).toBe('stopped');
    expect(board.job.stop?.raisedBy.name).toBe('Callum Frey');
    expect(board.job.stop?.reason).toBe('Radio lost');
    const pressedAt = Date.parse(board.job.stop!.pressedAt);
    expect(pressedAt).toBeLessThanOrEqual(pressedBy);
    expect(pressedAt).toBeGreaterThan(cutAt);
    expect(Date.parse(board.job.stop!.at)).toBeGreaterThan(pressedAt);
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    expect(await page.getByTestId('queued-stop').count()).toBe(0);
    // What happened while cut is on the screen now: the radio check someone else completed counts.
    const reeve = (await boardNow()).stages.find((s) => s.id === 'er-reeve')!;
    expect(reeve.steps.find((s) => s.id === 'er-reeve.radio-check')?.state).toBe('done');
    const progress = `${reeve.steps.filter((s) => s.state === 'done').length} of ${reeve.steps.length} steps done`;
    await expect.poll(() => page.getByTestId('stage-er-reeve').first().textContent(), { timeout: 10_000 }).toContain(progress);
    await screenshot(page, 'live-rigger-after-reconnect-tablet');
  });
});
