import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { replay } from '../../../shared/board/apply.js';
import type { BoardState } from '../../../shared/board/types.js';
import { isEventOf, jobEventListSchema, type JobEventDto } from '../../../shared/events/log.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';
import { JobOverride } from '../../../server/entities/JobOverride.js';
import { freshToken, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, advanceUntilActive, BoardClient, boardOf, briefEveryone, calmWeather, completeSteps, httpCommand, inStepOrder, readingWithinLimit, uploadPhoto, type CommandBody, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Shifts on the engine (issue 17), over the real HTTP and socket paths: ending a shift (refused
 * mid-hold, mid-movement and from a supervisor who is not acting), the make-safe checklist drawn
 * for the kind of job and the phase of the work and ticked by its roles, no work while making safe
 * or made safe, the handover note and the acting supervisor it passes, the start-of-shift hold
 * (inspection by a competent person, the operator's and the acting supervisor's acknowledgments,
 * a fresh weather reading, everyone briefed for the new shift), fresh readings before a stage that
 * moves the crane and before a resume, exactly-once commands and the log replaying to the board.
 * The checklist items expected here are copied by hand from shared/plan/templates/shift.ts (common
 * practice, no source: the checks a crew makes before leaving a boom). The test configuration asks
 * for readings no older than 15 minutes (tests/helpers/jobs.ts); the clock is moved 31 minutes,
 * past the longest setting a job may have (30).
 */
describe('shifts', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  /** The supervisor who takes over. */
  let supervisor2: SignedInUser;
  /** A rigger the admin marks as qualified to inspect: the competent person of the shift inspection. */
  let inspector: SignedInUser;
  /** On every crew: a viewer watches and cannot acknowledge a briefing, so the start of a shift never waits for them. */
  let viewer: SignedInUser;
  let unitId: string;
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const everyone = () => [...Object.values(crew), supervisor2, inspector];
  /** New access tokens after a test moves the server's clock past their 15 minutes. */
  const resign = () => {
    for (const who of [...everyone(), viewer, admin]) who.token = freshToken(server, who);
  };
  const OLD = 31 * 60 * 1000;
  const send = (who: SignedInUser, jobId: string, command: CommandBody, commandId?: ReturnType<typeof randomUUID>) => httpCommand(server, who, jobId, command, commandId);
  const events = async (jobId: string): Promise<JobEventDto[]> =>
    jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set(auth(crew.supervisor)).expect(200)).body).items;
  const brief = async (jobId: string, people: SignedInUser[]) => {
    for (const who of people) {
      const answer = await send(who, jobId, { type: 'briefing.acknowledge' });
      expect(answer.status, JSON.stringify(answer.body)).toBe(200);
    }
  };

  /** A live job with the second supervisor and the inspector on the crew, everyone briefed for shift 1. */
  async function liveJob(name: string, kind: 'erection' | 'dismantling' = 'erection'): Promise<string> {
    const job = await plannedJob(server, crew, unitId, name, [{ userId: supervisor2.user.id, role: 'supervisor' }, { userId: inspector.user.id, role: 'rigger' }, { userId: viewer.user.id, role: 'viewer' }]);
    if (kind === 'dismantling') {
      await request(server.app).patch(`/api/jobs/${job.id}`).set(auth(crew.supervisor)).send({ kind }).expect(200);
      await request(server.app).post(`/api/jobs/${job.id}/plan/generate`).set(auth(crew.supervisor)).expect(201);
    }
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await send(crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await brief(job.id, everyone());
    return job.id;
  }

  /** Someone of the crew in one of these roles (the first the test crew has). */
  const personFor = (roles: readonly CrewRole[]): SignedInUser => crew[roles.find((r) => r !== 'viewer') as keyof CrewByRole];

  /** Ticks every item still open, each by someone of its roles, with a note where asked. */
  async function tickAll(jobId: string): Promise<void> {
    const items = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items.filter((i) => !i.doneBy);
    for (const item of items) {
      const answer = await send(personFor(item.roles), jobId, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: `Noted for ${item.id}` } : {}) });
      expect(answer.status, JSON.stringify(answer.body)).toBe(200);
    }
  }

  /**
   * From made safe to the next shift: handover to `to`, the inspection, both acknowledgments, a
   * fresh reading, everyone briefed, and the start by the new acting supervisor.
   */
  async function nextShift(jobId: string, from: SignedInUser, to: SignedInUser): Promise<void> {
    expect((await send(from, jobId, { type: 'handover.write', hazards: 'None beyond the plan.', note: 'As the board shows.', toUserId: to.user.id })).status).toBe(200);
    expect((await send(to, jobId, { type: 'handover.acknowledge' })).status).toBe(200);
    await brief(jobId, everyone());
    expect((await send(inspector, jobId, { type: 'shift.inspect', note: 'Boom, pins, ropes and blocking looked at: as left.' })).status).toBe(200);
    expect((await send(crew.operator, jobId, { type: 'shift.acknowledge', role: 'operator' })).status).toBe(200);
    expect((await send(to, jobId, { type: 'shift.acknowledge', role: 'supervisor' })).status).toBe(200);
    expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
    const started = await send(to, jobId, { type: 'shift.start' });
    expect(started.status, JSON.stringify(started.body)).toBe(200);
  }

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = await signedInCrew(server);
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    inspector = await signedInUser(server, { qualifications: ['rigger'] });
    viewer = await signedInUser(server, { qualifications: ['viewer'] });
    await request(server.app).patch(`/api/users/${inspector.user.id}`).set(auth(admin)).send({ canInspect: true }).expect(200);
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'S');
  }, 60_000);
  afterEach(() => resign());
  afterAll(() => server.stop());

  describe('ending a shift', () => {
    it('is refused while a hold is partly acknowledged, and from a supervisor who is not acting; once the hold is withdrawn it ends', async () => {
      const jobId = await liveJob('Shift end mid-hold');
      await completeSteps(server, crew, jobId, 'er-ground');
      const hold = (await boardOf(server, crew.supervisor, jobId)).stages[0].hold!;
      expect((await send(crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator' })).status).toBe(200);

      const notActing = await send(supervisor2, jobId, { type: 'shift.end' });
      expect(notActing.status).toBe(403);
      expect(notActing.body.error?.code).toBe('not_acting_supervisor');
      expect(notActing.body.error?.message).toContain(`Only the acting supervisor, ${crew.supervisor.user.displayName},`);
      // A rigger is not a supervisor at all: the policy refuses before the rule.
      expect((await send(crew.rigger, jobId, { type: 'shift.end' })).body.error?.code).toBe('role_not_allowed');

      const busy = await send(crew.supervisor, jobId, { type: 'shift.end' });
      expect(busy.status).toBe(409);
      expect(busy.body.error?.code).toBe('shift_busy');
      expect(busy.body.error?.message).toContain(`“${hold.title}” is partly acknowledged (${crew.operator.user.displayName})`);
      expect((await boardOf(server, crew.supervisor, jobId)).shift).toMatchObject({ number: 1, phase: 'working', makeSafe: null });

      expect((await send(crew.operator, jobId, { type: 'hold.withdraw', holdId: hold.id, role: 'operator' })).status).toBe(200);
      expect((await send(crew.supervisor, jobId, { type: 'shift.end' })).status).toBe(200);
      expect((await boardOf(server, crew.supervisor, jobId)).shift).toMatchObject({ number: 1, phase: 'making_safe' });
    });

    it('is refused while a stage that moves the crane is part-way done', async () => {
      const jobId = await liveJob('Shift end mid-movement');
      await advanceUntilActive(server, crew, jobId, 'er-upper');
      const upper = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!;
      expect(upper.involvesCraneMovement).toBe(true);
      // Nothing of it done yet: the shift could end here. One step done: the crane is part-way through a movement.
      const first = inStepOrder(upper.steps)[0];
      const who = personFor(first.allowedRoles);
      const photoId = first.requiresPhoto ? await uploadPhoto(server, who) : undefined;
      expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
      const done = await send(who, jobId, { type: 'step.complete', stepId: first.id, ...(first.records ? { value: readingWithinLimit(first) } : {}), ...(photoId ? { photoId } : {}) });
      expect(done.status, JSON.stringify(done.body)).toBe(200);
      const busy = await send(crew.supervisor, jobId, { type: 'shift.end' });
      expect(busy.status).toBe(409);
      expect(busy.body.error).toMatchObject({ code: 'shift_busy' });
      expect(busy.body.error?.message).toContain(`“${upper.title}” moves the crane and is part-way done`);
      // Finished, the movement no longer stands in the way.
      // Finished (at its hold, which nobody has acknowledged yet), the shift may end.
      await completeSteps(server, crew, jobId, 'er-upper');
      expect(['holding', 'done']).toContain((await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!.state);
      expect((await send(crew.supervisor, jobId, { type: 'shift.end' })).status).toBe(200);
    });
  });

  describe('an erection over two shifts, followed on a socket', () => {
    let jobId: string;
    let follower: BoardClient;
    let upperTitle: string;
    const madeSafeCommandId = randomUUID();

    beforeAll(async () => {
      jobId = await liveJob('Shift erection');
      follower = new BoardClient(server.url, crew.signaller.token);
      expect((await follower.join(jobId)).ok).toBe(true);
      await advanceUntilActive(server, crew, jobId, 'er-upper');
      upperTitle = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!.title;
      // A defect on the ground stage and an approved override (and one not approved) for the handover to list.
      const ground = (await boardOf(server, crew.supervisor, jobId)).stages[0];
      const photoId = await uploadPhoto(server, crew.rigger);
      expect((await send(crew.rigger, jobId, { type: 'defect.report', stepId: ground.steps[0].id, description: 'Timber mat split at the north-east corner', photoId })).status).toBe(200);
      await server.context.queue.transaction(async (manager) => {
        const base = { jobId, figureValue: '78 %', requestedBy: crew.supervisor.user.id, requestedAt: new Date().toISOString() };
        await manager.save(JobOverride, { ...base, id: randomUUID(), figureKey: 'chart.lift', figureLabel: 'Lift against the chart', reason: 'Lift made slowly with the area cleared', approvedBy: supervisor2.user.id, approvedAt: new Date().toISOString() });
        await manager.save(JobOverride, { ...base, id: randomUUID(), figureKey: 'chart.raise', figureLabel: 'Raise against the tip limit', reason: 'Still waiting for approval', approvedBy: null, approvedAt: null });
      });
    }, 120_000);
    afterAll(() => follower.close());

    it('ends the shift with the checklist for a boom being assembled on the ground', async () => {
      const ended = await send(crew.supervisor, jobId, { type: 'shift.end' });
      expect(ended.status, JSON.stringify(ended.body)).toBe(200);
      expect(ended.body).toMatchObject({ event: { type: 'shift.ending', data: { shift: 1, workPhase: 'boom-on-ground' } } });
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.job.state).toBe('live');
      expect(board.shift).toMatchObject({ number: 1, phase: 'making_safe', makeSafe: { begunBy: { userId: crew.supervisor.user.id }, workPhase: 'boom-on-ground', madeSafe: null } });
      // On the ground: blocking and half-pinned joints; nothing about a raised boom left unattended.
      expect(board.shift!.makeSafe!.items.map((i) => i.id)).toEqual(['blocking', 'noHangingSection', 'hookBlocks', 'counterweight', 'guyLines', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
      expect(board.shift!.makeSafe!.items.find((i) => i.id === 'keyHeld')).toMatchObject({ roles: ['supervisor'], asksNote: true, doneBy: null });
      expect(board.shift!.makeSafe!.items.find((i) => i.id === 'noHangingSection')).toMatchObject({ roles: ['rigger'], asksNote: false });
    });

    it('refuses work while making safe, but not a weather reading or a stop', async () => {
      const upper = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!;
      const first = inStepOrder(upper.steps)[0];
      const refused = await send(personFor(first.allowedRoles), jobId, { type: 'step.complete', stepId: first.id, value: '1' });
      expect(refused.status).toBe(409);
      expect(refused.body.error?.code).toBe('making_safe');
      expect(refused.body.error?.message).toContain('finish the make-safe checklist');
      // The same refusal on the socket.
      const onSocket = await follower.command(jobId, { type: 'step.complete', stepId: first.id, value: '1' });
      expect(onSocket).toMatchObject({ ok: false, error: { code: 'making_safe' } });
      expect((await send(crew.signaller, jobId, calmWeather)).status).toBe(200);
      // Anyone may still stop the job; the checklist goes on while it is stopped.
      expect((await send(crew.signaller, jobId, { type: 'job.stop', pressedAt: new Date().toISOString(), reason: 'Walker inside the barrier' })).status).toBe(200);
      expect((await boardOf(server, crew.supervisor, jobId)).job).toMatchObject({ state: 'stopped', stop: { reason: 'Walker inside the barrier' } });
    });

    it('ticks each item only by its roles, with a note where one is asked; the last item makes the job safe, once', async () => {
      const wrongRole = await send(crew.rigger, jobId, { type: 'shift.item.done', itemId: 'keyHeld', note: 'In the site office' });
      expect(wrongRole.status).toBe(403);
      expect(wrongRole.body.error).toMatchObject({ code: 'role_not_allowed', message: 'This item is for: supervisor.' });
      const noNote = await send(crew.supervisor, jobId, { type: 'shift.item.done', itemId: 'forecast' });
      expect(noNote.status).toBe(400);
      expect(noNote.body.error?.fields?.map((f) => f.path)).toEqual(['note']);
      const unknown = await send(crew.rigger, jobId, { type: 'shift.item.done', itemId: 'boomParked' });
      expect(unknown.status).toBe(400);
      expect(unknown.body.error?.fields?.map((f) => f.path)).toEqual(['itemId']);

      expect((await send(crew.supervisor, jobId, { type: 'shift.item.done', itemId: 'keyHeld', note: 'Key in the site office safe' })).status).toBe(200);
      const twice = await send(crew.supervisor, jobId, { type: 'shift.item.done', itemId: 'keyHeld', note: 'again' });
      expect(twice.body.error?.code).toBe('invalid_state');
      expect(twice.body.error?.message).toContain(`already ticked by ${crew.supervisor.user.displayName}`);

      // Every item but the forecast, then the forecast last, by the supervisor, sent twice with one id.
      const board = await boardOf(server, crew.supervisor, jobId);
      for (const item of board.shift!.makeSafe!.items.filter((i) => !i.doneBy && i.id !== 'forecast')) {
        const answer = await send(personFor(item.roles), jobId, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: 'Noted' } : {}) });
        expect(answer.status, JSON.stringify(answer.body)).toBe(200);
        expect(answer.body).toMatchObject({ event: { data: { itemId: item.id, madeSafe: false } } });
      }
      expect((await boardOf(server, crew.supervisor, jobId)).job.state).toBe('stopped');
      const last: CommandBody = { type: 'shift.item.done', itemId: 'forecast', note: 'Gusts to 14 m/s after midnight, easing by six' };
      const first = await send(crew.supervisor, jobId, last, madeSafeCommandId);
      expect(first.status).toBe(200);
      expect(first.body).toMatchObject({ event: { data: { itemId: 'forecast', madeSafe: true, note: 'Gusts to 14 m/s after midnight, easing by six' } } });
      // A retry after a lost answer gets the same answer and records nothing more.
      expect(await send(crew.supervisor, jobId, last, madeSafeCommandId)).toEqual(first);
      expect((await events(jobId)).filter((e) => isEventOf(e, 'shift.item.done') && e.data.itemId === 'forecast')).toHaveLength(1);
    });

    it('shows made safe on the board with when and by whom, to every screen', async () => {
      const board = await boardOf(server, crew.operator, jobId);
      const lastItem = (await events(jobId)).filter((e) => e.type === 'shift.item.done').at(-1)!;
      // Made safe, the stop pressed while making safe is over: the start-of-shift hold takes its place.
      expect(board.job).toMatchObject({ state: 'made_safe', stop: null });
      expect(board.shift).toMatchObject({ number: 1, phase: 'made_safe', start: { inspection: null, operator: null, supervisor: null } });
      expect(board.shift!.makeSafe!.madeSafe).toEqual({ userId: crew.supervisor.user.id, name: crew.supervisor.user.displayName, at: lastItem.at });
      expect(board.shift!.makeSafe!.items.every((i) => i.doneBy)).toBe(true);
      // The signaller's socket followed every event, in order.
      await follower.waitForSeq(lastItem.seq);
      const seqs = follower.events.map((e) => e.seq);
      expect(seqs).toEqual(Array.from({ length: seqs.length }, (_, i) => seqs[0] + i));
      expect(follower.events.at(-1)).toMatchObject({ type: 'shift.item.done', data: { madeSafe: true } });
    });

    it('refuses work and a stop while made safe, saying when and by whom it was made safe', async () => {
      const upper = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!;
      const first = inStepOrder(upper.steps)[0];
      const work = await send(personFor(first.allowedRoles), jobId, { type: 'step.complete', stepId: first.id, value: '1' });
      expect(work.status).toBe(409);
      expect(work.body.error?.code).toBe('made_safe');
      expect(work.body.error?.message).toContain(`(last item by ${crew.supervisor.user.displayName})`);
      const stop = await send(crew.rigger, jobId, { type: 'job.stop', pressedAt: new Date().toISOString(), reason: 'test' });
      expect(stop.body.error?.code).toBe('made_safe');
      expect((await send(crew.supervisor, jobId, { type: 'shift.end' })).body.error?.code).toBe('made_safe');
      expect(await follower.command(jobId, { type: 'job.stop', pressedAt: new Date().toISOString() })).toMatchObject({ ok: false, error: { code: 'made_safe' } });
    });

    it('the handover note lists the board and the job’s approved overrides; the writer cannot acknowledge it; the supervisor taking over does and becomes acting', async () => {
      expect((await send(supervisor2, jobId, { type: 'handover.write', hazards: 'none', note: 'x' })).body.error?.code).toBe('not_acting_supervisor');
      const toSelf = await send(crew.supervisor, jobId, { type: 'handover.write', hazards: 'none', note: 'x', toUserId: crew.supervisor.user.id });
      expect(toSelf.body.error?.fields?.map((f) => f.path)).toEqual(['toUserId']);
      expect((await send(supervisor2, jobId, { type: 'handover.acknowledge' })).body.error?.code).toBe('handover_missing');

      const written = await send(crew.supervisor, jobId, {
        type: 'handover.write',
        hazards: 'Split mat at the north-east corner; gusts forecast overnight.',
        note: 'Upper works ready to start; read the wind first.',
        toUserId: supervisor2.user.id,
      });
      expect(written.status, JSON.stringify(written.body)).toBe(200);
      const note = (await boardOf(server, crew.supervisor, jobId)).handovers!.at(-1)!;
      expect(note).toMatchObject({ shift: 1, from: { userId: crew.supervisor.user.id }, to: { userId: supervisor2.user.id }, acknowledgedBy: null });
      expect(note.done).toContain((await boardOf(server, crew.supervisor, jobId)).stages[0].title);
      expect(note.open.find((line) => line.startsWith(upperTitle))).toMatch(/: \d+ of \d+ steps to do$/);
      expect(note.defects).toEqual([`Timber mat split at the north-east corner (reported by ${crew.rigger.user.displayName}, blocks its stage)`]);
      expect(note.overrides).toEqual(['Lift against the chart: Lift made slowly with the area cleared']);

      const own = await send(crew.supervisor, jobId, { type: 'handover.acknowledge' });
      expect(own.status).toBe(409);
      expect(own.body.error?.code).toBe('one_person_two_roles');
      const acknowledged = await send(supervisor2, jobId, { type: 'handover.acknowledge' });
      expect(acknowledged.status, JSON.stringify(acknowledged.body)).toBe(200);
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.actingSupervisor).toMatchObject({ userId: supervisor2.user.id, name: supervisor2.user.displayName });
      expect(board.handovers!.at(-1)!.acknowledgedBy).toMatchObject({ userId: supervisor2.user.id });
      // The outgoing supervisor, briefed for the next shift, no longer runs the job.
      await brief(jobId, [crew.supervisor]);
      expect((await send(crew.supervisor, jobId, { type: 'shift.start' })).body.error?.code).toBe('not_acting_supervisor');
      expect((await send(crew.supervisor, jobId, { type: 'shift.acknowledge', role: 'supervisor' })).body.error?.code).toBe('not_acting_supervisor');
    });

    it('the start-of-shift hold asks for the shift’s briefing, a competent person’s inspection, the operator and the acting supervisor', async () => {
      // Briefed for shift 1 is not briefed for shift 2.
      const unbriefed = await send(inspector, jobId, { type: 'shift.inspect', note: 'Boom, pins and blocking as left.' });
      expect(unbriefed.status).toBe(409);
      expect(unbriefed.body.error?.code).toBe('briefing_required');
      expect(unbriefed.body.error?.message).toContain('shift 2');
      await brief(jobId, [inspector, crew.rigger, crew.operator, supervisor2]);
      expect((await boardOf(server, crew.supervisor, jobId)).briefed.find((b) => b.userId === inspector.user.id)).toMatchObject({ shift: 2 });
      const early = await send(supervisor2, jobId, { type: 'shift.start' });
      expect(early.status).toBe(409);
      expect(early.body.error?.code).toBe('shift_not_ready');
      expect(early.body.error?.message).toContain('the shift inspection by a competent person');

      // The operator's acknowledgment waits for the inspection.
      expect((await send(crew.operator, jobId, { type: 'shift.acknowledge', role: 'operator' })).body.error?.code).toBe('shift_not_ready');
      const notCompetent = await send(crew.rigger, jobId, { type: 'shift.inspect', note: 'Looked fine to me.' });
      expect(notCompetent.status).toBe(403);
      expect(notCompetent.body.error?.code).toBe('not_inspector');
      // The acting supervisor acknowledges the inspection, so even a qualified one does not make it.
      await request(server.app).patch(`/api/users/${supervisor2.user.id}`).set(auth(admin)).send({ canInspect: true }).expect(200);
      resign();
      const ownInspection = await send(supervisor2, jobId, { type: 'shift.inspect', note: 'Boom, pins and blocking as left.' });
      expect(ownInspection.status).toBe(409);
      expect(ownInspection.body.error?.code).toBe('one_person_two_roles');
      await request(server.app).patch(`/api/users/${supervisor2.user.id}`).set(auth(admin)).send({ canInspect: false }).expect(200);
      resign();
      expect((await send(inspector, jobId, { type: 'shift.inspect', note: 'Boom, pins, ropes and blocking looked at: as left.' })).status).toBe(200);
      const noAcks = await send(supervisor2, jobId, { type: 'shift.start' });
      expect(noAcks.body.error?.code).toBe('shift_not_ready');
      expect(noAcks.body.error?.message).toContain('the operator’s acknowledgment');
      expect((await send(crew.operator, jobId, { type: 'shift.acknowledge', role: 'operator' })).status).toBe(200);
      expect((await send(supervisor2, jobId, { type: 'shift.acknowledge', role: 'supervisor' })).status).toBe(200);
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.shift!.start).toMatchObject({ inspection: { userId: inspector.user.id, note: 'Boom, pins, ropes and blocking looked at: as left.' }, operator: { userId: crew.operator.user.id }, supervisor: { userId: supervisor2.user.id } });
    });

    it('refuses the start on an old reading, then without everyone’s briefing; then the new acting supervisor starts shift 2 and work goes on', async () => {
      server.advance(OLD);
      resign();
      const old = await send(supervisor2, jobId, { type: 'shift.start' });
      expect(old.status).toBe(409);
      expect(old.body.error?.code).toBe('weather_required');
      expect(old.body.error?.message).toContain('can record one on the weather panel');
      expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
      const unbriefed = await send(supervisor2, jobId, { type: 'shift.start' });
      expect(unbriefed.status).toBe(409);
      expect(unbriefed.body.error?.code).toBe('briefing_required');
      expect(unbriefed.body.error?.message).toContain(`from ${crew.signaller.user.displayName}.`);
      await brief(jobId, [crew.signaller]);

      const commandId = randomUUID();
      const started = await send(supervisor2, jobId, { type: 'shift.start' }, commandId);
      expect(started.status, JSON.stringify(started.body)).toBe(200);
      expect(await send(supervisor2, jobId, { type: 'shift.start' }, commandId)).toEqual(started);
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.job.state).toBe('live');
      const startedEvents = (await events(jobId)).filter((e) => e.type === 'shift.started');
      expect(startedEvents).toHaveLength(1);
      expect(startedEvents[0]).toMatchObject({ seq: started.body.seq, by: { userId: supervisor2.user.id }, data: { shift: 2 } });
      expect(board.shift).toMatchObject({ number: 2, phase: 'working', makeSafe: null, start: null, startedAt: startedEvents[0].at });
      // Only the acting supervisor's start; a second start is refused.
      expect((await send(supervisor2, jobId, { type: 'shift.start' })).body.error?.code).toBe('invalid_state');
    });

    it('a stage that moves the crane does not start on an old reading', async () => {
      server.advance(OLD);
      resign();
      const upper = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!;
      expect(upper.steps.every((s) => s.state === 'open')).toBe(true);
      const first = inStepOrder(upper.steps)[0];
      const who = personFor(first.allowedRoles);
      const body: CommandBody = { type: 'step.complete', stepId: first.id, ...(first.records ? { value: readingWithinLimit(first) } : {}), ...(first.requiresPhoto ? { photoId: await uploadPhoto(server, who) } : {}) };
      const stale = await send(who, jobId, body);
      expect(stale.status).toBe(409);
      expect(stale.body.error?.code).toBe('weather_required');
      expect(stale.body.error?.message?.startsWith(`“${upperTitle}” moves the crane: `)).toBe(true);
      expect(stale.body.error?.message).toMatch(/older than 15 minutes\. The supervisor, operator, signaller or rigger can record one on the weather panel\.$/);
      expect((await send(crew.signaller, jobId, calmWeather)).status).toBe(200);
      expect((await send(who, jobId, body)).status).toBe(200);
      // Later steps of a stage already started are not held to the reading (the stage is under way).
      server.advance(OLD);
      resign();
      await completeSteps(server, crew, jobId, 'er-upper');
    });

    it('releases only by the acting supervisor in shift 2', async () => {
      const stage = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-upper')!;
      expect(stage.state).toBe('holding');
      if (!stage.hold) throw new Error('er-upper has no hold');
      for (const role of stage.hold.requiredRoles) expect((await send(crew[role as keyof CrewByRole], jobId, { type: 'hold.acknowledge', holdId: stage.hold.id, role })).status).toBe(200);
      expect((await send(crew.signaller, jobId, calmWeather)).status).toBe(200);
      const old = await send(crew.supervisor, jobId, { type: 'hold.release', holdId: stage.hold.id });
      expect(old.status).toBe(403);
      expect(old.body.error?.code).toBe('not_acting_supervisor');
      expect((await send(supervisor2, jobId, { type: 'hold.release', holdId: stage.hold.id })).status).toBe(200);
    });

    it('the log replayed through the shared reducer gives the server’s board', async () => {
      const log = await events(jobId);
      const { presence: _presence, ...snapshot } = await boardOf(server, crew.supervisor, jobId);
      expect(replay(log)).toEqual(snapshot);
      const types = log.map((e) => e.type);
      for (const type of ['shift.ending', 'shift.item.done', 'handover.written', 'handover.acknowledged', 'shift.inspected', 'shift.start.acknowledged', 'shift.started'] as const) expect(types).toContain(type);
    });
  });

  it('a resume after a stop that was not the wind is refused on an old reading', async () => {
    const jobId = await liveJob('Resume on an old reading');
    expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
    expect((await send(crew.signaller, jobId, { type: 'job.stop', pressedAt: server.context.now().toISOString(), reason: 'Walker on the footpath inside the barrier' })).status).toBe(200);
    server.advance(OLD);
    resign();
    const stale = await send(crew.supervisor, jobId, { type: 'job.resume', reason: 'Footpath clear' });
    expect(stale.status).toBe(409);
    expect(stale.body.error?.code).toBe('weather_required');
    expect(stale.body.error?.message).toMatch(/^Work cannot resume yet: .*older than 15 minutes/);
    expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
    expect((await send(crew.supervisor, jobId, { type: 'job.resume', reason: 'Footpath clear' })).status).toBe(200);
  });

  it('an erection with its boom up gets the checklist for a raised boom', { timeout: 240_000 }, async () => {
    const jobId = await liveJob('Shift erection boom up');
    await advanceUntilActive(server, crew, jobId, 'er-handover');
    const board = await boardOf(server, crew.supervisor, jobId);
    expect(board.stages.find((s) => s.id === 'er-raise')!.state).toBe('done');
    const ended = await send(crew.supervisor, jobId, { type: 'shift.end' });
    expect(ended.status, JSON.stringify(ended.body)).toBe(200);
    expect(ended.body).toMatchObject({ event: { data: { workPhase: 'boom-up' } } });
    const items = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items.map((i) => i.id);
    // Boom up: parked as the manual allows for an unattended crane; no blocking under sections on the ground.
    expect(items).toEqual(['hookBlocks', 'counterweight', 'boomParked', 'guyLines', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
  });

  it('a dismantling over three shifts: its own checklist before and after the lowering, the same handover and start', { timeout: 240_000 }, async () => {
    const jobId = await liveJob('Shift dismantling', 'dismantling');
    // Shift 1: the site hold released, the lowering not begun.
    await advanceUntilActive(server, crew, jobId, 'dm-lower');
    let ended = await send(crew.supervisor, jobId, { type: 'shift.end' });
    expect(ended.status, JSON.stringify(ended.body)).toBe(200);
    expect(ended.body).toMatchObject({ event: { data: { workPhase: 'boom-up' } } });
    let items = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items;
    expect(items.map((i) => i.id)).toEqual(['pinsSupported', 'hookBlocks', 'counterweight', 'boomParked', 'guyLines', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
    expect(items[0]).toMatchObject({ roles: ['rigger'], text: expect.stringContaining('No pin removed from a section that is not supported') });
    await tickAll(jobId);
    expect((await boardOf(server, crew.supervisor, jobId)).job.state).toBe('made_safe');
    await nextShift(jobId, crew.supervisor, supervisor2);

    // Shift 2: the lowering, on a fresh reading, then the shift ends with the boom down.
    server.advance(OLD);
    resign();
    const lower = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'dm-lower')!;
    const first = inStepOrder(lower.steps)[0];
    const who = personFor(first.allowedRoles);
    const stale = await send(who, jobId, { type: 'step.complete', stepId: first.id, ...(first.records ? { value: readingWithinLimit(first) } : {}), ...(first.requiresPhoto ? { photoId: await uploadPhoto(server, who) } : {}) });
    expect(stale.body.error?.code).toBe('weather_required');
    await completeSteps(server, crew, jobId, 'dm-lower');
    const afterLower = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'dm-lower')!;
    if (afterLower.state === 'holding') {
      // The crew helper releases as crew.supervisor; shift 2 is run by supervisor2.
      for (const role of afterLower.hold!.requiredRoles) {
        const by = role === 'supervisor' ? supervisor2 : crew[role as keyof CrewByRole];
        expect((await send(by, jobId, { type: 'hold.acknowledge', holdId: afterLower.hold!.id, role })).status).toBe(200);
      }
      expect((await send(crew.signaller, jobId, calmWeather)).status).toBe(200);
      expect((await send(supervisor2, jobId, { type: 'hold.release', holdId: afterLower.hold!.id })).status).toBe(200);
    }
    expect((await send(crew.supervisor, jobId, { type: 'shift.end' })).body.error?.code).toBe('not_acting_supervisor');
    ended = await send(supervisor2, jobId, { type: 'shift.end' });
    expect(ended.status, JSON.stringify(ended.body)).toBe(200);
    expect(ended.body).toMatchObject({ event: { data: { shift: 2, workPhase: 'boom-lowered' } } });
    items = (await boardOf(server, crew.supervisor, jobId)).shift!.makeSafe!.items;
    // Boom down: sections stowed; nothing about a raised boom or guy lines still rigged.
    expect(items.map((i) => i.id)).toEqual(['pinsSupported', 'sectionsStowed', 'hookBlocks', 'counterweight', 'engineOff', 'keyHeld', 'exclusionZone', 'forecast']);
    await tickAll(jobId);
    await nextShift(jobId, supervisor2, crew.supervisor);
    const board: BoardState = await boardOf(server, crew.supervisor, jobId);
    expect(board.shift).toMatchObject({ number: 3, phase: 'working' });
    expect(board.actingSupervisor?.userId).toBe(crew.supervisor.user.id);
    expect(board.handovers!.map((h) => [h.shift, h.from.userId, h.acknowledgedBy?.userId])).toEqual([
      [1, crew.supervisor.user.id, supervisor2.user.id],
      [2, supervisor2.user.id, crew.supervisor.user.id],
    ]);
    const { presence: _presence, ...snapshot } = board as BoardState & { presence: unknown };
    expect(replay(await events(jobId))).toEqual(snapshot);
  });

  it('only the acting supervisor resumes and skips; an overtaken handover note or a stale supervisor’s acknowledgment passes nothing; a revoked inspector’s inspection does not count', async () => {
    const jobId = await liveJob('Acting supervisor’s own decisions');
    expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
    expect((await send(crew.signaller, jobId, { type: 'job.stop', pressedAt: server.context.now().toISOString(), reason: 'Radio check failed' })).status).toBe(200);
    const otherResume = await send(supervisor2, jobId, { type: 'job.resume', reason: 'Radios fine now' });
    expect(otherResume.status).toBe(403);
    expect(otherResume.body.error?.code).toBe('not_acting_supervisor');
    expect((await send(crew.supervisor, jobId, { type: 'job.resume', reason: 'Radios fine now' })).status).toBe(200);
    const skippable = (await boardOf(server, crew.supervisor, jobId)).stages.find((st) => !st.hold?.mandatory && st.state !== 'done')!;
    expect((await send(supervisor2, jobId, { type: 'stage.skip', stageId: skippable.id, reason: 'Not needed on this site' })).body.error?.code).toBe('not_acting_supervisor');

    // Made safe; the acting supervisor acknowledges the start-of-shift hold, then the role passes by an admin's transfer.
    expect((await send(crew.supervisor, jobId, { type: 'shift.end' })).status).toBe(200);
    await tickAll(jobId);
    expect((await send(crew.supervisor, jobId, { type: 'handover.write', hazards: 'None beyond the plan.', note: 'Written before the transfer.' })).status).toBe(200);
    await brief(jobId, everyone());
    expect((await send(inspector, jobId, { type: 'shift.inspect', note: 'Boom, pins, ropes and blocking as left.' })).status).toBe(200);
    expect((await send(crew.operator, jobId, { type: 'shift.acknowledge', role: 'operator' })).status).toBe(200);
    expect((await send(crew.supervisor, jobId, { type: 'shift.acknowledge', role: 'supervisor' })).status).toBe(200);
    const transfer = await request(server.app).post(`/api/jobs/${jobId}/acting-supervisor`).set(auth(admin)).send({ userId: supervisor2.user.id, reason: 'Rhys called away to another site' });
    expect(transfer.status, JSON.stringify(transfer.body)).toBe(200);
    // The note was written by someone no longer acting: it hands nothing over.
    const stale = await send(supervisor2, jobId, { type: 'handover.acknowledge' });
    expect(stale.status).toBe(409);
    expect(stale.body.error?.code).toBe('handover_missing');
    // The outgoing supervisor's acknowledgment went with the role: the new one gives their own.
    expect((await boardOf(server, crew.supervisor, jobId)).shift!.start!.supervisor).toBeNull();
    expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
    const noAck = await send(supervisor2, jobId, { type: 'shift.start' });
    expect(noAck.body.error?.code).toBe('shift_not_ready');
    expect(noAck.body.error?.message).toContain('the acting supervisor’s acknowledgment');
    expect((await send(supervisor2, jobId, { type: 'shift.acknowledge', role: 'supervisor' })).status).toBe(200);
    // The inspector's qualification is withdrawn before the start: the inspection no longer counts.
    await request(server.app).patch(`/api/users/${inspector.user.id}`).set(auth(admin)).send({ canInspect: false }).expect(200);
    try {
      resign();
      const revoked = await send(supervisor2, jobId, { type: 'shift.start' });
      expect(revoked.status).toBe(409);
      expect(revoked.body.error?.code).toBe('not_inspector');
    } finally {
      await request(server.app).patch(`/api/users/${inspector.user.id}`).set(auth(admin)).send({ canInspect: true }).expect(200);
      resign();
    }
    expect((await send(supervisor2, jobId, { type: 'shift.start' })).status).toBe(200);
  });

  it('a start refused for want of briefing names who has not acknowledged the new shift', async () => {
    const jobId = await liveJob('Shift briefing');
    expect((await send(crew.supervisor, jobId, { type: 'shift.end' })).status).toBe(200);
    await tickAll(jobId);
    // Made safe: briefings now count for shift 2; a shift-1 briefing lets nobody act.
    expect((await send(crew.operator, jobId, { type: 'shift.acknowledge', role: 'operator' })).body.error?.code).toBe('briefing_required');
    expect((await send(crew.rigger, jobId, calmWeather)).status).toBe(200);
    await brief(jobId, [inspector, crew.operator, crew.supervisor]);
    expect((await send(inspector, jobId, { type: 'shift.inspect', note: 'Checked as left.' })).status).toBe(200);
    expect((await send(crew.operator, jobId, { type: 'shift.acknowledge', role: 'operator' })).status).toBe(200);
    expect((await send(crew.supervisor, jobId, { type: 'shift.acknowledge', role: 'supervisor' })).status).toBe(200);
    const refused = await send(crew.supervisor, jobId, { type: 'shift.start' });
    expect(refused.status).toBe(409);
    expect(refused.body.error?.code).toBe('briefing_required');
    expect(refused.body.error?.message).toContain('shift 2');
    for (const who of [crew.signaller, crew.rigger, supervisor2]) expect(refused.body.error?.message).toContain(who.user.displayName);
    for (const who of [crew.operator, viewer]) expect(refused.body.error?.message).not.toContain(who.user.displayName);
    await briefEveryone(server, crew, jobId);
    await brief(jobId, [supervisor2]);
    expect((await send(crew.supervisor, jobId, { type: 'shift.start' })).status).toBe(200);
    expect((await boardOf(server, crew.supervisor, jobId)).shift).toMatchObject({ number: 2, phase: 'working' });
    // The crew helper's release still works in shift 2, by the same acting supervisor.
    await completeSteps(server, crew, jobId, 'er-ground');
    await acknowledgeAndRelease(server, crew, jobId, 'er-ground');
  });
});
