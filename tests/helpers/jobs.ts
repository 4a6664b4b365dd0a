import request from 'supertest';
import type { Configuration } from '../../shared/schemas/configuration.js';
import { jobEnvelopeSchema, type JobDto } from '../../shared/schemas/jobs.js';
import type { SignedInUser } from './auth.js';
import type { TestServer } from './server.js';

/** A complete configuration for the demo model's 18 m boom that a unit with the 18 m kit can build. */
export function configuration18m(craneUnitId: string, overrides: Partial<Configuration> = {}): Configuration {
  return {
    craneUnitId,
    boomLengthM: 18,
    mainHook: { hookBlockId: 'HB120', parts: 6, lowestHookPositionM: 0 },
    auxiliary: { enabled: false, hookBlockId: null },
    heaviestLoad: { description: 'Transformer core, 20 t', loadT: 20, riggingT: 0.8, radiusM: 8 },
    ground: { groundType: 'medium dense gravel', allowablePressureKpa: 400, source: { kind: 'ground_investigation', reference: 'GI report T-001', designer: '' } },
    mats: { used: false, lengthM: 5, widthM: 1.2, thicknessM: 0.3, weightKg: 1100 },
    assist: { assistCraneId: null, chartId: null, lifts: [] },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '', loadAndTagLineAllowanceM: 3, swayAllowanceM: 2 },
    fallZoneMarginM: 5,
    ...overrides,
  };
}

export interface Crew {
  supervisor: SignedInUser;
  operator: SignedInUser;
  signaller: SignedInUser;
  rigger: SignedInUser;
}

/** Creates a job as the supervisor, puts the crew on it and saves the 18 m configuration. */
export async function plannedJob(server: TestServer, crew: Crew, unitId: string, name = 'Planned job'): Promise<JobDto> {
  const auth = { Authorization: `Bearer ${crew.supervisor.token}` };
  const created = jobEnvelopeSchema.parse((await request(server.app).post('/api/jobs').set(auth).send({ name, site: 'North yard', craneUnitId: unitId, kind: 'erection' }).expect(201)).body).job;
  await request(server.app)
    .put(`/api/jobs/${created.id}/crew`)
    .set(auth)
    .send({
      members: [
        { userId: crew.supervisor.user.id, role: 'supervisor' },
        { userId: crew.operator.user.id, role: 'operator' },
        { userId: crew.signaller.user.id, role: 'signaller' },
        { userId: crew.rigger.user.id, role: 'rigger' },
      ],
    })
    .expect(200);
  const configured = await request(server.app).put(`/api/jobs/${created.id}/configuration`).set(auth).send(configuration18m(unitId)).expect(200);
  return jobEnvelopeSchema.parse(configured.body).job;
}
