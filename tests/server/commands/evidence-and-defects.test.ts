import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Plan } from '../../../shared/schemas/plan.js';
import { Component } from '../../../server/entities/Component.js';
import { Inspection } from '../../../server/entities/Inspection.js';
import { Job } from '../../../server/entities/Job.js';
import { Upload } from '../../../server/entities/Upload.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { boardOf, briefEveryone, httpCommand, signedInCrew, uploadPhoto, type CrewByRole } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Two defects found by probing the board as a hostile crew member would (issue 18), each of which
 * this file showed before the fix: one photo stood as the evidence for two steps or defects of the
 * same job (a photo attached to a job was "already this job's"), and a defect report on one job's
 * board quarantined a component of another crane unit. The tests run in order on one live job.
 */
describe('evidence photos and defect reports stay with their own record and crane', () => {
  let server: TestServer;
  let crew: CrewByRole;
  let admin: SignedInUser;
  let jobId: string;
  /** Component ids by serial: A-… on the job's unit, B-T1 on another unit, S-… spares on no unit. */
  const parts: Record<string, string> = {};

  const auth = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const lastSeq = async () => (await server.context.dataSource.manager.findOneByOrFail(Job, { id: jobId })).lastSeq;
  const componentOf = (serial: string) => server.context.dataSource.manager.findOneByOrFail(Component, { id: parts[serial] });
  const uploadOf = (id: string) => server.context.dataSource.manager.findOneByOrFail(Upload, { id });
  const inspectionsOf = (serial: string) => server.context.dataSource.manager.countBy(Inspection, { componentId: parts[serial] });

  beforeAll(async () => {
    server = await startTestServer();
    crew = await signedInCrew(server);
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const { model, unit } = await seedModelAndUnit(server, admin.token, 'FL-01');
    Object.assign(parts, await addParts18m(server, admin.token, model.id, unit.id, 'A'));
    const other = (await request(server.app).post('/api/crane-units').set(auth(admin)).send({ fleetNumber: 'FL-02', modelId: model.id, location: 'Depot' }).expect(201)).body.unit as { id: string };
    for (const [serial, unitId] of [
      ['B-T1', other.id],
      ['S-T1', null],
      ['S-T2', null],
    ] as const) {
      const res = await request(server.app).post('/api/components').set(auth(admin)).send({ serial, kind: 'section', typeId: 'tip', modelId: model.id, unitId }).expect(201);
      parts[serial] = res.body.component.id as string;
    }

    const job = await plannedJob(server, crew, unit.id, 'Evidence job');
    jobId = job.id;
    // A step that records a part's serial as fitted, so a spare can become part of this crane.
    const plan = (await request(server.app).get(`/api/jobs/${jobId}/plan`).set(auth(crew.supervisor)).expect(200)).body.plan as Plan;
    plan.stages.find((s) => s.id === 'er-ground')!.steps.push({
      id: 'er-ground.test-fitted',
      text: 'Record the serial of the spare tip fitted today.',
      allowedRoles: ['rigger'],
      requiresPhoto: false,
      records: { kind: 'serial', label: 'Spare tip serial', unit: null, componentKind: null, typeId: null, plannedSerial: null, check: null },
      caution: null,
    });
    await request(server.app).put(`/api/jobs/${jobId}/plan`).set(auth(crew.supervisor)).send({ plan }).expect(200);
    await request(server.app).post(`/api/jobs/${jobId}/ready`).set(auth(crew.supervisor)).expect(200);
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, crew, jobId);
  });
  afterAll(() => server.stop());

  it('one photo is the evidence of one step: the second step is refused (photo_already_used) and nothing is recorded', async () => {
    const ground = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-ground')!;
    const [first, second] = ground.steps.filter((s) => s.allowedRoles.includes('supervisor') && !s.records && !s.after?.length);
    expect(second, 'two supervisor steps on the ground stage').toBeDefined();
    const photo = await uploadPhoto(server, crew.supervisor);
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'step.complete', stepId: first!.id, photoId: photo })).status).toBe(200);
    const seq = await lastSeq();

    const again = await httpCommand(server, crew.supervisor, jobId, { type: 'step.complete', stepId: second!.id, photoId: photo });
    expect(again.status).toBe(409);
    expect(again.body.error).toMatchObject({ code: 'photo_already_used', fields: [{ path: 'photoId', message: expect.stringMatching(/already the evidence for a step/) }] });
    // Nor as the photo of a defect on the same job.
    const asDefect = await httpCommand(server, crew.supervisor, jobId, { type: 'defect.report', stepId: second!.id, description: 'Mat edge cracked along the grain', photoId: photo });
    expect(asDefect.status).toBe(409);
    expect(asDefect.body.error?.code).toBe('photo_already_used');
    expect(await lastSeq()).toBe(seq);
    expect((await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-ground')!.steps.find((s) => s.id === second!.id)!.state).toBe('open');
    expect(await uploadOf(photo)).toMatchObject({ ownerKind: 'step', ownerId: jobId });

    // A photo of its own is accepted.
    const own = await uploadPhoto(server, crew.supervisor);
    expect((await httpCommand(server, crew.supervisor, jobId, { type: 'step.complete', stepId: second!.id, photoId: own })).status).toBe(200);
  });

  it('a defect report quarantines only a part of this job’s crane: another unit’s part and an unfitted spare are refused, untouched', async () => {
    const photo = await uploadPhoto(server, crew.rigger);
    const seq = await lastSeq();
    for (const serial of ['B-T1', 'S-T1']) {
      const answer = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', componentId: parts[serial], description: 'Bent lacing on the tip section', photoId: photo });
      expect(answer.status, serial).toBe(409);
      expect(answer.body.error).toMatchObject({ code: 'component_not_on_job', fields: [{ path: 'componentId' }] });
      expect(answer.body.error?.message).toContain(`${serial} is not a part of this job’s crane`);
      expect((await componentOf(serial)).status).toBe('serviceable');
      expect(await inspectionsOf(serial)).toBe(0);
    }
    expect(await lastSeq()).toBe(seq);
    expect((await uploadOf(photo)).ownerKind).toBeNull();

    // A part of the job's own unit is quarantined, in the same commit as the event.
    const own = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', componentId: parts['A-I3A'], description: 'Dent in the top chord of the insert', photoId: photo });
    expect(own.status, JSON.stringify(own.body)).toBe(200);
    expect((await componentOf('A-I3A')).status).toBe('quarantined');
  });

  it('a spare recorded as fitted by a step of this board is part of this crane for a defect report', async () => {
    expect((await httpCommand(server, crew.rigger, jobId, { type: 'step.complete', stepId: 'er-ground.test-fitted', value: 'S-T2' })).status).toBe(200);
    const answer = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', componentId: parts['S-T2'], description: 'Pin bore worn oval on the spare tip', photoId: await uploadPhoto(server, crew.rigger) });
    expect(answer.status, JSON.stringify(answer.body)).toBe(200);
    expect((await componentOf('S-T2')).status).toBe('quarantined');
    // The other spare stays refused: fitting one part does not admit the rest.
    const other = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', componentId: parts['S-T1'], description: 'Bent lacing on the tip section', photoId: await uploadPhoto(server, crew.rigger) });
    expect(other.body.error?.code).toBe('component_not_on_job');
  });

  it('two defect reports cannot share one photo, nor can a defect reuse an inspection’s photo', async () => {
    const ground = (await boardOf(server, crew.supervisor, jobId)).stages.find((s) => s.id === 'er-ground')!;
    const photo = await uploadPhoto(server, crew.rigger);
    const first = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', stepId: ground.steps[0]!.id, description: 'Mat edge cracked along the grain', photoId: photo });
    expect(first.status, JSON.stringify(first.body)).toBe(200);
    const seq = await lastSeq();
    const second = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', stepId: ground.steps[1]!.id, description: 'Plate corner lifted by the crawler', photoId: photo });
    expect([second.status, second.body.error?.code]).toEqual([409, 'photo_already_used']);
    const onPart = await httpCommand(server, crew.rigger, jobId, { type: 'defect.report', componentId: parts['A-T1'], description: 'Crack at the tip head weld', photoId: photo });
    expect([onPart.status, onPart.body.error?.code]).toEqual([409, 'photo_already_used']);
    expect(await lastSeq()).toBe(seq);
    expect((await componentOf('A-T1')).status).toBe('serviceable');
  });
});
