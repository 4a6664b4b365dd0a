import type { BrowserContext, Page } from 'playwright-core';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { jobEnvelopeSchema } from '../../shared/schemas/jobs.js';
import { insertUser, TEST_PASSWORD } from '../helpers/factories.js';
import { seedModelAndUnit } from '../helpers/fleet.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';
import { REFUSING_SMTP_URL } from '../helpers/mail.js';


/** The e-mail settings on the job page, and the admin's list of e-mails not delivered. */
describe('e-mail on screen', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  const contexts: BrowserContext[] = [];
  const pageErrors: string[] = [];

  async function open(path: string, email: string, viewport: { width: number; height: number }): Promise<Page> {
    const context = await chromium.browser.newContext({ viewport });
    contexts.push(context);
    const page = await context.newPage();
    page.on('pageerror', (error) => pageErrors.push(`${path}: ${error.message}`));
    await signInThroughForm(page, `${server.url}${path}`, email, TEST_PASSWORD);
    await page.waitForURL((url) => url.pathname === path);
    return page;
  }

  beforeAll(async () => {
    server = await startTestServer({ withClient: true, env: { SMTP_URL: REFUSING_SMTP_URL }, outbox: { retryDelaysMs: [0, 20, 40] } });
    chromium = await launchBrowser();
    await server.context.queue.transaction(async (m) => {
      await insertUser(m, { email: 'ilse.brandvold@crew.test', displayName: 'Ilse Brandvold', qualifications: [], isAdmin: true });
      await insertUser(m, { email: 'ravi.okonkwo@crew.test', displayName: 'Ravi Okonkwo', qualifications: ['supervisor'] });
    });
    const login = async (email: string) => (await request(server.app).post('/api/auth/login').send({ email, password: TEST_PASSWORD }).expect(200)).body.token as string;
    const { unit } = await seedModelAndUnit(server, await login('ilse.brandvold@crew.test'));
    const created = await request(server.app)
      .post('/api/jobs')
      .set('Authorization', `Bearer ${await login('ravi.okonkwo@crew.test')}`)
      .send({ name: 'Quayside boom erection', site: 'East quay', craneUnitId: unit.id, kind: 'erection' })
      .expect(201);
    jobId = jobEnvelopeSchema.parse(created.body).job.id;
    // Through the real outbox: the mail server cannot be reached, so it gives up after three tries.
    await server.context.outbox.enqueue([
      { dedupeKey: 'e2e-1', kind: 'completion', jobId, to: 'records@quay.test', subject: 'Record of Quayside boom erection: job complete', body: 'Final hash: 0f0f' },
    ]);
    const until = Date.now() + 10_000;
    while ((await server.context.outbox.problems()).every((p) => p.state !== 'failed')) {
      if (Date.now() > until) throw new Error('the send did not give up');
      await new Promise((r) => setTimeout(r, 25));
    }
  });
  afterEach(async () => {
    for (const context of contexts.splice(0)) await context.close().catch(() => undefined);
    expect(pageErrors.splice(0)).toEqual([]);
  });
  afterAll(async () => {
    await chromium?.close();
    await server?.stop();
  });

  for (const [size, viewport] of [
    ['phone', viewports.phone],
    ['desktop', viewports.desktop],
  ] as const) {
    it(`the admin sees the e-mail that was not delivered, with the mail server's answer (${size})`, async () => {
      const page = await open('/people', 'ilse.brandvold@crew.test', viewport);
      const tab = page.getByRole('tab', { name: /E-mail not delivered/ });
      await tab.click();
      const item = page.locator('.mail-problems .item').first();
      await item.waitFor();
      const text = (await item.textContent()) ?? '';
      expect(text).toContain('Given up after 3 tries');
      expect(text).toContain('Completion record: Record of Quayside boom erection: job complete');
      expect(text).toContain('To records@quay.test');
      expect(text).toMatch(/ECONNREFUSED/);
      await screenshot(page, `mail-problems-${size}`);
    });
  }

  it('the supervisor sets the hold reminder time beside the distribution list; out of range is refused in words', async () => {
    const page = await open(`/jobs/${jobId}`, 'ravi.okonkwo@crew.test', viewports.phone);
    const field = page.getByLabel('Remind after');
    await field.waitFor();
    expect(await field.inputValue()).toBe('10');
    await field.fill('0');
    await expect.poll(() => page.getByText('Enter 1 minute or more').isVisible()).toBe(true);
    expect(await page.getByRole('button', { name: 'Save e-mail settings' }).isDisabled()).toBe(true);
    await field.fill('25');
    await field.blur();
    await page.getByRole('button', { name: 'Save e-mail settings' }).click();
    await expect.poll(() => page.getByText('E-mail settings saved.').isVisible()).toBe(true);
    await page.getByRole('heading', { name: 'Hold reminders' }).scrollIntoViewIfNeeded();
    await screenshot(page, 'job-hold-reminder-phone');
    const token = (await request(server.app).post('/api/auth/login').send({ email: 'ravi.okonkwo@crew.test', password: TEST_PASSWORD }).expect(200)).body.token as string;
    const job = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}`).set('Authorization', `Bearer ${token}`).expect(200)).body).job;
    expect(job.holdReminderMinutes).toBe(25);
  });
});
