import { defineStore } from 'pinia';
import { useLoadTracker } from '../composables/useLoadTracker';
import { computed, reactive, ref } from 'vue';
import type { z } from 'zod';
import { arrangementDataSchema, type ArrangementData } from '../../shared/schemas/arrangement';
import { fieldsFromZod, type FieldError } from '../../shared/schemas/errors';
import {
  assistCraneEnvelopeSchema,
  assistCraneListSchema,
  boomMakeupEnvelopeSchema,
  componentDetailSchema,
  componentEnvelopeSchema,
  componentFilterSchema,
  componentListSchema,
  craneModelEnvelopeSchema,
  craneModelListSchema,
  craneUnitEnvelopeSchema,
  craneUnitListSchema,
  createCraneUnitSchema,
  createInspectionSchema,
  inspectionCreatedSchema,
  updateCraneUnitSchema,
  type AssistCraneUnitDto,
  type BoomMakeupAnswer,
  type ComponentDto,
  type ComponentFilter,
  type ComponentStatus,
  type CraneModelDto,
  type CraneModelSummary,
  type CraneUnitDto,
  type CreateInspectionRequest,
  type InspectionDto,
} from '../../shared/schemas/fleet';
import { api, ApiRequestError, describeError } from '../services/api';
import { fieldErrorOf, fieldErrorsFrom, withoutFieldError, type FieldErrors } from './form-errors';
import { useSessionStore } from './session';

/** A component detail as the screen holds it. */
export interface ComponentDetail {
  component: ComponentDto;
  inspections: InspectionDto[];
}

/** The query string for GET /api/components; empty filters are left out so the URL stays short. */
export function componentQuery(filter: ComponentFilter): string {
  const params = new URLSearchParams();
  if (filter.type) params.set('type', filter.type);
  if (filter.status) params.set('status', filter.status);
  if (filter.unitId) params.set('unitId', filter.unitId);
  const q = filter.q?.trim();
  if (q) params.set('q', q);
  const text = params.toString();
  return text ? `?${text}` : '';
}

/** Quarantine outranks everything else on screen: a quarantined part must never look usable. */
export function isQuarantined(component: Pick<ComponentDto, 'status'>): boolean {
  return component.status === 'quarantined';
}

/** Counts by status, for a unit's line on the overview. */
export function countByStatus(components: readonly Pick<ComponentDto, 'status'>[]): Record<ComponentStatus, number> {
  const out: Record<ComponentStatus, number> = { serviceable: 0, quarantined: 0, retired: 0 };
  for (const c of components) out[c.status] += 1;
  return out;
}

/** Outcome of an arrangement file import. */
export type ImportOutcome = { kind: 'imported'; model: CraneModelDto } | { kind: 'exists'; message: string } | { kind: 'refused' };

const id = (value: string) => encodeURIComponent(value);

/** Crane models, units, assist cranes, components and inspections, with who may change them. */
export const useFleetStore = defineStore('fleet', () => {
  const session = useSessionStore();
  const qualifications = computed(() => session.user?.qualifications ?? []);
  /** Models, units, assist cranes and components: admins and supervisors (the server decides). */
  const canChangeFleet = computed(() => session.isAdmin || qualifications.value.includes('supervisor'));
  /** Recording inspections: admins, supervisors and riggers. */
  const canInspect = computed(() => canChangeFleet.value || qualifications.value.includes('rigger'));

  const models = ref<CraneModelSummary[]>([]);
  const units = ref<CraneUnitDto[]>([]);
  const assistCranes = ref<AssistCraneUnitDto[]>([]);
  const modelDetails = reactive<Record<string, CraneModelDto>>({});
  const unitDetails = reactive<Record<string, CraneUnitDto>>({});
  const assistCraneDetails = reactive<Record<string, AssistCraneUnitDto>>({});
  const componentDetails = reactive<Record<string, ComponentDetail>>({});
  /** Every component of one unit, to name quarantined serials on its boom drawing. */
  const unitComponents = reactive<Record<string, ComponentDto[]>>({});
  const makeups = reactive<Record<string, BoomMakeupAnswer>>({});

  const components = ref<ComponentDto[]>([]);
  const componentFilter = ref<ComponentFilter>({});
  const componentsLoaded = ref(false);

  // Loading state and the last problem per resource key ("units", "model:<id>", ...).
  const { loadingKeys, problems, track, isLoading, problemOf } = useLoadTracker();

  function loadModels() {
    return track('models', async () => {
      models.value = (await api('/crane-models', { schema: craneModelListSchema })).items;
    });
  }
  function loadUnits() {
    return track('units', async () => {
      units.value = (await api('/crane-units', { schema: craneUnitListSchema })).items;
    });
  }
  function loadAssistCranes() {
    return track('assist-cranes', async () => {
      assistCranes.value = (await api('/assist-cranes', { schema: assistCraneListSchema })).items;
    });
  }
  /** Everything the fleet overview lists. */
  async function loadOverview() {
    await Promise.all([loadUnits(), loadModels(), loadAssistCranes()]);
  }

  function loadModel(modelId: string) {
    return track(`model:${modelId}`, async () => {
      const { model } = await api(`/crane-models/${id(modelId)}`, { schema: craneModelEnvelopeSchema });
      modelDetails[model.id] = model;
      return model;
    });
  }

  function loadUnit(unitId: string) {
    return track(`unit:${unitId}`, async () => {
      const { unit } = await api(`/crane-units/${id(unitId)}`, { schema: craneUnitEnvelopeSchema });
      unitDetails[unit.id] = unit;
      return unit;
    });
  }

  function loadUnitComponents(unitId: string) {
    return track(`unit-components:${unitId}`, async () => {
      unitComponents[unitId] = (await api(`/components${componentQuery({ unitId })}`, { schema: componentListSchema })).items;
    });
  }

  function makeupKey(unitId: string, lengthM: number) {
    return `makeup:${unitId}:${lengthM}`;
  }
  /** The boom make-up of a unit for one length, recomputed by the server from its parts today. */
  function loadMakeup(unitId: string, lengthM: number) {
    const key = makeupKey(unitId, lengthM);
    return track(key, async () => {
      const { makeup } = await api(`/crane-units/${id(unitId)}/boom-makeup?lengthM=${encodeURIComponent(String(lengthM))}`, {
        schema: boomMakeupEnvelopeSchema,
      });
      makeups[key] = makeup;
      return makeup;
    });
  }
  const makeupOf = (unitId: string, lengthM: number): BoomMakeupAnswer | null => makeups[makeupKey(unitId, lengthM)] ?? null;

  function loadAssistCrane(assistId: string) {
    return track(`assist-crane:${assistId}`, async () => {
      const { assistCrane } = await api(`/assist-cranes/${id(assistId)}`, { schema: assistCraneEnvelopeSchema });
      assistCraneDetails[assistCrane.id] = assistCrane;
      return assistCrane;
    });
  }

  // Only the answer to the latest filter may fill the list: a slow earlier answer is dropped.
  let latestComponentQuery = '';
  /** Loads the component list for the current filter (or a new one). */
  function loadComponents(filter: ComponentFilter = componentFilter.value) {
    const parsed = componentFilterSchema.safeParse(filter);
    if (!parsed.success) {
      problems.components = 'The filter is not valid: ' + fieldsFromZod(parsed.error).map((f) => f.message).join('; ');
      return Promise.resolve(null);
    }
    componentFilter.value = { ...filter };
    const query = componentQuery(parsed.data);
    latestComponentQuery = query;
    return track(`components${query}`, async () => {
      const { items } = await api(`/components${query}`, { schema: componentListSchema });
      if (query === latestComponentQuery) {
        components.value = items;
        componentsLoaded.value = true;
      }
      return items;
    }).then((items) => {
      // Keep the problem under one key so the page shows it whatever the filter was.
      if (query === latestComponentQuery) {
        if (items === null) problems.components = problems[`components${query}`] ?? '';
        else delete problems.components;
      }
      return items;
    });
  }
  const componentsLoading = computed(() => [...loadingKeys].some((k) => k.startsWith('components')));

  function loadComponent(componentId: string) {
    return track(`component:${componentId}`, async () => {
      const detail = await api(`/components/${id(componentId)}`, { schema: componentDetailSchema });
      componentDetails[detail.component.id] = detail;
      return detail;
    });
  }

  /** Puts a changed component everywhere it is shown, so its status is never stale on another list. */
  function upsertComponent(component: ComponentDto) {
    components.value = components.value.map((c) => (c.id === component.id ? component : c));
    const detail = componentDetails[component.id];
    if (detail) detail.component = component;
    for (const [unitId, list] of Object.entries(unitComponents)) {
      unitComponents[unitId] = list.map((c) => (c.id === component.id ? component : c));
    }
  }

  // ---- forms: one open at a time, so they share the saving state ----
  const saving = ref(false);
  const saveProblem = ref('');
  const fieldErrors = ref<FieldErrors>({});
  /** Every failing path, for the import, where the person needs the whole list to fix the file. */
  const fieldList = ref<FieldError[]>([]);

  function resetForm() {
    saving.value = false;
    saveProblem.value = '';
    fieldErrors.value = {};
    fieldList.value = [];
  }

  function refuseWith(fields: FieldError[], message: string) {
    fieldList.value = fields;
    fieldErrors.value = fieldErrorsFrom(fields);
    saveProblem.value = message;
  }

  async function submit<T>(work: () => Promise<T>): Promise<T | null> {
    saving.value = true;
    saveProblem.value = '';
    fieldErrors.value = {};
    fieldList.value = [];
    try {
      return await work();
    } catch (error) {
      if (error instanceof ApiRequestError && error.fields.length > 0) refuseWith(error.fields, error.message);
      else saveProblem.value = describeError(error);
      return null;
    } finally {
      saving.value = false;
    }
  }

  /** Adds a crane unit of a model. */
  async function createUnit(input: z.input<typeof createCraneUnitSchema>): Promise<CraneUnitDto | null> {
    const parsed = createCraneUnitSchema.safeParse(input);
    if (!parsed.success) {
      refuseWith(fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit(async () => {
      const { unit } = await api('/crane-units', { method: 'POST', body: parsed.data, schema: craneUnitEnvelopeSchema });
      units.value = [...units.value.filter((u) => u.id !== unit.id), unit];
      unitDetails[unit.id] = unit;
      return unit;
    });
  }

  /**
   * Adds an assist crane from its fleet number, its operator and its chart file (our assist-crane
   * JSON format). The server checks the charts and names every failing path.
   */
  async function createAssistCrane(input: { fleetNumber: string; operatorName: string; location: string; chartFileText: string }): Promise<AssistCraneUnitDto | null> {
    let data: unknown;
    try {
      data = JSON.parse(input.chartFileText);
    } catch {
      refuseWith([{ path: 'data', message: 'The chart file is not valid JSON' }], 'The chart file could not be read.');
      return null;
    }
    return submit(async () => {
      const body = { fleetNumber: input.fleetNumber, operatorName: input.operatorName, location: input.location, data };
      const { assistCrane } = await api('/assist-cranes', { method: 'POST', body, schema: assistCraneEnvelopeSchema });
      assistCranes.value = [...assistCranes.value.filter((a) => a.id !== assistCrane.id), assistCrane];
      return assistCrane;
    });
  }

  /** Changes a unit's fleet number, serial, location or notes. */
  async function updateUnit(unitId: string, patch: z.input<typeof updateCraneUnitSchema>): Promise<CraneUnitDto | null> {
    const parsed = updateCraneUnitSchema.safeParse(patch);
    if (!parsed.success) {
      refuseWith(fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit(async () => {
      const { unit } = await api(`/crane-units/${id(unitId)}`, { method: 'PATCH', body: parsed.data, schema: craneUnitEnvelopeSchema });
      units.value = units.value.map((u) => (u.id === unit.id ? unit : u));
      unitDetails[unit.id] = unit;
      return unit;
    });
  }

  /**
   * Imports an arrangement file's text. The server checks it in full and names every failing path;
   * a model with the same arrangement id is only replaced when asked.
   */
  async function importModel(fileText: string, replace = false): Promise<ImportOutcome> {
    let body: unknown;
    try {
      body = JSON.parse(fileText);
    } catch (error) {
      refuseWith([], `The file is not readable arrangement data (not JSON: ${error instanceof Error ? error.message : 'unreadable'}). Choose the .json file exported from Holdline or supplied with the crane's data.`);
      return { kind: 'refused' };
    }
    let exists = '';
    const model = await submit(async () => {
      try {
        const { model: imported } = await api(`/crane-models/import${replace ? '?replace=1' : ''}`, { method: 'POST', body, schema: craneModelEnvelopeSchema });
        return imported;
      } catch (error) {
        if (error instanceof ApiRequestError && error.code === 'model_exists') {
          exists = error.message;
          return null;
        }
        throw error;
      }
    });
    if (exists) return { kind: 'exists', message: exists };
    if (!model) return { kind: 'refused' };
    modelDetails[model.id] = model;
    const summary: CraneModelSummary = {
      id: model.id,
      arrangementId: model.arrangementId,
      manufacturer: model.manufacturer,
      model: model.model,
      boomLengthsM: model.boomLengthsM,
      unitCount: model.unitCount,
      updatedAt: model.updatedAt,
    };
    models.value = [...models.value.filter((m) => m.id !== model.id), summary];
    return { kind: 'imported', model };
  }

  /** The model's arrangement file as the server exports it, checked before it is saved. */
  async function fetchArrangementFile(modelId: string): Promise<ArrangementData | null> {
    return track(`arrangement:${modelId}`, () => api(`/crane-models/${id(modelId)}/arrangement`, { schema: arrangementDataSchema }));
  }

  /** Retiring is final; the history stays. */
  async function retireComponent(componentId: string, reason: string): Promise<ComponentDto | null> {
    if (!reason.trim()) {
      refuseWith([{ path: 'retire.reason', message: 'Say why the component is retired' }], '');
      return null;
    }
    return submit(async () => {
      const { component } = await api(`/components/${id(componentId)}`, {
        method: 'PATCH',
        body: { retire: { reason: reason.trim() } },
        schema: componentEnvelopeSchema,
      });
      upsertComponent(component);
      return component;
    });
  }

  /** Records an inspection; a damage finding quarantines the component on the server. */
  async function recordInspection(componentId: string, input: CreateInspectionRequest): Promise<InspectionDto | null> {
    const parsed = createInspectionSchema.safeParse(input);
    if (!parsed.success) {
      refuseWith(fieldsFromZod(parsed.error), '');
      return null;
    }
    return submit(async () => {
      const { inspection, component } = await api(`/components/${id(componentId)}/inspections`, {
        method: 'POST',
        body: parsed.data,
        schema: inspectionCreatedSchema,
      });
      upsertComponent(component);
      const detail = componentDetails[componentId];
      if (detail) detail.inspections = [inspection, ...detail.inspections.filter((i) => i.id !== inspection.id)];
      return inspection;
    });
  }

  /** The message for one field of the open form, or for anything under it. */
  function errorOf(path: string): string {
    return fieldErrorOf(fieldErrors.value, path);
  }
  /** The person changed a field: its old message goes. */
  function clearFieldError(path: string) {
    fieldErrors.value = withoutFieldError(fieldErrors.value, path);
  }

  return {
    canChangeFleet,
    canInspect,
    models,
    units,
    assistCranes,
    modelDetails,
    unitDetails,
    assistCraneDetails,
    componentDetails,
    unitComponents,
    components,
    componentFilter,
    componentsLoaded,
    componentsLoading,
    isLoading,
    problemOf,
    loadModels,
    loadUnits,
    loadAssistCranes,
    loadOverview,
    loadModel,
    loadUnit,
    loadUnitComponents,
    loadMakeup,
    makeupOf,
    loadAssistCrane,
    loadComponents,
    loadComponent,
    saving,
    saveProblem,
    fieldErrors,
    fieldList,
    errorOf,
    clearFieldError,
    resetForm,
    createUnit,
    updateUnit,
    importModel,
    createAssistCrane,
    fetchArrangementFile,
    retireComponent,
    recordInspection,
  };
});
