import { readFileSync } from 'node:fs';
import path from 'node:path';
import { arrangementDataSchema, assistCraneSchema } from '../../shared/schemas/arrangement.js';
import type { ComponentKind } from '../../shared/schemas/fleet.js';
import type { AppContext } from '../context.js';
import { createAssistCrane, createComponent, createCraneUnit, recordInspection, saveCraneModel } from '../commands/fleet.js';
import { storeUpload } from '../commands/uploads.js';
import type { User } from '../entities/User.js';
import { demoPhoto } from './photos.js';

const dataDir = path.join(import.meta.dirname, 'data');
const readJson = (name: string): unknown => JSON.parse(readFileSync(path.join(dataDir, name), 'utf8'));

/** Ids of what the fleet seed made, for the job seeds that follow. */
export interface DemoFleet {
  modelId: string;
  unitId: string;
  secondUnitId: string;
  assistCraneId: string;
}

/**
 * The invented fleet: the 250-tonne-class model, two units (a full kit on FL-07, a short kit on
 * FL-12), one assist crane, and a few parts quarantined after inspections with photos.
 */
export async function seedDemoFleet(context: AppContext, people: { supervisor: User; rigger: User }): Promise<DemoFleet> {
  const arrangement = arrangementDataSchema.parse(readJson('crane-model.json'));
  const { model } = await saveCraneModel(context, arrangement, { replace: false });
  const unit = await createCraneUnit(context, { fleetNumber: 'FL-07', modelId: model.id, serialNumber: 'MHW250-0419', location: 'Harrowmere substation, north laydown', notes: 'Full boom kit to 90 m on site.' });
  const second = await createCraneUnit(context, { fleetNumber: 'FL-12', modelId: model.id, serialNumber: 'MHW250-0533', location: 'Fenwold depot', notes: 'Short kit; in for track roller service.' });
  const assist = await createAssistCrane(context, {
    fleetNumber: 'AC-03',
    operatorName: 'Dara Quill',
    operatorUserId: null,
    location: 'Harrowmere substation',
    data: assistCraneSchema.parse(readJson('assist-crane.json')),
  });

  const kit: [ComponentKind, string, number][] = [
    ['section', 'base', 1],
    ['section', 'ins3', 1],
    ['section', 'ins6', 1],
    ['section', 'ins12', 6],
    ['section', 'tip', 1],
    ['guy_line', 'GT', 2],
    ['guy_line', 'GB', 2],
    ['guy_line', 'G3', 2],
    ['guy_line', 'G6', 2],
    ['guy_line', 'G12', 12],
    ['hook_block', 'HB160', 1],
    ['hook_block', 'HB120', 1],
    ['hook_block', 'BALL12', 1],
    ['rope', 'R28-hoist', 2],
    ['rope', 'R22-boom', 1],
  ];
  const serials = new Map<string, string>();
  for (const [kind, typeId, count] of kit) {
    for (let n = 1; n <= count; n++) {
      const serial = `F07-${typeId.toUpperCase()}-${String(n).padStart(2, '0')}`;
      const component = await createComponent(context, { serial, kind, typeId, modelId: model.id, unitId: unit.id, location: 'North laydown' });
      serials.set(serial, component.id);
    }
  }
  for (const [kind, typeId] of [['section', 'base'], ['section', 'ins6'], ['section', 'tip'], ['guy_line', 'GT'], ['guy_line', 'GT'], ['guy_line', 'G6'], ['guy_line', 'G6'], ['guy_line', 'GB'], ['guy_line', 'GB'], ['hook_block', 'HB45'], ['rope', 'R28-hoist']] as const) {
    const n = [...serials.keys()].filter((s) => s.startsWith(`F12-${typeId.toUpperCase()}-`)).length + 1;
    const serial = `F12-${typeId.toUpperCase()}-${String(n).padStart(2, '0')}`;
    const component = await createComponent(context, { serial, kind, typeId, modelId: model.id, unitId: second.id, location: 'Fenwold depot' });
    serials.set(serial, component.id);
  }

  const now = context.now();
  const inspect = async (serial: string, result: 'serviceable' | 'damaged' | 'repaired', notes: string, by: User, photo?: { caption: string; mark: 'dent' | 'wires' | 'weld' }, daysAgo = 1) => {
    const photoIds = photo ? [(await storeUpload(context, by, { buffer: await demoPhoto(photo.caption, photo.mark) })).id] : [];
    const at = new Date(now.getTime() - daysAgo * 86_400_000);
    await context.queue.transaction((m) => recordInspection(m, serials.get(serial)!, { result, notes, photoIds }, by, at));
  };

  // Pre-delivery inspections of the whole kit, then the finds that quarantined three parts.
  for (const serial of serials.keys()) await inspect(serial, 'serviceable', 'Pre-delivery check: no findings.', people.supervisor, undefined, 6);
  await inspect('F07-INS12-06', 'damaged', 'Dent about 8 mm deep in a top chord, 1.2 m from the foot end. Out of service until assessed.', people.rigger, { caption: 'F07-INS12-06 top chord dent', mark: 'dent' });
  await inspect('F07-G12-12', 'damaged', 'Three broken wires in one lay next to the socket.', people.rigger, { caption: 'F07-G12-12 broken wires at socket', mark: 'wires' });
  await inspect('F07-BALL12-01', 'damaged', 'Crack indication in the weld at the swivel housing; sent for testing.', people.supervisor, { caption: 'F07-BALL12-01 weld crack', mark: 'weld' });

  return { modelId: model.id, unitId: unit.id, secondUnitId: second.id, assistCraneId: assist.id };
}
