import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { demoAssistCraneData, seedModelAndUnit } from '../../helpers/fleet.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * A fleet number names one crane and a serial one part, whatever the letter case (issue 18:
 * `fl-07` beside `FL-07` was accepted as another unit). The commands compare case-folded
 * (Unicode), and unique indexes that ignore ASCII case back them up in the database.
 */
describe('fleet numbers and serials are one identity whatever their letter case', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let modelId: string;
  let unitId: string;
  const auth = () => ({ Authorization: `Bearer ${admin.token}` });
  const newUnit = (fleetNumber: string) => request(server.app).post('/api/crane-units').set(auth()).send({ fleetNumber, modelId, location: 'Yard' });
  const newPart = (serial: string) => request(server.app).post('/api/components').set(auth()).send({ serial, kind: 'section', typeId: 'tip', modelId, unitId });

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const seeded = await seedModelAndUnit(server, admin.token, 'FL-07');
    modelId = seeded.model.id;
    unitId = seeded.unit.id;
  });
  afterAll(() => server.stop());

  it('refuses a crane unit or assist crane whose fleet number differs from a unit’s only by case, naming the one there', async () => {
    for (const fleetNumber of ['fl-07', 'Fl-07', ' fL-07 ']) {
      const res = await newUnit(fleetNumber).expect(409);
      expect(res.body.error).toMatchObject({ code: 'fleet_number_taken', message: expect.stringContaining('already in use as FL-07') });
    }
    const assist = await request(server.app).post('/api/assist-cranes').set(auth()).send({ fleetNumber: 'fl-07', operatorName: 'Ola Brandt', data: demoAssistCraneData() }).expect(409);
    expect(assist.body.error.code).toBe('fleet_number_taken');
    // And the other way round: a unit may not take an assist crane's number.
    await request(server.app).post('/api/assist-cranes').set(auth()).send({ fleetNumber: 'AC-03', operatorName: 'Ola Brandt', data: demoAssistCraneData() }).expect(201);
    expect((await newUnit('ac-03').expect(409)).body.error.code).toBe('fleet_number_taken');
    expect((await request(server.app).get('/api/crane-units').set(auth()).expect(200)).body.items).toHaveLength(1);
  });

  it('refuses renaming another unit to a case variant, and lets a unit correct the case of its own number', async () => {
    const other = (await newUnit('FL-12').expect(201)).body.unit as { id: string };
    expect((await request(server.app).patch(`/api/crane-units/${other.id}`).set(auth()).send({ fleetNumber: 'fl-07' }).expect(409)).body.error.code).toBe('fleet_number_taken');
    const own = await request(server.app).patch(`/api/crane-units/${other.id}`).set(auth()).send({ fleetNumber: 'Fl-12' }).expect(200);
    expect(own.body.unit.fleetNumber).toBe('Fl-12');
  });

  it('refuses a component serial that differs from a registered one only by case, in any script', async () => {
    await newPart('F07-TIP-01').expect(201);
    const res = await newPart('f07-tip-01').expect(409);
    expect(res.body.error).toMatchObject({ code: 'serial_taken', message: expect.stringContaining('already registered as F07-TIP-01') });
    // Beyond ASCII: Ä/ä and Σ/σ are one letter each in two cases.
    await newPart('KRAN-Ä-Σ1').expect(201);
    expect((await newPart('kran-ä-σ1').expect(409)).body.error.code).toBe('serial_taken');
    // A different serial is still welcome.
    await newPart('F07-TIP-02').expect(201);
  });

  it('the database itself refuses an ASCII case variant written past the commands', async () => {
    const { manager } = server.context.dataSource;
    await expect(
      manager.query("INSERT INTO crane_unit (id, fleet_number, model_id, serial_number, location, notes, created_at, updated_at) VALUES ('00000000-0000-4000-8000-0000000000aa', 'fl-07', ?, '', '', '', '', '')", [modelId]),
    ).rejects.toThrow(/UNIQUE constraint failed: crane_unit\.fleet_number/);
    await expect(
      manager.query("INSERT INTO component (id, serial, kind, type_id, model_id, unit_id, location, status, created_at, updated_at) VALUES ('00000000-0000-4000-8000-0000000000ab', 'f07-TIP-01', 'section', 'tip', ?, NULL, '', 'serviceable', '', '')", [modelId]),
    ).rejects.toThrow(/UNIQUE constraint failed: component\.serial/);
  });
});
