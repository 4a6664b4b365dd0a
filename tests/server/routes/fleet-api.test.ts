import sharp from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { arrangementDataSchema } from '../../../shared/schemas/arrangement.js';
import { componentDetailSchema, componentListSchema, craneModelListSchema, inspectionCreatedSchema } from '../../../shared/schemas/fleet.js';
import { CraneModel } from '../../../server/entities/CraneModel.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { addParts18m, demoArrangement, demoAssistCraneData, seedModelAndUnit } from '../../helpers/fleet.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

describe('fleet: models, units, assist cranes, components and inspections', () => {
  let server: TestServer;
  let supervisor: SignedInUser;
  let rigger: SignedInUser;
  let viewer: SignedInUser;
  let operator: SignedInUser;
  let modelId: string;
  let unitId: string;
  let parts: Record<string, string>;
  const as = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });

  beforeAll(async () => {
    server = await startTestServer();
    supervisor = await signedInUser(server, { qualifications: ['supervisor'] });
    rigger = await signedInUser(server, { qualifications: ['rigger'] });
    viewer = await signedInUser(server, { qualifications: ['viewer'] });
    operator = await signedInUser(server, { qualifications: ['operator'] });
    const seeded = await seedModelAndUnit(server, supervisor.token);
    modelId = seeded.model.id;
    unitId = seeded.unit.id;
    parts = await addParts18m(server, supervisor.token, modelId, unitId, 'A');
  });
  afterAll(() => server.stop());

  describe('crane models', () => {
    it('exports the demo model and re-imports it identically', async () => {
      const exported = await request(server.app).get(`/api/crane-models/${modelId}/arrangement`).set(as(viewer)).expect(200);
      expect(exported.headers['content-disposition']).toMatch(/attachment; filename="?mhw-250l\.arrangement\.json"?/);
      const file = JSON.parse(exported.text) as object;
      expect(file).toEqual(arrangementDataSchema.parse(demoArrangement()));

      await request(server.app).post('/api/crane-models/import').set(as(supervisor)).send(file).expect(409);
      const replaced = await request(server.app).post('/api/crane-models/import?replace=1').set(as(supervisor)).send(file).expect(200);
      expect(replaced.body.model.id).toBe(modelId);
      const again = await request(server.app).get(`/api/crane-models/${modelId}/arrangement`).set(as(supervisor)).expect(200);
      expect(again.text).toBe(exported.text);
    });

    it('refuses a file with three errors, reports all three paths and saves nothing', async () => {
      const before = await server.context.dataSource.manager.count(CraneModel);
      const bad = structuredClone(demoArrangement()) as unknown as Record<string, unknown>;
      bad.id = 'broken-model';
      (bad.sectionTypes as { weightKg: number }[])[1].weightKg = -5;
      (bad.tracks as { shoeWidthM: unknown }).shoeWidthM = 'wide';
      delete bad.platesThresholdBoomLengthM;
      const res = await request(server.app).post('/api/crane-models/import').set(as(supervisor)).send(bad).expect(400);
      expect(res.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(['platesThresholdBoomLengthM', 'sectionTypes.1.weightKg', 'tracks.shoeWidthM']);
      expect(await server.context.dataSource.manager.count(CraneModel)).toBe(before);
    });

    it('lists models with their boom lengths; 401, 403, 404 as they should be', async () => {
      const list = craneModelListSchema.parse((await request(server.app).get('/api/crane-models').set(as(viewer)).expect(200)).body);
      expect(list.items[0]).toMatchObject({ manufacturer: 'Marrowgate Heavy Works', model: 'MHW 250L', unitCount: 1 });
      expect(list.items[0].boomLengthsM[0]).toBe(18);
      await request(server.app).get('/api/crane-models').expect(401);
      await request(server.app).post('/api/crane-models/import').set(as(rigger)).send(demoArrangement()).expect(403);
      await request(server.app).get('/api/crane-models/00000000-0000-4000-8000-000000000000').set(as(viewer)).expect(404);
      await request(server.app).get('/api/crane-models/not-an-id').set(as(viewer)).expect(404);
      const badPost = await request(server.app).post('/api/crane-models').set(as(supervisor)).send({ arrangement: { schemaVersion: 3 } }).expect(400);
      expect(badPost.body.error.fields.length).toBeGreaterThan(3);
    });
  });

  describe('crane units', () => {
    it('creates, reads and changes a unit; names bad fields; refuses a taken fleet number', async () => {
      const created = await request(server.app).post('/api/crane-units').set(as(supervisor)).send({ fleetNumber: 'FL-02', modelId, serialNumber: 'SN-2', location: 'Depot' }).expect(201);
      expect(created.body.unit).toMatchObject({ fleetNumber: 'FL-02', modelName: 'Marrowgate Heavy Works MHW 250L', componentCounts: { serviceable: 0, quarantined: 0, retired: 0 } });
      const bad = await request(server.app).post('/api/crane-units').set(as(supervisor)).send({ fleetNumber: '', modelId: 'x' }).expect(400);
      expect(bad.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(['fleetNumber', 'modelId']);
      expect((await request(server.app).post('/api/crane-units').set(as(supervisor)).send({ fleetNumber: 'FL-02', modelId }).expect(409)).body.error.code).toBe('fleet_number_taken');
      const changed = await request(server.app).patch(`/api/crane-units/${created.body.unit.id}`).set(as(supervisor)).send({ location: 'North gate' }).expect(200);
      expect(changed.body.unit.location).toBe('North gate');
      await request(server.app).patch(`/api/crane-units/${created.body.unit.id}`).set(as(operator)).send({ location: 'x' }).expect(403);
      await request(server.app).get(`/api/crane-units/${created.body.unit.id}`).set(as(viewer)).expect(200);
      await request(server.app).get('/api/crane-units/00000000-0000-4000-8000-000000000000').set(as(viewer)).expect(404);
      await request(server.app).get('/api/crane-units').expect(401);
    });
  });

  describe('assist cranes', () => {
    it('adds an assist crane with its charts and its operator; refuses a bad chart', async () => {
      const created = await request(server.app)
        .post('/api/assist-cranes')
        .set(as(supervisor))
        .send({ fleetNumber: 'AC-01', operatorName: 'Ola Brandt', data: demoAssistCraneData() })
        .expect(201);
      expect(created.body.assistCrane.data.charts.length).toBeGreaterThan(0);
      const list = await request(server.app).get('/api/assist-cranes').set(as(viewer)).expect(200);
      expect(list.body.items.map((c: { fleetNumber: string }) => c.fleetNumber)).toContain('AC-01');
      await request(server.app).get(`/api/assist-cranes/${created.body.assistCrane.id}`).set(as(viewer)).expect(200);
      const data = demoAssistCraneData();
      data.charts[0].points[2].radiusM = 1;
      const bad = await request(server.app).post('/api/assist-cranes').set(as(supervisor)).send({ fleetNumber: 'AC-02', operatorName: 'X', data }).expect(400);
      expect(bad.body.error.fields[0].path).toBe('data.charts.0.points.2.radiusM');
      await request(server.app).post('/api/assist-cranes').set(as(rigger)).send({ fleetNumber: 'AC-03', operatorName: 'X', data: demoAssistCraneData() }).expect(403);
    });
  });

  describe('components and inspections', () => {
    it('refuses a type the model does not have, a unit of another model and a taken serial', async () => {
      const wrongType = await request(server.app).post('/api/components').set(as(supervisor)).send({ serial: 'Z-1', kind: 'section', typeId: 'ins9', modelId }).expect(400);
      expect(wrongType.body.error.fields).toEqual([{ path: 'typeId', message: expect.stringContaining('ins9') }]);
      expect((await request(server.app).post('/api/components').set(as(supervisor)).send({ serial: 'A-B1', kind: 'section', typeId: 'base', modelId }).expect(409)).body.error.code).toBe('serial_taken');
      await request(server.app).post('/api/components').set(as(rigger)).send({ serial: 'Z-2', kind: 'section', typeId: 'base', modelId }).expect(403);
    });

    it('filters the list by type, status, unit and serial', async () => {
      const sections = componentListSchema.parse((await request(server.app).get(`/api/components?type=section&unitId=${unitId}`).set(as(viewer)).expect(200)).body);
      expect(sections.items.map((c) => c.serial)).toEqual(['A-B1', 'A-I3A', 'A-T1']);
      expect(sections.items[1]).toMatchObject({ typeLabel: 'Insert 3 m', unitFleetNumber: 'FL-01', status: 'serviceable', lastInspection: null });
      const search = componentListSchema.parse((await request(server.app).get('/api/components?q=GT').set(as(viewer)).expect(200)).body);
      expect(search.items.map((c) => c.serial)).toEqual(['A-GT-L', 'A-GT-R']);
      await request(server.app).get('/api/components?status=broken').set(as(viewer)).expect(400);
    });

    it('a damaged insert is quarantined and stops the boom, naming the serial; a passing inspection frees it', async () => {
      const before = await request(server.app).get(`/api/crane-units/${unitId}/boom-makeup?lengthM=18`).set(as(viewer)).expect(200);
      expect(before.body.makeup).toMatchObject({ buildable: true, reasons: [] });
      expect(before.body.makeup.sections.map((s: { serial: string }) => s.serial)).toEqual(['A-B1', 'A-I3A', 'A-T1']);

      const photo = await sharp({ create: { width: 640, height: 480, channels: 3, background: '#8a6d3b' } }).jpeg().toBuffer();
      const upload = await request(server.app).post('/api/uploads').set(as(rigger)).attach('file', photo, 'dent.jpg').expect(201);

      const noNotes = await request(server.app).post(`/api/components/${parts['A-I3A']}/inspections`).set(as(rigger)).send({ result: 'damaged' }).expect(400);
      expect(noNotes.body.error.fields[0].path).toBe('notes');
      await request(server.app).post(`/api/components/${parts['A-I3A']}/inspections`).set(as(viewer)).send({ result: 'serviceable' }).expect(403);
      await request(server.app).post(`/api/components/${parts['A-I3A']}/inspections`).set(as(operator)).send({ result: 'serviceable' }).expect(403);

      const damaged = inspectionCreatedSchema.parse(
        (await request(server.app).post(`/api/components/${parts['A-I3A']}/inspections`).set(as(rigger)).send({ result: 'damaged', notes: 'Dent in a top chord near the foot end', photoIds: [upload.body.id] }).expect(201)).body,
      );
      expect(damaged.component.status).toBe('quarantined');
      expect(damaged.inspection.photos[0].id).toBe(upload.body.id);
      const img = await request(server.app).get(damaged.inspection.photos[0].thumbnailUrl).expect(200);
      expect(img.headers['content-type']).toMatch(/^image\//);

      const refused = await request(server.app).get(`/api/crane-units/${unitId}/boom-makeup?lengthM=18`).set(as(viewer)).expect(200);
      expect(refused.body.makeup.buildable).toBe(false);
      expect(refused.body.makeup.reasons.join(' ')).toContain('A-I3A');
      const quarantined = componentListSchema.parse((await request(server.app).get('/api/components?status=quarantined').set(as(viewer)).expect(200)).body);
      expect(quarantined.items.map((c) => c.serial)).toEqual(['A-I3A']);
      expect(quarantined.items[0].lastInspection).toMatchObject({ result: 'damaged', byName: rigger.user.displayName });

      await request(server.app).post(`/api/components/${parts['A-I3A']}/inspections`).set(as(supervisor)).send({ result: 'repaired', notes: 'Chord straightened and re-inspected' }).expect(201);
      const after = await request(server.app).get(`/api/crane-units/${unitId}/boom-makeup?lengthM=18`).set(as(viewer)).expect(200);
      expect(after.body.makeup.buildable).toBe(true);

      const detail = componentDetailSchema.parse((await request(server.app).get(`/api/components/${parts['A-I3A']}`).set(as(viewer)).expect(200)).body);
      expect(detail.inspections.map((i) => i.result)).toEqual(['repaired', 'damaged']);
    });

    it('never builds a length the arrangement data does not list', async () => {
      const res = await request(server.app).get(`/api/crane-units/${unitId}/boom-makeup?lengthM=19`).set(as(viewer)).expect(200);
      expect(res.body.makeup.buildable).toBe(false);
      expect(res.body.makeup.reasons[0]).toMatch(/19/);
      await request(server.app).get(`/api/crane-units/${unitId}/boom-makeup?lengthM=abc`).set(as(viewer)).expect(400);
    });

    it('retiring keeps the history and takes the part out of every plan', async () => {
      await request(server.app).patch(`/api/components/${parts['A-T1']}`).set(as(supervisor)).send({ retire: { reason: '' } }).expect(400);
      const retired = await request(server.app).patch(`/api/components/${parts['A-T1']}`).set(as(supervisor)).send({ retire: { reason: 'Cracked weld beyond repair' } }).expect(200);
      expect(retired.body.component).toMatchObject({ status: 'retired', retiredReason: 'Cracked weld beyond repair' });
      expect((await request(server.app).post(`/api/components/${parts['A-T1']}/inspections`).set(as(rigger)).send({ result: 'serviceable' }).expect(409)).body.error.code).toBe('component_retired');
      await request(server.app).get(`/api/components/${parts['A-T1']}/inspections`).set(as(viewer)).expect(200);
      const makeup = await request(server.app).get(`/api/crane-units/${unitId}/boom-makeup?lengthM=18`).set(as(viewer)).expect(200);
      expect(makeup.body.makeup.buildable).toBe(false);
    });

    it('answers 404 for unknown components and 401 without sign-in', async () => {
      await request(server.app).get('/api/components/00000000-0000-4000-8000-000000000000').set(as(viewer)).expect(404);
      await request(server.app).post('/api/components/00000000-0000-4000-8000-000000000000/inspections').set(as(rigger)).send({ result: 'serviceable' }).expect(404);
      await request(server.app).get('/api/components').expect(401);
    });
  });
});
