import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { replay } from '../../../shared/board/apply.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import { createApp } from '../../../server/app.js';
import { openDatabase } from '../../../server/db/data-source.js';
import { createLogger } from '../../../server/logger.js';
import { RESUME_AFTER_PRESS_MS } from '../../../server/commands/board.js';
import { freshToken, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, advanceUntilActive, BoardClient, boardOf, briefEveryone, completeSteps, controllerValues18m, httpCommand, uploadPhoto, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

describe('the live board engine', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let supervisor2: SignedInUser;
  let viewer: SignedInUser;
  let outsider: SignedInUser;
  let unitId: string;
  const clients: BoardClient[] = [];
  /** New access tokens for everyone after a test moves the server's clock past their 15 minutes. */
  const resign = () => {
    for (const who of [...Object.values(crew), supervisor2, viewer, outsider]) who.token = freshToken(server, who);
  };
  const client = (who: SignedInUser) => {
    const c = new BoardClient(server.url, who.token);
    clients.push(c);
    return c;
  };

  /** A job taken live with everyone briefed; optionally a second supervisor and a viewer on the crew. */
  async function liveJob(name = 'Board job'): Promise<string> {
    const job = await plannedJob(server, crew, unitId, name);
    const auth = { Authorization: `Bearer ${crew.supervisor.token}` };
    await request(server.app)
      .put(`/api/jobs/${job.id}/crew`)
      .set(auth)
      .send({
        members: [
          ...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })),
          { userId: supervisor2.user.id, role: 'supervisor' },
          { userId: viewer.user.id, role: 'viewer' },
        ],
      })
      .expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    await httpCommand(server, supervisor2, job.id, { type: 'briefing.acknowledge' });
    return job.id;
  }

  beforeAll(async () => {
    server = await startTestServer();
    crew = {
      supervisor: await signedInUser(server, { qualifications: ['supervisor'] }),
      operator: await signedInUser(server, { qualifications: ['operator', 'signaller'] }),
      signaller: await signedInUser(server, { qualifications: ['signaller'] }),
      rigger: await signedInUser(server, { qualifications: ['rigger'] }),
    };
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    viewer = await signedInUser(server, { qualifications: ['viewer'] });
    outsider = await signedInUser(server, { qualifications: ['rigger'] });
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'B');
  });
  afterEach(() => {
    for (const c of clients.splice(0)) c.close();
  });
  afterAll(() => server.stop());

  it('a stage from its first step to its release is seen by three other clients in the same order with contiguous seq', async () => {
    const jobId = await liveJob();
    const watchers = [client(crew.operator), client(crew.signaller), client(viewer)];
    const joins = await Promise.all(watchers.map((w) => w.join(jobId)));
    expect(joins.every((j) => j.ok && j.mode === 'snapshot')).toBe(true);
    const startSeq = joins[0].ok ? joins[0].seq : 0;

    await completeSteps(server, crew, jobId, 'er-ground');
    await acknowledgeAndRelease(server, crew, jobId, 'er-ground');
    const board = await boardOf(server, crew.supervisor, jobId);
    expect(board.stages.find((s) => s.id === 'er-ground')).toMatchObject({ state: 'done', hold: { state: 'released' } });

    for (const w of watchers) await w.waitForSeq(board.seq);
    const seqs = watchers.map((w) => w.events.map((e) => e.seq));
    expect(seqs[0]).toEqual(Array.from({ length: board.seq - startSeq }, (_, i) => startSeq + i + 1));
    expect(seqs[1]).toEqual(seqs[0]);
    expect(seqs[2]).toEqual(seqs[0]);
    expect(watchers[1].events.map((e) => e.type)).toEqual(watchers[0].events.map((e) => e.type));
    const release = watchers[0].events.at(-1)!;
    expect(release.type).toBe('hold.released');
    // The release says what it set in motion: the two stages that depend on the ground stage.
    expect(release.data.effects).toMatchObject({ stages: expect.arrayContaining([{ id: 'er-ground', state: 'done' }, { id: 'er-upper', state: 'active' }, { id: 'er-check', state: 'active' }]) });
  });

  it('two parallel stages are active together; a hold gates only the stages that depend on it', async () => {
    const jobId = await liveJob();
    await advanceUntilActive(server, crew, jobId, 'er-upper');
    let board = await boardOf(server, crew.supervisor, jobId);
    expect(board.stages.filter((s) => s.state === 'active').map((s) => s.id).sort()).toEqual(['er-check', 'er-upper']);
    await completeSteps(server, crew, jobId, 'er-check');
    await acknowledgeAndRelease(server, crew, jobId, 'er-check');
    board = await boardOf(server, crew.supervisor, jobId);
    // Laying out the guy lines depends only on the component check: it starts while the upper works
    // are still open (pinning them waits for the joints).
    expect(board.stages.find((s) => s.id === 'er-guy-layout')?.state).toBe('active');
    expect(board.stages.find((s) => s.id === 'er-guys')?.state).toBe('locked');
    expect(board.stages.find((s) => s.id === 'er-upper')?.state).toBe('active');
    expect(board.stages.find((s) => s.id === 'er-joints')?.state).toBe('locked');
  });

  it('refuses a release before every role has acknowledged, and one person acknowledging under two roles', async () => {
    const jobId = await liveJob();
    await completeSteps(server, crew, jobId, 'er-ground');
    const hold = (await boardOf(server, crew.supervisor, jobId)).stages[0].hold!;
    expect(hold.state).toBe('open');
    const early = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
    expect(early).toMatchObject({ status: 409, body: { error: { code: 'invalid_state' } } });
    expect(early.body.error!.message).toMatch(/still needs/);

    // crew.operator is qualified as operator and signaller; give them both roles on this job.
    await request(server.app)
      .put(`/api/jobs/${jobId}/crew`)
      .set('Authorization', `Bearer ${crew.supervisor.token}`)
      .send({ members: [...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })), { userId: crew.operator.user.id, role: 'signaller' }] })
      .expect(200);
    expect((await httpCommand(server, crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator' })).status).toBe(200);
    const twice = await httpCommand(server, crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'signaller' });
    expect(twice).toMatchObject({ status: 409, body: { error: { code: 'one_person_two_roles' } } });
    // The same role again (a second screen of the same person) is no second role: it says so.
    const again = await httpCommand(server, crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator' });
    expect(again).toMatchObject({ status: 409, body: { error: { code: 'already_acknowledged' } } });
    const wrongRole = await httpCommand(server, crew.rigger, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'signaller' });
    expect(wrongRole).toMatchObject({ status: 403, body: { error: { code: 'role_not_allowed' } } });
  });

  it('nobody acknowledges a hold before acknowledging the briefing; a person added mid-job must do it first', async () => {
    const jobId = await liveJob();
    await completeSteps(server, crew, jobId, 'er-ground');
    const hold = (await boardOf(server, crew.supervisor, jobId)).stages[0].hold!;
    const newcomer = await signedInUser(server, { qualifications: ['signaller'] });
    await request(server.app)
      .put(`/api/jobs/${jobId}/crew`)
      .set('Authorization', `Bearer ${crew.supervisor.token}`)
      .send({ members: [...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role })), { userId: newcomer.user.id, role: 'signaller' }] })
      .expect(200);
    const refused = await httpCommand(server, newcomer, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'signaller' });
    expect(refused).toMatchObject({ status: 409, body: { error: { code: 'briefing_required' } } });
    expect((await httpCommand(server, newcomer, jobId, { type: 'briefing.acknowledge' })).status).toBe(200);
    expect((await httpCommand(server, newcomer, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'signaller' })).status).toBe(200);
  });

  it('a value-check hold refuses wrong values without naming a field or an expected value (the supervisor sees which fields)', async () => {
    const jobId = await liveJob();
    await advanceUntilActive(server, crew, jobId, 'er-config');
    await completeSteps(server, crew, jobId, 'er-config');
    const hold = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-config')!.hold!;
    expect(hold.valueCheck?.fields).toEqual(['boomLengthM', 'hookBlockId', 'parts', 'counterweightT', 'operatingMode']);
    expect(JSON.stringify(hold)).not.toContain('HB120');

    const noPhoto = await httpCommand(server, crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator', values: controllerValues18m });
    expect(noPhoto.body.error?.fields?.map((f) => f.path)).toEqual(['photoId']);
    const photoId = await uploadPhoto(server, crew.operator);
    const wrong = await httpCommand(server, crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator', photoId, values: { ...controllerValues18m, boomLengthM: '21', parts: '4' } });
    expect(wrong.status).toBe(409);
    expect(wrong.body.error?.code).toBe('values_mismatch');
    // Naming the wrong fields let a person recover every expected value by trying (issue 14).
    expect(wrong.body.error?.message).not.toMatch(/Boom length|Parts of line/);
    expect(JSON.stringify(wrong.body)).not.toMatch(/"18"|\b18 m|"6"/);
    const failures = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-config')!.hold!.checkFailures;
    expect(failures.map((f) => f.fields)).toEqual([['boomLengthM', 'parts']]);
    // After a failure: wait, read the controller again, with a new photo.
    server.advance(31_000);
    const right = await httpCommand(server, crew.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator', photoId: await uploadPhoto(server, crew.operator), values: { ...controllerValues18m, boomLengthM: '18.0' } });
    expect(right.status).toBe(200);
  });

  it('a mandatory hold can never be skipped; another stage can, with a reason', async () => {
    const jobId = await liveJob();
    const mandatory = await httpCommand(server, crew.supervisor, jobId, { type: 'stage.skip', stageId: 'er-ground', reason: 'Done yesterday' });
    expect(mandatory).toMatchObject({ status: 409, body: { error: { code: 'mandatory_hold' } } });
    await advanceUntilActive(server, crew, jobId, 'er-upper');
    const skipped = await httpCommand(server, crew.supervisor, jobId, { type: 'stage.skip', stageId: 'er-upper', reason: 'Counterweight fitted and checked on the previous shift' });
    expect(skipped.status).toBe(200);
    const board = await boardOf(server, crew.supervisor, jobId);
    expect(board.stages.find((s) => s.id === 'er-upper')).toMatchObject({ state: 'skipped', hold: { state: 'waived' } });
    expect((await httpCommand(server, crew.rigger, jobId, { type: 'stage.skip', stageId: 'er-check', reason: 'not needed today' })).body.error?.code).toBe('role_not_allowed');
  });

  it('stop and resume: anyone stops, nothing moves while stopped, resume needs a fresh reading under the limits', async () => {
    const jobId = await liveJob();
    const pressedAt = new Date(Date.now() - 30_000).toISOString();
    expect((await httpCommand(server, crew.rigger, jobId, { type: 'job.stop', pressedAt })).status).toBe(200);
    let board = await boardOf(server, crew.supervisor, jobId);
    expect(board.job).toMatchObject({ state: 'stopped', stop: { pressedAt, reason: null, raisedBy: { userId: crew.rigger.user.id } } });

    const step = board.stages[0].steps[0];
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'step.complete', stepId: step.id })).body.error?.code).toBe('job_stopped');
    expect((await httpCommand(server, crew.rigger, jobId, { type: 'job.stop.note', reason: 'Tag line snagged on the lattice' })).status).toBe(200);
    expect((await httpCommand(server, crew.signaller, jobId, { type: 'job.stop', pressedAt: new Date().toISOString() })).status).toBe(200);

    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Cleared' })).body.error?.code).toBe('weather_required');
    await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 12, gustMs: 17, heightM: 10 });
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Cleared' })).body.error?.code).toBe('weather_required');
    await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 4, gustMs: 7, heightM: 10 });
    expect((await httpCommand(server, crew.operator, jobId, { type: 'job.resume', reason: 'Cleared' })).body.error?.code).toBe('role_not_allowed');
    // The signaller pressed stop again seconds ago: a resume now would be decided without that press.
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Tag line freed and checked' })).body.error).toMatchObject({ code: 'stop_pressed_again', message: expect.stringContaining(`${crew.signaller.user.displayName} pressed stop again`) });
    server.advance(RESUME_AFTER_PRESS_MS);
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Tag line freed and checked' })).status).toBe(200);
    board = await boardOf(server, crew.supervisor, jobId);
    expect(board.job).toMatchObject({ state: 'live', lastResume: { reason: 'Tag line freed and checked' } });

    server.advance(16 * 60 * 1000);
    resign();
    await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 11, gustMs: 16, heightM: 10 });
    board = await boardOf(server, crew.supervisor, jobId);
    expect(board.job.state).toBe('stopped');
    expect(board.job.stop?.reason).toMatch(/over the limit/);
    server.advance(16 * 60 * 1000);
    resign();
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Old reading' })).body.error?.code).toBe('weather_required');
  });

  it('only the crew join a board; a viewer watches and may only raise a stop; someone outside the crew is refused', async () => {
    const jobId = await liveJob();
    const outside = client(outsider);
    const refused = await outside.join(jobId);
    expect(refused).toMatchObject({ ok: false, error: { code: 'forbidden', message: 'Only the job’s crew can open its board.' } });
    // Joining asks the same policy row as reading the board over HTTP, so both refuse in the same words.
    const boardHttp = await request(server.app).get(`/api/jobs/${jobId}/board`).set({ Authorization: `Bearer ${outsider.token}` }).expect(403);
    expect(refused.ok ? null : refused.error).toEqual(boardHttp.body.error);
    // A command from outside the crew is refused by the same policy over both transports, in the same words.
    const outsideStop = await outside.command(jobId, { type: 'job.stop', pressedAt: new Date().toISOString() });
    expect(outsideStop).toMatchObject({ ok: false, error: { code: 'forbidden' } });
    const outsideHttp = await httpCommand(server, outsider, jobId, { type: 'job.stop', pressedAt: new Date().toISOString() });
    expect(outsideHttp.status).toBe(403);
    expect(outsideStop.ok ? null : outsideStop.error).toEqual(outsideHttp.body.error);

    const watcher = client(viewer);
    expect((await watcher.join(jobId)).ok).toBe(true);
    expect(await watcher.command(jobId, { type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 })).toMatchObject({ ok: false, error: { code: 'role_not_allowed' } });
    const viewerBriefing = await httpCommand(server, viewer, jobId, { type: 'briefing.acknowledge' });
    expect(viewerBriefing).toMatchObject({ status: 403, body: { error: { code: 'role_not_allowed' } } });
    const viewerBriefingSocket = await watcher.command(jobId, { type: 'briefing.acknowledge' });
    expect(viewerBriefingSocket.ok ? null : viewerBriefingSocket.error).toEqual(viewerBriefing.body.error);
    // An operator obeys a stop signal from anyone (ASME B30.5, from memory): a viewer's stop counts.
    const viewerStop = await watcher.command(jobId, { type: 'job.stop', pressedAt: new Date().toISOString() });
    expect(viewerStop).toMatchObject({ ok: true, event: { type: 'job.stopped', by: { role: 'viewer' } } });

    const rigger = client(crew.rigger);
    await rigger.join(jobId);
    const stop = await rigger.command(jobId, { type: 'job.stop', pressedAt: new Date().toISOString() });
    expect(stop.ok).toBe(true);
    if (stop.ok) await watcher.waitForSeq(stop.seq);
    expect(watcher.events.at(-1)?.type).toBe('job.stopped');
  });

  it('a client that rejoins with afterSeq receives exactly the events it missed, none twice', async () => {
    const jobId = await liveJob();
    const first = client(crew.operator);
    const joined = await first.join(jobId);
    if (!joined.ok) throw new Error('join failed');
    await completeSteps(server, crew, jobId, 'er-ground');
    const seenBefore = (await boardOf(server, crew.supervisor, jobId)).seq;
    await first.waitForSeq(seenBefore);
    first.close();

    await acknowledgeAndRelease(server, crew, jobId, 'er-ground');
    const now = (await boardOf(server, crew.supervisor, jobId)).seq;
    expect(now).toBeGreaterThan(seenBefore);

    const again = client(crew.operator);
    const answer = await again.join(jobId, seenBefore);
    if (!answer.ok || answer.mode !== 'events') throw new Error('expected events');
    expect(answer.events.map((e) => e.seq)).toEqual(Array.from({ length: now - seenBefore }, (_, i) => seenBefore + i + 1));
    expect(new Set([...first.events, ...answer.events].map((e) => e.seq)).size).toBe(first.events.length + answer.events.length);

    const fresh = client(crew.operator);
    const snapshot = await fresh.join(jobId);
    expect(snapshot.ok && snapshot.mode).toBe('snapshot');
  });

  it('ticks arrive every second with the current seq, so a client can tell when it is behind or cut off', async () => {
    const jobId = await liveJob();
    const c = client(crew.signaller);
    const answer = await c.join(jobId);
    if (!answer.ok) throw new Error('join failed');
    const until = Date.now() + 3500;
    while (c.ticks.length < 2 && Date.now() < until) await new Promise((r) => setTimeout(r, 50));
    expect(c.ticks.length).toBeGreaterThanOrEqual(2);
    expect(c.ticks.at(-1)?.seq).toBe(answer.seq);
  });

  it('the same command twice is applied once; the same id with another body is refused', async () => {
    const jobId = await liveJob();
    const c = client(crew.rigger);
    await c.join(jobId);
    const commandId = randomUUID();
    const pressedAt = new Date().toISOString();
    const a = await c.command(jobId, { type: 'job.stop', pressedAt }, commandId);
    const b = await c.command(jobId, { type: 'job.stop', pressedAt }, commandId);
    expect(a.ok && b.ok).toBe(true);
    if (a.ok && b.ok) expect(b).toEqual(a);
    const events = jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set('Authorization', `Bearer ${crew.supervisor.token}`)).body).items;
    expect(events.filter((e) => e.type === 'job.stopped')).toHaveLength(1);
    const other = await c.command(jobId, { type: 'job.stop', pressedAt, reason: 'different' }, commandId);
    expect(other).toMatchObject({ ok: false, error: { code: 'command_id_reused' } });
  });

  it('20 concurrent releases from two devices of the acting supervisor and from a second supervisor: exactly one succeeds, the second supervisor is refused as not acting', async () => {
    const jobId = await liveJob();
    await completeSteps(server, crew, jobId, 'er-ground');
    const hold = (await boardOf(server, crew.supervisor, jobId)).stages[0].hold!;
    for (const role of hold.requiredRoles) {
      const who = crew[role as keyof CrewByRole];
      expect((await httpCommand(server, who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role })).status).toBe(200);
    }
    // The release starts a stage that moves the crane: on a fresh reading.
    expect((await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 })).status).toBe(200);
    const phone = client(crew.supervisor);
    const tablet = client(crew.supervisor);
    const other = client(supervisor2);
    await Promise.all([phone.join(jobId), tablet.join(jobId), other.join(jobId)]);
    const senders = [phone, tablet, other];
    const answers = await Promise.all(Array.from({ length: 20 }, (_, i) => senders[i % 3].command(jobId, { type: 'hold.release', holdId: hold.id }).then((answer) => ({ acting: i % 3 !== 2, answer }))));
    expect(answers.filter((x) => x.answer.ok)).toHaveLength(1);
    expect(answers.filter((x) => x.answer.ok).every((x) => x.acting)).toBe(true);
    // Before issue 17 either supervisor could release; now the second is refused whatever the hold's state.
    expect(answers.filter((x) => !x.acting).map((x) => (x.answer.ok ? 'ok' : x.answer.error.code))).toEqual(Array(6).fill('not_acting_supervisor'));
    // The acting supervisor's other presses are told the hold is already released (and by whom).
    expect(answers.filter((x) => x.acting && !x.answer.ok).every((x) => !x.answer.ok && x.answer.error.code === 'already_released')).toBe(true);
  });

  it('replaying the whole event log through the shared reducer gives the server’s snapshot', async () => {
    const jobId = await liveJob();
    await advanceUntilActive(server, crew, jobId, 'er-joints');
    await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 });
    const events = jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set('Authorization', `Bearer ${crew.supervisor.token}`)).body).items;
    const { presence, ...snapshot } = await boardOf(server, crew.supervisor, jobId);
    expect(Array.isArray(presence)).toBe(true);
    expect(replay(events)).toEqual(snapshot);
  });

  it('a step’s photo is seen by the job’s crew and not by someone outside it', async () => {
    const jobId = await liveJob();
    const stage = (await boardOf(server, crew.supervisor, jobId)).stages[0];
    const step = stage.steps.find((s) => s.requiresPhoto) ?? stage.steps[0];
    const who = crew[step.allowedRoles[0] as keyof CrewByRole];
    const photoId = await uploadPhoto(server, who);
    const value = step.records ? { value: '5' } : {};
    expect((await httpCommand(server, who, jobId, { type: 'step.complete', stepId: step.id, photoId, ...value })).status).toBe(200);
    await request(server.app).get(`/api/uploads/${photoId}/thumbnail`).set('Authorization', `Bearer ${crew.operator.token}`).expect(200);
    await request(server.app).get(`/api/uploads/${photoId}/thumbnail`).set('Authorization', `Bearer ${viewer.token}`).expect(200);
    await request(server.app).get(`/api/uploads/${photoId}/thumbnail`).set('Authorization', `Bearer ${outsider.token}`).expect(403);
  });

  it('refuses a step completion without the photo or value it asks for, and a quarantined serial', async () => {
    const jobId = await liveJob();
    await advanceUntilActive(server, crew, jobId, 'er-check');
    const stage = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-check')!;
    const serialStep = stage.steps.find((s) => s.records?.kind === 'serial' && s.records.componentKind === 'section')!;
    const who = crew[serialStep.allowedRoles[0] as keyof CrewByRole];
    const missing = await httpCommand(server, who, jobId, { type: 'step.complete', stepId: serialStep.id });
    expect(missing.body.error?.fields?.map((f) => f.path)).toContain('value');
    const unknown = await httpCommand(server, who, jobId, { type: 'step.complete', stepId: serialStep.id, value: 'NOT-A-SERIAL', ...(serialStep.requiresPhoto ? { photoId: await uploadPhoto(server, who) } : {}) });
    expect(unknown.status).toBe(400);
  });

  it('takes a serial typed in another letter case as the registered part and records it as registered', async () => {
    const jobId = await liveJob();
    await advanceUntilActive(server, crew, jobId, 'er-check');
    const stage = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-check')!;
    const serialStep = stage.steps.find((s) => s.records?.kind === 'serial' && s.records.componentKind === 'section')!;
    const registered = { base: 'B-B1', ins3: 'B-I3A', tip: 'B-T1' }[serialStep.records!.typeId as 'base' | 'ins3' | 'tip'];
    const who = crew[serialStep.allowedRoles[0] as keyof CrewByRole];
    const done = await httpCommand(server, who, jobId, { type: 'step.complete', stepId: serialStep.id, value: registered.toLowerCase(), ...(serialStep.requiresPhoto ? { photoId: await uploadPhoto(server, who) } : {}) });
    expect(done.status).toBe(200);
    const step = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-check')!.steps.find((s) => s.id === serialStep.id)!;
    expect(step.doneBy?.value).toBe(registered);
  });
});

describe('idempotency across a restart', () => {
  it('a command repeated after the server restarts on the same database is not applied twice', async () => {
    const server = await startTestServer();
    const crew: CrewByRole = await signedInCrew(server);
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'R');
    const job = await plannedJob(server, crew, unit.id);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set('Authorization', `Bearer ${crew.supervisor.token}`).expect(200);
    await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' });
    const commandId = randomUUID();
    const pressedAt = new Date().toISOString();
    const first = await httpCommand(server, crew.rigger, job.id, { type: 'job.stop', pressedAt }, commandId);
    expect(first.status).toBe(200);

    await server.close();
    const dataSource = await openDatabase(server.config.databasePath);
    const again = createApp({ config: server.config, dataSource, logger: createLogger('silent') });
    try {
      const repeated = await request(again.app).post(`/api/jobs/${job.id}/commands`).set('Authorization', `Bearer ${crew.rigger.token}`).send({ type: 'job.stop', pressedAt, commandId }).expect(200);
      expect(repeated.body).toEqual(first.body);
      const events = (await request(again.app).get(`/api/jobs/${job.id}/events?after=0`).set('Authorization', `Bearer ${crew.supervisor.token}`)).body.items as { type: string }[];
      expect(events.filter((e) => e.type === 'job.stopped')).toHaveLength(1);
      // The same id and body from another person (ids are in every export of the log) answer nothing of the rigger's.
      const borrowed = await request(again.app).post(`/api/jobs/${job.id}/commands`).set('Authorization', `Bearer ${crew.operator.token}`).send({ type: 'job.stop', pressedAt, commandId });
      expect(borrowed.status).toBe(409);
      expect(borrowed.body.error.code).toBe('command_id_reused');
    } finally {
      await again.close();
    }
  });
});
