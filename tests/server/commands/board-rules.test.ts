import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { replay } from '../../../shared/board/apply.js';
import { outOfLimitBeforeHold, outOfLimitSteps } from '../../../shared/board/readings.js';
import { addHold } from '../../../shared/plan/edit.js';
import { weatherVerdict } from '../../../shared/board/rules.js';
import type { BoardState } from '../../../shared/board/types.js';
import { isEventOf, jobEventListSchema, type JobEventDto } from '../../../shared/events/log.js';
import type { Plan, PlanStep } from '../../../shared/schemas/plan.js';
import { freshToken, signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, advanceUntilActive, boardOf, briefEveryone, calmWeather, completeSteps, controllerValues18m, httpCommand, inStepOrder, readingWithinLimit, uploadPhoto, type CrewByRole, signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { RESUME_AFTER_PRESS_MS } from '../../../server/commands/board.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * The board's rules with their refusals (issue 14): readings compared with the plan or a limit,
 * the one wind rule before the boom moves, a blind configuration check that cannot be guessed,
 * a release by someone who did not acknowledge under another role, a stop anyone raises and only
 * a supervisor resumes once its cause is recorded, step order, and revisions through the plan
 * validator. The test crane's 18 m boom has wind limits of gust 13 m/s, mean 9 m/s for assembly
 * and raising (invented demo data, server/demo/data/crane-model.json).
 */
describe('board rules', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let supervisor2: SignedInUser;
  let viewer: SignedInUser;
  let unitId: string;
  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  /** New access tokens after a test moves the server's clock past their 15 minutes. */
  const resign = () => {
    for (const who of [...Object.values(crew), supervisor2, viewer]) who.token = freshToken(server, who);
  };

  /** A step added by a test, so the rules are tested whatever the templates hold. */
  const step = (id: string, overrides: Partial<PlanStep> = {}): PlanStep => ({
    id,
    text: `Test step ${id}`,
    allowedRoles: ['rigger'],
    requiresPhoto: false,
    records: null,
    caution: null,
    ...overrides,
  });
  const reading = (check: NonNullable<PlanStep['records']>['check'], unit: string | null): PlanStep['records'] => ({
    kind: 'reading',
    label: 'Test reading',
    unit,
    componentKind: null,
    typeId: null,
    plannedSerial: null,
    check,
  });

  /** A live job whose draft plan was edited before it was made ready; everyone briefed. */
  async function liveJob(edit: (plan: Plan) => void = () => {}, extraCrew: { userId: string; role: string }[] = []): Promise<string> {
    const job = await plannedJob(server, crew, unitId, 'Rules job', [{ userId: supervisor2.user.id, role: 'supervisor' }, { userId: viewer.user.id, role: 'viewer' }, ...extraCrew]);
    const plan = (await request(server.app).get(`/api/jobs/${job.id}/plan`).set(auth(crew.supervisor)).expect(200)).body.plan as Plan;
    edit(plan);
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(auth(crew.supervisor)).send({ plan }).expect(200);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, job.id);
    await httpCommand(server, supervisor2, job.id, { type: 'briefing.acknowledge' });
    return job.id;
  }
  const stageOf = (plan: Plan, id: string) => plan.stages.find((s) => s.id === id)!;
  const events = async (who: SignedInUser, jobId: string): Promise<JobEventDto[]> =>
    jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/events?after=0`).set(auth(who)).expect(200)).body).items;
  const ack = async (who: SignedInUser, jobId: string, holdId: string, role: string) => httpCommand(server, who, jobId, { type: 'hold.acknowledge', holdId, role: role as never });
  /** Acknowledges a hold with each required role (no value check), the supervisor role by `supervisor`. */
  async function acknowledgeAll(jobId: string, stageId: string, supervisor = crew.supervisor) {
    const hold = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === stageId)!.hold!;
    for (const role of hold.requiredRoles) {
      const who = role === 'supervisor' ? supervisor : crew[role as keyof CrewByRole];
      const answer = await ack(who, jobId, hold.id, role);
      expect(answer.status, JSON.stringify(answer.body)).toBe(200);
    }
    return hold;
  }

  beforeAll(async () => {
    server = await startTestServer();
    crew = await signedInCrew(server);
    supervisor2 = await signedInUser(server, { qualifications: ['supervisor', 'signaller'] });
    viewer = await signedInUser(server, { qualifications: ['viewer'] });
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'R');
  });
  afterEach(() => resign());
  afterAll(() => server.stop());

  describe('readings compared with the plan', () => {
    it('a count that differs from the plan marks the step out of limit and blocks the mandatory hold of its stage until it is redone', async () => {
      const jobId = await liveJob((plan) => {
        stageOf(plan, 'er-ground').steps.push(step('er-ground.test-parts', { text: 'Count the parts of line.', records: reading({ kind: 'plan', planned: 6, tolerance: 0, source: 'configuration: main hook on 6 parts' }, 'parts') }));
      });
      await completeSteps(server, crew, jobId, 'er-ground');
      // The helper typed the planned 6; reopen it and type 5, as the rigger in the issue did.
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-ground.test-parts' })).status).toBe(200);
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-parts', value: '5' })).status).toBe(200);
      let board = await boardOf(server, crew.supervisor, jobId);
      const marked = board.stages[0].steps.find((s) => s.id === 'er-ground.test-parts')!;
      expect(marked.outOfLimit).toMatchObject({ kind: 'plan', value: '5', valueNumber: 5, planned: 6 });
      expect(marked.outOfLimit!.reason).toBe('5 parts was recorded; the plan says 6 parts.');
      // Every screen reads the same list: the console's.
      expect(outOfLimitSteps(board).map((e) => [e.stepId, e.by?.userId])).toEqual([['er-ground.test-parts', crew.rigger.user.id]]);
      // The record says it too, for whoever reads the history.
      const recorded = (await events(crew.supervisor, jobId)).filter((e) => isEventOf(e, 'step.completed')).filter((e) => e.data.stepId === 'er-ground.test-parts').at(-1)!;
      expect(recorded.data.outOfLimit).toMatchObject({ reason: '5 parts was recorded; the plan says 6 parts.' });

      const hold = await acknowledgeAll(jobId, 'er-ground');
      const refused = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
      expect(refused.status).toBe(409);
      expect(refused.body.error?.code).toBe('out_of_limit');
      expect(refused.body.error?.message).toContain('Count the parts of line.');
      expect(refused.body.error?.message).toContain('5 parts was recorded; the plan says 6 parts.');

      expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-ground.test-parts' })).status).toBe(200);
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-parts', value: '6' })).status).toBe(200);
      board = await boardOf(server, crew.supervisor, jobId);
      expect(outOfLimitSteps(board)).toEqual([]);
      await acknowledgeAll(jobId, 'er-ground');
      // Releasing the ground hold starts a stage that moves the crane: it needs a fresh reading too.
      await httpCommand(server, crew.rigger, jobId, calmWeather);
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id })).status).toBe(200);
    });

    it('words where a number is asked for are out of limit; a revision cannot loosen the figure, and a reworded step starts again', async () => {
      const jobId = await liveJob((plan) => {
        stageOf(plan, 'er-ground').steps.push(step('er-ground.test-cw', { records: reading({ kind: 'plan', planned: 65, tolerance: 0.5, source: 'crane data: raising counterweight' }, 't') }));
      });
      await completeSteps(server, crew, jobId, 'er-ground');
      await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-ground.test-cw' });
      await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-cw', value: 'checked' });
      let board = await boardOf(server, crew.supervisor, jobId);
      expect(board.stages[0].steps.find((s) => s.id === 'er-ground.test-cw')!.outOfLimit).toMatchObject({ valueNumber: null, reason: '“checked” is not a number; the plan says 65 t (±0.5 t).' });
      await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-ground.test-cw' });
      await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-cw', value: '60 t' });
      board = await boardOf(server, crew.supervisor, jobId);
      expect(board.stages[0].steps.find((s) => s.id === 'er-ground.test-cw')!.outOfLimit?.reason).toBe('60 t was recorded; the plan says 65 t (±0.5 t).');

      // A revision that moves the figure to fit the reading is refused by the plan validator.
      const plan = (await request(server.app).get(`/api/jobs/${jobId}/plan`).set(auth(crew.supervisor)).expect(200)).body.plan as Plan;
      const cw = stageOf(plan, 'er-ground').steps.find((s) => s.id === 'er-ground.test-cw')!;
      cw.records!.check = { kind: 'plan', planned: 60, tolerance: 0.5, source: 'what was fitted' };
      const loosened = await httpCommand(server, crew.supervisor, jobId, { type: 'plan.revise', plan, reason: 'Fit the plan to the crane' });
      expect(loosened.status).toBe(400);
      expect(JSON.stringify(loosened.body.error)).toMatch(/no longer held to/);
      // Reworded (counted again on the crane), the step starts again: nothing is out of limit until it is redone.
      cw.records!.check = { kind: 'plan', planned: 65, tolerance: 0.5, source: 'crane data: raising counterweight' };
      cw.text = 'Count the counterweight blocks on the crane again and record the total.';
      const revised = await httpCommand(server, crew.supervisor, jobId, { type: 'plan.revise', plan, reason: 'Counterweight to be counted again on the crane' });
      expect(revised.status, JSON.stringify(revised.body)).toBe(200);
      board = await boardOf(server, crew.supervisor, jobId);
      expect(board.stages[0].steps.find((s) => s.id === 'er-ground.test-cw')).toMatchObject({ state: 'open', outOfLimit: null });
      expect(outOfLimitSteps(board)).toEqual([]);
    });

    it('an out-of-limit reading in an earlier stage without a mandatory hold blocks the next mandatory hold that depends on it', { timeout: 60_000 }, async () => {
      const jobId = await liveJob((plan) => {
        stageOf(plan, 'er-upper').steps.push(step('er-upper.test-slope', { records: reading({ kind: 'max', limit: 1, source: 'crane data: ground slope for raising' }, '%') }));
      });
      await advanceUntilActive(server, crew, jobId, 'er-upper');
      await completeSteps(server, crew, jobId, 'er-upper');
      await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-upper.test-slope' });
      await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-upper.test-slope', value: '2.5' });
      // Work on until a mandatory hold downstream of er-upper is the next to release.
      for (let guard = 0; guard < 40; guard++) {
        const board = await boardOf(server, crew.supervisor, jobId);
        const holding = board.stages.find((s) => s.state === 'holding');
        const active = board.stages.find((s) => s.state === 'active');
        if (holding?.hold?.mandatory && upstreamOf(board, holding.id).includes('er-upper')) {
          await acknowledgeAll(jobId, holding.id);
          const refused = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: holding.hold.id });
          expect(refused.body.error?.code).toBe('out_of_limit');
          expect(refused.body.error?.message).toContain('2.5 % was recorded; the limit is at most 1 %.');
          expect(refused.body.error?.message).toContain('revise the plan so the step is done again');

          // The supervisor revises the plan: the slope is measured again. The finished stage opens for
          // that step, the blocked stage waits for it again, and the redone reading settles it.
          const plan = (await request(server.app).get(`/api/jobs/${jobId}/plan`).set(auth(crew.supervisor)).expect(200)).body.plan as Plan;
          stageOf(plan, 'er-upper').steps.find((s) => s.id === 'er-upper.test-slope')!.text = 'Measure the slope under the tracks again after the packing.';
          expect((await httpCommand(server, crew.supervisor, jobId, { type: 'plan.revise', plan, reason: 'Slope over the limit: pack and measure again' })).status).toBe(200);
          const revised = await boardOf(server, crew.supervisor, jobId);
          expect(revised.stages.find((s) => s.id === 'er-upper')?.state).toBe('active');
          expect(revised.stages.find((s) => s.id === holding.id)?.state).toBe('locked');
          expect(outOfLimitSteps(revised)).toEqual([]);
          // Version 2 of the plan: nobody works to it before they are briefed on it.
          await briefEveryone(server, crew, jobId);
          expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-upper.test-slope', value: '0.8' })).status).toBe(200);
          await acknowledgeAndRelease(server, crew, jobId, 'er-upper');
          for (let g = 0; g < 20; g++) {
            const now = await boardOf(server, crew.supervisor, jobId);
            if (now.stages.find((s) => s.id === holding.id)?.state === 'holding') break;
            const next = now.stages.find((s) => s.state === 'active' || s.state === 'holding')!;
            if (next.state === 'active') await completeSteps(server, crew, jobId, next.id);
            else await acknowledgeAndRelease(server, crew, jobId, next.id);
          }
          await acknowledgeAndRelease(server, crew, jobId, holding.id);
          expect((await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === holding.id)?.state).toBe('done');
          return;
        }
        if (holding) await acknowledgeAndRelease(server, crew, jobId, holding.id);
        else if (active) await completeSteps(server, crew, jobId, active.id);
        else break;
      }
      throw new Error('no mandatory hold after er-upper was reached');
    });
  });

  describe('readings before a hold, one walk for the screens and the server', () => {
    it('an out-of-limit reading behind an optional hold already released is listed at the next mandatory hold and refused there, the same step', { timeout: 60_000 }, async () => {
      const jobId = await liveJob((plan) => {
        stageOf(plan, 'er-upper').steps.push(step('er-upper.test-slope', { records: reading({ kind: 'max', limit: 1, source: 'crane data: ground slope for raising' }, '%') }));
        // An optional hold on the stage: the one it has (never a mandatory one), or one the planner adds.
        const upper = stageOf(plan, 'er-upper');
        if (upper.hold) expect(upper.hold.mandatory).toBe(false);
        else expect(addHold(plan, plan.stages.indexOf(upper)).ok).toBe(true);
      });
      await advanceUntilActive(server, crew, jobId, 'er-upper');
      await completeSteps(server, crew, jobId, 'er-upper');
      await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-upper.test-slope' });
      await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-upper.test-slope', value: '2.5' });
      // The optional hold does not stop for readings: it is released with the slope out of limit.
      await acknowledgeAndRelease(server, crew, jobId, 'er-upper');
      expect((await boardOf(server, crew.supervisor, jobId)).stages.find((st) => st.id === 'er-upper')?.hold?.state).toBe('released');
      for (let guard = 0; guard < 40; guard++) {
        const board = await boardOf(server, crew.supervisor, jobId);
        const holding = board.stages.find((st) => st.state === 'holding');
        const active = board.stages.find((st) => st.state === 'active');
        if (holding?.hold?.mandatory && upstreamOf(board, holding.id).includes('er-upper')) {
          await acknowledgeAll(jobId, holding.id);
          // What the hold card and the cab list (before issue 15 they stopped at the released hold and listed nothing).
          const listed = outOfLimitBeforeHold(await boardOf(server, crew.supervisor, jobId), holding.id).map((e) => e.stepId);
          expect(listed).toEqual(['er-upper.test-slope']);
          const refused = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: holding.hold.id });
          expect(refused.body.error?.code).toBe('out_of_limit');
          expect((refused.body.error?.fields ?? []).map((f: { path: string }) => f.path)).toEqual(listed.map((id) => `steps.${id}`));
          return;
        }
        if (holding) await acknowledgeAndRelease(server, crew, jobId, holding.id);
        else if (active) await completeSteps(server, crew, jobId, active.id);
        else break;
      }
      throw new Error('no mandatory hold after er-upper was reached');
    });
  });

  describe('steps in order', () => {
    it('a step with `after` is refused until those steps are done; reopening the first reopens the one after it', async () => {
      const jobId = await liveJob((plan) => {
        stageOf(plan, 'er-ground').steps.push(step('er-ground.test-exam', { text: 'Record the thorough examination.' }), step('er-ground.test-handover', { text: 'Hand the crane over.', after: ['er-ground.test-exam'] }));
      });
      const early = await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-handover' });
      expect(early.status).toBe(409);
      expect(early.body.error).toMatchObject({ code: 'out_of_order', message: 'Not yet: “Record the thorough examination.” must be done before “Hand the crane over.”.' });
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-exam' })).status).toBe(200);
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-handover' })).status).toBe(200);
      const reopened = await httpCommand(server, crew.rigger, jobId, { type: 'step.reopen', stepId: 'er-ground.test-exam' });
      expect(reopened.body).toMatchObject({ ok: true, event: { data: { alsoReopened: ['er-ground.test-handover'] } } });
      const steps = (await boardOf(server, crew.supervisor, jobId)).stages[0].steps;
      expect(steps.filter((s) => s.id.startsWith('er-ground.test-')).map((s) => s.state)).toEqual(['open', 'open']);
    });
  });

  describe('wind: one rule for the panel, the steps and the holds', () => {
    it('a gust typed into a wind step over the raising limit is out of limit, shows on the panel’s verdict and blocks the pre-raise hold', { timeout: 60_000 }, async () => {
      const jobId = await liveJob((plan) => {
        stageOf(plan, 'er-preraise').steps.push(step('er-preraise.test-gust', { text: 'Read the gust at the boom tip.', allowedRoles: ['operator'], records: reading({ kind: 'wind', phase: 'raising' }, 'm/s') }));
      });
      await advanceUntilActive(server, crew, jobId, 'er-preraise');
      await completeSteps(server, crew, jobId, 'er-preraise');
      await httpCommand(server, crew.operator, jobId, { type: 'step.reopen', stepId: 'er-preraise.test-gust' });
      expect((await httpCommand(server, crew.operator, jobId, { type: 'step.complete', stepId: 'er-preraise.test-gust', value: '14' })).status).toBe(200);
      await httpCommand(server, crew.rigger, jobId, calmWeather);
      const board = await boardOf(server, crew.supervisor, jobId);
      const verdict = weatherVerdict(board, server.context.now().getTime());
      expect(verdict.stepsOverLimit.map((s) => s.reason)).toEqual(['Gust 14 m/s is over the raising limit of 13 m/s.']);
      const hold = await acknowledgeAll(jobId, 'er-preraise');
      const refused = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
      expect(refused.body.error?.code).toBe('out_of_limit');
      expect(refused.body.error?.message).toContain('Gust 14 m/s is over the raising limit of 13 m/s.');
    });

    it('the pre-raise hold and the raise refuse an old reading; an over-limit reading stops the job and the resume', { timeout: 60_000 }, async () => {
      const jobId = await liveJob();
      await advanceUntilActive(server, crew, jobId, 'er-preraise');
      await completeSteps(server, crew, jobId, 'er-preraise');
      const hold = await acknowledgeAll(jobId, 'er-preraise');
      await httpCommand(server, crew.rigger, jobId, calmWeather);
      server.advance(16 * 60 * 1000);
      resign();
      const old = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
      expect(old.body.error).toMatchObject({ code: 'weather_required', message: 'Releasing “Ready to raise” lets the boom move: Record a new weather reading: the last one is older than 15 minutes. The supervisor, operator, signaller or rigger can record one on the weather panel.' });
      await httpCommand(server, crew.rigger, jobId, calmWeather);
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id })).status).toBe(200);

      const raise = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-raise')!;
      expect(raise.state).toBe('active');
      const first = raise.steps.find((s) => s.allowedRoles.includes('operator') && !(s.after ?? []).length)!;
      server.advance(16 * 60 * 1000);
      resign();
      const stale = await httpCommand(server, crew.operator, jobId, { type: 'step.complete', stepId: first.id, ...(first.records ? { value: '1' } : {}) });
      expect(stale.body.error?.code).toBe('weather_required');
      expect(stale.body.error?.message).toMatch(/^“Raise and test” moves the boom: Record a new weather reading/);

      // Gust 14 m/s over the raising limit of 13 m/s: the reading stops the job at once.
      await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 8.5, gustMs: 14, heightM: 30 });
      let board = await boardOf(server, crew.supervisor, jobId);
      expect(board.job).toMatchObject({ state: 'stopped', stop: { reason: 'Gust 14 m/s is over the limit of 13 m/s' } });
      expect(board.weather).toMatchObject({ gustMs: 14, heightM: 30 });
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Gusts easing' })).body.error).toMatchObject({
        code: 'weather_required',
        message: 'Work cannot resume yet: The latest reading is over the limits (Gust 14 m/s is over the limit of 13 m/s). Wait and record a new reading. The supervisor, operator, signaller or rigger can record one on the weather panel.',
      });
      // A reading to 0.1 m/s just inside the limit lets the supervisor resume, and the raise goes on.
      await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 8.9, gustMs: 12.9, heightM: 30 });
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Gusts below the limit again' })).status).toBe(200);
      expect((await httpCommand(server, crew.operator, jobId, { type: 'step.complete', stepId: first.id, ...(first.records ? { value: '1' } : {}) })).status).toBe(200);
      board = await boardOf(server, crew.supervisor, jobId);
      expect(board.weather).toMatchObject({ meanMs: 8.9, gustMs: 12.9 });
    });

    it('dismantling: the hold before lowering and the lowering itself refuse an old reading', { timeout: 60_000 }, async () => {
      const job = await plannedJob(server, crew, unitId, 'Rules dismantling');
      await request(server.app).patch(`/api/jobs/${job.id}`).set(auth(crew.supervisor)).send({ kind: 'dismantling' }).expect(200);
      await request(server.app).post(`/api/jobs/${job.id}/plan/generate`).set(auth(crew.supervisor)).expect(201);
      await request(server.app).post(`/api/jobs/${job.id}/ready`).set(auth(crew.supervisor)).expect(200);
      expect((await httpCommand(server, crew.supervisor, job.id, { type: 'job.start' })).status).toBe(200);
      await briefEveryone(server, crew, job.id);
      const lower = (await boardOf(server, crew.supervisor, job.id)).stages.find((s) => s.id === 'dm-lower')!;
      // Work every stage the lowering waits for; the last hold before it is left open.
      for (let guard = 0; guard < 30; guard++) {
        const board = await boardOf(server, crew.supervisor, job.id);
        const next = board.stages.find((s) => s.state === 'active' || s.state === 'holding')!;
        if (next.state === 'holding' && lower.dependsOn.includes(next.id) && next.hold) break;
        if (next.state === 'active') await completeSteps(server, crew, job.id, next.id);
        else await acknowledgeAndRelease(server, crew, job.id, next.id);
      }
      const before = (await boardOf(server, crew.supervisor, job.id)).stages.find((s) => s.state === 'holding')!;
      const hold = await acknowledgeAll(job.id, before.id);
      await httpCommand(server, crew.rigger, job.id, calmWeather);
      server.advance(16 * 60 * 1000);
      resign();
      const old = await httpCommand(server, crew.supervisor, job.id, { type: 'hold.release', holdId: hold.id });
      expect(old.body.error?.code).toBe('weather_required');
      await httpCommand(server, crew.rigger, job.id, calmWeather);
      expect((await httpCommand(server, crew.supervisor, job.id, { type: 'hold.release', holdId: hold.id })).status).toBe(200);
      const active = (await boardOf(server, crew.supervisor, job.id)).stages.find((s) => s.id === 'dm-lower')!;
      expect(active.state).toBe('active');
      server.advance(16 * 60 * 1000);
      resign();
      const first = inStepOrder(active.steps)[0];
      const who = crew[first.allowedRoles.find((r) => r !== 'viewer') as keyof CrewByRole];
      const photoId = first.requiresPhoto ? await uploadPhoto(server, who) : undefined;
      const stale = await httpCommand(server, who, job.id, { type: 'step.complete', stepId: first.id, ...(first.records ? { value: readingWithinLimit(first) } : {}), ...(photoId ? { photoId } : {}) });
      expect(stale.body.error?.message).toMatch(/^“Lower the boom onto blocking” moves the boom: Record a new weather reading/);
    });

    it('weather readings take one decimal, up to at least 40 m/s, and say at what height they were taken', async () => {
      const jobId = await liveJob();
      const noHeight = await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 3, gustMs: 5 } as never);
      expect(noHeight.status).toBe(400);
      expect(noHeight.body.error?.fields?.map((f) => f.path)).toContain('heightM');
      const twoDecimals = await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 3.25, gustMs: 5, heightM: 2 });
      expect(twoDecimals.body.error?.fields?.map((f) => f.path)).toEqual(['meanMs']);
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 6.5, gustMs: 7.5, heightM: 2 })).status).toBe(200);
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.weather).toMatchObject({ meanMs: 6.5, gustMs: 7.5, heightM: 2 });
      expect(weatherVerdict(board, server.context.now().getTime()).caution).toMatch(/^Read at 2 m above ground/);
      // A storm is recorded as it is (and stops the job), not refused by the form.
      const storm = await httpCommand(server, crew.rigger, jobId, { type: 'weather.record', meanMs: 32.4, gustMs: 40.8, heightM: 10 });
      expect(storm.status).toBe(200);
      expect((await boardOf(server, crew.supervisor, jobId)).job.state).toBe('stopped');
    });
  });

  describe('the blind configuration check', () => {
    it('a failed check names no field to the person checking, records who/when/which fields for the supervisor, makes them read again, and locks after three', { timeout: 60_000 }, async () => {
      const jobId = await liveJob();
      await advanceUntilActive(server, crew, jobId, 'er-config');
      await completeSteps(server, crew, jobId, 'er-config');
      const hold = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-config')!.hold!;
      const check = async (who: SignedInUser, role: string, values: Record<string, string>, photoId?: string) =>
        httpCommand(server, who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: role as never, values, photoId: photoId ?? (await uploadPhoto(server, who)) });

      const firstPhoto = await uploadPhoto(server, crew.operator);
      const commandId = randomUUID();
      const failing = { type: 'hold.acknowledge', holdId: hold.id, role: 'operator', values: { ...controllerValues18m, parts: '4' }, photoId: firstPhoto } as const;
      const wrong = await httpCommand(server, crew.operator, jobId, failing, commandId);
      expect(wrong.status).toBe(409);
      // The same command sent again (a retry after a lost answer) gets the same refusal and is recorded once.
      expect(await httpCommand(server, crew.operator, jobId, failing, commandId)).toEqual(wrong);
      expect((await events(crew.supervisor, jobId)).filter((e) => e.type === 'hold.check.failed')).toHaveLength(1);
      expect(wrong.body.error?.code).toBe('values_mismatch');
      expect(wrong.body.error?.fields).toBeUndefined();
      expect(wrong.body.error?.message).not.toMatch(/parts|boom length|hook|counterweight|mode/i);

      // The supervisor sees the failure with the field; the operator's own board and event feed do not.
      let supervisorBoard = await boardOf(server, crew.supervisor, jobId);
      const failures = supervisorBoard.stages.find((s) => s.id === 'er-config')!.hold!.checkFailures;
      expect(failures).toEqual([expect.objectContaining({ userId: crew.operator.user.id, role: 'operator', fields: ['parts'] })]);
      const operatorBoard = await boardOf(server, crew.operator, jobId);
      expect(operatorBoard.stages.find((s) => s.id === 'er-config')!.hold!.checkFailures).toEqual([expect.objectContaining({ userId: crew.operator.user.id, fields: null })]);
      const failedEvent = (log: JobEventDto[]) => log.find((e) => e.type === 'hold.check.failed')!;
      expect(failedEvent(await events(crew.supervisor, jobId)).data).toMatchObject({ fields: ['parts'], role: 'operator' });
      expect(failedEvent(await events(crew.operator, jobId)).data.fields).toBeNull();
      // Never the values, typed or expected, in the record.
      expect(JSON.stringify(failedEvent(await events(crew.supervisor, jobId)).data)).not.toMatch(/HB120|"4"|"6"|lifting/);
      // The operator's copy of the log replays to the operator's snapshot.
      const { presence: _p, ...operatorSnapshot } = operatorBoard;
      expect(replay(await events(crew.operator, jobId))).toEqual(operatorSnapshot);

      // Read the controller again: not straight away, and not with the old photo.
      expect((await check(crew.operator, 'operator', controllerValues18m)).body.error?.code).toBe('check_wait');
      server.advance(31_000);
      const samePhoto = await check(crew.operator, 'operator', controllerValues18m, firstPhoto);
      expect(samePhoto.body.error?.fields?.map((f) => f.path)).toEqual(['photoId']);
      expect((await check(crew.operator, 'operator', { ...controllerValues18m, counterweightT: '60' })).body.error?.code).toBe('values_mismatch');
      const third = await check(crew.signaller, 'signaller', { ...controllerValues18m, operatingMode: 'assembly' });
      expect(third.body.error?.message).toMatch(/locked until the supervisor has reviewed/);
      server.advance(31_000);
      expect((await check(crew.operator, 'operator', controllerValues18m)).body.error?.code).toBe('check_locked');
      supervisorBoard = await boardOf(server, crew.supervisor, jobId);
      expect(supervisorBoard.stages.find((s) => s.id === 'er-config')!.hold).toMatchObject({ checkLocked: true, failuresSinceReview: 3 });
      expect(supervisorBoard.stages.find((s) => s.id === 'er-config')!.hold!.checkFailures.map((f) => f.fields)).toEqual([['parts'], ['counterweightT'], ['operatingMode']]);

      // Only a supervisor reviews; then the check may be tried again, and the right values pass.
      expect((await httpCommand(server, crew.operator, jobId, { type: 'hold.check.review', holdId: hold.id, note: 'unlock' })).status).toBe(403);
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'hold.check.review', holdId: hold.id, note: 'Went through the controller screens with both; operating mode menu explained.' })).status).toBe(200);
      expect((await check(crew.operator, 'operator', controllerValues18m)).status).toBe(200);
      expect((await check(crew.signaller, 'signaller', controllerValues18m)).status).toBe(200);
      // The signaller checked blind: the operator's values never reached them.
      const operatorAck = (log: JobEventDto[]) => log.filter((e) => isEventOf(e, 'hold.acknowledged')).find((e) => e.data.holdId === hold.id && e.data.role === 'operator')!;
      expect(operatorAck(await events(crew.signaller, jobId)).data.values).toBeNull();
      expect(operatorAck(await events(crew.supervisor, jobId)).data.values).toEqual(controllerValues18m);
      const after = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-config')!.hold!;
      expect(after).toMatchObject({ state: 'acknowledged', checkLocked: false, failuresSinceReview: 0, lastReview: { userId: crew.supervisor.user.id } });
      expect(after.checkFailures).toHaveLength(3);
    });
  });

  describe('who releases and who stops', () => {
    it('the acting supervisor who acknowledged as signaller cannot release the same hold; another supervisor can only once the job is handed over to them (only the acting supervisor releases)', async () => {
      const jobId = await liveJob(() => {}, [{ userId: supervisor2.user.id, role: 'signaller' }]);
      const handOver = async (from: SignedInUser, to: SignedInUser) => {
        expect((await httpCommand(server, from, jobId, { type: 'handover.write', hazards: 'None beyond the plan', note: 'Ground hold under way.', toUserId: to.user.id })).status).toBe(200);
        expect((await httpCommand(server, to, jobId, { type: 'handover.acknowledge' })).status).toBe(200);
      };
      // supervisor2, also the signaller, takes the job over and so becomes the acting supervisor.
      await handOver(crew.supervisor, supervisor2);
      await completeSteps(server, crew, jobId, 'er-ground');
      const hold = (await boardOf(server, crew.supervisor, jobId)).stages[0].hold!;
      expect(hold.requiredRoles).toEqual(expect.arrayContaining(['supervisor', 'signaller']));
      for (const role of hold.requiredRoles) {
        const who = role === 'signaller' ? supervisor2 : crew[role as keyof CrewByRole];
        expect((await ack(who, jobId, hold.id, role)).status).toBe(200);
      }
      await httpCommand(server, crew.rigger, jobId, calmWeather);
      const alone = await httpCommand(server, supervisor2, jobId, { type: 'hold.release', holdId: hold.id });
      expect(alone.status).toBe(409);
      expect(alone.body.error?.code).toBe('one_person_two_roles');
      expect(alone.body.error?.message).toMatch(new RegExp(`^You acknowledged “${hold.title}” as signaller; another supervisor must release it`));
      // Before issue 17 any other supervisor released it; now only the acting one does.
      const notActing = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
      expect(notActing.status).toBe(403);
      expect(notActing.body.error?.code).toBe('not_acting_supervisor');
      expect(notActing.body.error?.message).toContain(`Only the acting supervisor, ${supervisor2.user.displayName},`);
      await handOver(supervisor2, crew.supervisor);
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id })).status).toBe(200);
    });

    it('a viewer may raise a stop; its cause is recorded by whoever pressed it or a supervisor before the supervisor resumes', async () => {
      const jobId = await liveJob();
      const stop = await httpCommand(server, viewer, jobId, { type: 'job.stop', pressedAt: new Date().toISOString() });
      expect(stop.status).toBe(200);
      expect((await boardOf(server, crew.supervisor, jobId)).job).toMatchObject({ state: 'stopped', stop: { raisedBy: { userId: viewer.user.id, role: 'viewer' }, reason: null } });
      // A viewer acts on nothing else.
      expect((await httpCommand(server, viewer, jobId, calmWeather)).body.error?.code).toBe('role_not_allowed');
      // A second press keeps the first stop and is listed beside it.
      expect((await httpCommand(server, crew.signaller, jobId, { type: 'job.stop', pressedAt: new Date().toISOString() })).status).toBe(200);
      await httpCommand(server, crew.rigger, jobId, calmWeather);
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'All clear' })).body.error?.code).toBe('stop_cause_required');
      expect((await httpCommand(server, crew.rigger, jobId, { type: 'job.stop.note', reason: 'Someone said so' })).body.error?.code).toBe('role_not_allowed');
      expect((await httpCommand(server, viewer, jobId, { type: 'job.stop.note', reason: 'A walker came through the gate on the footpath side' })).status).toBe(200);
      const board = await boardOf(server, crew.supervisor, jobId);
      expect(board.job.stop).toMatchObject({ reason: 'A walker came through the gate on the footpath side', raisedBy: { userId: viewer.user.id }, alsoPressedBy: [expect.objectContaining({ userId: crew.signaller.user.id })] });
      expect((await httpCommand(server, crew.operator, jobId, { type: 'job.resume', reason: 'All clear' })).body.error?.code).toBe('role_not_allowed');
      // The signaller's second press came seconds ago: the resume waits until it can have been seen.
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Gate closed and marshalled' })).body.error?.code).toBe('stop_pressed_again');
      server.advance(RESUME_AFTER_PRESS_MS);
      expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.resume', reason: 'Gate closed and marshalled' })).status).toBe(200);
    });
  });

  describe('plan revisions go through the plan validator', () => {
    it('a revision whose raise stage waits only for the ground stage is refused, naming the hold it would bypass', async () => {
      const jobId = await liveJob();
      await completeSteps(server, crew, jobId, 'er-ground');
      await acknowledgeAndRelease(server, crew, jobId, 'er-ground');
      const plan = (await request(server.app).get(`/api/jobs/${jobId}/plan`).set(auth(crew.supervisor)).expect(200)).body.plan as Plan;
      stageOf(plan, 'er-raise').dependsOn = ['er-ground'];
      const refused = await httpCommand(server, crew.supervisor, jobId, { type: 'plan.revise', plan, reason: 'Raise straight away' });
      expect(refused.status).toBe(409);
      expect(refused.body.error?.code).toBe('mandatory_hold');
      expect(refused.body.error?.message).toMatch(/Ready to raise|Configuration checked against the plan/);
      // Nothing changed on the board: the raise stage is still locked.
      expect((await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-raise')?.state).toBe('locked');
    });
  });
});

/** A stage and every stage it waits for, directly or not. */
function upstreamOf(board: BoardState, stageId: string): string[] {
  const byId = new Map(board.stages.map((s) => [s.id, s]));
  const seen = new Set<string>();
  const queue = [stageId];
  while (queue.length) {
    const id = queue.shift()!;
    if (seen.has(id)) continue;
    seen.add(id);
    queue.push(...(byId.get(id)?.dependsOn ?? []));
  }
  return [...seen];
}
