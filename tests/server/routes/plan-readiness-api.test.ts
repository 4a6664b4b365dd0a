// Readiness and the plan through the real app: a motion nobody with a call sign directs keeps the
// job in planning, and a hand edit that takes a mandatory hold out of a stage's way is refused.
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { readinessSchema } from '../../../shared/schemas/jobs.js';
import { planEnvelopeSchema, type Plan } from '../../../shared/schemas/plan.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { signedInCrew } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob, type Crew } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

describe('plan readiness: communications and mandatory holds', () => {
  let server: TestServer;
  let crew: Crew;
  let unitId: string;
  const as = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const readiness = async (jobId: string) => readinessSchema.parse((await request(server.app).get(`/api/jobs/${jobId}/readiness`).set(as(crew.supervisor)).expect(200)).body);

  beforeAll(async () => {
    server = await startTestServer();
    crew = await signedInCrew(server);
    const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'RD');
  });
  afterAll(() => server.stop());

  it('a motion without a director, or directed by someone without a call sign, is a readiness reason', async () => {
    const job = await plannedJob(server, crew, unitId);
    expect(await readiness(job.id)).toEqual({ ready: true, reasons: [] });

    const comms = job.commsPlan;
    await request(server.app)
      .patch(`/api/jobs/${job.id}`)
      .set(as(crew.supervisor))
      .send({ commsPlan: { ...comms, motionSignallers: comms.motionSignallers.filter((m) => m.motion !== 'swing') } })
      .expect(200);
    const noSwing = await readiness(job.id);
    expect(noSwing.ready).toBe(false);
    expect(noSwing.reasons.filter((r) => r.code.startsWith('comms_'))).toEqual([{ code: 'comms_motion_unassigned', message: expect.stringMatching(/^Nobody directs the swing/) }]);

    await request(server.app)
      .patch(`/api/jobs/${job.id}`)
      .set(as(crew.supervisor))
      .send({ commsPlan: { ...comms, callSigns: comms.callSigns.filter((c) => c.userId !== crew.signaller.user.id) } })
      .expect(200);
    const noCallSign = await readiness(job.id);
    // 18 m without auxiliary hoist or assist crane: boom hoist, main hoist, swing and travel.
    expect(noCallSign.reasons.filter((r) => r.code === 'comms_motion_no_call_sign')).toHaveLength(4);
    const plan = planEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).expect(200)).body).plan;
    expect(JSON.stringify(plan)).not.toMatch(/not in the crew list/);
  });

  it('a hand edit whose raise stage waits only for the site stage is refused, naming the holds', async () => {
    const job = await plannedJob(server, crew, unitId);
    const { plan } = planEnvelopeSchema.parse((await request(server.app).get(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).expect(200)).body);
    const rewired: Plan = structuredClone(plan);
    const raise = rewired.stages.find((s) => s.id === 'er-raise');
    if (!raise) throw new Error('no raise stage');
    raise.dependsOn = ['er-ground'];
    const refused = await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(rewired).expect(409);
    expect(refused.body.error.code).toBe('mandatory_hold');
    expect(refused.body.error.fields.map((f: { message: string }) => f.message).join('\n')).toMatch(/“Ready to raise”/);

    const noWind: Plan = structuredClone(plan);
    const pre = noWind.stages.find((s) => s.id === 'er-preraise');
    if (!pre) throw new Error('no pre-raise stage');
    pre.steps = pre.steps.filter((s) => s.id !== 'er-preraise.wind');
    const refusedWind = await request(server.app).put(`/api/jobs/${job.id}/plan`).set(as(crew.supervisor)).send(noWind).expect(409);
    expect(refusedWind.body.error.fields[0].message).toMatch(/It protects the mandatory hold “Ready to raise”/);
  });
});
