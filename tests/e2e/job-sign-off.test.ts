import type { BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { BoardSnapshot } from '../../shared/board/types.js';
import { DemoBoardDriver } from '../../server/demo/board-driver.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { Job } from '../../server/entities/Job.js';
import { User } from '../../server/entities/User.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, pressAndHold, screenshot, signInThroughForm, type LaunchedBrowser, viewports } from './browser.js';

const LIVE_JOB = 'Transformer T2 lift: boom erection';

/**
 * The job's ending in real browsers (issue 16): the demo's live erection is worked by the demo's
 * own driver up to its post-assembly inspection and hand-over; the qualified inspector (Priya
 * Raman, rigger) acknowledges on a phone by press-and-hold, a rigger who is not qualified is told
 * why they cannot, the supervisor releases on a laptop after reading who inspected, and every
 * screen then shows the closed board with no control.
 */
describe('the job signed off by the inspector and the supervisor', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  let holdId: string;
  const open: BrowserContext[] = [];
  const pageErrors: string[] = [];

  const boardNow = async () => {
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    return (await request(server.app).get(`/api/jobs/${jobId}/board`).set({ Authorization: `Bearer ${token}` }).expect(200)).body as BoardSnapshot;
  };

  async function openView(email: string, view: string, viewport: { width: number; height: number }): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport });
    open.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${email}: ${error.message}`));
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/${view}`, email, DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith(`/${view}`));
    await page.locator('.board-header .fleet').waitFor();
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    return page;
  }


  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    const person = (who: string) => server.context.dataSource.manager.findOneByOrFail(User, { email: `${who}@holdline.test` });
    const crew = { supervisor: await person('supervisor'), operator: await person('operator'), signaller: await person('signaller'), rigger: await person('rigger') };
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === LIVE_JOB)!.id;
    // The demo stops at the tensioning hold; the crew works on to the hand-over as the demo's driver does.
    const driver = new DemoBoardDriver(server.context, jobId, crew);
    await driver.acknowledge('er-tension', ['signaller']);
    await driver.release('er-tension');
    await driver.runUntil('er-handover');
    await driver.completeSteps('er-handover');
    await driver.acknowledge('er-handover', ['supervisor', 'operator']);
    const hold = (await boardNow()).stages.find((s) => s.id === 'er-handover')!.hold!;
    expect(hold).toMatchObject({ signOff: true, state: 'open' });
    holdId = hold.id;
  }, 240_000);
  afterEach(async () => {
    for (const context of open.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('the inspector acknowledges on a phone, the supervisor releases on a laptop, and every screen shows the job complete and read-only', { timeout: 180_000 }, async () => {
    // A rigger who is not qualified sees the inspector's slot waiting and why the control is not theirs.
    const rigger = await openView('rigger@holdline.test', 'rigger', viewports.phone);
    const riggerHold = rigger.getByTestId(`hold-${holdId}`);
    await riggerHold.waitFor({ timeout: 10_000 });
    expect(await rigger.getByTestId(`ack-${holdId}-inspector`).textContent()).toContain('Qualified inspector: waiting');
    expect(await rigger.getByTestId(`inspect-why-${holdId}`).textContent()).toContain('qualified to inspect cranes');
    expect(await rigger.getByTestId(`inspect-${holdId}`).count()).toBe(0);

    // The qualified inspector, on a phone: a tap does nothing; press-and-hold acknowledges.
    const inspector = await openView('rigger2@holdline.test', 'rigger', viewports.phone);
    const control = inspector.getByTestId(`inspect-${holdId}`);
    await control.waitFor({ timeout: 10_000 });
    await control.scrollIntoViewIfNeeded();
    await screenshot(inspector, 'ending-inspector-phone');
    await control.click();
    // The tap sent nothing: give a wrongly sent command time to arrive, then check.
    await inspector.waitForTimeout(1_000);
    expect((await boardNow()).stages.find((s) => s.id === 'er-handover')!.hold!.acknowledgments.some((a) => a.inspector)).toBe(false);
    await pressAndHold(inspector, control, () =>
      expect.poll(async () => (await boardNow()).stages.find((s) => s.id === 'er-handover')!.hold!.state, { timeout: 10_000 }).toBe('acknowledged'),
    );
    const slot = inspector.getByTestId(`ack-${holdId}-inspector`);
    await expect.poll(() => slot.textContent(), { timeout: 10_000 }).toContain('acknowledged by Priya Raman (rigger)');
    await slot.scrollIntoViewIfNeeded();
    await screenshot(inspector, 'ending-inspector-acknowledged-phone');

    // The supervisor, on a laptop: the release summary names the inspector; press-and-hold completes the job.
    const supervisor = await openView('supervisor@holdline.test', 'console', viewports.desktop);
    await supervisor.getByTestId(`release-${holdId}`).click();
    const dialog = supervisor.getByTestId(`release-dialog-${holdId}`);
    await dialog.waitFor();
    const summary = (await dialog.textContent()) ?? '';
    expect(summary).toContain('Priya Raman, qualified inspector (rigger)');
    expect(summary).toContain('Releasing it completes the job');
    await screenshot(supervisor, 'ending-release-summary-laptop');
    await pressAndHold(supervisor, dialog.getByTestId(`release-dialog-${holdId}-hold`), () =>
      expect.poll(async () => (await boardNow()).job.state, { timeout: 10_000 }).toBe('complete'),
    );

    // Every open screen turns to the closed board: who signed off, who released, when; no control, no stop bar.
    for (const [page, name] of [
      [supervisor, 'ending-closed-laptop'],
      [inspector, 'ending-closed-phone'],
      [rigger, 'ending-closed-rigger-phone'],
    ] as const) {
      const headline = page.getByTestId('closed-headline');
      await headline.waitFor({ timeout: 10_000 });
      expect(await headline.textContent()).toMatch(/^Job complete: signed off by Priya Raman and released by Rhys Calloway at \d\d:\d\d \(UTC[+\u2212]\d\d:\d\d\)$/);
      // No control that acts on the job: only the history's hash may be shown in full or copied.
      const controls = await page.locator('.board-page').locator('button, input, textarea, select').evaluateAll((els) => els.filter((el) => !el.closest('.head-hash')).map((el) => el.textContent?.trim() ?? el.tagName));
      expect(controls).toEqual([]);
      expect(await page.getByTestId('stop-bar').count()).toBe(0);
      await page.evaluate(() => window.scrollTo(0, 0));
      await screenshot(page, name);
    }

    // Another view of the same job says the same.
    const display = await openView('viewer@holdline.test', 'display', viewports.desktop);
    expect(await display.getByTestId('closed-headline').textContent()).toContain('signed off by Priya Raman');
    expect(await display.getByTestId('closed-record-link').getAttribute('href')).toBe(`/jobs/${jobId}/record`);

    // The crane unit now shows what was built: the blind check's values and the serials by position.
    const unitId = (await server.context.dataSource.manager.findOneByOrFail(Job, { id: jobId })).craneUnitId;
    for (const [viewport, name] of [
      [viewports.desktop, 'ending-unit-as-built-laptop'],
      [viewports.phone, 'ending-unit-as-built-phone'],
    ] as const) {
      await supervisor.setViewportSize(viewport);
      await supervisor.goto(`${server.url}/fleet/units/${unitId}`);
      const panel = supervisor.getByTestId('as-built');
      await panel.waitFor({ timeout: 10_000 });
      expect(await panel.textContent()).toContain(LIVE_JOB);
      expect(await supervisor.getByTestId('as-built-controller').textContent()).toContain('Parts of line');
      expect(await supervisor.getByTestId('as-built-serials').locator('tbody tr').count()).toBeGreaterThan(0);
      await panel.scrollIntoViewIfNeeded();
      await screenshot(supervisor, name);
    }
  });

  it('the admin marks a person qualified to inspect on the people screen, with the caution, and the table shows it', { timeout: 120_000 }, async () => {
    const context = await chromium.browser.newContext({ viewport: viewports.phone });
    open.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`admin: ${error.message}`));
    await signInThroughForm(page, `${server.url}/people`, 'admin@holdline.test', DEMO_PASSWORD);
    const priya = page.getByRole('article', { name: 'Priya Raman' });
    await priya.waitFor({ timeout: 10_000 });
    expect(await priya.textContent()).toContain('Inspector');
    expect(await page.getByRole('article', { name: 'Callum Frey' }).textContent()).not.toContain('Inspector');
    await page.getByRole('button', { name: 'Edit Callum Frey' }).click();
    const toggle = page.getByTestId('person-can-inspect');
    await toggle.waitFor();
    expect(await page.locator('.person-dialog').textContent()).toContain('Holdline only records what you set here');
    await toggle.click();
    await screenshot(page, 'ending-people-edit-phone');
    await page.getByRole('button', { name: 'Save changes' }).click();
    await expect.poll(async () => (await server.context.dataSource.manager.findOneByOrFail(User, { email: 'rigger@holdline.test' })).canInspect, { timeout: 10_000 }).toBe(true);
    await expect.poll(() => page.getByRole('article', { name: 'Callum Frey' }).textContent(), { timeout: 10_000 }).toContain('Inspector');
    const laptop = await (await chromium.browser.newContext({ viewport: viewports.desktop })).newPage();
    open.push(laptop.context());
    await signInThroughForm(laptop, `${server.url}/people`, 'admin@holdline.test', DEMO_PASSWORD);
    await expect.poll(() => laptop.getByTestId(/^inspector-chip-/).count(), { timeout: 10_000 }).toBe(2);
    await screenshot(laptop, 'ending-people-table-laptop');
  });
});
