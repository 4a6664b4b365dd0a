import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { JobEventOf } from '../../../shared/events/log.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import { jobEnvelopeSchema } from '../../../shared/schemas/jobs.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { BoardClient, boardOf, briefEveryone, completeSteps, httpCommand, weatherIfNeeded, type CrewByRole } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * POST /api/jobs/:id/acting-supervisor (issue 17, handover): when the outgoing supervisor cannot be
 * reached, an administrator makes another supervisor of the crew the acting supervisor, with a
 * reason. Admin only; the person must be an active supervisor in the crew and not already acting;
 * the job must have a board and not be closed. The event is in the chain and on every socket, and
 * only the new acting supervisor releases holds from then on.
 */
describe('the administrator’s transfer of the acting supervisor', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  let supervisor2: SignedInUser;
  /** A supervisor who is not in the crew of the jobs here. */
  let outsider: SignedInUser;
  let unitId: string;
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const reason = 'The day supervisor went home ill and does not answer the phone.';
  const transfer = (jobId: string, body: Record<string, unknown>, as: SignedInUser | null = admin) => {
    const req = request(server.app).post(`/api/jobs/${jobId}/acting-supervisor`);
    return (as ? req.set(auth(as)) : req).send(body);
  };

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = {
      supervisor: await signedInUser(server, { qualifications: ['supervisor'] }),
      operator: await signedInUser(server, { qualifications: ['operator'] }),
      signaller: await signedInUser(server, { qualifications: ['signaller'] }),
      rigger: await signedInUser(server, { qualifications: ['rigger', 'supervisor'] }),
    };
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    outsider = await signedInUser(server, { qualifications: ['supervisor'] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'C');
    unitId = unit.id;
  });
  afterAll(() => server.stop());

  /** A job with supervisor2 in its crew as a second supervisor; started (live, everyone briefed) unless `start` is false. */
  async function job(name: string, start = true): Promise<string> {
    const planned = await plannedJob(server, crew, unitId, name);
    const members = [
      ...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })),
      { userId: supervisor2.user.id, role: 'supervisor' },
    ];
    await request(server.app).put(`/api/jobs/${planned.id}/crew`).set(auth(crew.supervisor)).send({ members }).expect(200);
    if (!start) return planned.id;
    await request(server.app).post(`/api/jobs/${planned.id}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await httpCommand(server, crew.supervisor, planned.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, planned.id);
    expect((await httpCommand(server, supervisor2, planned.id, { type: 'briefing.acknowledge' })).status).toBe(200);
    return planned.id;
  }

  it('is for administrators only: 401 without sign-in, 403 for the job’s own supervisors and crew', async () => {
    const jobId = await job('Policy transfer job');
    expect((await transfer(jobId, { userId: supervisor2.user.id, reason }, null)).status).toBe(401);
    for (const who of [crew.supervisor, supervisor2, crew.operator]) {
      const refused = await transfer(jobId, { userId: supervisor2.user.id, reason }, who);
      expect(refused.status).toBe(403);
      expect(refused.body.error.code).toBe('forbidden');
      expect(refused.body.error.message).toContain('Only an administrator');
    }
    expect((await boardOf(server, crew.supervisor, jobId)).actingSupervisor?.userId).toBe(crew.supervisor.user.id);
  }, 60_000);

  it('refuses a person who is not an active supervisor in the crew, the one already acting, and a missing reason', async () => {
    const jobId = await job('Refusals transfer job');
    const seq = (await boardOf(server, crew.supervisor, jobId)).seq;
    const notInCrew = await transfer(jobId, { userId: outsider.user.id, reason });
    expect(notInCrew.status).toBe(400);
    expect(notInCrew.body.error.fields).toEqual([expect.objectContaining({ path: 'userId' })]);
    // In the crew, qualified as supervisor, but on this job a rigger.
    const notSupervisorHere = await transfer(jobId, { userId: crew.rigger.user.id, reason });
    expect(notSupervisorHere.status).toBe(400);
    expect(notSupervisorHere.body.error.fields[0].path).toBe('userId');
    const already = await transfer(jobId, { userId: crew.supervisor.user.id, reason });
    expect(already.status).toBe(409);
    expect(already.body.error.code).toBe('already_acting');
    const noReason = await transfer(jobId, { userId: supervisor2.user.id, reason: ' ' });
    expect(noReason.status).toBe(400);
    expect(noReason.body.error.fields[0].path).toBe('reason');
    // Nothing was written.
    expect((await boardOf(server, crew.supervisor, jobId)).seq).toBe(seq);
  }, 60_000);

  it('refuses a deactivated supervisor, a job still being planned and a closed job', async () => {
    const planning = await job('Planning transfer job', false);
    const inPlanning = await transfer(planning, { userId: supervisor2.user.id, reason });
    expect(inPlanning.status).toBe(409);
    expect(inPlanning.body.error.code).toBe('invalid_state');

    const cancelled = await job('Cancelled transfer job');
    expect((await httpCommand(server, crew.supervisor, cancelled, { type: 'job.cancel', reason: 'The client postponed the lift.' })).status).toBe(200);
    const closed = await transfer(cancelled, { userId: supervisor2.user.id, reason });
    expect(closed.status).toBe(409);
    expect(closed.body.error.code).toBe('job_closed');

    const live = await job('Deactivated transfer job');
    const gone = await signedInUser(server, { qualifications: ['supervisor'] });
    const members = [...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })), { userId: gone.user.id, role: 'supervisor' }];
    await request(server.app).put(`/api/jobs/${live}/crew`).set(auth(crew.supervisor)).send({ members }).expect(200);
    await request(server.app).patch(`/api/users/${gone.user.id}`).set(auth(admin)).send({ active: false }).expect(200);
    const inactive = await transfer(live, { userId: gone.user.id, reason });
    expect(inactive.status).toBe(400);
    expect(inactive.body.error.fields[0]).toEqual({ path: 'userId', message: `${gone.user.displayName} is deactivated` });
  }, 60_000);

  it('makes the named supervisor the acting one: the event in the log and on every socket, and only they release holds', async () => {
    const jobId = await job('Transfer job');
    // Work to the first hold and have it fully acknowledged, ready for the acting supervisor's release.
    let board = await boardOf(server, crew.supervisor, jobId);
    for (let guard = 0; guard < 10 && !board.stages.some((s) => s.state === 'holding'); guard++) {
      const active = board.stages.find((s) => s.state === 'active')!;
      await completeSteps(server, crew, jobId, active.id);
      board = await boardOf(server, crew.supervisor, jobId);
    }
    const stage = board.stages.find((s) => s.state === 'holding')!;
    const hold = stage.hold!;
    for (const role of hold.requiredRoles) {
      const who = role === 'supervisor' ? supervisor2 : crew[role as keyof CrewByRole];
      const ack = await httpCommand(server, who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role });
      expect(ack.status, JSON.stringify(ack.body)).toBe(200);
    }
    await weatherIfNeeded(server, crew, jobId, stage.id, true);

    const watchers = [new BoardClient(server.url, crew.supervisor.token), new BoardClient(server.url, crew.operator.token)];
    try {
      for (const w of watchers) expect((await w.join(jobId)).ok).toBe(true);
      const done = await transfer(jobId, { userId: supervisor2.user.id, reason });
      expect(done.status, JSON.stringify(done.body)).toBe(200);
      expect(jobEnvelopeSchema.parse(done.body).job.id).toBe(jobId);
      const seq = done.body.seq as number;

      const events = jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events`).set(auth(admin)).expect(200)).body).items;
      const event = events.find((e) => e.seq === seq) as JobEventOf<'acting.transferred'>;
      expect(event.type).toBe('acting.transferred');
      expect(event.by).toMatchObject({ userId: admin.user.id, role: 'admin' });
      expect(event.data).toEqual({
        from: { userId: crew.supervisor.user.id, name: crew.supervisor.user.displayName },
        to: { userId: supervisor2.user.id, name: supervisor2.user.displayName },
        reason,
      });
      for (const w of watchers) {
        await w.waitForSeq(seq);
        expect(w.events.find((e) => e.seq === seq)?.type).toBe('acting.transferred');
      }
      expect((await boardOf(server, crew.supervisor, jobId)).actingSupervisor).toMatchObject({ userId: supervisor2.user.id, name: supervisor2.user.displayName });

      // The supervisor who was acting no longer releases; the new acting supervisor does.
      const old = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
      expect(old.status).toBe(403);
      expect(old.body.error?.code).toBe('not_acting_supervisor');
      const released = await httpCommand(server, supervisor2, jobId, { type: 'hold.release', holdId: hold.id });
      expect(released.status, JSON.stringify(released.body)).toBe(200);
    } finally {
      for (const w of watchers) w.close();
    }
  }, 120_000);
});
