import { readFileSync } from 'node:fs';
import path from 'node:path';
import request from 'supertest';
import type { ArrangementData, AssistCrane } from '../../shared/schemas/arrangement.js';
import type { CraneModelDto, CraneUnitDto } from '../../shared/schemas/fleet.js';
import type { TestServer } from './server.js';

const dataDir = path.resolve(import.meta.dirname, '..', '..', 'server', 'demo', 'data');

/** The invented demo crane model's arrangement file, as raw JSON. */
export function demoArrangement(): ArrangementData {
  return JSON.parse(readFileSync(path.join(dataDir, 'crane-model.json'), 'utf8')) as ArrangementData;
}

/** The invented demo assist crane's data. */
export function demoAssistCraneData(): AssistCrane {
  return JSON.parse(readFileSync(path.join(dataDir, 'assist-crane.json'), 'utf8')) as AssistCrane;
}

/** Imports the demo model and adds a unit, through the API, as someone allowed to. */
export async function seedModelAndUnit(server: TestServer, token: string, fleetNumber = 'FL-01'): Promise<{ model: CraneModelDto; unit: CraneUnitDto }> {
  const auth = { Authorization: `Bearer ${token}` };
  const imported = await request(server.app).post('/api/crane-models/import').set(auth).send(demoArrangement());
  const model =
    imported.status === 201
      ? (imported.body.model as CraneModelDto)
      : ((await request(server.app).get('/api/crane-models').set(auth)).body.items as CraneModelDto[]).find((m) => m.arrangementId === demoArrangement().id)!;
  const unit = await request(server.app).post('/api/crane-units').set(auth).send({ fleetNumber, modelId: model.id, location: 'Yard' }).expect(201);
  return { model: model as CraneModelDto, unit: unit.body.unit as CraneUnitDto };
}

/** Registers the parts of the 18 m boom (base, 3 m insert, tip, its guy lines, the HB120 block and a hoist rope) on a unit. */
export async function addParts18m(server: TestServer, token: string, modelId: string, unitId: string, prefix: string): Promise<Record<string, string>> {
  const auth = { Authorization: `Bearer ${token}` };
  const parts: [string, 'section' | 'guy_line' | 'hook_block' | 'rope', string][] = [
    [`${prefix}-HB120`, 'hook_block', 'HB120'],
    [`${prefix}-R28`, 'rope', 'R28-hoist'],
    [`${prefix}-B1`, 'section', 'base'],
    [`${prefix}-I3A`, 'section', 'ins3'],
    [`${prefix}-T1`, 'section', 'tip'],
    ...(['GT', 'G3', 'GB'] as const).flatMap((mark): [string, 'guy_line', string][] => [
      [`${prefix}-${mark}-L`, 'guy_line', mark],
      [`${prefix}-${mark}-R`, 'guy_line', mark],
    ]),
  ];
  const ids: Record<string, string> = {};
  for (const [serial, kind, typeId] of parts) {
    const res = await request(server.app).post('/api/components').set(auth).send({ serial, kind, typeId, modelId, unitId }).expect(201);
    ids[serial] = res.body.component.id as string;
  }
  return ids;
}
