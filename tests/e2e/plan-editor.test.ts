import path from 'node:path';
import type { Browser, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { planEnvelopeSchema, type Plan } from '../../shared/schemas/plan.js';
import { TEST_PASSWORD } from '../helpers/factories.js';
import { signedInUser } from '../helpers/auth.js';
import { addParts18m, seedModelAndUnit } from '../helpers/fleet.js';
import { plannedJob, type Crew } from '../helpers/jobs.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, signInThroughForm, SCREENSHOT_DIR, screenshot, viewports, type LaunchedBrowser } from './browser.js';

type Viewport = (typeof viewports)[keyof typeof viewports];

/** Uncaught errors of every page, so a screen that breaks while rendering fails the test. */
const pageErrors: string[] = [];

/** Signs in through the real form and lands on `next`. */
async function signIn(browser: Browser, baseUrl: string, viewport: Viewport, email: string, next: string): Promise<Page> {
  const context = await browser.newContext({ viewport, acceptDownloads: true });
  const page = await context.newPage();
  page.on('pageerror', (error) => pageErrors.push(`${next}: ${error.message}`));
  // Refused requests (the 401 of the session check before signing in) are expected; script errors are not.
  page.on('console', (message) => {
    if (message.text().includes('[Vue warn]') || (message.type() === 'error' && !message.text().startsWith('Failed to load resource'))) pageErrors.push(`${next}: ${message.text()}`);
  });
  await signInThroughForm(page, `${baseUrl}${next}`, email, TEST_PASSWORD);
  await page.waitForURL((url) => url.pathname === next.split('?')[0]);
  return page;
}

describe('plan editor', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let crew: Crew;
  let jobId: string;
  // Set by the editing test, read by the read-only one: the stage edited and its place after the move.
  let editedTitle = '';
  let editedPlace = 0;

  const planOf = async (): Promise<Plan> =>
    planEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/plan`).set({ Authorization: `Bearer ${crew.supervisor.token}` }).expect(200)).body).plan;

  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    chromium = await launchBrowser();
    // No demo data on the test server: people, the fleet and the job are made here through the real API.
    crew = {
      supervisor: await signedInUser(server, { qualifications: ['supervisor'], email: 'ilse.varga@crew.test' }),
      operator: await signedInUser(server, { qualifications: ['operator'], email: 'tomas.reyes@crew.test' }),
      signaller: await signedInUser(server, { qualifications: ['signaller'], email: 'amaka.obi@crew.test' }),
      rigger: await signedInUser(server, { qualifications: ['rigger'], email: 'jon.lindqvist@crew.test' }),
    };
    const { model, unit } = await seedModelAndUnit(server, crew.supervisor.token, 'CC-14');
    await addParts18m(server, crew.supervisor.token, model.id, unit.id, 'CC14');
    // The draft plan is generated when the configuration is saved.
    jobId = (await plannedJob(server, crew, unit.id, 'Erection at the cooling towers')).id;
  });
  afterEach(() => {
    // Read, then cleared, so one test's errors are not blamed on the next.
    const errors = pageErrors.splice(0);
    expect(errors).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  it('lets the supervisor edit, save and lock the plan on a tablet', async () => {
    const generated = await planOf();
    // The first stage carries a mandatory hold; take the first stage whose hold is not mandatory to edit and move.
    const mandatoryStage = generated.stages.find((s) => s.hold?.mandatory)!;
    const editIndex = generated.stages.findIndex((s, i) => i > 0 && i < generated.stages.length - 1 && !s.hold?.mandatory && s.steps.length > 0);
    const edited = generated.stages[editIndex];
    const below = generated.stages[editIndex + 1];
    expect(mandatoryStage).toBeDefined();
    expect(editIndex).toBeGreaterThan(0);
    editedTitle = edited.title;
    editedPlace = editIndex + 2;

    const page = await signIn(chromium.browser, server.url, viewports.tablet, crew.supervisor.user.email, `/jobs/${jobId}?tab=plan`);
    await expect.poll(() => page.getByRole('heading', { name: 'Stages' }).isVisible()).toBe(true);
    expect(await page.getByRole('tab', { name: 'Plan and briefing' }).getAttribute('aria-selected')).toBe('true');
    expect(await page.getByText('No problems found in the saved plan.').isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Save plan' }).isDisabled()).toBe(true);

    // A mandatory hold's stage: the word and the lock, and the remove button refused with the reason.
    const mandatoryCard = page.getByRole('article', { name: new RegExp(`^Stage \\d+: ${mandatoryStage.title}$`) });
    expect(await mandatoryCard.locator('.tone-badge', { hasText: 'Mandatory' }).isVisible()).toBe(true);
    await mandatoryCard.getByRole('button', { name: `Edit stage “${mandatoryStage.title}”` }).click();
    await expect.poll(() => mandatoryCard.getByRole('button', { name: 'Remove this stage' }).isVisible()).toBe(true);
    expect(await mandatoryCard.getByRole('button', { name: 'Remove this stage' }).isDisabled()).toBe(true);
    expect(await mandatoryCard.getByText(/Cannot be removed\. Its hold “.*” is mandatory/).isVisible()).toBe(true);
    expect(await mandatoryCard.getByRole('button', { name: 'Remove this hold point' }).isDisabled()).toBe(true);
    // Its required roles cannot be unticked.
    const lockedRole = mandatoryCard.getByRole('group', { name: /Who must acknowledge/ }).getByRole('checkbox', { name: 'Supervisor' });
    expect(await lockedRole.getAttribute('aria-disabled')).toBe('true');
    expect(await mandatoryCard.getByText("A mandatory hold's roles can be added to, never removed.").isVisible()).toBe(true);
    await mandatoryCard.getByRole('button', { name: `Close stage “${mandatoryStage.title}”` }).click();

    // Edit the first step's text and add a step.
    const card = page.getByRole('article', { name: new RegExp(`^Stage \\d+: ${edited.title}$`) });
    await card.getByRole('button', { name: `Edit stage “${edited.title}”` }).click();
    const firstStep = card.getByLabel('Step 1', { exact: true });
    await expect.poll(() => firstStep.isVisible()).toBe(true);
    expect(await firstStep.inputValue()).toBe(edited.steps[0].text);
    await firstStep.fill('Check the crawler gauge with a tape at both ends and call the reading to the supervisor.');
    await expect.poll(() => page.getByText('Changes not saved').isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Make ready and lock the plan' }).isDisabled()).toBe(true);
    expect(await page.getByText('Save the plan first: only the saved plan can be locked.').isVisible()).toBe(true);

    await card.getByRole('button', { name: 'Add a step' }).click();
    const added = card.getByLabel(`Step ${edited.steps.length + 1}`, { exact: true });
    await expect.poll(() => added.isVisible()).toBe(true);
    await added.fill('Photograph the counterweight stack from the operator’s side.');
    const addedRow = card.locator('.step-row').nth(edited.steps.length);
    await addedRow.getByRole('checkbox', { name: 'Operator' }).click();
    await addedRow.getByText('Needs a photo').click();

    // Leaving the tab with unsaved edits asks first; staying keeps them.
    await page.getByRole('tab', { name: 'Overview' }).click();
    const leave = page.getByRole('dialog');
    await expect.poll(() => leave.getByText('Leave without saving the plan?').isVisible()).toBe(true);
    await leave.getByRole('button', { name: 'Stay and save' }).click();
    await expect.poll(() => leave.count()).toBe(0);
    expect(new URL(page.url()).searchParams.get('tab')).toBe('plan');
    expect(await added.inputValue()).toBe('Photograph the counterweight stack from the operator’s side.');

    // Move the edited stage down by one with the big arrow button.
    await card.getByRole('button', { name: `Move stage “${edited.title}” down` }).click();
    await expect.poll(async () => (await card.getAttribute('aria-label')) ?? '').toBe(`Stage ${editIndex + 2}: ${edited.title}`);

    // A blank step is named before anything is sent, next to the field and in the list above.
    await added.fill('');
    await page.getByRole('button', { name: 'Save plan' }).click();
    await expect.poll(() => page.getByText('Some fields need fixing before the plan can be saved.').isVisible()).toBe(true);
    expect(await card.getByText('Fill this in').isVisible()).toBe(true);
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'plan-editor-tablet-refused.png') });
    await added.fill('Photograph the counterweight stack from the operator’s side.');

    await screenshot(page, 'plan-editor-tablet');
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'plan-editor-tablet-view.png') });
    await page.getByRole('button', { name: 'Save plan' }).click();
    await expect.poll(() => page.locator('.save-bar .saved-line', { hasText: 'Saved' }).isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Save plan' }).isDisabled()).toBe(true);
    expect(await page.getByText('Changes not saved').count()).toBe(0);

    // What the server holds is what the screen showed.
    const saved = await planOf();
    expect(saved.stages.map((s) => s.id)).toEqual(generated.stages.map((s, i) => (i === editIndex ? below.id : i === editIndex + 1 ? edited.id : s.id)));
    const savedStage = saved.stages[editIndex + 1];
    expect(savedStage.steps[0].text).toBe('Check the crawler gauge with a tape at both ends and call the reading to the supervisor.');
    const newStep = savedStage.steps[savedStage.steps.length - 1];
    expect(newStep.text).toBe('Photograph the counterweight stack from the operator’s side.');
    expect(newStep.id).toMatch(/^custom-/);
    expect(newStep.allowedRoles).toEqual(['supervisor', 'rigger', 'operator']);
    expect(newStep.requiresPhoto).toBe(true);

    // The viewport as a tablet shows it, with the edited stage open.
    await card.scrollIntoViewIfNeeded();
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'plan-editor-tablet-saved.png') });

    // Make ready: the confirmation, then the job is ready and plan version 1 is locked.
    await page.getByRole('button', { name: 'Make ready and lock the plan' }).click();
    const confirm = page.getByRole('dialog');
    await expect.poll(() => confirm.getByText('Lock the plan as version 1?').isVisible()).toBe(true);
    await confirm.getByRole('button', { name: 'Make ready' }).click();
    await expect.poll(async () => (await page.locator('.job-head .tone-badge').textContent()) ?? '').toContain('Ready');
    const banner = page.locator('.plan-read .banner');
    await expect.poll(() => banner.getByText('Version 1').isVisible()).toBe(true);
    expect(await banner.getByText('Locked', { exact: true }).isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Save plan' }).count()).toBe(0);
    const versions = page.getByRole('region', { name: 'Versions' });
    await expect.poll(() => versions.getByRole('cell', { name: 'locked at ready' }).isVisible()).toBe(true);
    expect(await versions.getByRole('cell', { name: crew.supervisor.user.displayName }).count()).toBe(1);
    expect(await versions.getByText('Only one version so far').isVisible()).toBe(true);

    const locked = await request(server.app).get(`/api/jobs/${jobId}`).set({ Authorization: `Bearer ${crew.supervisor.token}` }).expect(200);
    expect(locked.body.job.state).toBe('ready');
    expect(locked.body.job.planVersion).toBe(1);
    await page.context().close();
  });

  it('shows the locked plan read-only at phone width to a rigger of the crew, and prints it', async () => {
    const page = await signIn(chromium.browser, server.url, viewports.phone, crew.rigger.user.email, `/jobs/${jobId}?tab=plan`);
    const banner = page.locator('.plan-read .banner');
    await expect.poll(() => banner.getByText('Version 1').isVisible()).toBe(true);
    expect(await page.getByRole('tab', { name: 'Plan', exact: true }).isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Save plan' }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /^Edit stage/ }).count()).toBe(0);
    expect(await page.locator('.stage-read .tone-badge', { hasText: 'Mandatory' }).first().isVisible()).toBe(true);

    // The edited stage, one place further down, shows its steps on demand with the step added in the editor.
    const card = page.getByRole('article', { name: `Stage ${editedPlace}: ${editedTitle}` });
    await card.getByRole('button', { name: /^Show the \d+ steps$/ }).click();
    await expect.poll(() => card.getByText('Photograph the counterweight stack from the operator’s side.').isVisible()).toBe(true);
    expect(await card.getByText('Check the crawler gauge with a tape at both ends and call the reading to the supervisor.').isVisible()).toBe(true);

    const downloading = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Print plan' }).click();
    const download = await downloading;
    expect(download.suggestedFilename()).toBe('plan-CC-14-Erection-at-the-cooling-towers-v1.pdf');
    const stream = await download.createReadStream();
    const head = await new Promise<string>((resolve) => stream.once('data', (chunk: Buffer) => resolve(chunk.subarray(0, 5).toString('latin1'))));
    stream.destroy();
    expect(head).toBe('%PDF-');
    // The button has finished its work before the picture is taken.
    await expect.poll(() => page.locator('.plan-read .banner .q-spinner').count()).toBe(0);

    await screenshot(page, 'plan-read-only-phone');
    await page.screenshot({ path: path.join(SCREENSHOT_DIR, 'plan-read-only-phone-view.png') });
    await page.context().close();
  });
});
