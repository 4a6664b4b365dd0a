import canonicalize from 'canonicalize';
import { z } from 'zod';
import type { Configuration } from '../schemas/configuration.js';
import { figureStatuses } from '../schemas/configuration.js';
import { crewMemberSchema, crewRoleSchema, jobKindSchema, jobStateSchema, type CommsPlan } from '../schemas/jobs.js';
import type { Plan } from '../schemas/plan.js';
import { valueCheckFieldSchema } from '../schemas/plan.js';

/**
 * The job's event log, one schema per event type in one discriminated union: the writer checks
 * each event against it before it is hashed, the presenter reads stored rows through it, and the
 * reducer, the history and the record read the typed data.
 *
 * Stored events are never rewritten, so every schema must keep reading what older versions
 * wrote: a field added later is optional here (marked "since"), and objects strip what they do
 * not declare instead of refusing it. The chain is hashed over the stored row, never over this
 * parse, so reading can never change what was proved.
 */

/** A plan or a configuration carried whole by an event: it was checked against its own schema when it was saved. */
const carried = <T>() => z.custom<T>((v) => typeof v === 'object' && v !== null && !Array.isArray(v));

const windLimit = z.object({ gustMs: z.number(), meanMs: z.number() });
const userRole = z.object({ userId: z.string(), role: crewRoleSchema });

/** The stage, hold and job states an event set in motion, written by the writer for people reading the log. */
const effectsSchema = z.object({
  job: z.object({ state: jobStateSchema }).optional(),
  stages: z.array(z.object({ id: z.string(), state: z.enum(['locked', 'active', 'holding', 'done', 'skipped']) })).optional(),
  holds: z.array(z.object({ id: z.string(), state: z.enum(['waiting', 'open', 'acknowledged', 'released', 'waived']) })).optional(),
});

/** What a recorded reading was compared with (shared/board/readings.ts). */
export const outOfLimitSchema = z.object({
  reason: z.string(),
  kind: z.enum(['plan', 'max', 'min', 'wind']),
  value: z.string(),
  valueNumber: z.number().nullable(),
  planned: z.number().nullable(),
  tolerance: z.number().nullable(),
  limit: z.number().nullable(),
  unit: z.string().nullable(),
  source: z.string().nullable(),
});

export const weatherReadingSchema = z.object({
  meanMs: z.number(),
  gustMs: z.number(),
  /** since 2026-12-03; older readings have no height. */
  heightM: z.number().nullable().optional(),
  lightning: z.boolean(),
  poorVisibility: z.boolean(),
  ice: z.boolean(),
});

const stageHold = { stageId: z.string(), holdId: z.string() };

/**
 * An acknowledgment taken back because its author left the crew or was disabled: of a stage's
 * hold (`stageId`), or of the start-of-shift hold (`stageId` null, `holdId` 'shift-start').
 */
export const withdrawnSchema = z.object({
  stageId: z.string().nullable(),
  holdId: z.string(),
  userId: z.string(),
  name: z.string(),
  role: z.string(),
});
export type Withdrawn = z.infer<typeof withdrawnSchema>;

const person = z.object({ userId: z.string(), name: z.string() });
/** The roles that acknowledge the start-of-shift hold besides the inspection. */
export const shiftStartRoleSchema = z.enum(['operator', 'supervisor']);

/** An event's data: its own fields, and the effects the writer adds to every event. */
const data = <S extends z.ZodRawShape>(shape: S) => z.object({ ...shape, effects: effectsSchema.optional() });

/** The data of each event type. */
export const eventDataSchemas = {
  'job.created': data({
    job: z.object({
      name: z.string(),
      site: z.string(),
      kind: jobKindSchema,
      craneUnitId: z.string().optional(),
      state: jobStateSchema.optional(),
      /** since 2026-12-03: the site's IANA time zone. */
      timeZone: z.string().optional(),
    }),
    craneFleetNumber: z.string(),
    crew: z.array(crewMemberSchema),
  }),
  'job.updated': data({
    changes: z.object({
      name: z.string().optional(),
      site: z.string().optional(),
      kind: jobKindSchema.optional(),
      distribution: z.array(z.string()).optional(),
      /** since 2026-12-03 */
      holdReminderMinutes: z.number().int().optional(),
      commsPlan: carried<CommsPlan>().optional(),
      /** since 2026-12-03 */
      timeZone: z.string().optional(),
    }),
    planRegenerated: z.boolean(),
  }),
  'crew.set': data({
    crew: z.array(crewMemberSchema),
    added: z.array(userRole),
    removed: z.array(userRole),
    /** since 2026-12-03: acknowledgments of holds not yet released that left with the people removed. */
    withdrawn: z.array(withdrawnSchema).optional(),
  }),
  'configuration.set': data({
    planRegenerated: z.boolean(),
    windLimits: z.object({ assembly: windLimit, raising: windLimit }).nullable(),
    /** since 2026-12-03 */
    weatherFreshMinutes: z.number().optional(),
    configuration: carried<Configuration>(),
    figures: z.array(z.object({ key: z.string(), value: z.string(), status: z.enum(figureStatuses), overridable: z.boolean() })),
    overridesWithdrawn: z.array(z.object({ id: z.string(), figureKey: z.string() })),
  }),
  'override.requested': data({
    override: z.object({ id: z.string(), figureKey: z.string(), figureLabel: z.string(), figureValue: z.string(), reason: z.string() }),
  }),
  'override.approved': data({ overrideId: z.string(), figureKey: z.string() }),
  'plan.generated': data({ plan: carried<Plan>() }),
  'plan.edited': data({ plan: carried<Plan>(), problems: z.array(z.string()) }),
  'job.ready': data({ state: z.literal('ready'), planVersion: z.number().int(), plan: carried<Plan>() }),
  'job.started': data({}),
  'briefing.acknowledged': data({
    planVersion: z.number().int(),
    /** since 2026-12-03: the shift the briefing was for (older events: shift 1). */
    shift: z.number().int().optional(),
  }),
  'step.completed': data({
    stageId: z.string(),
    stepId: z.string(),
    value: z.string().nullable(),
    photoId: z.string().nullable(),
    /** since 2026-12-03 */
    outOfLimit: outOfLimitSchema.nullable().optional(),
  }),
  'step.reopened': data({
    stageId: z.string(),
    stepId: z.string(),
    /** since 2026-12-03 */
    alsoReopened: z.array(z.string()).optional(),
    clearedAcknowledgments: z.number().int(),
  }),
  'hold.acknowledged': data({
    ...stageHold,
    role: crewRoleSchema,
    photoId: z.string().nullable(),
    /** What a value check typed; null on the copy people who do not plan the job receive. */
    values: z.partialRecord(valueCheckFieldSchema, z.string()).nullable(),
    /** since 2026-12-03: acknowledged the final sign-off as the qualified inspector. */
    inspector: z.boolean().optional(),
  }),
  'hold.withdrawn': data({ ...stageHold, role: crewRoleSchema }),
  'hold.released': data(stageHold),
  'hold.check.failed': data({
    ...stageHold,
    role: crewRoleSchema,
    photoId: z.string().nullable(),
    /** Which fields differed; null on the copy people who do not plan the job receive. */
    fields: z.array(valueCheckFieldSchema).nullable(),
    /** since 2026-12-03 */
    failuresSinceReview: z.number().int().optional(),
  }),
  'hold.check.reviewed': data({ ...stageHold, note: z.string(), failuresReviewed: z.number().int() }),
  'stage.skipped': data({ stageId: z.string(), reason: z.string() }),
  'job.stopped': data({ reason: z.string().nullable(), pressedAt: z.string(), alreadyStopped: z.boolean() }),
  'job.stop.noted': data({ reason: z.string() }),
  'job.resumed': data({ reason: z.string() }),
  'weather.recorded': data({
    reading: weatherReadingSchema,
    phase: z.enum(['assembly', 'raising']),
    limit: windLimit.nullable(),
    /** The reading stopped the live job. */
    stop: z.object({ reason: z.string() }).nullable(),
    overLimit: z.string().nullable(),
  }),
  'defect.reported': data({
    defectId: z.string(),
    componentId: z.string().nullable(),
    serial: z.string().nullable(),
    stageId: z.string().nullable(),
    description: z.string(),
    photoId: z.string().nullable(),
  }),
  'plan.revised': data({ planVersion: z.number().int(), plan: carried<Plan>(), reason: z.string() }),
  'job.completed': data({}),
  'job.cancelled': data({ reason: z.string() }),
  /** The acting supervisor ends the shift: the make-safe checklist for the phase of the work. */
  'shift.ending': data({
    shift: z.number().int(),
    workPhase: z.string(),
    items: z.array(z.object({ id: z.string(), text: z.string(), roles: z.array(crewRoleSchema), asksNote: z.boolean() })),
  }),
  /** One make-safe item done; the last one makes the job safe. */
  'shift.item.done': data({ itemId: z.string(), role: crewRoleSchema, note: z.string().nullable(), madeSafe: z.boolean() }),
  'handover.written': data({
    shift: z.number().int(),
    to: person.nullable(),
    done: z.array(z.string()),
    open: z.array(z.string()),
    defects: z.array(z.string()),
    overrides: z.array(z.string()),
    hazards: z.string(),
    note: z.string(),
  }),
  /** The incoming supervisor read the note: they are the acting supervisor from now. */
  'handover.acknowledged': data({ handoverSeq: z.number().int(), from: person }),
  /** An administrator made someone else the acting supervisor (the outgoing one unreachable). */
  'acting.transferred': data({ from: person.nullable(), to: person, reason: z.string() }),
  /** The competent person's shift inspection before the next shift starts. */
  'shift.inspected': data({ shift: z.number().int(), note: z.string() }),
  'shift.start.acknowledged': data({ shift: z.number().int(), role: shiftStartRoleSchema }),
  /** The start-of-shift hold is released: work goes on. */
  'shift.started': data({ shift: z.number().int() }),
  /** A crew member's account was disabled: their acknowledgments of holds not yet released are taken back. */
  'crew.member.disabled': data({ userId: z.string(), name: z.string(), withdrawn: z.array(withdrawnSchema) }),
} as const;

export type JobEventType = keyof typeof eventDataSchemas;

/** Planning events: they change the job before it reaches the board (the reducer only counts them). */
export const planningEventTypes: ReadonlySet<JobEventType> = new Set([
  'job.created',
  'job.updated',
  'crew.set',
  'configuration.set',
  'override.requested',
  'override.approved',
  'plan.generated',
  'plan.edited',
  'job.ready',
]);

/** The role an event was done in: a crew role, or an administrator acting on a job. */
export const actedAsSchema = z.union([crewRoleSchema, z.literal('admin')]);
export type ActedAs = z.infer<typeof actedAsSchema>;

const envelope = {
  jobId: z.string(),
  seq: z.number().int(),
  at: z.string(),
  by: z.object({ userId: z.string(), name: z.string(), role: actedAsSchema }),
};

function eventOf<T extends JobEventType, D extends z.ZodType>(type: T, data: D) {
  return z.object({ ...envelope, type: z.literal(type), data });
}

/** An event of a job's log as the API, the board and the record present it. */
export const jobEventSchema = z.discriminatedUnion('type', [
  eventOf('job.created', eventDataSchemas['job.created']),
  eventOf('job.updated', eventDataSchemas['job.updated']),
  eventOf('crew.set', eventDataSchemas['crew.set']),
  eventOf('configuration.set', eventDataSchemas['configuration.set']),
  eventOf('override.requested', eventDataSchemas['override.requested']),
  eventOf('override.approved', eventDataSchemas['override.approved']),
  eventOf('plan.generated', eventDataSchemas['plan.generated']),
  eventOf('plan.edited', eventDataSchemas['plan.edited']),
  eventOf('job.ready', eventDataSchemas['job.ready']),
  eventOf('job.started', eventDataSchemas['job.started']),
  eventOf('briefing.acknowledged', eventDataSchemas['briefing.acknowledged']),
  eventOf('step.completed', eventDataSchemas['step.completed']),
  eventOf('step.reopened', eventDataSchemas['step.reopened']),
  eventOf('hold.acknowledged', eventDataSchemas['hold.acknowledged']),
  eventOf('hold.withdrawn', eventDataSchemas['hold.withdrawn']),
  eventOf('hold.released', eventDataSchemas['hold.released']),
  eventOf('hold.check.failed', eventDataSchemas['hold.check.failed']),
  eventOf('hold.check.reviewed', eventDataSchemas['hold.check.reviewed']),
  eventOf('stage.skipped', eventDataSchemas['stage.skipped']),
  eventOf('job.stopped', eventDataSchemas['job.stopped']),
  eventOf('job.stop.noted', eventDataSchemas['job.stop.noted']),
  eventOf('job.resumed', eventDataSchemas['job.resumed']),
  eventOf('weather.recorded', eventDataSchemas['weather.recorded']),
  eventOf('defect.reported', eventDataSchemas['defect.reported']),
  eventOf('plan.revised', eventDataSchemas['plan.revised']),
  eventOf('job.completed', eventDataSchemas['job.completed']),
  eventOf('job.cancelled', eventDataSchemas['job.cancelled']),
  eventOf('shift.ending', eventDataSchemas['shift.ending']),
  eventOf('shift.item.done', eventDataSchemas['shift.item.done']),
  eventOf('handover.written', eventDataSchemas['handover.written']),
  eventOf('handover.acknowledged', eventDataSchemas['handover.acknowledged']),
  eventOf('acting.transferred', eventDataSchemas['acting.transferred']),
  eventOf('shift.inspected', eventDataSchemas['shift.inspected']),
  eventOf('shift.start.acknowledged', eventDataSchemas['shift.start.acknowledged']),
  eventOf('shift.started', eventDataSchemas['shift.started']),
  eventOf('crew.member.disabled', eventDataSchemas['crew.member.disabled']),
]);
export type JobEventDto = z.infer<typeof jobEventSchema>;
export type JobEventOf<T extends JobEventType> = Extract<JobEventDto, { type: T }>;
export type EventData<T extends JobEventType> = JobEventOf<T>['data'];

/** What a command handler writes for an event: its type, the role it was done in, and its data. */
export type EventDraft = {
  [T in JobEventType]: { type: T; role: ActedAs; data: z.input<(typeof eventDataSchemas)[T]> };
}[JobEventType];

export const jobEventListSchema = z.object({ items: z.array(jobEventSchema), lastSeq: z.number().int() });

/** Narrows an event to one type. */
export function isEventOf<T extends JobEventType>(event: JobEventDto, type: T): event is JobEventOf<T> {
  return event.type === type;
}

/** Reads a stored or received event; throws a ZodError naming what does not fit. */
export function parseJobEvent(event: unknown): JobEventDto {
  return jobEventSchema.parse(event);
}

/**
 * Checks a new event's data before it is hashed: the data as it will be stored must read back
 * through its schema unchanged, at every depth. An undeclared field (reading strips it) or a
 * value the schema would change is a bug in the handler, refused here, so nothing reaches the
 * log that the reducer and the record would not see.
 */
export function checkNewEventData(draft: EventDraft): void {
  const stored: unknown = JSON.parse(JSON.stringify(draft.data));
  const read: unknown = eventDataSchemas[draft.type].parse(stored);
  if (canonicalize(read) !== canonicalize(stored)) {
    throw new Error(`A ${draft.type} event carries data its schema does not declare: ${canonicalize(stored)} reads back as ${canonicalize(read)}`);
  }
}
