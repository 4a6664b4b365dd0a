import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { JobEventDto } from '../../../shared/events/log.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import type { InboxMessage } from '../../../shared/schemas/audit.js';
import { jobEnvelopeSchema } from '../../../shared/schemas/jobs.js';
import { MailOutbox } from '../../../server/entities/MailOutbox.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { boardOf, briefEveryone, httpCommand, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const DISTRIBUTION = ['records@example.test', 'night.office@example.test'];

/**
 * A zone without daylight saving, so the expected clock does not depend on the day the test
 * runs: Asia/Kolkata is UTC+05:30 all year (IANA time zone database, file `asia`, zone
 * Asia/Kolkata: "5:30 - IST" since 1945).
 */
const ZONE = 'Asia/Kolkata';
const ZONE_OFFSET_MINUTES = 5 * 60 + 30;

/** The site clock as "HH:MM (UTC+05:30)", worked out from the UTC instant by adding the published fixed offset. */
function kolkataClock(iso: string): string {
  const minutes = (new Date(iso).getUTCHours() * 60 + new Date(iso).getUTCMinutes() + ZONE_OFFSET_MINUTES) % (24 * 60);
  const two = (n: number) => String(n).padStart(2, '0');
  return `${two(Math.floor(minutes / 60))}:${two(minutes % 60)} (UTC+05:30)`;
}

/**
 * The shift-end e-mail (issue 17, "anchored at each shift end"): when the last make-safe item
 * makes the job safe, and again when a handover note is written while it is, the outbox e-mails
 * each address of the distribution list the log's head hash after that event, with who made it
 * safe and when in site time, and the handover note in full. Read from the fake SMTP inbox.
 */
describe('the shift-end e-mail', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  let supervisor2: SignedInUser;
  let unitId: string;
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });

  beforeAll(async () => {
    server = await startTestServer({ outbox: { retryDelaysMs: [0, 50, 100] } });
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = await signedInCrew(server);
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'C');
    unitId = unit.id;
  });
  afterAll(() => server.stop());

  /** A live job in the site zone with a distribution list, everyone briefed; then the acting supervisor ends the shift. */
  async function jobMakingSafe(name: string): Promise<string> {
    const job = await plannedJob(server, crew, unitId, name);
    const members = [...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })), { userId: supervisor2.user.id, role: 'supervisor' }];
    await request(server.app).put(`/api/jobs/${job.id}/crew`).set(auth(crew.supervisor)).send({ members }).expect(200);
    await request(server.app).patch(`/api/jobs/${job.id}`).set(auth(crew.supervisor)).send({ distribution: DISTRIBUTION, timeZone: ZONE }).expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    const ended = await httpCommand(server, crew.supervisor, job.id, { type: 'shift.end' });
    expect(ended.status, JSON.stringify(ended.body)).toBe(200);
    return job.id;
  }

  /** Ticks every make-safe item but `leave` (by the first crew role it names, with a note where it asks one). */
  async function tickItems(jobId: string, leave = 0): Promise<{ lastBy: SignedInUser | null }> {
    const items = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items;
    let lastBy: SignedInUser | null = null;
    for (const item of items.slice(0, items.length - leave)) {
      const role = item.roles.find((r) => r !== 'viewer') as keyof CrewByRole;
      const answer = await httpCommand(server, crew[role], jobId, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: `Noted for ${item.id}: key in the site office safe.` } : {}) });
      expect(answer.status, JSON.stringify(answer.body)).toBe(200);
      lastBy = crew[role];
    }
    return { lastBy };
  }

  const headOf = async (jobId: string) => jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}`).set(auth(crew.supervisor)).expect(200)).body).job;
  const eventsOf = async (jobId: string): Promise<JobEventDto[]> => jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events`).set(auth(crew.supervisor)).expect(200)).body).items;
  const hashLine = (mail: InboxMessage) => /Hash of the job's record after this event: ([0-9a-f]{64})/.exec(mail.text)?.[1];
  /** The server's own chain check of a hash taken from an e-mail (the record page's "Check this hash"). */
  const verify = async (jobId: string, hash: string) => (await request(server.app).get(`/api/jobs/${jobId}/record/verify`).query({ expect: hash }).set(auth(crew.supervisor)).expect(200)).body;

  it('sends the head hash after the made-safe event, who made it safe and when in site time; again with the handover note written after', async () => {
    const jobId = await jobMakingSafe('Night shift job');
    const { lastBy } = await tickItems(jobId);
    const job = await headOf(jobId);
    expect(job.state).toBe('made_safe');
    const madeSafe = (await eventsOf(jobId)).at(-1)!;
    expect(madeSafe.seq).toBe(job.lastSeq);
    const fake = server.context.mailer.fake!;

    for (const address of DISTRIBUTION) {
      const mail = await fake.waitFor(address, 8_000, (m) => m.subject.includes('Night shift job') && m.subject.includes('made safe'));
      expect(mail.subject).toBe('Record of Night shift job: made safe at the end of shift 1');
      // The hash in the e-mail is the job's head hash right after the event that made it safe.
      expect(hashLine(mail)).toBe(job.headHash);
      expect(mail.text).toContain(`(event number ${madeSafe.seq} of the record)`);
      expect(mail.text).toContain(`the last item by ${lastBy!.user.displayName}`);
      expect(mail.text).toContain(`${crew.supervisor.user.displayName} ended the shift`);
      // Site time with its offset, the clock worked out from the published fixed offset.
      expect(mail.text).toContain(kolkataClock(madeSafe.at));
      expect(mail.text).toContain('No handover note was written before the job was made safe.');
      expect(mail.text).toContain('Noted for keyHeld: key in the site office safe.');
      // How to check the hash later, both ways.
      expect(mail.text).toContain(`npm run verify-record -- events.jsonl --expect ${job.headHash}`);
      expect(mail.text).toContain('“Check this hash”');
    }
    // The server's own chain check leads to the e-mailed hash, at the made-safe event.
    expect((await verify(jobId, job.headHash)).expected).toEqual({ hash: job.headHash, found: true, seq: madeSafe.seq });

    // A handover note written while the job is made safe is anchored too, with the note in full.
    const note = 'Boom foot pinned, first two inserts on blocking.\nThe hired rigging crew leaves tomorrow at noon: book them again before the raise.';
    const hazards = 'Soft ground by the east mat after the rain; keep the trailer off it.';
    const written = await httpCommand(server, crew.supervisor, jobId, { type: 'handover.write', hazards, note, toUserId: supervisor2.user.id });
    expect(written.status, JSON.stringify(written.body)).toBe(200);
    const afterNote = await headOf(jobId);
    expect(afterNote.lastSeq).toBe(written.body.seq);
    for (const address of DISTRIBUTION) {
      const mail = await fake.waitFor(address, 8_000, (m) => m.subject === 'Record of Night shift job: handover note for shift 1');
      expect(hashLine(mail)).toBe(afterNote.headHash);
      expect(mail.text).toContain(`(event number ${written.body.seq} of the record)`);
      expect(mail.text).toContain(`written by ${crew.supervisor.user.displayName}`);
      expect(mail.text).toContain(`for ${supervisor2.user.displayName}`);
      for (const line of [...note.split('\n'), hazards]) expect(mail.text).toContain(`  ${line}`);
    }
    expect((await verify(jobId, afterNote.headHash)).expected).toEqual({ hash: afterNote.headHash, found: true, seq: written.body.seq });

    // One row per address and event, each sent; a second queueing of the same event adds nothing.
    await server.context.outbox.idle();
    const rows = await server.context.dataSource.manager.findBy(MailOutbox, { jobId, kind: 'shift_anchor' });
    expect(rows.map((r) => r.state)).toEqual(['sent', 'sent', 'sent', 'sent']);
    server.context.outbox.jobEventCommitted(madeSafe);
    await new Promise((r) => setTimeout(r, 300));
    expect(await server.context.dataSource.manager.countBy(MailOutbox, { jobId, kind: 'shift_anchor' })).toBe(4);
  }, 120_000);

  it('carries the handover note written while the crew made the crane safe', async () => {
    const jobId = await jobMakingSafe('Handover first job');
    await tickItems(jobId, 1);
    const note = 'Counterweight slabs 1 to 4 fitted; slab 5 on the trailer.';
    const written = await httpCommand(server, crew.supervisor, jobId, { type: 'handover.write', hazards: 'none', note });
    expect(written.status, JSON.stringify(written.body)).toBe(200);
    // Not made safe yet: the note alone sends nothing.
    await server.context.outbox.idle();
    expect(await server.context.dataSource.manager.countBy(MailOutbox, { jobId })).toBe(0);
    await tickLast(jobId);
    const job = await headOf(jobId);
    expect(job.state).toBe('made_safe');
    const mail = await server.context.mailer.fake!.waitFor(DISTRIBUTION[0]!, 8_000, (m) => m.subject === 'Record of Handover first job: made safe at the end of shift 1');
    expect(hashLine(mail)).toBe(job.headHash);
    expect(mail.text).toContain(`  ${note}`);
    expect(mail.text).not.toContain('No handover note was written');
    expect(mail.text).toContain('Not yet acknowledged by the supervisor taking over.');
  }, 120_000);

  it('is queued again at start for a job made safe whose e-mails were never queued (a crash right after the commit)', async () => {
    const jobId = await jobMakingSafe('Crash night job');
    await tickItems(jobId);
    const written = await httpCommand(server, crew.supervisor, jobId, { type: 'handover.write', hazards: 'none', note: 'Nothing to add.' });
    expect(written.status).toBe(200);
    await server.context.outbox.idle();
    // Read through whichever server runs now.
    const keys = async () => (await server.context.dataSource.manager.findBy(MailOutbox, { jobId, kind: 'shift_anchor' })).map((r) => r.dedupeKey).sort();
    const before = await keys();
    expect(before).toHaveLength(2 * DISTRIBUTION.length);
    // As if the server had stopped between the commits and the queueing: the rows are gone.
    await server.context.queue.transaction((m) => m.delete(MailOutbox, { jobId }));
    const dataDir = server.dataDir;
    await server.close();
    server = await startTestServer({ dataDir, outbox: { retryDelaysMs: [0, 50, 100] } });
    const until = Date.now() + 8_000;
    while ((await keys()).length < before.length && Date.now() < until) await new Promise((r) => setTimeout(r, 50));
    expect(await keys()).toEqual(before);
  }, 120_000);

  async function tickLast(jobId: string): Promise<void> {
    const item = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items.find((i) => !i.doneBy)!;
    const role = item.roles.find((r) => r !== 'viewer') as keyof CrewByRole;
    const answer = await httpCommand(server, crew[role], jobId, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: 'Forecast: calm until morning.' } : {}) });
    expect(answer.status, JSON.stringify(answer.body)).toBe(200);
  }
});
