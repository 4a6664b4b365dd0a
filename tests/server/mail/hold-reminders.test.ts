import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { jobEnvelopeSchema } from '../../../shared/schemas/jobs.js';
import { MailOutbox } from '../../../server/entities/MailOutbox.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, BoardClient, boardOf, briefEveryone, completeSteps, httpCommand, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

const MINUTE = 60_000;

async function crewAndUnit(server: TestServer): Promise<{ crew: CrewByRole; unitId: string }> {
  const crew: CrewByRole = await signedInCrew(server);
  const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
  const { model, unit } = await seedModelAndUnit(server, admin.token);
  await addParts18m(server, admin.token, model.id, unit.id, 'R');
  return { crew, unitId: unit.id };
}

/** A live job worked forward until its first hold is open; returns the hold and the reminder time set on the job. */
async function jobWaitingAtHold(server: TestServer, crew: CrewByRole, unitId: string, minutes: number) {
  const job = await plannedJob(server, crew, unitId, `Reminder job ${Math.random().toString(36).slice(2, 7)}`);
  const auth = { Authorization: `Bearer ${crew.supervisor.token}` };
  // The supervisor sets the reminder time on the job page, beside the distribution list.
  const patched = await request(server.app).patch(`/api/jobs/${job.id}`).set(auth).send({ holdReminderMinutes: minutes }).expect(200);
  expect(jobEnvelopeSchema.parse(patched.body).job.holdReminderMinutes).toBe(minutes);
  await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth).expect(200);
  expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
  await briefEveryone(server, crew, job.id);
  for (let guard = 0; guard < 40; guard++) {
    const board = await boardOf(server, crew.supervisor, job.id);
    const holding = board.stages.find((s) => s.state === 'holding');
    if (holding?.hold) return { jobId: job.id, stageId: holding.id, hold: holding.hold };
    const active = board.stages.find((s) => s.state === 'active');
    if (!active) throw new Error('no stage to work');
    await completeSteps(server, crew, job.id, active.id);
  }
  throw new Error('no hold opened');
}

const to = (server: TestServer, who: SignedInUser, jobId: string) => server.context.mailer.fake!.messages.filter((m) => m.to.includes(who.user.email.toLowerCase()) && m.text.includes(`/jobs/${jobId}/open`));

describe('hold reminders for crew members who are not on the board', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let unitId: string;
  const clients: BoardClient[] = [];

  beforeAll(async () => {
    server = await startTestServer({ outbox: { retryDelaysMs: [0, 50, 100] } });
    ({ crew, unitId } = await crewAndUnit(server));
  });
  afterEach(() => {
    for (const c of clients.splice(0)) c.close();
  });
  afterAll(() => server.stop());

  it('a new job reminds after 10 minutes, and the setting takes whole minutes from 1 to 120', async () => {
    const job = await plannedJob(server, crew, unitId, 'Setting job');
    expect(job.holdReminderMinutes).toBe(10);
    const auth = { Authorization: `Bearer ${crew.supervisor.token}` };
    for (const bad of [0, 121, 2.5, -3]) {
      const res = await request(server.app).patch(`/api/jobs/${job.id}`).set(auth).send({ holdReminderMinutes: bad }).expect(400);
      expect(res.body.error.fields.map((f: { path: string }) => f.path)).toEqual(['holdReminderMinutes']);
    }
    for (const good of [1, 120]) await request(server.app).patch(`/api/jobs/${job.id}`).set(auth).send({ holdReminderMinutes: good }).expect(200);
    // A rigger is not the job's planner.
    await request(server.app).patch(`/api/jobs/${job.id}`).set('Authorization', `Bearer ${crew.rigger.token}`).send({ holdReminderMinutes: 5 }).expect(403);
  });

  it('an absent crew member gets exactly one reminder however often the timer looks; those on the board get none', async () => {
    const { jobId, hold } = await jobWaitingAtHold(server, crew, unitId, 2);
    const absentRole = hold.requiredRoles.find((r) => r !== 'supervisor') ?? hold.requiredRoles[0]!;
    const absent = crew[absentRole as keyof CrewByRole];
    const present = Object.values(crew).filter((who) => who !== absent);
    for (const who of present) {
      const c = new BoardClient(server.url, who.token);
      clients.push(c);
      expect((await c.join(jobId)).ok).toBe(true);
    }

    expect(await server.reminders.check()).toBe(0); // just opened
    server.advance(1 * MINUTE);
    expect(await server.reminders.check()).toBe(0); // 1 of 2 minutes
    server.advance(1.5 * MINUTE);
    expect(await server.reminders.check()).toBe(1); // past 2 minutes: the absent person, nobody else
    for (let i = 0; i < 5; i++) {
      server.advance(1 * MINUTE);
      expect(await server.reminders.check()).toBe(0);
    }
    const mail = await server.context.mailer.fake!.waitFor(absent.user.email);
    await server.context.outbox.idle();
    expect(to(server, absent, jobId)).toHaveLength(1);
    expect(mail.subject).toContain(hold.title);
    expect(mail.text).toContain(`${server.url}/jobs/${jobId}/open`);
    expect(mail.text).toMatch(/waited 2 minutes/);
    for (const who of present) expect(to(server, who, jobId)).toHaveLength(0);

    // A restart on the same data: the reminder is remembered, so the absent person gets no second one.
    for (const c of clients.splice(0)) c.close();
    const dataDir = server.dataDir;
    await server.close();
    server = await startTestServer({ outbox: { retryDelaysMs: [0, 50, 100] }, dataDir });
    server.advance(20 * MINUTE);
    // Nobody is connected after the restart, so the other roles' people are reminded now, once each.
    const others = hold.requiredRoles.filter((r) => r !== absentRole).length;
    expect(await server.reminders.check()).toBe(others);
    expect(await server.reminders.check()).toBe(0);
    await server.context.outbox.idle();
    // The fake inbox kept the first reminder over the restart, and there is still only one.
    expect(to(server, absent, jobId)).toHaveLength(1);
  });
});

describe('a reminder queued for a hold that then moves on', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let unitId: string;

  beforeAll(async () => {
    // The first try waits 5 minutes, so the hold can be released while the reminder is still queued.
    server = await startTestServer({ outbox: { retryDelaysMs: [5 * MINUTE, 50] } });
    ({ crew, unitId } = await crewAndUnit(server));
  });
  afterAll(() => server.stop());

  it('is dropped when its turn comes, and no new one is queued for that hold', async () => {
    const { jobId, stageId, hold } = await jobWaitingAtHold(server, crew, unitId, 1);
    server.advance(2 * MINUTE);
    const queued = await server.reminders.check();
    expect(queued).toBe(hold.requiredRoles.length);

    await acknowledgeAndRelease(server, crew, jobId, stageId);
    server.advance(6 * MINUTE);
    server.context.outbox.kick();
    await server.context.outbox.idle();
    const rows = await server.context.dataSource.manager.findBy(MailOutbox, { jobId, kind: 'hold_reminder' });
    expect(rows).toHaveLength(queued);
    expect(rows.every((r) => r.state === 'cancelled' && r.attempts === 0)).toBe(true);
    expect(server.context.mailer.fake?.messages.filter((m) => m.subject.includes(hold.title)) ?? []).toHaveLength(0);

    await server.reminders.check();
    const after = await server.context.dataSource.manager.findBy(MailOutbox, { jobId, kind: 'hold_reminder' });
    expect(after.filter((r) => r.holdWait?.holdId === hold.id)).toHaveLength(queued);
  });
});
