// Site time through the API: a job in a zone other than the server's (this test process runs in
// the runner's zone, UTC on CI) keeps its IANA zone in the job's answer, the list, the board and
// the log, and its e-mails and PDFs write times in it with the UTC offset.
// Pacific/Auckland is New Zealand Standard Time UTC+12:00 and Daylight Time UTC+13:00 (late
// September to early April): IANA tz database, New Zealand Daylight Time Order 2007, from memory.
import { execFileSync } from 'node:child_process';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobEnvelopeSchema, jobListSchema } from '../../../shared/schemas/jobs.js';
import { sessionSchema } from '../../../shared/schemas/auth.js';
import { signedInUser } from '../../helpers/auth.js';
import { TEST_PASSWORD } from '../../helpers/factories.js';
import { boardOf, briefEveryone, completeSteps, httpCommand, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const MINUTE = 60_000;
const HOUR = 60 * MINUTE;
const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];

/**
 * A written site time and the UTC time beside it, read back into numbers: the wall clocks as
 * milliseconds, so the test works out the offset itself (site clock − UTC clock) and compares it
 * with the offset the words claim.
 */
function readSiteAndUtc(text: string): { siteMs: number; utcMs: number; claimedOffsetMs: number; claimed: string } {
  const m = /(\d{1,2}) (\w{3}) (\d{4}), (\d\d):(\d\d) \(UTC([+\u2212])(\d\d):(\d\d)\), (?:(\d{1,2}) (\w{3}) (\d{4}), )?(\d\d):(\d\d) UTC/.exec(text);
  if (!m) throw new Error(`no site time with UTC in: ${text}`);
  const [, d, mon, y, hh, mm, sign, oh, om, ud, umon, uy, uhh, umm] = m;
  const siteMs = Date.UTC(Number(y), MONTHS.indexOf(mon!), Number(d), Number(hh), Number(mm));
  const utcMs = Date.UTC(Number(uy ?? y), MONTHS.indexOf(umon ?? mon!), Number(ud ?? d), Number(uhh), Number(umm));
  const claimedOffsetMs = (sign === '+' ? 1 : -1) * (Number(oh) * HOUR + Number(om) * MINUTE);
  return { siteMs, utcMs, claimedOffsetMs, claimed: m[0] };
}

describe('a job in its site’s time zone', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let unitId: string;

  beforeAll(async () => {
    server = await startTestServer({ outbox: { retryDelaysMs: [0, 50, 100] } });
    crew = await signedInCrew(server);
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'Z');
    unitId = unit.id;
  });
  afterAll(() => server.stop());

  const auth = () => ({ Authorization: `Bearer ${crew.supervisor.token}` });

  it('is created in the zone chosen, which the answer, the list, the board and the log carry', async () => {
    expect(server.config.timeZone).not.toBe('Pacific/Auckland');
    const res = await request(server.app).post('/api/jobs').set(auth()).send({ name: 'Auckland job', site: 'Harbour quay', craneUnitId: unitId, kind: 'erection', timeZone: 'Pacific/Auckland' }).expect(201);
    const job = jobEnvelopeSchema.parse(res.body).job;
    expect(job.timeZone).toBe('Pacific/Auckland');
    const listed = jobListSchema.parse((await request(server.app).get('/api/jobs').set(auth()).expect(200)).body).items.find((j) => j.id === job.id);
    expect(listed?.timeZone).toBe('Pacific/Auckland');
    expect((await boardOf(server, crew.supervisor, job.id)).job.timeZone).toBe('Pacific/Auckland');
    const events = (await request(server.app).get(`/api/jobs/${job.id}/events?after=0`).set(auth()).expect(200)).body.items as { type: string; data: { job?: { timeZone?: string } } }[];
    expect(events.find((e) => e.type === 'job.created')?.data.job?.timeZone).toBe('Pacific/Auckland');
  });

  it('without a zone, takes the server’s, which every session answer carries for the create form', async () => {
    const res = await request(server.app).post('/api/jobs').set(auth()).send({ name: 'Home job', site: 'Depot', craneUnitId: unitId, kind: 'erection' }).expect(201);
    expect(jobEnvelopeSchema.parse(res.body).job.timeZone).toBe(server.config.timeZone);
    const session = sessionSchema.parse((await request(server.app).post('/api/auth/login').send({ email: crew.rigger.user.email, password: TEST_PASSWORD }).expect(200)).body);
    expect(session.timeZone).toBe(server.config.timeZone);
  });

  it('refuses a zone the server does not know, naming the field, on create and on change', async () => {
    const created = await request(server.app).post('/api/jobs').set(auth()).send({ name: 'Mars job', site: 'Olympus', craneUnitId: unitId, kind: 'erection', timeZone: 'Mars/Olympus' }).expect(400);
    expect(created.body.error.code).toBe('validation');
    expect(created.body.error.fields.map((f: { path: string }) => f.path)).toEqual(['timeZone']);
    const job = await plannedJob(server, crew, unitId, 'Zone change job');
    const patched = await request(server.app).patch(`/api/jobs/${job.id}`).set(auth()).send({ timeZone: 'Mars/Olympus' }).expect(400);
    expect(patched.body.error.fields.map((f: { path: string }) => f.path)).toEqual(['timeZone']);
    // A known zone typed in another case is stored the usual way, and the log says so.
    const changed = await request(server.app).patch(`/api/jobs/${job.id}`).set(auth()).send({ timeZone: 'europe/warsaw' }).expect(200);
    expect(jobEnvelopeSchema.parse(changed.body).job.timeZone).toBe('Europe/Warsaw');
    expect((await boardOf(server, crew.supervisor, job.id)).job.timeZone).toBe('Europe/Warsaw');
  });

  /** A PDF of the job read back as text (poppler's pdftotext), whitespace collapsed. */
  async function pdfText(url: string): Promise<string> {
    const res = await request(server.app)
      .get(url)
      .set(auth())
      .buffer(true)
      .parse((r, done) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => done(null, Buffer.concat(chunks)));
      })
      .expect(200);
    return execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', '-', '-'], { input: res.body as Buffer }).toString('utf8').replace(/\s+/g, ' ');
  }

  /** The "printed" line's site clock, minus the offset it claims, is the moment it was printed (to the minute). */
  function expectPrintedNowInAuckland(text: string) {
    const printed = /printed (\d{1,2}) (\w{3}) (\d{4}), (\d\d):(\d\d) \(UTC\+(\d\d):00\) site time/.exec(text);
    expect(printed, text.slice(0, 400)).not.toBeNull();
    const [, d, mon, y, hh, mm, oh] = printed!;
    const printedUtcMs = Date.UTC(Number(y), MONTHS.indexOf(mon!), Number(d), Number(hh), Number(mm)) - Number(oh) * HOUR;
    expect(Math.abs(printedUtcMs - server.context.now().getTime())).toBeLessThan(2 * MINUTE);
    expect(['12', '13']).toContain(oh);
  }

  it('prints the configuration sheet’s and the plan checklist’s time in the site’s zone with its offset', async () => {
    const job = await plannedJob(server, crew, unitId, 'Sheet job');
    await request(server.app).patch(`/api/jobs/${job.id}`).set(auth()).send({ timeZone: 'Pacific/Auckland' }).expect(200);
    const sheet = await pdfText(`/api/jobs/${job.id}/configuration.pdf`);
    expect(sheet).toContain('Site time Pacific/Auckland');
    expectPrintedNowInAuckland(sheet);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth()).expect(200);
    const plan = await pdfText(`/api/jobs/${job.id}/plan.pdf`);
    expect(plan).toContain("Write times as the site's clock (Pacific/Auckland).");
    expectPrintedNowInAuckland(plan);
  });

  it('writes a hold reminder’s time as the site’s clock with its offset, and UTC beside it', async () => {
    const job = await plannedJob(server, crew, unitId, 'Reminder in Auckland');
    await request(server.app).patch(`/api/jobs/${job.id}`).set(auth()).send({ timeZone: 'Pacific/Auckland', holdReminderMinutes: 1 }).expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth()).expect(200);
    const startedAt = server.context.now().getTime();
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    let holdTitle = '';
    for (let guard = 0; guard < 40 && !holdTitle; guard++) {
      const board = await boardOf(server, crew.supervisor, job.id);
      const holding = board.stages.find((s) => s.state === 'holding');
      if (holding?.hold) holdTitle = holding.hold.title;
      else await completeSteps(server, crew, job.id, board.stages.find((s) => s.state === 'active')!.id);
    }
    expect(holdTitle).not.toBe('');
    server.advance(2 * MINUTE);
    // Nobody is on the board: each role the hold still needs is e-mailed.
    expect(await server.reminders.check()).toBeGreaterThan(0);
    await server.context.outbox.idle();
    const mail = server.context.mailer.fake!.messages.find((m) => m.subject.includes(holdTitle) && m.text.includes(`/jobs/${job.id}/open`));
    expect(mail).toBeDefined();
    expect(mail!.text).toContain("Times are the site's (Pacific/Auckland)");
    const line = mail!.text.split('\n').find((l) => l.startsWith('It has waited since'))!;
    const { siteMs, utcMs, claimedOffsetMs, claimed } = readSiteAndUtc(line);
    // The offset the words claim is the difference between the two clocks written, 12 or 13 hours.
    expect(siteMs - utcMs, claimed).toBe(claimedOffsetMs);
    expect([12 * HOUR, 13 * HOUR]).toContain(claimedOffsetMs);
    // And the UTC moment is when the hold opened: after the start, before the reminder.
    expect(utcMs).toBeGreaterThanOrEqual(Math.floor(startedAt / MINUTE) * MINUTE);
    expect(utcMs).toBeLessThanOrEqual(server.context.now().getTime());
  });
});
