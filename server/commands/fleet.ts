import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import type { ArrangementData } from '../../shared/schemas/arrangement.js';
import type { InspectionResult } from '../../shared/schemas/fleet.js';
import type { z } from 'zod';
import type {
  createAssistCraneSchema,
  createComponentSchema,
  createCraneUnitSchema,
  createInspectionSchema,
  updateComponentSchema,
  updateCraneUnitSchema,
} from '../../shared/schemas/fleet.js';
import { componentTypeLabel } from '../../shared/fleet/type-labels.js';
import type { AppContext } from '../context.js';
import { AssistCrane } from '../entities/AssistCrane.js';
import { Component } from '../entities/Component.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Inspection } from '../entities/Inspection.js';
import { User } from '../entities/User.js';
import { badRequest, conflict, notFound } from '../errors.js';
import { attachUploads } from './uploads.js';

type Input<S extends z.ZodType> = z.output<S>;

/** Saves a new crane model; its arrangement id must be new unless `replace` is set. */
export async function saveCraneModel(context: AppContext, arrangement: ArrangementData, options: { replace: boolean }): Promise<{ model: CraneModel; created: boolean }> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    const existing = await manager.findOneBy(CraneModel, { arrangementId: arrangement.id });
    if (existing && !options.replace) {
      throw conflict('model_exists', `A crane model with the arrangement id "${arrangement.id}" already exists. Import again with "replace" to update it.`);
    }
    if (existing) {
      await assertComponentTypesKept(manager, existing.id, arrangement);
      existing.arrangement = arrangement;
      existing.updatedAt = now;
      return { model: await manager.save(existing), created: false };
    }
    const model = manager.create(CraneModel, { id: randomUUID(), arrangementId: arrangement.id, arrangement, createdAt: now, updatedAt: now });
    return { model: await manager.save(model), created: true };
  });
}

/** Replaces a model's arrangement data. */
export async function updateCraneModel(context: AppContext, modelId: string, arrangement: ArrangementData): Promise<CraneModel> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    const model = await manager.findOneBy(CraneModel, { id: modelId });
    if (!model) throw notFound('That crane model');
    if (arrangement.id !== model.arrangementId && (await manager.existsBy(CraneModel, { arrangementId: arrangement.id }))) {
      throw conflict('model_exists', `Another crane model already has the arrangement id "${arrangement.id}".`);
    }
    await assertComponentTypesKept(manager, model.id, arrangement);
    model.arrangementId = arrangement.id;
    model.arrangement = arrangement;
    model.updatedAt = now;
    return manager.save(model);
  });
}

/** Refuses new arrangement data that would leave physical components with a type it no longer has. */
async function assertComponentTypesKept(manager: EntityManager, modelId: string, arrangement: ArrangementData): Promise<void> {
  const components = await manager.findBy(Component, { modelId });
  const orphans = components.filter((c) => c.status !== 'retired' && componentTypeLabel(arrangement, c.kind, c.typeId) === null);
  if (orphans.length > 0) {
    const list = orphans.slice(0, 5).map((c) => `${c.serial} (${c.typeId})`).join(', ');
    throw conflict('types_in_use', `The new arrangement data drops types still used by components: ${list}${orphans.length > 5 ? '…' : ''}.`);
  }
}

/**
 * How two fleet numbers or serials are compared: Unicode-normalised (NFKC) and without letter
 * case, so `fl-07` is `FL-07`. What people type is stored as typed.
 */
export function identityKey(value: string): string {
  return value.normalize('NFKC').toUpperCase();
}

/**
 * Refuses a fleet number that another crane unit or assist crane already has, letter case
 * ignored: on site one fleet number names one crane. The tables are small and every write goes
 * through the one queue, so comparing in code here is exact; unique indexes that ignore ASCII
 * case back it up (migration FleetIdentityNoCase).
 */
async function assertFleetNumberFree(manager: EntityManager, fleetNumber: string, exceptUnitId?: string): Promise<void> {
  const key = identityKey(fleetNumber);
  const units = await manager.find(CraneUnit, { select: { id: true, fleetNumber: true } });
  const assists = await manager.find(AssistCrane, { select: { id: true, fleetNumber: true } });
  const taken = [...units.filter((u) => u.id !== exceptUnitId), ...assists].find((c) => identityKey(c.fleetNumber) === key);
  if (taken) {
    throw conflict('fleet_number_taken', taken.fleetNumber === fleetNumber ? `Fleet number ${fleetNumber} is already in use.` : `Fleet number ${fleetNumber} is already in use as ${taken.fleetNumber}: letter case does not make another crane.`);
  }
}

/** Adds a crane unit by fleet number. */
export async function createCraneUnit(context: AppContext, input: Input<typeof createCraneUnitSchema>): Promise<CraneUnit> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    if (!(await manager.existsBy(CraneModel, { id: input.modelId }))) throw badRequest('Choose a crane model that exists.', [{ path: 'modelId', message: 'No such crane model' }]);
    await assertFleetNumberFree(manager, input.fleetNumber);
    return manager.save(manager.create(CraneUnit, { id: randomUUID(), ...input, createdAt: now, updatedAt: now }));
  });
}

/** Changes a crane unit's facts. */
export async function updateCraneUnit(context: AppContext, unitId: string, changes: Input<typeof updateCraneUnitSchema>): Promise<CraneUnit> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    const unit = await manager.findOneBy(CraneUnit, { id: unitId });
    if (!unit) throw notFound('That crane unit');
    if (changes.modelId && changes.modelId !== unit.modelId) {
      if (!(await manager.existsBy(CraneModel, { id: changes.modelId }))) throw badRequest('Choose a crane model that exists.', [{ path: 'modelId', message: 'No such crane model' }]);
      if (await manager.existsBy(Component, { unitId })) throw conflict('unit_has_components', 'Move or retire this unit’s components before changing its model.');
    }
    if (changes.fleetNumber && changes.fleetNumber !== unit.fleetNumber) await assertFleetNumberFree(manager, changes.fleetNumber, unit.id);
    Object.assign(unit, changes, { updatedAt: now });
    return manager.save(unit);
  });
}

/** Adds an assist crane with its charts. */
export async function createAssistCrane(context: AppContext, input: Input<typeof createAssistCraneSchema>): Promise<AssistCrane> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    await assertFleetNumberFree(manager, input.fleetNumber);
    if (input.operatorUserId && !(await manager.existsBy(User, { id: input.operatorUserId }))) {
      throw badRequest('Choose an operator who has an account, or leave it empty.', [{ path: 'operatorUserId', message: 'No such person' }]);
    }
    return manager.save(manager.create(AssistCrane, { id: randomUUID(), ...input, createdAt: now }));
  });
}

/** Registers a physical component; its type must exist in its model's arrangement data. */
export async function createComponent(context: AppContext, input: Input<typeof createComponentSchema>): Promise<Component> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    const model = await manager.findOneBy(CraneModel, { id: input.modelId });
    if (!model) throw badRequest('Choose a crane model that exists.', [{ path: 'modelId', message: 'No such crane model' }]);
    if (componentTypeLabel(model.arrangement, input.kind, input.typeId) === null) {
      throw badRequest('That type is not in the model’s arrangement data.', [{ path: 'typeId', message: `No ${input.kind.replace('_', ' ')} type "${input.typeId}" in this model` }]);
    }
    await assertUnitOfModel(manager, input.unitId, model.id);
    const sameSerial = (await manager.find(Component, { select: { id: true, serial: true } })).find((c) => identityKey(c.serial) === identityKey(input.serial));
    if (sameSerial) throw conflict('serial_taken', sameSerial.serial === input.serial ? `Serial number ${input.serial} is already registered.` : `Serial number ${input.serial} is already registered as ${sameSerial.serial}: letter case does not make another part.`);
    return manager.save(manager.create(Component, { id: randomUUID(), ...input, status: 'serviceable', retiredReason: null, createdAt: now, updatedAt: now }));
  });
}

async function assertUnitOfModel(manager: EntityManager, unitId: string | null, modelId: string): Promise<void> {
  if (!unitId) return;
  const unit = await manager.findOneBy(CraneUnit, { id: unitId });
  if (!unit) throw badRequest('Choose a crane unit that exists.', [{ path: 'unitId', message: 'No such crane unit' }]);
  if (unit.modelId !== modelId) throw badRequest('That unit is another model.', [{ path: 'unitId', message: `Unit ${unit.fleetNumber} is not this component's model` }]);
}

/** Moves a component or retires it for good; history stays. */
export async function updateComponent(context: AppContext, componentId: string, changes: Input<typeof updateComponentSchema>): Promise<Component> {
  const now = context.now().toISOString();
  return context.queue.transaction(async (manager) => {
    const component = await manager.findOneBy(Component, { id: componentId });
    if (!component) throw notFound('That component');
    if (component.status === 'retired') throw conflict('component_retired', `${component.serial} is retired; its record is kept but it cannot change.`);
    if (changes.unitId !== undefined) {
      await assertUnitOfModel(manager, changes.unitId, component.modelId);
      component.unitId = changes.unitId;
    }
    if (changes.location !== undefined) component.location = changes.location;
    if (changes.retire) {
      component.status = 'retired';
      component.retiredReason = changes.retire.reason;
    }
    component.updatedAt = now;
    return manager.save(component);
  });
}

/** The status an inspection leaves a component in. */
export function statusAfterInspection(result: InspectionResult): 'serviceable' | 'quarantined' {
  return result === 'damaged' ? 'quarantined' : 'serviceable';
}

/**
 * Records an inspection and sets the component's status from it: damage quarantines the part
 * everywhere until a later inspection passes it. Runs in the caller's transaction so a board
 * defect report can quarantine in the same commit as its event.
 */
export async function recordInspection(
  manager: EntityManager,
  componentId: string,
  input: Input<typeof createInspectionSchema>,
  actor: User,
  at: Date,
): Promise<{ inspection: Inspection; component: Component }> {
  const component = await manager.findOneBy(Component, { id: componentId });
  if (!component) throw notFound('That component');
  if (component.status === 'retired') throw conflict('component_retired', `${component.serial} is retired and is no longer inspected.`);
  const inspection = manager.create(Inspection, {
    id: randomUUID(),
    componentId,
    at: at.toISOString(),
    byUserId: actor.id,
    result: input.result,
    notes: input.notes,
    photoIds: input.photoIds,
  });
  await manager.save(inspection);
  await attachUploads(manager, input.photoIds, 'inspection', inspection.id, actor.id);
  component.status = statusAfterInspection(input.result);
  component.updatedAt = at.toISOString();
  await manager.save(component);
  return { inspection, component };
}
