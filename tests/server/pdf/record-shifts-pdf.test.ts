// The record PDF and events.csv of a job at a site in another zone than the server's (the tests
// run in UTC), worked over two shifts through the real server commands: a crew change that takes
// an acknowledgment back, the end of shift 1 with its make-safe checklist, the handover note to a
// second supervisor, the start-of-shift hold and shift 2. Read back with poppler's pdftotext.
import { execFileSync } from 'node:child_process';
import { mkdirSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import { parse } from 'csv-parse/sync';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { jobEventListSchema, type JobEventDto } from '../../../shared/events/log.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, boardOf, briefEveryone, calmWeather, completeSteps, httpCommand, type CrewByRole, type CommandBody, signedInCrew } from '../../helpers/board.js';
import { TEST_PASSWORD } from '../../helpers/factories.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const ZONE = 'Pacific/Auckland';
/** The server's clock is set to this instant: 17:00 on 10 Dec 2026 in Auckland, in New Zealand daylight time. */
const START = Date.parse('2026-12-10T04:00:00.000Z');
const HOUR = 3_600_000;

const MONTHS = ['Jan', 'Feb', 'Mar', 'Apr', 'May', 'Jun', 'Jul', 'Aug', 'Sep', 'Oct', 'Nov', 'Dec'];
const two = (n: number) => String(n).padStart(2, '0');
/**
 * Auckland's wall clock in December written by hand, without Intl: UTC + 13 h. New Zealand
 * daylight time is UTC+13:00 from the last Sunday of September to the first Sunday of April
 * (IANA tz database, Pacific/Auckland; from memory).
 */
function aucklandInDecember(iso: string): string {
  const d = new Date(Date.parse(iso) + 13 * HOUR);
  expect(d.getUTCMonth()).toBe(11);
  return `${d.getUTCDate()} ${MONTHS[d.getUTCMonth()]} ${d.getUTCFullYear()}, ${two(d.getUTCHours())}:${two(d.getUTCMinutes())}:${two(d.getUTCSeconds())} (UTC+13:00)`;
}

const scratch = path.resolve('test-results', 'record-pdf');
mkdirSync(scratch, { recursive: true });

/** The PDF's text in writing order (pdftotext -raw), whitespace collapsed; pdfkit's wrap after a hyphen joined again. */
function textOf(pdf: Buffer, name: string): string {
  const file = path.join(scratch, `${name}.pdf`);
  writeFileSync(file, pdf);
  return execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ').replace(/- /g, '-');
}

describe('the record of a job over two shifts at a site in another zone', { timeout: 180_000 }, () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  let rigger2: SignedInUser;
  let supervisor2: SignedInUser;
  let jobId: string;
  let holdTitle: string;
  let events: JobEventDto[];
  let pdfText: string;
  /** The record printed overnight, while the job was made safe. */
  let overnightText: string;
  const everyone = () => [crew.supervisor, crew.operator, crew.signaller, crew.rigger, rigger2, supervisor2, admin];
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const ok = async (who: SignedInUser, command: CommandBody) => {
    const answer = await httpCommand(server, who, jobId, command);
    if (answer.status !== 200) throw new Error(`${command.type}: ${JSON.stringify(answer.body)}`);
  };
  const member = (who: SignedInUser, role: CrewRole) => ({ userId: who.user.id, role });
  const download = async (file: string, who: SignedInUser) =>
    (
      await request(server.app)
        .get(`/api/jobs/${jobId}/${file}`)
        .set(auth(who))
        .buffer(true)
        .parse((r, done) => {
          const chunks: Buffer[] = [];
          r.on('data', (c: Buffer) => chunks.push(c));
          r.on('end', () => done(null, Buffer.concat(chunks)));
        })
        .expect(200)
    ).body as Buffer;

  beforeAll(async () => {
    server = await startTestServer();
    // A fixed December day, so the site's offset is known whenever the test runs; tokens follow the same clock.
    server.advance(START - Date.now());
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = await signedInCrew(server);
    rigger2 = await signedInUser(server, { qualifications: ['rigger'] });
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    await request(server.app).patch(`/api/users/${rigger2.user.id}`).set(auth(admin)).send({ canInspect: true }).expect(200);
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'C');

    // Shift 1: the job at the Auckland site, supervisor2 in the crew from the start.
    const job = await plannedJob(server, crew, unit.id, 'Wharf crane erection over two shifts');
    jobId = job.id;
    await request(server.app).patch(`/api/jobs/${jobId}`).set(auth(crew.supervisor)).send({ timeZone: ZONE }).expect(200);
    const firstCrew = [member(crew.supervisor, 'supervisor'), member(crew.operator, 'operator'), member(crew.signaller, 'signaller'), member(crew.rigger, 'rigger'), member(supervisor2, 'supervisor')];
    await request(server.app).put(`/api/jobs/${jobId}/crew`).set(auth(crew.supervisor)).send({ members: firstCrew }).expect(200);
    await request(server.app).post(`/api/jobs/${jobId}/ready`).set(auth(crew.supervisor)).expect(200);
    await ok(crew.supervisor, { type: 'job.start' });
    await briefEveryone(server, crew, jobId);
    await ok(supervisor2, { type: 'briefing.acknowledge' });

    // Worked to the first hold a rigger acknowledges with another role.
    let stageId: string | null = null;
    for (let guard = 0; guard < 50 && !stageId; guard++) {
      const board = await boardOf(server, crew.supervisor, jobId);
      const next = board.stages.find((s) => s.state === 'active' || s.state === 'holding')!;
      const hold = next.hold;
      if (next.state === 'holding' && hold && hold.requiredRoles.includes('rigger') && hold.requiredRoles.length > 1 && !hold.valueCheck && !hold.signOff) {
        stageId = next.id;
        holdTitle = hold.title;
      } else if (next.state === 'active') await completeSteps(server, crew, jobId, next.id);
      else await acknowledgeAndRelease(server, crew, jobId, next.id);
    }
    const holdId = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === stageId)!.hold!.id;
    await ok(crew.rigger, { type: 'hold.acknowledge', holdId, role: 'rigger' });
    // The rigger leaves, rigger2 takes over in the same change: the acknowledgment leaves with the first.
    await request(server.app)
      .put(`/api/jobs/${jobId}/crew`)
      .set(auth(crew.supervisor))
      .send({ members: [...firstCrew.filter((m) => m.userId !== crew.rigger.user.id), member(rigger2, 'rigger')] })
      .expect(200);
    await ok(rigger2, { type: 'briefing.acknowledge' });
    const crew2: CrewByRole = { ...crew, rigger: rigger2 };
    await acknowledgeAndRelease(server, crew2, jobId, stageId!);

    // End of shift 1: every make-safe item by one of its roles, then the handover to supervisor2.
    await ok(crew.supervisor, { type: 'shift.end' });
    const items = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items;
    for (const item of items) {
      const who = crew2[item.roles.find((r) => r !== 'viewer') as keyof CrewByRole];
      await ok(who, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: `Noted for ${item.id}: key in the site office safe; gusts to 12 m/s after midnight.` } : {}) });
    }
    await ok(crew.supervisor, {
      type: 'handover.write',
      hazards: 'Frost forecast overnight: check the mats and blocking before any travel.',
      note: 'Assist crane booked for 07:30 site time; the wharf gate opens at 07:00.',
      toUserId: supervisor2.user.id,
    });
    await ok(supervisor2, { type: 'handover.acknowledge' });
    overnightText = textOf(await download('record.pdf', supervisor2), 'two-shifts-auckland-overnight');

    // The next morning (14 hours on): everyone signs in again, the start-of-shift hold, shift 2.
    server.advance(14 * HOUR);
    for (const who of everyone()) who.token = (await request(server.app).post('/api/auth/login').send({ email: who.user.email, password: TEST_PASSWORD }).expect(200)).body.token as string;
    for (const who of [crew.supervisor, crew.operator, crew.signaller, rigger2, supervisor2]) await ok(who, { type: 'briefing.acknowledge' });
    await ok(rigger2, { type: 'shift.inspect', note: 'Boom sections, pins, blocking and mats checked after the night: no change.' });
    await ok(crew.operator, { type: 'shift.acknowledge', role: 'operator' });
    await ok(supervisor2, { type: 'shift.acknowledge', role: 'supervisor' });
    await ok(crew.signaller, calmWeather);
    await ok(supervisor2, { type: 'shift.start' });

    events = jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events`).set(auth(supervisor2)).expect(200)).body).items;
    pdfText = textOf(await download('record.pdf', supervisor2), 'two-shifts-auckland');
  }, 180_000);

  afterAll(async () => {
    await server?.stop();
  });

  const one = <T extends JobEventDto['type']>(type: T) => {
    const found = events.filter((e) => e.type === type);
    expect(found).toHaveLength(1);
    return found[0] as Extract<JobEventDto, { type: T }>;
  };

  it('names the site’s zone on the cover and writes every time of the log in site time with +13:00, never in UTC alone', () => {
    expect(events.length).toBeGreaterThan(30);
    expect(pdfText).toContain(`Site time ${ZONE}: every time in this record is the site’s clock, with its offset from UTC`);
    // The whole log: each event's number, its site time and who, in writing order.
    for (const e of events) expect(pdfText).toContain(`${e.seq} ${aucklandInDecember(e.at)} ${e.by.name}`);
    expect(pdfText).not.toMatch(/\d\d:\d\d:\d\d UTC/);
    expect(pdfText).not.toContain('(UTC+00:00)');
    expect(pdfText).toContain('Changed the site’s time zone');
    expect(pdfText).not.toContain('timeZone');
    // The morning of shift 2 is the next day at the site.
    expect(aucklandInDecember(one('shift.started').at)).toMatch(/^11 Dec 2026, 07:/);
  });

  it('shows the end of shift 1, every make-safe item with who ticked it, and when the job was made safe', () => {
    const shifts = pdfText.slice(pdfText.indexOf('Shifts How each shift started'));
    const ending = one('shift.ending');
    expect(shifts).toContain(`END OF SHIFT 1: ended by ${ending.by.name} (supervisor), ${aucklandInDecember(ending.at)}.`);
    const done = events.filter((e) => e.type === 'shift.item.done');
    expect(done).toHaveLength(ending.data.items.length);
    for (const item of ending.data.items) {
      const tick = done.find((e) => e.data.itemId === item.id)!;
      expect(shifts).toContain(item.text);
      expect(shifts).toContain(`${tick.by.name} (${tick.data.role}) ${aucklandInDecember(tick.at)}`);
      if (item.asksNote) expect(shifts).toContain(`Noted for ${item.id}: key in the site office safe`);
    }
    const last = done.find((e) => e.data.madeSafe)!;
    expect(shifts).toContain(`MADE SAFE ${aucklandInDecember(last.at)}, last item by ${last.by.name}.`);
  });

  it('says on the cover of a record printed overnight that the job is made safe, when and by whom', () => {
    const last = events.find((e) => e.type === 'shift.item.done' && e.data.madeSafe)!;
    const cover = overnightText.slice(0, overnightText.indexOf('Crew Name'));
    expect(cover).toContain('State MADE SAFE: job in progress, no work until the next shift starts; this record is not final');
    expect(cover).toContain(`Shift 1, MADE SAFE: no work until the next shift starts (${aucklandInDecember(last.at)}, last item by ${last.by.name})`);
    expect(cover).toContain(`Acting supervisor ${supervisor2.user.displayName}, since ${aucklandInDecember(one('handover.acknowledged').at)}`);
    const shifts = overnightText.slice(overnightText.indexOf('Shifts How each shift started'));
    expect(shifts).toContain('Start-of-shift hold: nothing recorded yet. NOT STARTED.');
  });

  it('prints the handover note in full and who acknowledged it', () => {
    const note = one('handover.written');
    const read = one('handover.acknowledged');
    const shifts = pdfText.slice(pdfText.indexOf('Shifts How each shift started'));
    expect(shifts).toContain(`HANDOVER NOTE from ${crew.supervisor.user.displayName} (supervisor), ${aucklandInDecember(note.at)}, to ${supervisor2.user.displayName}:`);
    expect(shifts).toContain('Hazards Frost forecast overnight: check the mats and blocking before any travel.');
    expect(shifts).toContain('Note Assist crane booked for 07:30 site time; the wharf gate opens at 07:00.');
    expect(note.data.done.length).toBeGreaterThan(0);
    expect(shifts).toContain(`Done ${note.data.done.join('; ')}`);
    expect(shifts).toContain(`Read and acknowledged ${supervisor2.user.displayName} (supervisor), ${aucklandInDecember(read.at)}: the acting supervisor from then`);
    // The acting supervisor's changes: the job's start, then the handover.
    expect(shifts).toContain(`${aucklandInDecember(read.at)} Acknowledged the handover note (${supervisor2.user.displayName}) ${crew.supervisor.user.displayName} ${supervisor2.user.displayName}`);
  });

  it('shows the start of shift 2: the inspection with its note, the operator’s and supervisor’s acknowledgments, the briefings, and who released it', () => {
    const shifts = pdfText.slice(pdfText.indexOf('Shifts How each shift started'));
    const second = shifts.slice(shifts.indexOf('Shift 2'));
    const inspected = one('shift.inspected');
    const started = one('shift.started');
    expect(second).toContain(`START-OF-SHIFT HOLD released by ${supervisor2.user.displayName} (supervisor), ${aucklandInDecember(started.at)}.`);
    expect(second).toContain(`Shift inspection ${rigger2.user.displayName} ${aucklandInDecember(inspected.at)} Boom sections, pins, blocking and mats checked after the night: no change.`);
    for (const ack of events.filter((e) => e.type === 'shift.start.acknowledged')) {
      expect(second).toContain(`${ack.data.role === 'operator' ? 'Operator' : 'Supervisor'} ${ack.by.name} ${aucklandInDecember(ack.at)} acknowledged`);
    }
    const briefings = events.filter((e) => e.type === 'briefing.acknowledged' && e.data.shift === 2);
    expect(briefings).toHaveLength(5);
    for (const b of briefings) expect(second).toContain(`${b.by.name} (plan version 1, ${aucklandInDecember(b.at)})`);
  });

  it('lists the crew change with the acknowledgment it took back, also on the hold', () => {
    const change = events.filter((e) => e.type === 'crew.set').at(-1)!;
    expect(change.type === 'crew.set' && change.data.withdrawn?.length).toBe(1);
    const section = pdfText.slice(pdfText.indexOf('Crew changes during the job'));
    expect(section).toContain(`Added: ${rigger2.user.displayName} as rigger. Removed: ${crew.rigger.user.displayName} as rigger`);
    expect(section).toContain(`${crew.rigger.user.displayName} as rigger at “${holdTitle}”: those holds are open again`);
    expect(pdfText).toContain(`TAKEN BACK (crew change or account disabled) ${crew.rigger.user.displayName} Rigger ${aucklandInDecember(change.at)}`);
  });

  it('gives events.csv the site time with its offset beside the UTC time', async () => {
    const rows = parse((await download('events.csv', supervisor2)).toString('utf8'), { columns: true, bom: true, skip_empty_lines: true }) as Record<string, string>[];
    expect(Object.keys(rows[0]).slice(0, 3)).toEqual(['seq', 'time (UTC)', `time at the site (${ZONE})`]);
    expect(rows.map((r) => r['time (UTC)'])).toEqual(events.map((e) => e.at));
    expect(rows.map((r) => r[`time at the site (${ZONE})`])).toEqual(events.map((e) => aucklandInDecember(e.at)));
  });
});
