import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { craneUnitSchema } from '../../../shared/schemas/fleet.js';
import type { BoardState } from '../../../shared/board/types.js';
import type { JobEventDto } from '../../../shared/events/log.js';
import { jobEnvelopeSchema, jobListSchema } from '../../../shared/schemas/jobs.js';
import type { Plan } from '../../../shared/schemas/plan.js';
import { userSchema } from '../../../shared/schemas/users.js';
import { DEMO_PASSWORD } from '../../../server/demo/people.js';
import { seedDemoIfEmpty } from '../../../server/demo/seed.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { advanceUntilActive, BoardClient, boardOf, briefEveryone, calmWeather, completeSteps, httpCommand, type CommandBody, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * The job's ending (issue 16): the erection plan's last hold is the post-assembly inspection and
 * hand-over; besides its roles a crew member the admin marks as qualified to inspect acknowledges
 * it, and its release by the acting supervisor (issue 17: whoever started the job, until they hand
 * over) completes the job, closes its board and writes the crane unit's as-built configuration.
 * Everything goes through the real HTTP and socket paths.
 */
describe('the job ending with its sign-off', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  /** A rigger the admin marks as qualified to inspect. */
  let inspector: SignedInUser;
  /** A second supervisor, also marked qualified to inspect: may inspect or release (once acting), never both. */
  let supervisor2: SignedInUser;
  let unitId: string;
  let parts: Record<string, string>;
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const setCanInspect = async (who: SignedInUser, canInspect: boolean) =>
    userSchema.parse((await request(server.app).patch(`/api/users/${who.user.id}`).set(auth(admin)).send({ canInspect }).expect(200)).body.user);

  /**
   * A live job with the inspector and the second supervisor on the crew, everyone briefed. `edit`
   * changes the draft plan before it is made ready.
   */
  async function liveJob(name: string, edit: (plan: Plan) => void = () => {}): Promise<string> {
    const job = await plannedJob(server, crew, unitId, name, [{ userId: inspector.user.id, role: 'rigger' }, { userId: supervisor2.user.id, role: 'supervisor' }]);
    const plan = (await request(server.app).get(`/api/jobs/${job.id}/plan`).set(auth(crew.supervisor)).expect(200)).body.plan as Plan;
    edit(plan);
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(auth(crew.supervisor)).send({ plan }).expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    for (const who of [inspector, supervisor2]) expect((await httpCommand(server, who, job.id, { type: 'briefing.acknowledge' })).status).toBe(200);
    return job.id;
  }

  /** Works the job up to its final hold, open and waiting for acknowledgments. */
  async function atSignOff(jobId: string): Promise<{ id: string; requiredRoles: string[] }> {
    await advanceUntilActive(server, crew, jobId, 'er-handover');
    await completeSteps(server, crew, jobId, 'er-handover');
    const stage = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-handover')!;
    expect(stage.state).toBe('holding');
    expect(stage.hold).toMatchObject({ signOff: true, state: 'open', title: 'Post-assembly inspection and hand-over' });
    return stage.hold!;
  }

  const send = (who: SignedInUser, jobId: string, command: CommandBody) => httpCommand(server, who, jobId, command);

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = await signedInCrew(server);
    inspector = await signedInUser(server, { qualifications: ['rigger'] });
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    parts = await addParts18m(server, admin.token, model.id, unit.id, 'E');
    // The admin's mark, through the people route: the flag is off until set.
    expect(userSchema.parse((await request(server.app).get(`/api/users/${inspector.user.id}`).set(auth(admin)).expect(200)).body.user).canInspect).toBe(false);
    expect((await setCanInspect(inspector, true)).canInspect).toBe(true);
    expect((await setCanInspect(supervisor2, true)).canInspect).toBe(true);
  }, 60_000);
  afterAll(() => server.stop());

  it('only the admin marks a person qualified to inspect', async () => {
    const res = await request(server.app).patch(`/api/users/${crew.rigger.user.id}`).set(auth(crew.supervisor)).send({ canInspect: true });
    expect(res.status).toBe(403);
    const rigger = userSchema.parse((await request(server.app).get(`/api/users/${crew.rigger.user.id}`).set(auth(admin)).expect(200)).body.user);
    expect(rigger.canInspect).toBe(false);
  });

  describe('a job driven through every stage to the sign-off', () => {
    let jobId: string;
    let holdId: string;

    beforeAll(async () => {
      jobId = await liveJob('Ending job');
      holdId = (await atSignOff(jobId)).id;
    }, 180_000);

    it('is not completed by job.complete: the plan ends with its sign-off', async () => {
      const answer = await send(crew.supervisor, jobId, { type: 'job.complete' });
      expect(answer.status).toBe(409);
      expect(answer.body.error).toMatchObject({ code: 'invalid_state' });
      expect(answer.body.error!.message).toContain('Post-assembly inspection and hand-over');
    });

    it('refuses a crew member without the qualification as the inspector', async () => {
      const answer = await send(crew.rigger, jobId, { type: 'hold.acknowledge', holdId, role: 'rigger', asInspector: true });
      expect(answer.status).toBe(403);
      expect(answer.body.error?.code).toBe('not_inspector');
      // Nor may the rigger slip in under the rigger role: the hold asks for supervisor and operator.
      const asRole = await send(crew.rigger, jobId, { type: 'hold.acknowledge', holdId, role: 'rigger' });
      expect(asRole.status).toBe(403);
      expect(asRole.body.error?.message).toContain('a qualified inspector');
    });

    it('is not released on the roles alone: the inspector is missing', async () => {
      expect((await send(crew.supervisor, jobId, { type: 'hold.acknowledge', holdId, role: 'supervisor' })).status).toBe(200);
      expect((await send(crew.operator, jobId, { type: 'hold.acknowledge', holdId, role: 'operator' })).status).toBe(200);
      const hold = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-handover')!.hold!;
      expect(hold.state).toBe('open');
      const answer = await send(crew.supervisor, jobId, { type: 'hold.release', holdId });
      expect(answer.status).toBe(409);
      expect(answer.body.error?.message).toContain('still needs: a qualified inspector');
    });

    it('the supervisor who acknowledges as the inspector does not release it, not even once the job is handed over to them (only the acting supervisor releases)', async () => {
      // supervisor2 is qualified: acknowledges as the inspector in their crew role (supervisor)...
      const ack = await send(supervisor2, jobId, { type: 'hold.acknowledge', holdId, role: 'supervisor', asInspector: true });
      expect(ack.status, JSON.stringify(ack.body)).toBe(200);
      let hold = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-handover')!.hold!;
      expect(hold.state).toBe('acknowledged');
      expect(hold.acknowledgments.find((a) => a.userId === supervisor2.user.id)).toMatchObject({ role: 'supervisor', inspector: true });
      // ...is not the acting supervisor, so may not release at all (issue 17)...
      const notActing = await send(supervisor2, jobId, { type: 'hold.release', holdId });
      expect(notActing.status).toBe(403);
      expect(notActing.body.error?.code).toBe('not_acting_supervisor');
      // ...and once the job is handed over to them, still may not release what they inspected.
      expect((await send(crew.supervisor, jobId, { type: 'handover.write', hazards: 'None beyond the plan', note: 'Sign-off under way.', toUserId: supervisor2.user.id })).status).toBe(200);
      expect((await send(supervisor2, jobId, { type: 'handover.acknowledge' })).status).toBe(200);
      const release = await send(supervisor2, jobId, { type: 'hold.release', holdId });
      expect(release.status).toBe(409);
      expect(release.body.error?.code).toBe('one_person_two_roles');
      expect(release.body.error?.message).toContain('as the inspector');
      // Handed back, so the next test's release is by the supervisor who acknowledged as supervisor.
      expect((await send(supervisor2, jobId, { type: 'handover.write', hazards: 'None beyond the plan', note: 'Back to you for the sign-off.', toUserId: crew.supervisor.user.id })).status).toBe(200);
      expect((await send(crew.supervisor, jobId, { type: 'handover.acknowledge' })).status).toBe(200);
      expect((await boardOf(server, crew.supervisor, jobId)).actingSupervisor?.userId).toBe(crew.supervisor.user.id);
      // A second inspector is refused while the hold is fully acknowledged; the first withdraws and the rigger takes the slot.
      const second = await send(inspector, jobId, { type: 'hold.acknowledge', holdId, role: 'rigger', asInspector: true });
      expect(second.status).toBe(409);
      expect(second.body.error?.message).toContain('is already acknowledged');
      expect((await send(supervisor2, jobId, { type: 'hold.withdraw', holdId, role: 'supervisor' })).status).toBe(200);
      hold = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-handover')!.hold!;
      expect(hold.state).toBe('open');
      expect(hold.acknowledgments.some((a) => a.inspector)).toBe(false);
    });

    it('released by the acting supervisor after the qualified inspector, it completes the job', async () => {
      const ack = await send(inspector, jobId, { type: 'hold.acknowledge', holdId, role: 'rigger', asInspector: true });
      expect(ack.status, JSON.stringify(ack.body)).toBe(200);
      const release = await send(crew.supervisor, jobId, { type: 'hold.release', holdId });
      expect(release.status, JSON.stringify(release.body)).toBe(200);
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.job.state).toBe('complete');
      const hold = board.stages.find((s) => s.id === 'er-handover')!.hold!;
      expect(hold.state).toBe('released');
      expect(hold.releasedBy?.userId).toBe(crew.supervisor.user.id);
      expect(hold.acknowledgments.find((a) => a.inspector)?.userId).toBe(inspector.user.id);
      expect(board.stages.every((s) => s.state === 'done' || s.state === 'skipped')).toBe(true);
      const job = jobEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}`).set(auth(crew.supervisor)).expect(200)).body).job;
      expect(job.state).toBe('complete');
    });

    it('the crane unit shows the as-built configuration', async () => {
      const unit = craneUnitSchema.parse((await request(server.app).get(`/api/crane-units/${unitId}`).set(auth(crew.supervisor)).expect(200)).body.unit);
      expect(unit.asBuilt).toMatchObject({ jobId, jobName: 'Ending job', kind: 'erection', boomLengthM: 18, hookBlockId: 'HB120', parts: 6 });
      // The values the crew typed at the blind configuration check (tests/helpers/board.ts controllerValues18m).
      expect(unit.asBuilt!.controllerValues).toEqual({ boomLengthM: '18', hookBlockId: 'HB120', parts: '6', counterweightT: '65', operatingMode: 'lifting' });
      // The serials recorded at the positions are the unit's registered parts, nothing invented.
      const serials = unit.asBuilt!.serials.map((s) => s.serial);
      expect(serials.length).toBeGreaterThan(0);
      for (const serial of serials) expect(Object.keys(parts)).toContain(serial);
      expect(serials).toEqual(expect.arrayContaining(['E-B1', 'E-T1']));
      for (const s of unit.asBuilt!.serials) expect(s.position.length).toBeGreaterThan(0);
    });

    it('refuses every later command over HTTP with job_closed', async () => {
      const commands: [SignedInUser, CommandBody][] = [
        [crew.rigger, calmWeather],
        // A stop too: the board no longer records one (the crane is stopped by radio and signal).
        [crew.supervisor, { type: 'job.stop', pressedAt: new Date().toISOString() }],
        [crew.supervisor, { type: 'hold.withdraw', holdId, role: 'supervisor' }],
        [crew.signaller, { type: 'briefing.acknowledge' }],
      ];
      for (const [who, command] of commands) {
        const answer = await send(who, jobId, command);
        expect(answer.status, JSON.stringify(answer.body)).toBe(409);
        expect(answer.body.error?.code).toBe('job_closed');
        expect(answer.body.error?.message).toContain('The job is complete: its board is read-only');
      }
    });

    it('refuses every later command over the socket with the same message', async () => {
      const client = new BoardClient(server.url, crew.rigger.token);
      try {
        const joined = await client.join(jobId);
        expect(joined.ok).toBe(true);
        const answer = await client.command(jobId, calmWeather);
        expect(answer.ok).toBe(false);
        if (answer.ok) return;
        expect(answer.error.code).toBe('job_closed');
        expect(answer.error.message).toContain('The job is complete: its board is read-only');
      } finally {
        client.close();
      }
    });
  });

  it('the sign-off is not released while another stage is still open', async () => {
    // A stage the crew added that the hand-over does not wait for: still open when the sign-off is reached.
    const jobId = await liveJob('Ending job with an open stage', (plan) => {
      plan.stages.push({
        id: 'er-extra-tidy',
        title: 'Tidy the laydown area',
        summary: 'Added by the crew.',
        dependsOn: ['er-ground'],
        cautions: [],
        involvesCraneMovement: false,
        steps: [{ id: 'er-extra-tidy.sweep', text: 'Sweep the laydown area.', allowedRoles: ['rigger'], requiresPhoto: false, records: null, caution: null }],
        hold: null,
      });
    });
    const hold = await atSignOff(jobId);
    for (const [who, role, asInspector] of [
      [crew.supervisor, 'supervisor', false],
      [crew.operator, 'operator', false],
      [inspector, 'rigger', true],
    ] as const) {
      const answer = await send(who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role, ...(asInspector ? { asInspector } : {}) });
      expect(answer.status, JSON.stringify(answer.body)).toBe(200);
    }
    const refused = await send(crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
    expect(refused.status).toBe(409);
    expect(refused.body.error?.message).toContain('“Tidy the laydown area”');
    expect((await boardOf(server, crew.supervisor, jobId)).job.state).toBe('live');
    // Once the added stage is done, the same release completes the job.
    expect((await send(crew.rigger, jobId, { type: 'step.complete', stepId: 'er-extra-tidy.sweep' })).status).toBe(200);
    const released = await send(crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
    expect(released.status, JSON.stringify(released.body)).toBe(200);
    expect((await boardOf(server, crew.supervisor, jobId)).job.state).toBe('complete');
  }, 180_000);
});

describe('the board helper works a job to its end', () => {
  let server: TestServer;
  afterAll(() => server.stop());

  it('advanceUntilActive completes a job when given the qualified inspector, and stops at the sign-off without one', async () => {
    server = await startTestServer();
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const crew: CrewByRole = await signedInCrew(server);
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'H');
    await request(server.app).patch(`/api/users/${crew.rigger.user.id}`).set({ Authorization: `Bearer ${admin.token}` }).send({ canInspect: true }).expect(200);
    const job = await plannedJob(server, crew, unit.id, 'Helper job');
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set({ Authorization: `Bearer ${crew.supervisor.token}` }).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    await expect(advanceUntilActive(server, crew, job.id)).rejects.toThrow('pass a qualified inspector');
    // The rigger holds no role the sign-off asks for, so the rigger is free to be its inspector.
    await advanceUntilActive(server, crew, job.id, undefined, { who: crew.rigger, role: 'rigger' });
    expect((await boardOf(server, crew.supervisor, job.id)).job.state).toBe('complete');
  }, 180_000);
});

describe('the demo on first start', () => {
  let server: TestServer;
  beforeAll(async () => {
    server = await startTestServer();
    await seedDemoIfEmpty(server.context);
  }, 120_000);
  afterAll(() => server.stop());

  it('seeds the trial erection complete through its sign-off, and its crane unit as built', async () => {
    const login = await request(server.app).post('/api/auth/login').send({ email: 'supervisor@holdline.test', password: DEMO_PASSWORD }).expect(200);
    const headers = { Authorization: `Bearer ${login.body.token as string}` };
    const jobs = jobListSchema.parse((await request(server.app).get('/api/jobs').set(headers).expect(200)).body).items;
    const trial = jobs.find((j) => j.state === 'complete');
    expect(trial?.name).toBe('Depot trial erection, 21 m');
    const board = (await request(server.app).get(`/api/jobs/${trial!.id}/board`).set(headers).expect(200)).body as BoardState;
    const signOff = board.stages.find((s) => s.hold?.signOff)!;
    expect(signOff.hold!.state).toBe('released');
    expect(signOff.hold!.acknowledgments.find((a) => a.inspector)?.name).toBe('Priya Raman');
    const unit = craneUnitSchema.parse((await request(server.app).get(`/api/crane-units/${trial!.craneUnitId}`).set(headers).expect(200)).body.unit);
    expect(unit.fleetNumber).toBe('FL-12');
    expect(unit.asBuilt).toMatchObject({ jobId: trial!.id, kind: 'erection', boomLengthM: 21 });
    expect(unit.asBuilt!.serials.length).toBeGreaterThan(0);
    expect(Object.keys(unit.asBuilt!.controllerValues).length).toBeGreaterThan(0);
  });

  it('seeds a job over two shifts: made safe yesterday, handed over to Marta Lindqvist, live in shift 2', async () => {
    const login = await request(server.app).post('/api/auth/login').send({ email: 'supervisor2@holdline.test', password: DEMO_PASSWORD }).expect(200);
    const headers = { Authorization: `Bearer ${login.body.token as string}` };
    const jobs = jobListSchema.parse((await request(server.app).get('/api/jobs').set(headers).expect(200)).body).items;
    const job = jobs.find((j) => j.name === 'Pump house roof lift: boom erection')!;
    expect(job).toMatchObject({ state: 'live', timeZone: 'Europe/London' });
    const board = (await request(server.app).get(`/api/jobs/${job.id}/board`).set(headers).expect(200)).body as BoardState;
    expect(board.shift).toMatchObject({ number: 2, phase: 'working' });
    expect(board.actingSupervisor?.name).toBe('Marta Lindqvist');
    expect(board.handovers).toHaveLength(1);
    expect(board.handovers![0]).toMatchObject({ shift: 1, from: { name: 'Rhys Calloway' }, to: { name: 'Marta Lindqvist' }, acknowledgedBy: { name: 'Marta Lindqvist' } });
    expect(board.handovers![0].done.length).toBeGreaterThan(0);
    // Some work in shift 2, so the board is live rather than just restarted.
    expect(board.stages.find((s) => s.id === 'er-joints')!.steps.some((s) => s.state === 'done')).toBe(true);

    // The log tells the two shifts in order, every time in the past and none going back.
    const events: JobEventDto[] = [];
    for (let after = 0; ; ) {
      const page = (await request(server.app).get(`/api/jobs/${job.id}/events?after=${after}`).set(headers).expect(200)).body as { items: JobEventDto[]; lastSeq: number };
      events.push(...page.items);
      if (!page.items.length || page.items.at(-1)!.seq >= page.lastSeq) break;
      after = page.items.at(-1)!.seq;
    }
    const times = events.map((e) => Date.parse(e.at));
    expect(times.every((t, i) => i === 0 || t >= times[i - 1])).toBe(true);
    expect(times.at(-1)!).toBeLessThanOrEqual(Date.now());
    const first = (type: JobEventDto['type']) => events.find((e) => e.type === type)!;
    const ending = first('shift.ending');
    if (ending.type !== 'shift.ending') throw new Error('no shift.ending');
    const ticked = events.filter((e) => e.type === 'shift.item.done');
    // Every item of the checklist ticked once, by someone holding one of the item's roles.
    expect(ticked.map((e) => (e.type === 'shift.item.done' ? e.data.itemId : '')).sort()).toEqual(ending.data.items.map((i) => i.id).sort());
    for (const e of ticked) if (e.type === 'shift.item.done') expect(ending.data.items.find((i) => i.id === e.data.itemId)!.roles).toContain(e.by.role);
    expect(ticked.at(-1)!.type === 'shift.item.done' && ticked.at(-1)!.data.madeSafe).toBe(true);
    expect(first('shift.inspected').by.name).toBe('Priya Raman');
    expect(first('shift.started').by.name).toBe('Marta Lindqvist');
    // Made safe in the evening and started again the next morning: a night in between.
    expect(Date.parse(first('shift.started').at) - Date.parse(ticked.at(-1)!.at)).toBeGreaterThan(8 * 3_600_000);
    // On the site's clock (read with Intl, in the job's zone): each shift begins at 7 in the morning, on consecutive days;
    // the first shift ends in the afternoon.
    const siteHour = (iso: string) => Number(new Intl.DateTimeFormat('en-GB', { timeZone: 'Europe/London', hour: '2-digit', hourCycle: 'h23' }).format(new Date(iso)));
    const siteDay = (iso: string) => new Intl.DateTimeFormat('en-CA', { timeZone: 'Europe/London', year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(iso));
    const started = first('job.started');
    const acknowledged = first('handover.acknowledged');
    expect([siteHour(started.at), siteHour(acknowledged.at)]).toEqual([7, 7]);
    expect(Date.parse(`${siteDay(acknowledged.at)}T00:00Z`) - Date.parse(`${siteDay(started.at)}T00:00Z`)).toBe(86_400_000);
    expect(siteHour(ending.at)).toBe(16);
    expect(events.map((e) => e.type).indexOf('shift.started')).toBeGreaterThan(events.map((e) => e.type).indexOf('handover.acknowledged'));
    const verify = (await request(server.app).get(`/api/jobs/${job.id}/record/verify`).set(headers).expect(200)).body as { valid: boolean };
    expect(verify.valid).toBe(true);
  });
});
