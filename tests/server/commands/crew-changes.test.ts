import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BoardHold, BoardState } from '../../../shared/board/types.js';
import type { JobEventDto, JobEventOf } from '../../../shared/events/log.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, BoardClient, boardOf, briefEveryone, completeSteps, httpCommand, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';
import { User } from '../../../server/entities/User.js';

/**
 * Crew changes while a job is under way (issue 17): PUT /api/jobs/:id/crew on a live board, and an
 * administrator disabling the account of someone in the crew. A person leaving takes their
 * acknowledgments of holds not yet released with them and the hold says why; a change may not
 * leave a role an open hold needs with nobody, nor remove the acting supervisor; a person added
 * mid-job acts only after the briefing. Everything through the real HTTP and socket paths.
 */
describe('crew changes mid-job', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  /** A second rigger who can take over from the first. */
  let rigger2: SignedInUser;
  /** A second supervisor, in the crew of every job here. */
  let supervisor2: SignedInUser;
  let unitId: string;
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  type Member = { userId: string; role: CrewRole };
  const member = (who: SignedInUser, role: CrewRole): Member => ({ userId: who.user.id, role });
  const crewOf = (c: CrewByRole): Member[] => [member(c.supervisor, 'supervisor'), member(c.operator, 'operator'), member(c.signaller, 'signaller'), member(c.rigger, 'rigger')];

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = await signedInCrew(server);
    rigger2 = await signedInUser(server, { qualifications: ['rigger'] });
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor'] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    await addParts18m(server, admin.token, model.id, unit.id, 'C');
    unitId = unit.id;
  });
  afterAll(() => server.stop());

  /**
   * A live job (crew `c` plus `extra`, everyone briefed, the job started by `c.supervisor`, who is
   * then the acting supervisor) worked forward to the first hold a rigger acknowledges, now open.
   */
  async function jobAtRiggerHold(name: string, c: CrewByRole = crew, extra: Member[] = [member(supervisor2, 'supervisor')]): Promise<{ jobId: string; hold: BoardHold }> {
    const job = await plannedJob(server, c, unitId, name);
    await request(server.app).put(`/api/jobs/${job.id}/crew`).set(auth(c.supervisor)).send({ members: [...crewOf(c), ...extra] }).expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(c.supervisor)).expect(200);
    expect((await httpCommand(server, c.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, c, job.id);
    for (let guard = 0; guard < 50; guard++) {
      const board = await boardOf(server, c.supervisor, job.id);
      const next = board.stages.find((s) => s.state === 'active' || s.state === 'holding');
      if (!next) break;
      const hold = next.hold;
      if (next.state === 'holding' && hold && hold.requiredRoles.includes('rigger') && hold.requiredRoles.length > 1 && !hold.valueCheck && !hold.signOff) {
        expect(board.actingSupervisor?.userId).toBe(c.supervisor.user.id);
        return { jobId: job.id, hold };
      }
      if (next.state === 'active') await completeSteps(server, c, job.id, next.id);
      else await acknowledgeAndRelease(server, c, job.id, next.id);
    }
    throw new Error('no hold for a rigger on this plan');
  }

  const putCrew = (jobId: string, members: Member[], as: SignedInUser = crew.supervisor) => request(server.app).put(`/api/jobs/${jobId}/crew`).set(auth(as)).send({ members });
  const holdOn = (board: BoardState, holdId: string) => board.stages.find((s) => s.hold?.id === holdId)!.hold!;
  async function eventsOf(jobId: string): Promise<JobEventDto[]> {
    return jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events`).set(auth(crew.supervisor)).expect(200)).body).items;
  }

  it('removing a person withdraws their acknowledgments; the hold re-opens and says why, on every screen', async () => {
    const { jobId, hold } = await jobAtRiggerHold('Rigger swap job');
    const ack = await httpCommand(server, crew.rigger, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'rigger' });
    expect(ack.status, JSON.stringify(ack.body)).toBe(200);
    const other = hold.requiredRoles.find((r) => r !== 'rigger' && r !== 'supervisor') as keyof CrewByRole | undefined;
    if (other) expect((await httpCommand(server, crew[other], jobId, { type: 'hold.acknowledge', holdId: hold.id, role: other })).status).toBe(200);
    expect(holdOn(await boardOf(server, crew.supervisor, jobId), hold.id).acknowledgments.map((a) => a.userId)).toContain(crew.rigger.user.id);

    const watcher = new BoardClient(server.url, crew.signaller.token);
    try {
      await watcher.join(jobId);
      // The replacement is named in the same change: rigger2 in, the first rigger out.
      const swapped = await putCrew(jobId, [...crewOf(crew).filter((m) => m.userId !== crew.rigger.user.id), member(rigger2, 'rigger'), member(supervisor2, 'supervisor')]);
      expect(swapped.status, JSON.stringify(swapped.body)).toBe(200);

      const board = await boardOf(server, crew.supervisor, jobId);
      const after = holdOn(board, hold.id);
      expect(after.state).toBe('open');
      expect(after.acknowledgments.map((a) => a.userId)).not.toContain(crew.rigger.user.id);
      // Whoever else acknowledged keeps their acknowledgment.
      if (other) expect(after.acknowledgments.map((a) => a.userId)).toEqual([crew[other].user.id]);
      expect(after.reopenedBecause?.reason).toContain(crew.rigger.user.displayName);
      expect(after.reopenedBecause?.reason).toContain('left the crew');

      // The log carries what was withdrawn, and the live socket got that same event.
      const set = (await eventsOf(jobId)).filter((e): e is JobEventOf<'crew.set'> => e.type === 'crew.set').at(-1)!;
      expect(set.data.withdrawn).toEqual([{ stageId: expect.any(String), holdId: hold.id, userId: crew.rigger.user.id, name: crew.rigger.user.displayName, role: 'rigger' }]);
      expect(set.data.removed).toEqual([{ userId: crew.rigger.user.id, role: 'rigger' }]);
      await watcher.waitForSeq(set.seq);
      expect(watcher.events.find((e) => e.seq === set.seq)).toMatchObject({ type: 'crew.set', data: { withdrawn: set.data.withdrawn } });

      // The removed rigger can no longer act on the board.
      const gone = await httpCommand(server, crew.rigger, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'rigger' });
      expect(gone.status).toBe(403);
    } finally {
      watcher.close();
    }
  }, 120_000);

  it('refuses to leave a role an open hold needs with nobody, and allows it with a replacement in the same change', async () => {
    const { jobId, hold } = await jobAtRiggerHold('Only rigger job');
    const before = await boardOf(server, crew.supervisor, jobId);
    const withoutRigger = [...crewOf(crew).filter((m) => m.role !== 'rigger'), member(supervisor2, 'supervisor')];
    const refused = await putCrew(jobId, withoutRigger);
    expect(refused.status).toBe(409);
    expect(refused.body.error?.code).toBe('crew_role_needed');
    expect(refused.body.error.fields).toContainEqual({ path: 'members.rigger', message: `Nobody left as rigger for “${hold.title}”` });
    // Nothing changed: no event, the same crew.
    const unchanged = await boardOf(server, crew.supervisor, jobId);
    expect(unchanged.seq).toBe(before.seq);
    expect(unchanged.crew).toEqual(before.crew);

    const replaced = await putCrew(jobId, [...withoutRigger, member(rigger2, 'rigger')]);
    expect(replaced.status, JSON.stringify(replaced.body)).toBe(200);
    expect((await boardOf(server, crew.supervisor, jobId)).crew.filter((m) => m.role === 'rigger').map((m) => m.userId)).toEqual([rigger2.user.id]);
  }, 120_000);

  it('refuses to remove the acting supervisor, even with another supervisor in the crew, until the role has passed', async () => {
    const { jobId } = await jobAtRiggerHold('Acting supervisor job');
    const others = crewOf(crew).filter((m) => m.role !== 'supervisor');
    // Another supervisor covers the role, but the acting one may not be taken off.
    const refused = await putCrew(jobId, [...others, member(supervisor2, 'supervisor')], supervisor2);
    expect(refused.status).toBe(409);
    expect(refused.body.error?.code).toBe('acting_supervisor');
    expect(refused.body.error?.message).toContain(crew.supervisor.user.displayName);
    // An administrator cannot do it through the crew either: they transfer the role first.
    expect((await putCrew(jobId, [...others, member(supervisor2, 'supervisor')], admin)).body.error.code).toBe('acting_supervisor');
    const transferred = await request(server.app)
      .post(`/api/jobs/${jobId}/acting-supervisor`)
      .set(auth(admin))
      .send({ userId: supervisor2.user.id, reason: 'The day supervisor went home ill and cannot be reached.' });
    expect(transferred.status, JSON.stringify(transferred.body)).toBe(200);
    const removed = await putCrew(jobId, [...others, member(supervisor2, 'supervisor')], supervisor2);
    expect(removed.status, JSON.stringify(removed.body)).toBe(200);
  }, 120_000);

  it('a person added mid-job is refused work until they acknowledge the briefing', async () => {
    const { jobId, hold } = await jobAtRiggerHold('Added rigger job');
    const added = await putCrew(jobId, [...crewOf(crew), member(supervisor2, 'supervisor'), member(rigger2, 'rigger')]);
    expect(added.status, JSON.stringify(added.body)).toBe(200);
    const refused = await httpCommand(server, rigger2, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'rigger' });
    expect(refused.status).toBe(409);
    expect(refused.body.error?.code).toBe('briefing_required');
    expect(holdOn(await boardOf(server, crew.supervisor, jobId), hold.id).acknowledgments).toEqual([]);
    expect((await httpCommand(server, rigger2, jobId, { type: 'briefing.acknowledge' })).status).toBe(200);
    const accepted = await httpCommand(server, rigger2, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'rigger' });
    expect(accepted.status, JSON.stringify(accepted.body)).toBe(200);
  }, 120_000);

  it('disabling an account withdraws its acknowledgments in the log and on every socket, even for the only one in the role', async () => {
    // A crew of its own: this operator's account is disabled.
    const own: CrewByRole = { ...crew, operator: await signedInUser(server, { qualifications: ['operator'] }) };
    const { jobId, hold } = await jobAtRiggerHold('Disabled account job', own);
    const operatorHold = hold.requiredRoles.includes('operator');
    // The rigger acknowledges this hold; the operator too when it asks for one.
    expect((await httpCommand(server, own.rigger, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'rigger' })).status).toBe(200);
    const leaving = operatorHold ? own.operator : own.rigger;
    if (operatorHold) expect((await httpCommand(server, own.operator, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'operator' })).status).toBe(200);

    const watchers = [new BoardClient(server.url, own.supervisor.token), new BoardClient(server.url, own.signaller.token), new BoardClient(server.url, admin.token)];
    try {
      for (const w of watchers) expect((await w.join(jobId)).ok).toBe(true);
      const seqBefore = (await boardOf(server, own.supervisor, jobId)).seq;
      // Not refused, though they are the only one in their role on the job: the account is shut at once; the hold waits.
      const disabled = await request(server.app).patch(`/api/users/${leaving.user.id}`).set(auth(admin)).send({ active: false });
      expect(disabled.status, JSON.stringify(disabled.body)).toBe(200);

      const events = await eventsOf(jobId);
      const event = events.find((e): e is JobEventOf<'crew.member.disabled'> => e.type === 'crew.member.disabled');
      expect(event, 'a crew.member.disabled event').toBeDefined();
      expect(event!.seq).toBe(seqBefore + 1);
      expect(event!.by).toMatchObject({ userId: admin.user.id, role: 'admin' });
      expect(event!.data).toMatchObject({ userId: leaving.user.id, name: leaving.user.displayName });
      expect(event!.data.withdrawn).toEqual([{ stageId: expect.any(String), holdId: hold.id, userId: leaving.user.id, name: leaving.user.displayName, role: operatorHold ? 'operator' : 'rigger' }]);

      const board = await boardOf(server, own.supervisor, jobId);
      const after = holdOn(board, hold.id);
      expect(after.acknowledgments.map((a) => a.userId)).not.toContain(leaving.user.id);
      expect(after.reopenedBecause?.reason).toBe(`${leaving.user.displayName}’s account was disabled`);
      // Still in the crew list (the supervisor replaces them); the hold waits for someone in the role.
      expect(board.crew.map((m) => m.userId)).toContain(leaving.user.id);

      for (const w of watchers) {
        await w.waitForSeq(event!.seq);
        expect(w.events.find((e) => e.seq === event!.seq)?.type).toBe('crew.member.disabled');
      }
      // Exactly once: only one such event for this deactivation.
      expect(events.filter((e) => e.type === 'crew.member.disabled')).toHaveLength(1);
    } finally {
      for (const w of watchers) w.close();
    }
  }, 120_000);

  it('a release never counts an acknowledgment by a disabled account, even when its withdrawal never ran', async () => {
    const own: CrewByRole = { ...crew, rigger: await signedInUser(server, { qualifications: ['rigger'] }) };
    const { jobId, hold } = await jobAtRiggerHold('Disabled without withdrawal job', own);
    for (const role of hold.requiredRoles) {
      const who = role === 'supervisor' ? supervisor2 : own[role as keyof CrewByRole];
      expect((await httpCommand(server, who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role })).status).toBe(200);
    }
    // The deactivation committed and the server died before the withdrawal: only the account row changed.
    await server.context.dataSource.manager.update(User, { id: own.rigger.user.id }, { active: false });
    const refused = await httpCommand(server, own.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
    expect(refused.status).toBe(409);
    expect(refused.body.error?.code).toBe('account_inactive');
    expect(refused.body.error?.message).toContain(own.rigger.user.displayName);
    expect(holdOn(await boardOf(server, own.supervisor, jobId), hold.id).state).toBe('acknowledged');
    // Taking them off the crew with a replacement withdraws the acknowledgment; the new rigger acknowledges and the release goes.
    const members = [...crewOf(own).filter((m) => m.userId !== own.rigger.user.id), member(rigger2, 'rigger'), member(supervisor2, 'supervisor')];
    expect((await putCrew(jobId, members, own.supervisor)).status).toBe(200);
    expect((await httpCommand(server, rigger2, jobId, { type: 'briefing.acknowledge' })).status).toBe(200);
    expect((await httpCommand(server, rigger2, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: 'rigger' })).status).toBe(200);
    expect((await httpCommand(server, own.supervisor, jobId, { type: 'hold.release', holdId: hold.id })).status).toBe(200);
  }, 120_000);

  it('while the job is made safe: the start-of-shift hold keeps its operator and supervisor; a swapped operator’s acknowledgment is withdrawn', async () => {
    const inspector = await signedInUser(server, { qualifications: ['rigger'] });
    await request(server.app).patch(`/api/users/${inspector.user.id}`).set(auth(admin)).send({ canInspect: true }).expect(200);
    const operator2 = await signedInUser(server, { qualifications: ['operator'] });
    const job = await plannedJob(server, crew, unitId, 'Made safe crew job');
    const base = [...crewOf(crew), member(supervisor2, 'supervisor'), member(inspector, 'rigger')];
    await putCrew(job.id, base).expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    expect((await httpCommand(server, inspector, job.id, { type: 'briefing.acknowledge' })).status).toBe(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'shift.end' })).status).toBe(200);
    for (const item of (await boardOf(server, crew.supervisor, job.id)).shift!.makeSafe!.items) {
      const role = item.roles[0] as keyof CrewByRole;
      const done = await httpCommand(server, crew[role], job.id, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: 'In the site office safe.' } : {}) });
      expect(done.status, JSON.stringify(done.body)).toBe(200);
    }
    expect((await boardOf(server, crew.supervisor, job.id)).job.state).toBe('made_safe');
    // The next shift's briefing, then the inspection and the operator's acknowledgment of the start-of-shift hold.
    await briefEveryone(server, crew, job.id);
    expect((await httpCommand(server, inspector, job.id, { type: 'briefing.acknowledge' })).status).toBe(200);
    expect((await httpCommand(server, inspector, job.id, { type: 'shift.inspect', note: 'Boom, pins, rope and blocking seen; nothing found.' })).status).toBe(200);
    expect((await httpCommand(server, crew.operator, job.id, { type: 'shift.acknowledge', role: 'operator' })).status).toBe(200);

    const withoutOperator = base.filter((m) => m.role !== 'operator');
    const refused = await putCrew(job.id, withoutOperator);
    expect(refused.status).toBe(409);
    expect(refused.body.error?.code).toBe('crew_role_needed');
    expect(refused.body.error.fields).toContainEqual({ path: 'members.operator', message: 'Nobody left as operator for “the start-of-shift hold”' });

    const swapped = await putCrew(job.id, [...withoutOperator, member(operator2, 'operator')]);
    expect(swapped.status, JSON.stringify(swapped.body)).toBe(200);
    const board = await boardOf(server, crew.supervisor, job.id);
    expect(board.shift!.start!.operator).toBeNull();
    expect(board.shift!.start!.inspection?.userId).toBe(inspector.user.id);
    const set = (await eventsOf(job.id)).filter((e): e is JobEventOf<'crew.set'> => e.type === 'crew.set').at(-1)!;
    expect(set.data.withdrawn).toEqual([{ stageId: null, holdId: 'shift-start', userId: crew.operator.user.id, name: crew.operator.user.displayName, role: 'operator' }]);
    // The new operator is briefed for the coming shift before acknowledging it.
    const early = await httpCommand(server, operator2, job.id, { type: 'shift.acknowledge', role: 'operator' });
    expect(early.body.error?.code).toBe('briefing_required');
    expect((await httpCommand(server, operator2, job.id, { type: 'briefing.acknowledge' })).status).toBe(200);
    const acknowledged = await httpCommand(server, operator2, job.id, { type: 'shift.acknowledge', role: 'operator' });
    expect(acknowledged.status, JSON.stringify(acknowledged.body)).toBe(200);
  }, 120_000);

  it('disabling an account with nothing acknowledged writes no event', async () => {
    const own: CrewByRole = { ...crew, signaller: await signedInUser(server, { qualifications: ['signaller'] }) };
    const { jobId } = await jobAtRiggerHold('Nothing to withdraw job', own);
    const seqBefore = (await boardOf(server, own.supervisor, jobId)).seq;
    await request(server.app).patch(`/api/users/${own.signaller.user.id}`).set(auth(admin)).send({ active: false }).expect(200);
    expect((await boardOf(server, own.supervisor, jobId)).seq).toBe(seqBefore);
  }, 120_000);
});
