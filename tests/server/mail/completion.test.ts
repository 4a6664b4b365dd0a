import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { jobEnvelopeSchema } from '../../../shared/schemas/jobs.js';
import { mailProblemListSchema } from '../../../shared/schemas/mail.js';
import { MailOutbox } from '../../../server/entities/MailOutbox.js';
import { User } from '../../../server/entities/User.js';
import { FakeSmtpServer } from '../../../server/mail/fake-smtp.js';
import { noRecordPdf } from '../../../server/mail/record-pdf.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, boardOf, briefEveryone, completeSteps, httpCommand, weatherIfNeeded, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';
import { REFUSING_SMTP_URL } from '../../helpers/mail.js';

const DISTRIBUTION = ['records@example.test', 'site.office@example.test'];

interface Setup {
  crew: CrewByRole;
  /** A rigger the admin marked as qualified to inspect: acknowledges the final sign-off as the inspector. */
  inspector: SignedInUser;
  admin: SignedInUser;
  unitId: string;
}

async function setUp(server: TestServer): Promise<Setup> {
  const crew: CrewByRole = await signedInCrew(server);
  const inspector = await signedInUser(server, { qualifications: ['rigger'] });
  await server.context.queue.transaction((m) => m.update(User, { id: inspector.user.id }, { canInspect: true }));
  const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
  const { model, unit } = await seedModelAndUnit(server, admin.token);
  await addParts18m(server, admin.token, model.id, unit.id, 'C');
  return { crew, inspector, admin, unitId: unit.id };
}

/**
 * A job with a distribution list worked through every stage up to its final sign-off, which is
 * open and acknowledged: the supervisor's release (`complete`) completes it. A plan without a
 * sign-off stops with every stage done, for `job.complete`.
 */
async function jobReadyToComplete(server: TestServer, { crew, inspector, unitId }: Setup): Promise<string> {
  const job = await plannedJob(server, crew, unitId, 'Completion job');
  const auth = { Authorization: `Bearer ${crew.supervisor.token}` };
  const members = [...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })), { userId: inspector.user.id, role: 'rigger' }];
  await request(server.app).put(`/api/jobs/${job.id}/crew`).set(auth).send({ members }).expect(200);
  await request(server.app).patch(`/api/jobs/${job.id}`).set(auth).send({ distribution: DISTRIBUTION }).expect(200);
  await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth).expect(200);
  expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
  await briefEveryone(server, crew, job.id);
  await httpCommand(server, inspector, job.id, { type: 'briefing.acknowledge' });
  for (let guard = 0; guard < 100; guard++) {
    const board = await boardOf(server, crew.supervisor, job.id);
    const next = board.stages.find((s) => s.state === 'active' || s.state === 'holding');
    if (!next) break;
    if (next.state === 'active') await completeSteps(server, crew, job.id, next.id);
    else if (!next.hold?.signOff) await acknowledgeAndRelease(server, crew, job.id, next.id);
    else {
      for (const role of next.hold.requiredRoles) {
        const answer = await httpCommand(server, crew[role as keyof CrewByRole], job.id, { type: 'hold.acknowledge', holdId: next.hold.id, role });
        expect(answer.status, JSON.stringify(answer.body)).toBe(200);
      }
      const asInspector = await httpCommand(server, inspector, job.id, { type: 'hold.acknowledge', holdId: next.hold.id, role: 'rigger', asInspector: true });
      expect(asInspector.status, JSON.stringify(asInspector.body)).toBe(200);
      await weatherIfNeeded(server, crew, job.id, next.id, true);
      return job.id;
    }
  }
  return job.id;
}

/** Releases the final sign-off (or sends `job.complete` on a plan without one); the job is then complete. */
async function complete(server: TestServer, { crew }: Setup, jobId: string) {
  const board = await boardOf(server, crew.supervisor, jobId);
  const signOff = board.stages.find((s) => s.state === 'holding' && s.hold?.signOff)?.hold;
  const answer = await httpCommand(server, crew.supervisor, jobId, signOff ? { type: 'hold.release', holdId: signOff.id } : { type: 'job.complete' });
  expect(answer.status, JSON.stringify(answer.body)).toBe(200);
  const job = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}`).set('Authorization', `Bearer ${crew.supervisor.token}`).expect(200)).body).job;
  expect(job.state).toBe('complete');
  return job;
}

/** The text of every page of a PDF (poppler's pdftotext), whitespace collapsed. */
function pdfText(pdf: Buffer): string {
  const folder = mkdtempSync(path.join(os.tmpdir(), 'holdline-mail-pdf-'));
  try {
    const file = path.join(folder, 'attached.pdf');
    writeFileSync(file, pdf);
    return execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' }).replace(/\s+/g, ' ');
  } finally {
    rmSync(folder, { recursive: true, force: true });
  }
}

// The record PDF renders in a worker before the e-mail goes; on a busy two-core machine that takes a while, and these waits only catch a hang.
async function waitUntil(what: string, test: () => Promise<boolean>, timeoutMs = 30_000): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (!(await test())) {
    if (Date.now() > until) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 25));
  }
}

describe('the completion e-mail', () => {
  let server: TestServer;
  let setup: Setup;

  beforeAll(async () => {
    // The app's own record renderer (server/pdf/record.ts through the record.pdf route's function).
    server = await startTestServer({ outbox: { retryDelaysMs: [0, 50, 100] } });
    setup = await setUp(server);
  });
  afterAll(() => server.stop());

  it('goes to every address of the distribution list with the record PDF and the final hash of the log', async () => {
    const jobId = await jobReadyToComplete(server, setup);
    const job = await complete(server, setup, jobId);
    const fake = server.context.mailer.fake!;
    for (const address of DISTRIBUTION) {
      const mail = await fake.waitFor(address, 30_000, (m) => m.subject.includes('Completion job'));
      // The head hash the API reports after completion is the hash of the completing event.
      expect(mail.text).toContain(`Final hash of the job's record: ${job.headHash}`);
      expect(mail.text).toContain('The record PDF is attached.');
      // The final sign-off is read from the log: its release and the inspector's acknowledgment.
      expect(mail.text).toContain('Final sign-off:');
      expect(mail.text).toContain(`Acknowledged by ${setup.inspector.user.displayName} (qualified inspector)`);
      expect(mail.attachments).toEqual([expect.objectContaining({ filename: `record-${jobId.slice(0, 8)}.pdf`, contentType: 'application/pdf' })]);
      // The attached record is the job's, and carries the same final hash as the e-mail's body.
      const text = pdfText(fake.attachmentContent(mail.id, 0));
      expect(text).toContain(`Final hash: ${job.headHash}`);
      expect(text).toContain('Completion job');
      expect(text).toContain(setup.inspector.user.displayName);
    }
    // One row per address, each recorded as sent after the mail server took it.
    await server.context.outbox.idle();
    const rows = await server.context.dataSource.manager.findBy(MailOutbox, { jobId, kind: 'completion' });
    expect(rows.map((r) => r.state)).toEqual(['sent', 'sent']);
  }, 120_000);
});

describe('a mail server that cannot be reached', () => {
  let server: TestServer;
  let setup: Setup;
  beforeAll(async () => {
    server = await startTestServer({ env: { SMTP_URL: REFUSING_SMTP_URL }, outbox: { retryDelaysMs: [0, 40, 80] } });
    setup = await setUp(server);
  });
  afterAll(() => server.stop());

  it('does not block or fail the command; after its last try the failure is listed for the admin only', async () => {
    const jobId = await jobReadyToComplete(server, setup);
    await complete(server, setup, jobId);

    const problems = async () => mailProblemListSchema.parse((await request(server.app).get('/api/mail/problems').set('Authorization', `Bearer ${setup.admin.token}`).expect(200)).body).items;
    await waitUntil('both sends to give up', async () => (await problems()).filter((p) => p.jobId === jobId && p.state === 'failed').length === 2);
    const listed = (await problems()).filter((p) => p.jobId === jobId);
    expect(listed.map((p) => p.to).sort()).toEqual([...DISTRIBUTION].sort());
    for (const p of listed) {
      expect(p).toMatchObject({ kind: 'completion', state: 'failed', attempts: 3, nextAttemptAt: null });
      expect(p.lastError).toMatch(/ECONNREFUSED/);
    }
    // The job itself is complete and its board answers as usual.
    expect((await request(server.app).get(`/api/jobs/${jobId}/board`).set('Authorization', `Bearer ${setup.crew.rigger.token}`).expect(200)).body.job.state).toBe('complete');
    await request(server.app).get('/api/mail/problems').set('Authorization', `Bearer ${setup.crew.supervisor.token}`).expect(403);
    await request(server.app).get('/api/mail/problems').expect(401);
  }, 120_000);
});

describe('a mail server that answers 550 and then recovers', () => {
  let server: TestServer;
  let setup: Setup;
  const refusing = new FakeSmtpServer();
  afterEach(() => {
    refusing.refuseEverything = false;
  });
  beforeAll(async () => {
    refusing.refuseEverything = true;
    const port = await refusing.start();
    // The second try waits long enough for the test to see the refusal listed before it recovers.
    // Without a record source, to check the words of an e-mail whose record could not be attached.
    server = await startTestServer({ env: { SMTP_URL: `smtp://127.0.0.1:${port}` }, outbox: { retryDelaysMs: [0, 1_500, 100], recordPdf: noRecordPdf } });
    setup = await setUp(server);
  });
  afterAll(async () => {
    await server.stop();
    await refusing.stop();
  });

  it('is retried: listed as waiting for another try with the 550 answer, then delivered and no longer listed', async () => {
    const jobId = await jobReadyToComplete(server, setup);
    await complete(server, setup, jobId);
    const problems = async () => mailProblemListSchema.parse((await request(server.app).get('/api/mail/problems').set('Authorization', `Bearer ${setup.admin.token}`).expect(200)).body).items.filter((p) => p.jobId === jobId);
    await waitUntil('the first refusal', async () => (await problems()).length === 2);
    for (const p of await problems()) {
      expect(p).toMatchObject({ state: 'pending', attempts: 1 });
      expect(p.lastError).toMatch(/550/);
      expect(p.nextAttemptAt).not.toBeNull();
    }
    refusing.refuseEverything = false;
    for (const address of DISTRIBUTION) {
      const mail = await refusing.waitFor(address, 30_000);
      expect(mail.text).toContain('Final hash');
      // No record PDF source here: nothing is attached, and the e-mail says where the record is.
      expect(mail.attachments).toEqual([]);
      expect(mail.text).toContain(`The record PDF is not attached to this e-mail: download it from the job in Holdline, ${server.url}/jobs/${jobId}`);
    }
    await waitUntil('the sends to be recorded', async () => (await problems()).length === 0);
    const rows = await server.context.dataSource.manager.findBy(MailOutbox, { jobId });
    expect(rows.map((r) => [r.state, r.attempts])).toEqual([
      ['sent', 2],
      ['sent', 2],
    ]);
  }, 120_000);
});
