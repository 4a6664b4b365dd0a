import { z } from 'zod';
import { crewRoleSchema } from './jobs.js';

const id = z.string().trim().min(1).max(64).regex(/^[A-Za-z0-9_.:-]+$/, 'Use letters, digits, dot, colon, dash or underscore');
const text = (max: number) => z.string().trim().min(1).max(max);

/** What a step records when it is completed. */
export const stepRecordSchema = z.object({
  kind: z.enum(['serial', 'reading']),
  label: text(120),
  /** For readings, e.g. "m/s", "kPa". */
  unit: z.string().trim().max(20).nullable(),
  /** For serials, the component kind and type expected at this position (the as-built record). */
  componentKind: z.enum(['section', 'guy_line', 'hook_block', 'rope']).nullable(),
  typeId: z.string().trim().max(64).nullable(),
  /** The serial the plan expects here (from the boom make-up), for the record; any serviceable one of the type may be fitted. */
  plannedSerial: z.string().trim().max(64).nullable(),
  /**
   * What a reading is held to. A reading outside it marks the step out of limit and blocks the
   * release of a mandatory hold until the step is redone or the plan revised. Absent (old plans)
   * or null: recorded only.
   */
  check: z
    .discriminatedUnion('kind', [
      /** Must equal the plan's figure (parts of line, counterweight, pin count...), within an absolute tolerance. */
      z.object({ kind: z.literal('plan'), planned: z.number().finite(), tolerance: z.number().finite().nonnegative(), source: z.string().trim().max(200) }),
      /** Must not exceed a limit (slope of the ground...). */
      z.object({ kind: z.literal('max'), limit: z.number().finite(), source: z.string().trim().max(200) }),
      /** Must reach at least a limit. */
      z.object({ kind: z.literal('min'), limit: z.number().finite(), source: z.string().trim().max(200) }),
      /** A wind gust, held to the job's wind limit for the phase, by the board's one wind rule. */
      z.object({ kind: z.literal('wind'), phase: z.enum(['assembly', 'raising']) }),
    ])
    .nullable()
    .optional(),
});
export type StepRecord = z.infer<typeof stepRecordSchema>;

export const stepSchema = z.object({
  id,
  text: text(500),
  /** Crew roles allowed to complete it. */
  allowedRoles: z.array(crewRoleSchema).min(1),
  requiresPhoto: z.boolean(),
  records: stepRecordSchema.nullable(),
  /** A caution shown with the step. */
  caution: z.string().trim().max(500).nullable(),
  /**
   * The template marks this step as one that protects a mandatory hold: it cannot be removed
   * from the plan. Absent in old plans: false.
   */
  required: z.boolean().optional(),
  /** Step ids of the same stage that must be done before this one. Absent in old plans: none. */
  after: z.array(id).max(50).optional(),
});
export type PlanStep = z.infer<typeof stepSchema>;

/** The controller values a value-check hold asks for. */
export const valueCheckFields = ['boomLengthM', 'hookBlockId', 'parts', 'counterweightT', 'operatingMode'] as const;
export const valueCheckFieldSchema = z.enum(valueCheckFields);
export type ValueCheckField = z.infer<typeof valueCheckFieldSchema>;
export const valueCheckFieldLabels: Record<ValueCheckField, string> = {
  boomLengthM: 'Boom length (m)',
  hookBlockId: 'Hook block',
  parts: 'Parts of line',
  counterweightT: 'Counterweight (t)',
  operatingMode: 'Operating mode',
};

/**
 * A value check: the person acknowledging types what the crane's controller shows. The expected
 * values come from the configuration and are never sent to the people who acknowledge.
 */
export const valueCheckSchema = z.object({
  fields: z.array(z.object({ field: valueCheckFieldSchema, expected: z.string().trim().min(1).max(64) })).min(1),
});

export const holdSchema = z.object({
  id,
  title: text(200),
  instruction: text(1000),
  /** Roles that must each acknowledge, by different people. */
  requiredRoles: z.array(crewRoleSchema).min(1, 'A hold needs at least one acknowledging role'),
  releasingRole: z.literal('supervisor'),
  /** Can never be skipped, removed, or lose a required role. */
  mandatory: z.boolean(),
  valueCheck: valueCheckSchema.nullable(),
  /**
   * The job's final sign-off: besides its roles, a crew member the admin marks as qualified to
   * inspect acknowledges it (post-assembly inspection: OSHA 29 CFR 1926.1412(c), from memory),
   * and its release completes the job. Absent in plans written before the job had an ending.
   */
  signOff: z.boolean().optional(),
});
export type PlanHold = z.infer<typeof holdSchema>;

export const stageSchema = z.object({
  id,
  title: text(200),
  /** Why this stage exists, in a sentence. */
  summary: z.string().trim().max(1000),
  /** Stage ids that must be done (or skipped) before this one becomes active. */
  dependsOn: z.array(id),
  cautions: z.array(text(500)).max(20),
  /** The crane or the assist crane moves in this stage: a radio check opens it. */
  involvesCraneMovement: z.boolean(),
  /**
   * The boom goes up or comes down in this stage ('moves'), or the stage gets it ready to
   * ('prepares'): the raising wind limit applies, and a boom-moving stage needs a fresh reading.
   * Absent in plans written before it was declared: then known by the template's stage ids.
   */
  boom: z.enum(['moves', 'prepares']).optional(),
  steps: z.array(stepSchema).max(200),
  hold: holdSchema.nullable(),
});
export type PlanStage = z.infer<typeof stageSchema>;

export const briefingSchema = z.object({
  title: text(200),
  sections: z.array(z.object({ heading: text(200), items: z.array(text(1000)) })),
});
export type Briefing = z.infer<typeof briefingSchema>;

/** A job's plan: stages in order, each with steps and at most one hold, and the briefing. */
export const planSchema = z.object({
  kind: z.enum(['erection', 'dismantling']),
  stages: z.array(stageSchema).min(1).max(120),
  briefing: briefingSchema,
});
export type Plan = z.infer<typeof planSchema>;

/** One problem that stops a plan being locked. */
export interface PlanProblem {
  code:
    | 'cycle'
    | 'unknown_dependency'
    | 'unreachable'
    | 'duplicate_id'
    | 'mandatory_hold_removed'
    | 'mandatory_role_removed'
    | 'no_acknowledging_role'
    | 'holds_need_more_people'
    /** A stage or step no longer waits for a mandatory hold that gated it in the reference plan (or the hold left its stage). */
    | 'mandatory_hold_bypassed'
    /** A step the template marks required was removed or moved out of its stage. */
    | 'required_step_removed'
    /** A step's `after` names no step of its stage, the steps wait in a circle, or an order of the reference plan was dropped. */
    | 'step_order'
    /** A reading is no longer held to what the reference plan holds it to, or to something looser. */
    | 'check_weakened'
    /** A stage that raises or lowers the boom (or readies it) no longer says so: the wind rules would not apply. */
    | 'boom_movement_undeclared';
  message: string;
  /** Where in the plan, as a path like "stages.3.dependsOn.0". */
  path?: string;
}

export const planVersionSchema = z.object({
  version: z.number().int(),
  createdAt: z.string(),
  createdBy: z.object({ userId: z.string(), name: z.string() }),
  reason: z.string(),
  plan: planSchema,
});
export type PlanVersionDto = z.infer<typeof planVersionSchema>;

/** Answer of GET /api/jobs/:id/plan: the draft while planning, the locked version after. */
export const planEnvelopeSchema = z.object({
  version: z.number().int(),
  locked: z.boolean(),
  /** The draft was generated from another configuration than the current one. */
  stale: z.boolean(),
  plan: planSchema,
  problems: z.array(z.object({ code: z.string(), message: z.string(), path: z.string().optional() })),
});
export const planVersionListSchema = z.object({ items: z.array(planVersionSchema) });
