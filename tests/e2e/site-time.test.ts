// Site time on screen: a job at a site in Pacific/Auckland, a server in the test runner's zone (UTC
// on CI) and a browser set to America/Chicago. Every time the board shows must be Auckland's clock
// with Auckland's offset, never the device's or the server's. The expected clock is worked out in
// the test from Intl's numeric parts (wall clock minus instant), not through shared/time.ts.
// Pacific/Auckland: UTC+12:00 standard, UTC+13:00 daylight time from late September to early April
// (IANA tz database; New Zealand Daylight Time Order 2007; from memory).
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../server/demo/seed.js';
import { jobEnvelopeSchema } from '../../shared/schemas/jobs.js';
import { startTestServer, type TestServer } from '../helpers/server.js';
import { launchBrowser, screenshot, signInThroughForm, viewports, type LaunchedBrowser } from './browser.js';

const SITE = 'Pacific/Auckland';
const DEVICE = 'America/Chicago';

/** The wall clock of `zone` at `iso` ("HH:MM") and its offset ("UTC+13:00"), from Intl's numeric parts. */
function expectedClock(iso: string, zone: string): { clock: string; offset: string } {
  const at = new Date(iso);
  const parts = Object.fromEntries(
    new Intl.DateTimeFormat('en-US', { timeZone: zone, year: 'numeric', month: 'numeric', day: 'numeric', hour: 'numeric', minute: 'numeric', hourCycle: 'h23' })
      .formatToParts(at)
      .map((p) => [p.type, p.value]),
  );
  const wallAsUtc = Date.UTC(Number(parts.year), Number(parts.month) - 1, Number(parts.day), Number(parts.hour), Number(parts.minute));
  const offsetMin = Math.round((wallAsUtc - Math.floor(at.getTime() / 60_000) * 60_000) / 60_000);
  const abs = Math.abs(offsetMin);
  const two = (n: number) => String(n).padStart(2, '0');
  return { clock: `${two(Number(parts.hour))}:${two(Number(parts.minute))}`, offset: `UTC${offsetMin < 0 ? '\u2212' : '+'}${two(Math.floor(abs / 60))}:${two(abs % 60)}` };
}

describe('site time on screen', () => {
  let server: TestServer;
  let chromium: LaunchedBrowser;
  let jobId: string;
  let token: string;
  beforeAll(async () => {
    server = await startTestServer({ withClient: true });
    await seedDemoIfEmpty(server.context);
    chromium = await launchBrowser();
    token = (await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200)).body.token as string;
    const jobs = await request(server.app).get('/api/jobs').set({ Authorization: `Bearer ${token}` }).expect(200);
    jobId = (jobs.body.items as { id: string; name: string }[]).find((j) => j.name === 'Transformer T2 lift: boom erection')!.id;
    // The site is in Auckland; the server and the browser are elsewhere.
    expect(server.config.timeZone).not.toBe(SITE);
    await request(server.app).patch(`/api/jobs/${jobId}`).set({ Authorization: `Bearer ${token}` }).send({ timeZone: SITE }).expect(200);
  }, 120_000);
  afterAll(async () => {
    await chromium?.close();
    await server?.close();
  });

  for (const [name, viewport] of [['phone', viewports.phone], ['laptop', viewports.desktop]] as const) {
    it(`the board's header and feed show the site's clock with its offset (${name})`, async () => {
      const context = await chromium.browser.newContext({ viewport, timezoneId: DEVICE });
      const page = await context.newPage();
      const errors: string[] = [];
      page.on('pageerror', (e) => errors.push(e.message));
      await signInThroughForm(page, `${server.url}/jobs/${jobId}/console`, 'supervisor@holdline.test', DEMO_PASSWORD);
      await page.waitForURL((url) => url.pathname.endsWith('/console'));
      const now = expectedClock(new Date().toISOString(), SITE);
      await expect.poll(() => page.getByTestId('site-time-zone').textContent(), { timeout: 10_000 }).toBe(`Site time ${now.offset}`);

      // The newest event in the feed, against the log's own time for it.
      const events = (await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set({ Authorization: `Bearer ${token}` }).expect(200)).body.items as { at: string }[];
      const newest = events.at(-1)!;
      const site = expectedClock(newest.at, SITE);
      const device = expectedClock(newest.at, DEVICE);
      const first = page.locator('.event .when').first();
      await first.scrollIntoViewIfNeeded();
      const shown = (await first.innerText()).replace(/\s+/g, ' ').trim();
      // Today at the site (the demo's events are minutes old): the clock alone, then the offset.
      expect(shown).toBe(`${site.clock} ${site.offset}`);
      expect(shown).not.toContain(device.clock);
      await screenshot(page, `site-time-board-${name}`);

      await page.goto(`${server.url}/jobs/${jobId}`);
      const fact = page.getByText(/^Pacific\/Auckland, UTC\+1[23]:00 now$/);
      await fact.waitFor({ timeout: 10_000 });
      await screenshot(page, `site-time-job-page-${name}`);
      expect(errors).toEqual([]);
      await context.close();
    }, 120_000);
  }

  it('the new-job dialog offers the server’s zone and takes the site’s when it is picked', async () => {
    const context = await chromium.browser.newContext({ viewport: viewports.phone, timezoneId: DEVICE });
    const page = await context.newPage();
    await signInThroughForm(page, `${server.url}/jobs`, 'supervisor@holdline.test', DEMO_PASSWORD);
    await page.getByRole('button', { name: /new job/i }).first().click();
    const picker = page.getByLabel('Site time zone');
    await picker.waitFor();
    // The server's zone is the default, not the device's.
    expect(await picker.inputValue()).toContain(server.config.timeZone);
    await page.getByLabel('Job name').fill('Harbour crane erection');
    await page.getByLabel('Site', { exact: true }).fill('Wharf 4');
    await page.getByLabel('Crane unit').click();
    await page.getByRole('option').first().click();
    await picker.fill('auck');
    await page.getByRole('option', { name: /Pacific\/Auckland/ }).click();
    await screenshot(page, 'site-time-new-job-phone');
    await page.getByRole('button', { name: 'Create job' }).click();
    await page.waitForURL((url) => /\/jobs\/[0-9a-f-]{36}$/.test(url.pathname));
    const id = new URL(page.url()).pathname.split('/').at(-1)!;
    const job = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${id}`).set({ Authorization: `Bearer ${token}` }).expect(200)).body).job;
    expect(job.timeZone).toBe(SITE);
    await page.getByText(/^Pacific\/Auckland, UTC\+1[23]:00 now$/).waitFor({ timeout: 10_000 });
    // A planner corrects the zone on the job's page; the fact follows the server's answer.
    const editor = page.locator('[data-test="time-zone-editor"]');
    await editor.getByLabel('Site time zone').fill('kolkata');
    await page.getByRole('option', { name: /Asia\/Kolkata/ }).click();
    await editor.getByRole('button', { name: 'Save the time zone' }).click();
    await page.getByText(/^Asia\/Kolkata, UTC\+05:30 now$/).waitFor({ timeout: 10_000 });
    await screenshot(page, 'site-time-zone-editor-phone');
    const saved = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${id}`).set({ Authorization: `Bearer ${token}` }).expect(200)).body).job;
    expect(saved.timeZone).toBe('Asia/Kolkata');
    await context.close();
  }, 120_000);
});
