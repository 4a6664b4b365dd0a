import { execFileSync } from 'node:child_process';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { planEnvelopeSchema, planVersionListSchema, type Plan } from '../../../shared/schemas/plan.js';
import { jobEnvelopeSchema, readinessSchema } from '../../../shared/schemas/jobs.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob, type Crew } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

describe('plans: draft, edits, mandatory holds, ready and versions', () => {
  let server: TestServer;
  let crew: Crew;
  let viewer: SignedInUser;
  let unitId: string;
  const as = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const getPlan = async (jobId: string, who = crew.supervisor) => planEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/plan`).set(as(who)).expect(200)).body);

  beforeAll(async () => {
    server = await startTestServer();
    crew = await signedInCrew(server);
    viewer = await signedInUser(server, { qualifications: ['viewer'] });
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'PL');
  });
  afterAll(() => server.stop());

  it('saving the configuration generates the draft; ready locks version 1 and later edits are refused with 409', async () => {
    const job = await plannedJob(server, crew, unitId);
    const draft = await getPlan(job.id);
    expect(draft).toMatchObject({ version: 0, locked: false, stale: false, problems: [] });
    expect(draft.plan.stages.length).toBeGreaterThan(5);

    const readiness = readinessSchema.parse((await request(server.app).get(`/api/jobs/${job.id}/readiness`).set(as(crew.supervisor)).expect(200)).body);
    expect(readiness).toEqual({ ready: true, reasons: [] });
    const ready = jobEnvelopeSchema.parse((await request(server.app).post(`/api/jobs/${job.id}/ready`).set(as(crew.supervisor)).expect(200)).body).job;
    expect(ready).toMatchObject({ state: 'ready', planVersion: 1 });

    const locked = await getPlan(job.id);
    expect(locked).toMatchObject({ version: 1, locked: true });
    expect(locked.plan).toEqual(draft.plan);
    const edit = await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(draft.plan).expect(409);
    expect(edit.body.error.code).toBe('invalid_state');
    await request(server.app).put(`/api/jobs/${job.id}/configuration`).set(as(crew.supervisor)).send(job.configuration!).expect(409);
    await request(server.app).post(`/api/jobs/${job.id}/ready`).set(as(crew.supervisor)).expect(409);

    const versions = planVersionListSchema.parse((await request(server.app).get(`/api/jobs/${job.id}/plan/versions`).set(as(crew.operator)).expect(200)).body);
    expect(versions.items.map((v) => v.version)).toEqual([1]);
  });

  it('only the job’s supervisors edit the plan', async () => {
    const job = await plannedJob(server, crew, unitId);
    const { plan } = await getPlan(job.id);
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.operator)).send(plan).expect(403);
    const outsider = await signedInUser(server, { qualifications: ['supervisor'] });
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(outsider)).send(plan).expect(403);
    const edited: Plan = structuredClone(plan);
    edited.stages[0].steps[0].text = 'Walk the whole site with the client’s engineer first';
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(edited).expect(200);
    expect((await getPlan(job.id)).plan.stages[0].steps[0].text).toBe('Walk the whole site with the client’s engineer first');
  });

  it('a hand edit rebuilds the briefing from the edited stages', async () => {
    const job = await plannedJob(server, crew, unitId);
    const { plan } = await getPlan(job.id);
    const edited: Plan = structuredClone(plan);
    const stage = edited.stages.find((s) => s.hold && !s.hold.mandatory)!;
    stage.hold!.title = 'Counterweight and gauge checked against the plan, both sides';
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(edited).expect(200);
    const saved = await getPlan(job.id);
    expect(JSON.stringify(saved.plan.briefing)).toContain('Counterweight and gauge checked against the plan, both sides');
  });

  it('mandatory holds and their required roles cannot be removed', async () => {
    const job = await plannedJob(server, crew, unitId);
    const { plan } = await getPlan(job.id);
    const index = plan.stages.findIndex((s) => s.hold?.mandatory);
    expect(index).toBeGreaterThanOrEqual(0);

    const withoutHold: Plan = structuredClone(plan);
    withoutHold.stages[index].hold = null;
    expect((await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(withoutHold).expect(409)).body.error.code).toBe('mandatory_hold');

    const notMandatory: Plan = structuredClone(plan);
    notMandatory.stages[index].hold!.mandatory = false;
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(notMandatory).expect(409);

    const fewerRoles: Plan = structuredClone(plan);
    const hold = fewerRoles.stages.find((s) => s.hold?.mandatory && s.hold.requiredRoles.length > 1)!.hold!;
    hold.requiredRoles = hold.requiredRoles.slice(1);
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(fewerRoles).expect(409);

    const stageGone: Plan = structuredClone(plan);
    stageGone.stages.splice(index, 1);
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(stageGone).expect(409);
  });

  it('a cycle or an unreachable stage stops ready with a reason', async () => {
    const job = await plannedJob(server, crew, unitId);
    const { plan } = await getPlan(job.id);
    const cyclic: Plan = structuredClone(plan);
    cyclic.stages[0].dependsOn = [cyclic.stages[1].id];
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(cyclic).expect(200);
    const refused = await request(server.app).post(`/api/jobs/${job.id}/ready`).set(as(crew.supervisor)).expect(409);
    expect(refused.body.error.code).toBe('not_ready');
    expect(refused.body.error.fields.map((f: { path: string }) => f.path)).toContain('plan_cycle');

    const unknown: Plan = structuredClone(plan);
    unknown.stages[2].dependsOn = ['no-such-stage'];
    await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(unknown).expect(200);
    const reasons = readinessSchema.parse((await request(server.app).get(`/api/jobs/${job.id}/readiness`).set(as(crew.supervisor)).expect(200)).body);
    expect(reasons.reasons.map((r) => r.code)).toEqual(expect.arrayContaining(['plan_unknown_dependency']));
    expect(reasons.ready).toBe(false);
  });

  it('ready is refused with every readiness reason when a role is missing', async () => {
    const job = await plannedJob(server, crew, unitId);
    await request(server.app).put(`/api/jobs/${job.id}/crew`).set(as(crew.supervisor)).send({ members: [{ userId: crew.supervisor.user.id, role: 'supervisor' }] }).expect(200);
    const refused = await request(server.app).post(`/api/jobs/${job.id}/ready`).set(as(crew.supervisor)).expect(409);
    const codes = refused.body.error.fields.map((f: { path: string }) => f.path);
    expect(codes).toEqual(expect.arrayContaining(['crew_operator', 'crew_signaller', 'plan_holds_need_more_people']));
  });

  it('people who acknowledge holds never see a value check’s expected values', async () => {
    const job = await plannedJob(server, crew, unitId);
    const full = await getPlan(job.id);
    const hidden = await getPlan(job.id, crew.operator);
    const check = (p: Plan) => p.stages.flatMap((s) => s.hold?.valueCheck?.fields ?? []);
    expect(check(full.plan).length).toBeGreaterThan(0);
    expect(check(full.plan).find((f) => f.field === 'boomLengthM')?.expected).toBe('18');
    expect(check(hidden.plan).every((f) => f.expected === '(hidden)')).toBe(true);
    await request(server.app).get(`/api/jobs/${job.id}/plan`).set(as(viewer)).expect(403);
  });

  it('the plan PDF lists every stage, step and hold in order', async () => {
    const job = await plannedJob(server, crew, unitId);
    const { plan } = await getPlan(job.id);
    const res = await request(server.app)
      .get(`/api/jobs/${job.id}/plan.pdf`)
      .set(as(crew.rigger))
      .buffer(true)
      .parse((r, cb) => {
        const chunks: Buffer[] = [];
        r.on('data', (c: Buffer) => chunks.push(c));
        r.on('end', () => cb(null, Buffer.concat(chunks)));
      })
      .expect(200);
    const text = execFileSync('pdftotext', ['-raw', '-', '-'], { input: res.body as Buffer }).toString('utf8').replace(/\s+/g, '');
    let cursor = 0;
    for (const stage of plan.stages) {
      for (const piece of [stage.title, ...stage.steps.map((s) => s.text), ...(stage.hold ? [stage.hold.title] : [])]) {
        const at = text.indexOf(piece.replace(/\s+/g, ''), cursor);
        expect(at, `"${piece}" after position ${cursor}`).toBeGreaterThanOrEqual(0);
        cursor = at;
      }
    }
  });
});
