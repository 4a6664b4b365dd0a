import { z } from 'zod';
import { configurationSchema, figureSchema } from './configuration.js';
import { HOLD_REMINDER_DEFAULT_MINUTES, holdReminderMinutesSchema } from './mail.js';
import { qualificationSchema } from './users.js';
import { isTimeZone, tidyTimeZone } from '../time.js';

/** `made_safe`: a shift ended with its make-safe checklist done; no work until the start-of-shift hold is released. */
export const jobStates = ['planning', 'ready', 'live', 'stopped', 'made_safe', 'complete', 'cancelled'] as const;
export const jobStateSchema = z.enum(jobStates);
export type JobState = z.infer<typeof jobStateSchema>;
/**
 * The states in which the job's supervisors (or an admin) may change the crew: planning and every
 * state with a board (a shift change, someone leaving). The server enforces it (setCrew) and tells
 * the screen through `can.editCrew`.
 */
export const crewEditStates: readonly JobState[] = ['planning', 'ready', 'live', 'stopped', 'made_safe'];
export const jobStateLabels: Record<JobState, string> = {
  planning: 'Planning',
  ready: 'Ready',
  live: 'Live',
  stopped: 'Stopped',
  made_safe: 'Made safe',
  complete: 'Complete',
  cancelled: 'Cancelled',
};

export const jobKinds = ['erection', 'dismantling'] as const;
export const jobKindSchema = z.enum(jobKinds);
export type JobKind = z.infer<typeof jobKindSchema>;

/** Crew roles on a job are the qualifications a person may hold. */
export const crewRoleSchema = qualificationSchema;
export type CrewRole = z.infer<typeof crewRoleSchema>;

/** The motions a signaller directs, as the communications plan assigns them. */
export const motions = ['boom hoist', 'main hoist', 'auxiliary hoist', 'swing', 'travel', 'assist crane'] as const;

/** Radio channel, call signs, who directs which motion, and the fallback when radios fail. */
export const commsPlanSchema = z.object({
  radioChannel: z.string().trim().max(60),
  /** Call sign per crew member. */
  callSigns: z.array(z.object({ userId: z.uuid(), callSign: z.string().trim().min(1).max(40) })).max(40),
  /** Which signaller directs which motion. */
  motionSignallers: z.array(z.object({ motion: z.enum(motions), userId: z.uuid() })).max(20),
  fallbackHandSignals: z.string().trim().max(2000),
});
export type CommsPlan = z.infer<typeof commsPlanSchema>;

export const emptyCommsPlan: CommsPlan = { radioChannel: '', callSigns: [], motionSignallers: [], fallbackHandSignals: '' };

export const crewMemberSchema = z.object({ userId: z.string(), name: z.string(), role: crewRoleSchema });
export type CrewMember = z.infer<typeof crewMemberSchema>;

/** The roles without which a job can never leave planning; the server's readiness and the crew editor read this one list. */
export const requiredCrewRoles = ['supervisor', 'operator', 'signaller'] as const satisfies readonly CrewRole[];

/** The required roles nobody in the crew holds yet, in the order of `requiredCrewRoles`. */
export function missingCrewRoles(crew: readonly Pick<CrewMember, 'role'>[]): CrewRole[] {
  return requiredCrewRoles.filter((role) => !crew.some((m) => m.role === role));
}

export const overrideSchema = z.object({
  id: z.string(),
  figureKey: z.string(),
  figureLabel: z.string(),
  reason: z.string(),
  requestedBy: z.object({ userId: z.string(), name: z.string() }),
  requestedAt: z.string(),
  approvedBy: z.object({ userId: z.string(), name: z.string() }).nullable(),
  approvedAt: z.string().nullable(),
});
export type OverrideDto = z.infer<typeof overrideSchema>;

/** A job as the API presents it. */
export const jobSchema = z.object({
  id: z.string(),
  name: z.string(),
  site: z.string(),
  craneUnitId: z.string(),
  craneFleetNumber: z.string(),
  kind: jobKindSchema,
  state: jobStateSchema,
  /** The site's IANA time zone: every time about this job is shown in it, with its UTC offset. */
  timeZone: z.string(),
  configuration: configurationSchema.nullable(),
  /** The server's figures; they win over any a client computed. */
  figures: z.array(figureSchema),
  crew: z.array(crewMemberSchema),
  distribution: z.array(z.string()),
  /** Minutes a hold waits for a crew member who is not on the board before they are e-mailed. */
  holdReminderMinutes: holdReminderMinutesSchema.default(HOLD_REMINDER_DEFAULT_MINUTES),
  commsPlan: commsPlanSchema,
  overrides: z.array(overrideSchema),
  lastSeq: z.number().int(),
  headHash: z.string(),
  planVersion: z.number().int(),
  createdAt: z.string(),
  updatedAt: z.string(),
  /** What the person asking may do, so the screen can hide the rest. */
  can: z.object({
    edit: z.boolean(),
    approveOverrides: z.boolean(),
    /** The crew may be changed by this person now: the job's supervisors or an admin, in `crewEditStates`. */
    editCrew: z.boolean(),
  }),
});
export type JobDto = z.infer<typeof jobSchema>;

export const jobSummarySchema = jobSchema.pick({ id: true, name: true, site: true, craneUnitId: true, craneFleetNumber: true, kind: true, state: true, timeZone: true, planVersion: true, updatedAt: true }).extend({
  myRoles: z.array(crewRoleSchema),
});
export type JobSummary = z.infer<typeof jobSummarySchema>;

/** A site's IANA time zone ("Europe/Warsaw"): one the runtime's Intl knows, written the usual way. */
export const timeZoneSchema = z
  .string()
  .trim()
  .min(1, 'Choose the site’s time zone')
  .max(64, 'Choose a time zone from the list')
  .refine(isTimeZone, 'Not a time zone this server knows: choose one from the list, e.g. Europe/Warsaw')
  .transform(tidyTimeZone);

const name = z.string().trim().min(1, 'Name the job').max(120);
const site = z.string().trim().min(1, 'Name the site').max(200);

/** Body of POST /api/jobs; without `timeZone` the job takes the server's zone. */
export const createJobSchema = z.object({ name, site, craneUnitId: z.uuid('Choose the crane unit'), kind: jobKindSchema, timeZone: timeZoneSchema.optional() });
/** Body of PATCH /api/jobs/:id. */
export const updateJobSchema = z
  .object({
    name,
    site,
    kind: jobKindSchema,
    distribution: z.array(z.email()).max(50),
    holdReminderMinutes: holdReminderMinutesSchema,
    commsPlan: commsPlanSchema,
    timeZone: timeZoneSchema,
  })
  .partial()
  .strict()
  .refine((v) => Object.keys(v).length > 0, 'Change at least one field');
/** Body of PUT /api/jobs/:id/crew. */
export const setCrewSchema = z.object({
  members: z.array(z.object({ userId: z.uuid(), role: crewRoleSchema })).max(60),
});
/** Body of POST /api/jobs/:id/overrides: request one, or approve one as a second person. */
export const overrideActionSchema = z.discriminatedUnion('action', [
  z.object({ action: z.literal('request'), figureKey: z.string().min(1).max(80), reason: z.string().trim().min(10, 'Give the reason in a sentence').max(1000) }),
  z.object({ action: z.literal('approve'), overrideId: z.uuid() }),
]);

/** One readiness problem: what stops the job leaving planning. */
export const readinessSchema = z.object({
  ready: z.boolean(),
  reasons: z.array(z.object({ code: z.string(), message: z.string() })),
});
export type Readiness = z.infer<typeof readinessSchema>;

/** The answer of GET /jobs/:id/record/verify (the check itself is shared/events/chain.ts). */
export const verifySchema = z.object({
  valid: z.boolean(),
  checked: z.number().int(),
  firstBadSeq: z.number().int().nullable(),
  /** The log's last hash when the whole chain verifies; null when it does not. */
  finalHash: z.string().nullable(),
  /** With `?expect=<hash>`: whether the verified log leads to a hash kept outside (paper, e-mail). */
  expected: z.object({ hash: z.string(), found: z.boolean(), seq: z.number().int().nullable() }).optional(),
});

export const jobEnvelopeSchema = z.object({ job: jobSchema });
export const jobListSchema = z.object({ items: z.array(jobSummarySchema) });
