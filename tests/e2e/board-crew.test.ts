import AxeBuilder from '@axe-core/playwright';
import type { BrowserContext, Locator, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type { BoardSnapshot } from '../../shared/board/types.js';
import { storeUpload } from '../../server/commands/uploads.js';
import { Component } from '../../server/entities/Component.js';
import { DemoBoardDriver } from '../../server/demo/board-driver.js';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { demoPhoto } from '../../server/demo/photos.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { Job } from '../../server/entities/Job.js';
import { JobPlan } from '../../server/entities/JobPlan.js';
import { User } from '../../server/entities/User.js';
import type { ValueCheckField } from '../../shared/schemas/plan.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, pressAndHold, screenshot, signInThroughForm, type LaunchedBrowser, viewports } from './browser.js';

const LIVE_JOB = 'Transformer T2 lift: boom erection';
type Who = 'supervisor' | 'operator' | 'signaller' | 'rigger' | 'viewer';
const views: Record<Who, string> = { supervisor: 'console', operator: 'cab', signaller: 'signaller', rigger: 'rigger', viewer: 'board' };

/**
 * Must-show 3 of issue 14, in real browsers on the demo's live job: a rigger records a count that
 * differs from the plan, the supervisor sees it at the hold and cannot release until it is redone,
 * a release by press-and-hold, and a stop seen on a scrolled phone. The demo job is worked forward
 * with the same commands a crew sends (the demo's own driver); everything the test is about is done
 * through the screens. No fixed sleeps: every check waits for what the page should show.
 */
describe('the board in the hands of a crew', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  let driver: DemoBoardDriver;
  const people = {} as Record<Who, User>;
  const open: BrowserContext[] = [];
  const pageErrors: string[] = [];

  const boardNow = async () => {
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    return (await request(server.app).get(`/api/jobs/${jobId}/board`).set({ Authorization: `Bearer ${token}` }).expect(200)).body as BoardSnapshot;
  };

  /** Completes the given open steps of a stage as the crew would (allowed role, planned value, photo when asked). */
  async function completeSteps(stageId: string, only?: (stepId: string) => boolean) {
    const board = await boardNow();
    const stage = board.stages.find((s) => s.id === stageId)!;
    const open = stage.steps.filter((s) => s.state === 'open' && (!only || only(s.id)));
    const done = new Set(stage.steps.filter((s) => s.state === 'done').map((s) => s.id));
    while (open.length) {
      const i = open.findIndex((s) => s.after.every((id) => done.has(id) || !open.some((o) => o.id === id)));
      const [step] = open.splice(i, 1);
      const role = (['rigger', 'signaller', 'operator', 'supervisor'] as const).find((r) => step.allowedRoles.includes(r))!;
      const check = step.records?.check;
      let value: string | undefined;
      if (step.records?.kind === 'reading') value = check?.kind === 'plan' ? String(check.planned) : check?.kind === 'max' || check?.kind === 'min' ? String(check.limit) : 'checked';
      // A serial: the planned one, or any serviceable component of the type asked for (as the demo's driver does).
      if (step.records?.kind === 'serial') {
        value = step.records.plannedSerial ?? (await server.context.dataSource.manager.findOneBy(Component, { typeId: step.records.typeId ?? '', status: 'serviceable' }))?.serial;
      }
      const photoId = step.requiresPhoto ? (await storeUpload(server.context, people[role], { buffer: await demoPhoto(step.text.slice(0, 30), 'weld') })).id : undefined;
      await driver.send(people[role], { type: 'step.complete', stepId: step.id, ...(value ? { value } : {}), ...(photoId ? { photoId } : {}) });
      done.add(step.id);
    }
  }

  async function openView(who: Who, viewport: { width: number; height: number }, view = views[who]): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport });
    open.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${who}: ${error.message}`));
    await signInThroughForm(page, `${server.url}/jobs/${jobId}/${view}`, `${who}@holdline.test`, DEMO_PASSWORD);
    await page.waitForURL((url) => url.pathname.endsWith(`/${view}`));
    await page.locator('.board-header .fleet').waitFor();
    await expect.poll(() => page.getByTestId('not-live').count(), { timeout: 10_000 }).toBe(0);
    return page;
  }


  /** Is the element's centre the element itself (not covered by the fixed header or stop bar) and inside the window? */
  const reachable = (locator: Locator) =>
    locator.evaluate((el) => {
      const r = el.getBoundingClientRect();
      const x = r.left + r.width / 2;
      const y = r.top + r.height / 2;
      const hit = document.elementFromPoint(x, y);
      return y > 0 && y < window.innerHeight && !!hit && (hit === el || el.contains(hit));
    });

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    for (const who of Object.keys(views) as Who[]) people[who] = await server.context.dataSource.manager.findOneByOrFail(User, { email: `${who}@holdline.test` });
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === LIVE_JOB)!.id;
    driver = new DemoBoardDriver(server.context, jobId, { supervisor: people.supervisor, operator: people.operator, signaller: people.signaller, rigger: people.rigger });
    // The demo stops at the tensioning hold with the operator's acknowledgment: the signaller's, the release,
    // then the stages up to the configuration check, as the crew would work them.
    await driver.acknowledge('er-tension', ['signaller']);
    await driver.release('er-tension');
    await driver.runUntil('er-config');
  });
  afterEach(async () => {
    for (const context of open.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('a count that differs from the plan is out of limit on the rigger’s phone, at the hold and on the console; the release is refused until it is redone, then released by press-and-hold', async () => {
    const before = await boardNow();
    const config = before.stages.find((s) => s.id === 'er-config')!;
    expect(config.state).toBe('active');
    const parts = config.steps.find((s) => s.id === 'er-config.parts')!;
    expect(parts.records?.check).toMatchObject({ kind: 'plan', planned: 6 });
    const holdId = config.hold!.id;
    expect(config.hold!.mandatory).toBe(true);
    // Whatever the plan puts before the count is done first, by the crew.
    await completeSteps('er-config', (id) => parts.after.includes(id));

    // 1. The rigger, on a phone, counts 5 parts of line where the plan says 6.
    const rigger = await openView('rigger', viewports.phone);
    const row = rigger.getByTestId('step-er-config.parts');
    await row.getByLabel('Parts of line').fill('5');
    await rigger.getByTestId('complete-er-config.parts').click();
    await row.getByTestId('out-of-limit-mark').waitFor({ timeout: 10_000 });
    // Word, shape and colour together; the reason names the value and the plan's figure.
    expect(await row.getByTestId('out-of-limit-mark').textContent()).toContain('Out of limit');
    const reason = await row.getByTestId('out-of-limit-er-config.parts').textContent();
    expect(reason).toMatch(/5/);
    expect(reason).toMatch(/6/);
    await row.scrollIntoViewIfNeeded();
    await screenshot(rigger, 'crew-rigger-out-of-limit-phone');

    // The rest of the stage is done; the hold opens.
    await completeSteps('er-config');

    // The operator's blind check fails three times (a boom length that is not the plan's): the hold locks.
    const job = await server.context.dataSource.manager.findOneByOrFail(Job, { id: jobId });
    const plan = await server.context.dataSource.manager.findOneByOrFail(JobPlan, { jobId, version: job.planVersion });
    const expected = Object.fromEntries(plan.plan.stages.find((s) => s.id === 'er-config')!.hold!.valueCheck!.fields.map((f) => [f.field, f.expected])) as Record<ValueCheckField, string>;
    for (let i = 0; i < 3; i++) {
      const photoId = (await storeUpload(server.context, people.operator, { buffer: await demoPhoto('Controller screen', 'weld') })).id;
      await expect(driver.send(people.operator, { type: 'hold.acknowledge', holdId, role: 'operator', values: { ...expected, boomLengthM: '99' }, photoId })).rejects.toThrow();
      // The same person reads the controller again before the next try (30 s on the server's clock).
      server.advance(31_000);
    }
    expect((await boardNow()).stages.find((s) => s.id === 'er-config')!.hold!.checkLocked).toBe(true);

    // 2. The supervisor sees each failure (who, when, which field; never the values) and reviews it with the crew.
    const supervisor = await openView('supervisor', viewports.desktop);
    const failures = supervisor.getByTestId(`check-failures-${holdId}`);
    await failures.waitFor({ timeout: 10_000 });
    const failureText = (await failures.textContent()) ?? '';
    expect(failureText).toContain('3 failed checks');
    expect(failureText).toContain('Tomasz Wierzba (operator)');
    expect(failureText).toContain('boom length (m) did not match the plan');
    expect(failureText).not.toContain('99');
    await failures.scrollIntoViewIfNeeded();
    await screenshot(supervisor, 'crew-console-check-failures-laptop');
    await failures.getByLabel('What you found with the crew').fill('Operator read the jib length line; boom length read again with the signaller');
    await failures.getByRole('button', { name: 'Record the review' }).click();
    await expect.poll(async () => (await boardNow()).stages.find((s) => s.id === 'er-config')!.hold!.checkLocked, { timeout: 10_000 }).toBe(false);

    // Every role acknowledges the hold, the operator with the controller's true values.
    await driver.acknowledge('er-config');
    expect((await boardNow()).stages.find((s) => s.id === 'er-config')!.hold!.state).toBe('acknowledged');

    // The supervisor sees the count at the hold (in words, beside the planned value) and on the console's list.
    const limits = supervisor.getByTestId(`hold-limits-${holdId}`);
    await limits.waitFor({ timeout: 10_000 });
    expect(await limits.textContent()).toMatch(/Parts of line/);
    expect(await limits.textContent()).toContain('Parts of line: 5 recorded, the plan says 6.');
    expect(await supervisor.getByTestId('console-out-of-limit').textContent()).toContain('Parts of line');

    // 3. The release summary names the acknowledgments, the reading and the wind; a tap does nothing; a hold is refused with the reason.
    await supervisor.getByTestId(`release-${holdId}`).click();
    const dialog = supervisor.getByTestId(`release-dialog-${holdId}`);
    await dialog.waitFor();
    const summary = (await dialog.textContent()) ?? '';
    for (const ack of (await boardNow()).stages.find((s) => s.id === 'er-config')!.hold!.acknowledgments) expect(summary).toContain(ack.name);
    expect(await dialog.getByTestId('release-out-of-limit').textContent()).toContain('Parts of line');
    expect(await dialog.getByTestId('weather-age').textContent()).toMatch(/Last wind reading .* ago|just now/);
    const holdButton = dialog.getByTestId(`release-dialog-${holdId}-hold`);
    await holdButton.click();
    await pressAndHold(supervisor, holdButton, () => dialog.getByRole('alert').waitFor({ timeout: 10_000 }));
    const refusal = (await dialog.getByRole('alert').textContent()) ?? '';
    expect(refusal).toContain('cannot be released');
    expect(refusal).toContain('Reopen the step');
    await screenshot(supervisor, 'crew-console-release-refused-laptop');
    expect((await boardNow()).stages.find((s) => s.id === 'er-config')!.hold!.state).toBe('acknowledged');
    await dialog.getByRole('button', { name: 'Not now' }).click();
    await dialog.waitFor({ state: 'detached' });

    // 4. The rigger redoes the count: reopen, count again, 6.
    await row.getByTestId('reopen-er-config.parts').click();
    await expect.poll(() => row.getByTestId('out-of-limit-mark').count(), { timeout: 10_000 }).toBe(0);
    await row.getByLabel('Parts of line').fill('6');
    await rigger.getByTestId('complete-er-config.parts').click();
    await expect.poll(async () => (await boardNow()).stages.find((s) => s.id === 'er-config')!.steps.find((s) => s.id === 'er-config.parts')!.doneBy?.value, { timeout: 10_000 }).toBe('6');
    await completeSteps('er-config');
    await driver.acknowledge('er-config');
    await expect.poll(() => supervisor.getByTestId(`hold-limits-${holdId}`).count(), { timeout: 10_000 }).toBe(0);

    // 5. Released by press-and-hold.
    await supervisor.getByTestId(`release-${holdId}`).click();
    await dialog.waitFor();
    expect(await dialog.getByTestId('release-out-of-limit').count()).toBe(0);
    await screenshot(supervisor, 'crew-console-release-summary-laptop');
    await pressAndHold(supervisor, dialog.getByTestId(`release-dialog-${holdId}-hold`), () => dialog.waitFor({ state: 'detached', timeout: 10_000 }));
    await expect.poll(async () => (await boardNow()).stages.find((s) => s.id === 'er-config')!.hold!.state, { timeout: 10_000 }).toBe('released');
    await screenshot(rigger, 'crew-rigger-after-release-phone');
  });

  it('a stop raised by a viewer is in view on a scrolled phone, controls that cannot act say why, and the supervisor resumes by press-and-hold after the cause and a fresh wind reading', async () => {
    const rigger = await openView('rigger', viewports.phone);
    const viewer = await openView('viewer', viewports.desktop);
    const supervisor = await openView('supervisor', viewports.desktop);

    // The rigger is far down the page.
    await rigger.evaluate(() => window.scrollTo(0, document.documentElement.scrollHeight));
    expect(await rigger.evaluate(() => window.scrollY)).toBeGreaterThan(400);

    // A viewer raises the stop from their own board.
    const stop = viewer.getByTestId('stop-control');
    await pressAndHold(viewer, stop, () => viewer.getByTestId('stopped-state').waitFor({ timeout: 10_000 }));
    expect((await boardNow()).job.stop?.raisedBy.name).toBe(people.viewer.displayName);

    // The scrolled phone shows it in view without scrolling back.
    const band = rigger.getByTestId('stop-band');
    await band.waitFor({ timeout: 10_000 });
    const box = (await band.boundingBox())!;
    expect(box.y).toBeGreaterThanOrEqual(0);
    expect(box.y + box.height).toBeLessThanOrEqual(viewports.phone.height);
    expect(await band.textContent()).toContain('JOB STOPPED');
    expect(await rigger.evaluate(() => window.scrollY)).toBeGreaterThan(400);
    // The stop control says the job is already stopped.
    expect(await rigger.getByTestId('stop-control').textContent()).toContain('Job already stopped');
    // A button that cannot act while stopped is grey and says why.
    const markDone = rigger.locator('[data-testid^="complete-"]').first();
    if (await markDone.count()) {
      expect(await markDone.isDisabled()).toBe(true);
      expect(await rigger.getByText('Job stopped: wait for the supervisor’s resume.').count()).toBeGreaterThan(0);
    }
    await screenshot(rigger, 'crew-rigger-stopped-scrolled-phone');
    await rigger.screenshot({ path: 'test-results/screenshots/crew-rigger-stopped-scrolled-phone-viewport.png' });

    // Resume needs the cause first.
    const resumeOpen = supervisor.getByTestId('resume-open');
    await supervisor.getByLabel('Reason for resuming').fill('Viewer’s concern checked; area clear');
    expect(await resumeOpen.isDisabled()).toBe(true);
    await supervisor.getByTestId('stopped-state').getByRole('button', { name: 'Person in the exclusion zone' }).click();
    await expect.poll(() => supervisor.getByTestId('stopped-state').textContent(), { timeout: 10_000 }).toContain('Reason: Person in the exclusion zone');

    // A fresh wind reading to 0.1 m/s, with its height, through the recorder.
    const wind = supervisor.getByTestId('wind-recorder');
    await wind.getByLabel('Mean wind').fill('4.6');
    await wind.getByLabel('Gust').fill('6.3');
    await wind.getByLabel('Height of the reading').fill('12');
    await wind.getByTestId('wind-record').click();
    await expect.poll(async () => (await boardNow()).weather, { timeout: 10_000 }).toMatchObject({ meanMs: 4.6, gustMs: 6.3, heightM: 12 });
    // A gust over 40 m/s is refused on the device.
    await wind.getByLabel('Gust').fill('41.5');
    await wind.getByText(/Up to 40 m\/s/).waitFor();
    await wind.getByLabel('Gust').fill('');

    // At 1280 × 800 the resume control is not under the stop bar once scrolled to.
    await resumeOpen.scrollIntoViewIfNeeded();
    expect(await reachable(resumeOpen)).toBe(true);
    await resumeOpen.click();
    const dialog = supervisor.getByTestId('resume-dialog');
    await dialog.waitFor();
    expect(await dialog.textContent()).toContain('Person in the exclusion zone');
    expect(await dialog.getByTestId('weather-age').textContent()).toContain('gust 6.3 m/s at 12 m');
    await screenshot(supervisor, 'crew-console-resume-summary-laptop');
    await pressAndHold(supervisor, dialog.getByTestId('resume-dialog-hold'), () => dialog.waitFor({ state: 'detached', timeout: 10_000 }));
    await expect.poll(async () => (await boardNow()).job.state, { timeout: 10_000 }).toBe('live');
    await band.waitFor({ state: 'detached', timeout: 10_000 });
  });

  it('fixed header and stop bar together take at most a quarter of a tablet’s height, live and stopped; the site display shows every stage without scrolling', async () => {
    const measure = (page: Page) =>
      page.evaluate(() => {
        const header = document.querySelector('.q-header')!.getBoundingClientRect().height;
        const bar = document.querySelector('[data-testid="stop-bar"]')?.getBoundingClientRect().height ?? 0;
        return { header, bar, height: window.innerHeight };
      });
    for (const who of ['supervisor', 'operator', 'signaller', 'rigger', 'viewer'] as Who[]) {
      const page = await openView(who, viewports.tablet);
      const m = await measure(page);
      expect(m.header + m.bar, `${who} live: header ${m.header} + bar ${m.bar}`).toBeLessThanOrEqual(m.height / 4);
      if (who === 'supervisor') await screenshot(page, 'crew-console-live-tablet');
    }
    const display = await openView('viewer', viewports.display, 'display');
    const stages = (await boardNow()).stages;
    // Wait for each stage to render (isVisible() alone does not wait), then check it is there.
    for (const s of stages) await display.getByTestId(`tv-stage-${s.id}`).waitFor({ state: 'visible', timeout: 10_000 });
    for (const s of stages) expect(await display.getByTestId(`tv-stage-${s.id}`).isVisible()).toBe(true);
    expect(await display.evaluate(() => document.documentElement.scrollHeight <= window.innerHeight)).toBe(true);
    for (const s of stages) {
      const box = (await display.getByTestId(`tv-stage-${s.id}`).boundingBox())!;
      expect(box.y + box.height, `stage ${s.order} on the TV`).toBeLessThanOrEqual(viewports.display.height);
    }
    await screenshot(display, 'crew-display-tv');

    // Stopped: the red band joins the bar, still within a quarter of the tablet.
    await driver.send(people.signaller, { type: 'job.stop', pressedAt: new Date().toISOString(), reason: 'Radio lost' });
    const tablet = await openView('operator', viewports.tablet);
    await tablet.getByTestId('stop-band').waitFor({ timeout: 10_000 });
    const m = await measure(tablet);
    expect(m.header + m.bar, `stopped: header ${m.header} + bar ${m.bar}`).toBeLessThanOrEqual(m.height / 4);
    await screenshot(tablet, 'crew-cab-stopped-tablet');
    // Stopped, in day and night: the band, the already-stopped control and the disabled controls keep their contrast (AAA in the cab).
    for (const theme of ['day', 'night']) {
      await tablet.evaluate((t) => localStorage.setItem('holdline.theme', t), theme);
      await tablet.reload();
      await tablet.getByTestId('stop-band').waitFor({ timeout: 10_000 });
      const result = await new AxeBuilder({ page: tablet }).withRules(['color-contrast', 'color-contrast-enhanced', 'button-name', 'label']).analyze();
      expect(result.violations.map((v) => `${theme} ${v.id}: ${v.nodes.map((n) => n.target.join(' ')).slice(0, 3).join(', ')}`)).toEqual([]);
      await screenshot(tablet, `crew-cab-stopped-tablet-${theme}`);
    }
    await display.getByTestId('stop-band').waitFor({ timeout: 10_000 });
    await screenshot(display, 'crew-display-stopped-tv');
    expect(await display.evaluate(() => document.documentElement.scrollHeight - window.innerHeight)).toBeLessThanOrEqual(0);
  });
});
