import request from 'supertest';
import type { Configuration } from '../../shared/schemas/configuration.js';
import { jobEnvelopeSchema, motions, type JobDto } from '../../shared/schemas/jobs.js';
import type { SignedInUser } from './auth.js';
import type { TestServer } from './server.js';

/** The assist crane's pads and tandem raise as the schema defaults them: nothing entered. */
export const noAssistPads: Configuration['assist']['pads'] = { kind: 'outrigger', loadT: null, lengthM: null, widthM: null, weightKg: 0 };
export const noTandem: Configuration['assist']['tandem'] = { alongFromTipM: null, sideM: null, releaseAngleDeg: null, hookBlockT: 0, slingsT: 0, shacklesT: 0, deductionsT: 0 };

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
    assist: { assistCraneId: null, chartId: null, lifts: [], pads: noAssistPads, tandem: noTandem },
    siteHazards: { powerLines: [], buriedServices: '', neighbours: '', loadAndTagLineAllowanceM: 3, swayAllowanceM: 2 },
    fallZoneMarginM: 5,
    chartCautionPercent: 75,
    weatherFreshMinutes: 15,
    ...overrides,
  };
}

export interface Crew {
  supervisor: SignedInUser;
  operator: SignedInUser;
  signaller: SignedInUser;
  rigger: SignedInUser;
}

/** Creates a job as the supervisor, puts the crew (and `extraCrew`) on it and saves the 18 m configuration. */
export async function plannedJob(server: TestServer, crew: Crew, unitId: string, name = 'Planned job', extraCrew: readonly { userId: string; role: string }[] = []): Promise<JobDto> {
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
        ...extraCrew,
      ],
    })
    .expect(200);
  // Readiness asks for every motion to be directed by a crew member with a call sign.
  await request(server.app)
    .patch(`/api/jobs/${created.id}`)
    .set(auth)
    .send({
      commsPlan: {
        radioChannel: 'Channel 2',
        callSigns: [
          { userId: crew.supervisor.user.id, callSign: 'Lead' },
          { userId: crew.operator.user.id, callSign: 'Cab' },
          { userId: crew.signaller.user.id, callSign: 'Signals' },
          { userId: crew.rigger.user.id, callSign: 'Rigger' },
        ],
        motionSignallers: motions.map((motion) => ({ motion, userId: crew.signaller.user.id })),
        fallbackHandSignals: 'Stop, Emergency Stop, Hoist, Lower, Raise Boom, Lower Boom, Swing, Travel, Move Slowly',
      },
    })
    .expect(200);
  const configured = await request(server.app).put(`/api/jobs/${created.id}/configuration`).set(auth).send(configuration18m(unitId)).expect(200);
  return jobEnvelopeSchema.parse(configured.body).job;
}
