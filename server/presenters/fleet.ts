import type { AssistCraneUnitDto, ComponentDto, ComponentStatus, CraneModelDto, CraneModelSummary, CraneUnitDto, InspectionDto, PhotoDto } from '../../shared/schemas/fleet.js';
import { componentTypeLabel } from '../../shared/fleet/type-labels.js';
import type { AssistCrane } from '../entities/AssistCrane.js';
import type { Component } from '../entities/Component.js';
import type { CraneModel } from '../entities/CraneModel.js';
import type { CraneUnit } from '../entities/CraneUnit.js';
import type { Inspection } from '../entities/Inspection.js';

/** "Marrowgate Heavy Works MHW 250L" style name of a model. */
export function modelName(model: CraneModel): string {
  return `${model.arrangement.manufacturer} ${model.arrangement.model}`;
}

/** A crane model in lists. */
export function presentCraneModelSummary(model: CraneModel, unitCount: number): CraneModelSummary {
  return {
    id: model.id,
    arrangementId: model.arrangementId,
    manufacturer: model.arrangement.manufacturer,
    model: model.arrangement.model,
    boomLengthsM: model.arrangement.arrangements.map((a) => a.boomLengthM).sort((a, b) => a - b),
    unitCount,
    updatedAt: model.updatedAt,
  };
}

/** A crane model with its arrangement data. */
export function presentCraneModel(model: CraneModel, unitCount: number): CraneModelDto {
  return { ...presentCraneModelSummary(model, unitCount), arrangement: model.arrangement };
}

/** A crane unit with its component counts. */
export function presentCraneUnit(unit: CraneUnit, model: CraneModel, counts: Record<ComponentStatus, number>): CraneUnitDto {
  return {
    id: unit.id,
    fleetNumber: unit.fleetNumber,
    modelId: unit.modelId,
    modelName: modelName(model),
    serialNumber: unit.serialNumber,
    location: unit.location,
    notes: unit.notes,
    componentCounts: counts,
    asBuilt: unit.asBuilt,
    createdAt: unit.createdAt,
    updatedAt: unit.updatedAt,
  };
}

/** An assist crane unit. */
export function presentAssistCrane(crane: AssistCrane): AssistCraneUnitDto {
  return {
    id: crane.id,
    fleetNumber: crane.fleetNumber,
    operatorName: crane.operatorName,
    operatorUserId: crane.operatorUserId,
    location: crane.location,
    data: crane.data,
    createdAt: crane.createdAt,
  };
}

export interface ComponentRelations {
  model: CraneModel;
  unit: CraneUnit | null;
  lastInspection: { inspection: Inspection; byName: string; thumbnailUrl: string | null } | null;
}

/** A component with the names a list needs. */
export function presentComponent(component: Component, rel: ComponentRelations): ComponentDto {
  return {
    id: component.id,
    serial: component.serial,
    kind: component.kind,
    typeId: component.typeId,
    typeLabel: componentTypeLabel(rel.model.arrangement, component.kind, component.typeId) ?? component.typeId,
    modelId: component.modelId,
    modelName: modelName(rel.model),
    unitId: component.unitId,
    unitFleetNumber: rel.unit?.fleetNumber ?? null,
    location: component.location,
    status: component.status,
    retiredReason: component.retiredReason,
    lastInspection: rel.lastInspection
      ? { at: rel.lastInspection.inspection.at, result: rel.lastInspection.inspection.result, byName: rel.lastInspection.byName, thumbnailUrl: rel.lastInspection.thumbnailUrl }
      : null,
    createdAt: component.createdAt,
    updatedAt: component.updatedAt,
  };
}

/** One inspection with who did it and its photos. */
export function presentInspection(inspection: Inspection, byName: string, photos: PhotoDto[]): InspectionDto {
  return {
    id: inspection.id,
    componentId: inspection.componentId,
    at: inspection.at,
    by: { id: inspection.byUserId, name: byName },
    result: inspection.result,
    notes: inspection.notes,
    photos,
  };
}
