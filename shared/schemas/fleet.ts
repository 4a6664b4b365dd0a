import { z } from 'zod';
import { arrangementDataSchema, assistCraneSchema, boomArrangementSchema } from './arrangement.js';
import { valueCheckFieldSchema } from './plan.js';

/** What a physical component is. */
export const componentKinds = ['section', 'guy_line', 'hook_block', 'rope'] as const;
export const componentKindSchema = z.enum(componentKinds);
export type ComponentKind = z.infer<typeof componentKindSchema>;
export const componentKindLabels: Record<ComponentKind, string> = {
  section: 'Boom section',
  guy_line: 'Guy line',
  hook_block: 'Hook block',
  rope: 'Wire rope',
};

/** Whether a component may enter a plan. */
export const componentStatuses = ['serviceable', 'quarantined', 'retired'] as const;
export const componentStatusSchema = z.enum(componentStatuses);
export type ComponentStatus = z.infer<typeof componentStatusSchema>;

/** What an inspection found. */
export const inspectionResults = ['serviceable', 'damaged', 'repaired'] as const;
export const inspectionResultSchema = z.enum(inspectionResults);
export type InspectionResult = z.infer<typeof inspectionResultSchema>;

const text = (max: number) => z.string().trim().max(max);
const fleetNumber = z.string().trim().min(1, 'Enter the fleet number').max(32);
const serial = z.string().trim().min(1, 'Enter the serial number').max(64);
const uuid = z.uuid();

/** A stored photo as the API presents it. */
export const photoSchema = z.object({ id: z.string(), url: z.string(), thumbnailUrl: z.string() });
export type PhotoDto = z.infer<typeof photoSchema>;

/** Answer of POST /api/uploads. */
export const uploadSchema = photoSchema.extend({
  mimeType: z.enum(['image/jpeg', 'image/png', 'image/webp']),
  sizeBytes: z.number().int(),
  widthPx: z.number().int(),
  heightPx: z.number().int(),
});
export type UploadDto = z.infer<typeof uploadSchema>;

// ---- crane models ----

/** A crane model in lists. */
export const craneModelSummarySchema = z.object({
  id: z.string(),
  /** The arrangement data's own id (stable across export and import). */
  arrangementId: z.string(),
  manufacturer: z.string(),
  model: z.string(),
  boomLengthsM: z.array(z.number()),
  unitCount: z.number().int(),
  updatedAt: z.string(),
});
export type CraneModelSummary = z.infer<typeof craneModelSummarySchema>;

/** A crane model with its arrangement data. */
export const craneModelSchema = craneModelSummarySchema.extend({ arrangement: arrangementDataSchema });
export type CraneModelDto = z.infer<typeof craneModelSchema>;

/** Body of POST /api/crane-models and PATCH /api/crane-models/:id. */
export const craneModelInputSchema = z.object({ arrangement: arrangementDataSchema });

// ---- crane units ----

/**
 * What a crane unit was last built to (or taken down from), written when a job's final sign-off is
 * released: the configuration, the controller values that passed the blind check, and the serial
 * fitted at each recorded position.
 */
export const asBuiltSchema = z.object({
  jobId: z.string(),
  jobName: z.string(),
  site: z.string(),
  kind: z.enum(['erection', 'dismantling']),
  completedAt: z.string(),
  planVersion: z.number().int(),
  boomLengthM: z.number().nullable(),
  hookBlockId: z.string().nullable(),
  parts: z.number().int().nullable(),
  controllerValues: z.partialRecord(valueCheckFieldSchema, z.string()),
  serials: z.array(z.object({ stepId: z.string(), position: z.string(), serial: z.string() })),
});
export type AsBuilt = z.infer<typeof asBuiltSchema>;

export const craneUnitSchema = z.object({
  id: z.string(),
  fleetNumber: z.string(),
  modelId: z.string(),
  modelName: z.string(),
  serialNumber: z.string(),
  location: z.string(),
  notes: z.string(),
  componentCounts: z.object({ serviceable: z.number().int(), quarantined: z.number().int(), retired: z.number().int() }),
  /** The configuration the last completed job left it in; null before any job completed on it. */
  asBuilt: asBuiltSchema.nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type CraneUnitDto = z.infer<typeof craneUnitSchema>;

export const createCraneUnitSchema = z.object({
  fleetNumber,
  modelId: uuid,
  serialNumber: text(64).default(''),
  location: text(120).default(''),
  notes: text(2000).default(''),
});
export const updateCraneUnitSchema = createCraneUnitSchema
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Change at least one field');

// ---- assist cranes ----

export const assistCraneUnitSchema = z.object({
  id: z.string(),
  fleetNumber: z.string(),
  /** Name of the assist crane's own operator. */
  operatorName: z.string(),
  /** The operator's Holdline account, when they have one. */
  operatorUserId: z.string().nullable(),
  location: z.string(),
  data: assistCraneSchema,
  createdAt: z.string(),
});
export type AssistCraneUnitDto = z.infer<typeof assistCraneUnitSchema>;

export const createAssistCraneSchema = z.object({
  fleetNumber,
  operatorName: z.string().trim().min(1, "Enter the assist crane operator's name").max(120),
  operatorUserId: uuid.nullable().default(null),
  location: text(120).default(''),
  data: assistCraneSchema,
});

// ---- components and inspections ----

export const inspectionSchema = z.object({
  id: z.string(),
  componentId: z.string(),
  at: z.string(),
  by: z.object({ id: z.string(), name: z.string() }),
  result: inspectionResultSchema,
  notes: z.string(),
  photos: z.array(photoSchema),
});
export type InspectionDto = z.infer<typeof inspectionSchema>;

export const componentSchema = z.object({
  id: z.string(),
  serial: z.string(),
  kind: componentKindSchema,
  /** Section type id, guy-line mark, hook block id or rope id in the model's arrangement data. */
  typeId: z.string(),
  /** Words for the type, e.g. "Insert 6 m". */
  typeLabel: z.string(),
  modelId: z.string(),
  modelName: z.string(),
  unitId: z.string().nullable(),
  unitFleetNumber: z.string().nullable(),
  location: z.string(),
  status: componentStatusSchema,
  retiredReason: z.string().nullable(),
  lastInspection: z.object({ at: z.string(), result: inspectionResultSchema, byName: z.string(), thumbnailUrl: z.string().nullable() }).nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type ComponentDto = z.infer<typeof componentSchema>;

export const componentFilterSchema = z.object({
  type: componentKindSchema.optional(),
  status: componentStatusSchema.optional(),
  unitId: uuid.optional(),
  q: text(64).optional(),
});
export type ComponentFilter = z.infer<typeof componentFilterSchema>;

export const createComponentSchema = z.object({
  serial,
  kind: componentKindSchema,
  typeId: z.string().trim().min(1, 'Choose the type').max(64),
  modelId: uuid,
  unitId: uuid.nullable().default(null),
  location: text(120).default(''),
});

/** Body of PATCH /api/components/:id. Retiring is final and keeps the history. */
export const updateComponentSchema = z
  .object({
    unitId: uuid.nullable(),
    location: text(120),
    retire: z.object({ reason: z.string().trim().min(1, 'Say why the component is retired').max(500) }),
  })
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Change at least one field');

/** Body of POST /api/components/:id/inspections. A damage finding needs notes. */
export const createInspectionSchema = z
  .object({
    result: inspectionResultSchema,
    notes: text(4000).default(''),
    photoIds: z.array(uuid).max(12).default([]),
  })
  .refine((v) => v.result !== 'damaged' || v.notes.length > 0, { message: 'Describe the damage found', path: ['notes'] });
export type CreateInspectionRequest = z.input<typeof createInspectionSchema>;

export const componentDetailSchema = z.object({ component: componentSchema, inspections: z.array(inspectionSchema) });
export const componentListSchema = z.object({ items: z.array(componentSchema) });
export const craneModelListSchema = z.object({ items: z.array(craneModelSummarySchema) });
export const craneUnitListSchema = z.object({ items: z.array(craneUnitSchema) });
export const assistCraneListSchema = z.object({ items: z.array(assistCraneUnitSchema) });
export const craneModelEnvelopeSchema = z.object({ model: craneModelSchema });
export const craneUnitEnvelopeSchema = z.object({ unit: craneUnitSchema });
export const assistCraneEnvelopeSchema = z.object({ assistCrane: assistCraneUnitSchema });
export const componentEnvelopeSchema = z.object({ component: componentSchema });
export const inspectionCreatedSchema = z.object({ inspection: inspectionSchema, component: componentSchema });
/** Query of GET /api/crane-units/:id/boom-makeup. */
export const boomMakeupQuerySchema = z.object({ lengthM: z.coerce.number().positive().max(500) });
/**
 * Answer of GET /api/crane-units/:id/boom-makeup: the BoomMakeup of shared/calc/boom.ts as the
 * client reads it; unknown keys are dropped.
 */
export const boomMakeupEnvelopeSchema = z.object({
  makeup: z.object({
    boomLengthM: z.number(),
    buildable: z.boolean(),
    reasons: z.array(z.string()),
    sections: z.array(
      z.object({
        position: z.number().int(),
        typeId: z.string(),
        lengthM: z.number(),
        weightKg: z.number(),
        startM: z.number(),
        endM: z.number(),
        serial: z.string().nullable(),
      }),
    ),
    guyLines: z.array(z.object({ mark: z.string(), lengthM: z.number(), quantity: z.number().int(), pinsEach: z.number().int(), serials: z.array(z.string()) })),
    totalSectionWeightKg: z.number(),
    pinCount: z.object({ jointPins: z.number().int(), guyLinePins: z.number().int(), total: z.number().int() }),
    arrangement: boomArrangementSchema.nullable().optional(),
    platesRequired: z.boolean(),
    auxSheaveAllowed: z.boolean(),
    rule: z.string(),
  }),
});
export type BoomMakeupAnswer = z.infer<typeof boomMakeupEnvelopeSchema>['makeup'];
