import { In, type EntityManager } from 'typeorm';
import type { InventoryItem } from '../../shared/schemas/arrangement.js';
import type { ComponentDto, ComponentFilter, ComponentStatus, CraneUnitDto, InspectionDto, PhotoDto } from '../../shared/schemas/fleet.js';
import type { AppContext } from '../context.js';
import { Component } from '../entities/Component.js';
import { CraneModel } from '../entities/CraneModel.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import { Inspection } from '../entities/Inspection.js';
import { Upload } from '../entities/Upload.js';
import { User } from '../entities/User.js';
import { notFound } from '../errors.js';
import { presentComponent, presentCraneUnit, presentInspection } from '../presenters/fleet.js';
import { presentPhoto } from '../presenters/upload.js';

/** Loads entities by id into a map, in one query. */
async function byId<T extends { id: string }>(manager: EntityManager, entity: new () => T, ids: Iterable<string | null>): Promise<Map<string, T>> {
  const wanted = [...new Set([...ids].filter((id): id is string => id !== null))];
  if (wanted.length === 0) return new Map();
  const rows = (await manager.findBy(entity, { id: In(wanted) } as never)) as T[];
  return new Map(rows.map((r) => [r.id, r]));
}

/** Photos for upload ids, in the order given, with URLs the browser can load. */
export async function photosFor(context: AppContext, manager: EntityManager, ids: string[]): Promise<PhotoDto[]> {
  const uploads = await byId(manager, Upload, ids);
  return ids.flatMap((id) => {
    const upload = uploads.get(id);
    return upload ? [presentPhoto(upload, context)] : [];
  });
}

/** Counts of a unit's components by status. */
async function countsByUnit(manager: EntityManager, unitIds: string[]): Promise<Map<string, Record<ComponentStatus, number>>> {
  const result = new Map<string, Record<ComponentStatus, number>>();
  for (const id of unitIds) result.set(id, { serviceable: 0, quarantined: 0, retired: 0 });
  if (unitIds.length === 0) return result;
  const rows = (await manager
    .createQueryBuilder(Component, 'c')
    .select('c.unit_id', 'unitId')
    .addSelect('c.status', 'status')
    .addSelect('COUNT(*)', 'n')
    .where('c.unit_id IN (:...unitIds)', { unitIds })
    .groupBy('c.unit_id')
    .addGroupBy('c.status')
    .getRawMany()) as { unitId: string; status: ComponentStatus; n: number }[];
  for (const row of rows) result.get(row.unitId)![row.status] = Number(row.n);
  return result;
}

/** Crane units as the API presents them. */
export async function presentUnits(manager: EntityManager, units: CraneUnit[]): Promise<CraneUnitDto[]> {
  const models = await byId(manager, CraneModel, units.map((u) => u.modelId));
  const counts = await countsByUnit(manager, units.map((u) => u.id));
  return units.map((u) => presentCraneUnit(u, models.get(u.modelId)!, counts.get(u.id)!));
}

/** Components with model, unit and latest inspection, in few queries. */
export async function presentComponents(context: AppContext, manager: EntityManager, components: Component[]): Promise<ComponentDto[]> {
  if (components.length === 0) return [];
  const models = await byId(manager, CraneModel, components.map((c) => c.modelId));
  const units = await byId(manager, CraneUnit, components.map((c) => c.unitId));
  const ids = components.map((c) => c.id);
  // The latest inspection of each component: ties on time are broken by id so the answer is stable.
  const latest = (await manager
    .createQueryBuilder(Inspection, 'i')
    .where('i.component_id IN (:...ids)', { ids })
    .andWhere('NOT EXISTS (SELECT 1 FROM inspection j WHERE j.component_id = i.component_id AND (j.at > i.at OR (j.at = i.at AND j.id > i.id)))')
    .getMany()) as Inspection[];
  const inspectors = await byId(manager, User, latest.map((i) => i.byUserId));
  const firstPhotos = await photosFor(context, manager, latest.flatMap((i) => i.photoIds.slice(0, 1)));
  const thumbById = new Map(firstPhotos.map((p) => [p.id, p.thumbnailUrl]));
  const latestByComponent = new Map(latest.map((i) => [i.componentId, i]));
  return components.map((c) => {
    const inspection = latestByComponent.get(c.id);
    return presentComponent(c, {
      model: models.get(c.modelId)!,
      unit: c.unitId ? (units.get(c.unitId) ?? null) : null,
      lastInspection: inspection
        ? { inspection, byName: inspectors.get(inspection.byUserId)?.displayName ?? 'Unknown', thumbnailUrl: thumbById.get(inspection.photoIds[0] ?? '') ?? null }
        : null,
    });
  });
}

/** Components matching the list filters, by serial. */
export async function listComponents(context: AppContext, filter: ComponentFilter): Promise<ComponentDto[]> {
  const manager = context.dataSource.manager;
  const query = manager.createQueryBuilder(Component, 'c').orderBy('c.serial', 'ASC');
  if (filter.type) query.andWhere('c.kind = :kind', { kind: filter.type });
  if (filter.status) query.andWhere('c.status = :status', { status: filter.status });
  if (filter.unitId) query.andWhere('c.unit_id = :unitId', { unitId: filter.unitId });
  if (filter.q) query.andWhere('c.serial LIKE :q', { q: `%${filter.q.replace(/[%_]/g, '')}%` });
  return presentComponents(context, manager, await query.getMany());
}

/** One component and its whole inspection history, newest first. */
export async function componentDetail(context: AppContext, componentId: string): Promise<{ component: ComponentDto; inspections: InspectionDto[] }> {
  const manager = context.dataSource.manager;
  const component = await manager.findOneBy(Component, { id: componentId });
  if (!component) throw notFound('That component');
  const [presented] = await presentComponents(context, manager, [component]);
  return { component: presented, inspections: await inspectionsOf(context, manager, componentId) };
}

/** A component's inspections, newest first. */
export async function inspectionsOf(context: AppContext, manager: EntityManager, componentId: string): Promise<InspectionDto[]> {
  const inspections = await manager.find(Inspection, { where: { componentId }, order: { at: 'DESC', id: 'DESC' } });
  const people = await byId(manager, User, inspections.map((i) => i.byUserId));
  const photos = new Map((await photosFor(context, manager, inspections.flatMap((i) => i.photoIds))).map((p) => [p.id, p]));
  return inspections.map((i) =>
    presentInspection(
      i,
      people.get(i.byUserId)?.displayName ?? 'Unknown',
      i.photoIds.flatMap((id) => (photos.has(id) ? [photos.get(id)!] : [])),
    ),
  );
}

/** A unit's components as the boom make-up calculation sees them. */
export async function unitInventory(manager: EntityManager, unit: CraneUnit): Promise<InventoryItem[]> {
  const components = await manager.find(Component, { where: { unitId: unit.id, modelId: unit.modelId }, order: { serial: 'ASC' } });
  return components.map((c) => ({ serial: c.serial, kind: c.kind, typeId: c.typeId, status: c.status }));
}
