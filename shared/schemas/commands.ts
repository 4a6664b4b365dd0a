import { z } from 'zod';
import { crewRoleSchema } from './jobs.js';
import { planSchema, valueCheckFieldSchema } from './plan.js';
import { shiftStartRoleSchema } from '../events/log.js';

const commandId = z.uuid('commandId must be a UUID made by the client');
const reason = z.string().trim().min(3, 'Give a reason').max(1000);
/** Wind speed in m/s to one decimal (limits such as 6.5 m/s need it), up to 80 m/s so any gale can be recorded. */
const speedMs = z
  .number()
  .finite()
  .min(0)
  .max(80)
  .refine((v) => Math.abs(v * 10 - Math.round(v * 10)) < 1e-6, 'Give the speed to one decimal (0.1 m/s)');
/** Height above ground where the wind was read, in metres (0.1 m). */
const heightM = z
  .number()
  .finite()
  .min(0)
  .max(300)
  .refine((v) => Math.abs(v * 10 - Math.round(v * 10)) < 1e-6, 'Give the height to one decimal');

/** Every command the live board accepts, one schema per type. */
export const boardCommandSchema = z.discriminatedUnion('type', [
  z.object({ commandId, type: z.literal('job.start') }),
  z.object({ commandId, type: z.literal('job.complete') }),
  z.object({ commandId, type: z.literal('job.cancel'), reason }),
  z.object({ commandId, type: z.literal('briefing.acknowledge') }),
  z.object({
    commandId,
    type: z.literal('step.complete'),
    stepId: z.string().min(1).max(64),
    value: z.string().trim().min(1).max(200).optional(),
    photoId: z.uuid().optional(),
  }),
  z.object({ commandId, type: z.literal('step.reopen'), stepId: z.string().min(1).max(64) }),
  z.object({
    commandId,
    type: z.literal('hold.acknowledge'),
    holdId: z.string().min(1).max(64),
    role: crewRoleSchema,
    values: z.partialRecord(valueCheckFieldSchema, z.string().trim().max(64)).optional(),
    photoId: z.uuid().optional(),
    /** Acknowledges the job's final sign-off as the qualified inspector (in the person's crew role). */
    asInspector: z.boolean().optional(),
  }),
  z.object({ commandId, type: z.literal('hold.withdraw'), holdId: z.string().min(1).max(64), role: crewRoleSchema }),
  z.object({ commandId, type: z.literal('hold.release'), holdId: z.string().min(1).max(64) }),
  /** The supervisor has looked into failed value checks with the crew; the check may be tried again. */
  z.object({ commandId, type: z.literal('hold.check.review'), holdId: z.string().min(1).max(64), note: reason }),
  z.object({ commandId, type: z.literal('stage.skip'), stageId: z.string().min(1).max(64), reason }),
  z.object({ commandId, type: z.literal('job.stop'), reason: z.string().trim().max(1000).optional(), pressedAt: z.iso.datetime() }),
  z.object({ commandId, type: z.literal('job.stop.note'), reason: z.string().trim().min(1).max(1000) }),
  z.object({ commandId, type: z.literal('job.resume'), reason }),
  z.object({
    commandId,
    type: z.literal('weather.record'),
    meanMs: speedMs,
    gustMs: speedMs,
    heightM,
    lightning: z.boolean().optional(),
    poorVisibility: z.boolean().optional(),
    ice: z.boolean().optional(),
  }),
  z
    .object({
      commandId,
      type: z.literal('defect.report'),
      componentId: z.uuid().optional(),
      stepId: z.string().min(1).max(64).optional(),
      description: z.string().trim().min(5, 'Describe the defect').max(2000),
      photoId: z.uuid(),
    })
    .refine((c) => c.componentId || c.stepId, { message: 'Name the component or the step', path: ['componentId'] }),
  z.object({ commandId, type: z.literal('plan.revise'), plan: planSchema, reason }),
  /** The acting supervisor ends the shift: the board shows the make-safe checklist. */
  z.object({ commandId, type: z.literal('shift.end') }),
  z.object({ commandId, type: z.literal('shift.item.done'), itemId: z.string().min(1).max(64), note: z.string().trim().min(1).max(500).optional() }),
  /** The outgoing acting supervisor's note; what is done, open, defects and overrides are listed by the server from the board. */
  z.object({
    commandId,
    type: z.literal('handover.write'),
    hazards: z.string().trim().min(3, 'Say what the next shift must watch for, or “none”').max(2000),
    note: z.string().trim().max(4000),
    toUserId: z.uuid().optional(),
  }),
  z.object({ commandId, type: z.literal('handover.acknowledge') }),
  /** The competent person's shift inspection before the next shift (29 CFR 1926.1412(d), from memory). */
  z.object({ commandId, type: z.literal('shift.inspect'), note: z.string().trim().min(3, 'Say what was inspected and found').max(2000) }),
  z.object({ commandId, type: z.literal('shift.acknowledge'), role: shiftStartRoleSchema }),
  z.object({ commandId, type: z.literal('shift.start') }),
]);
export type BoardCommand = z.infer<typeof boardCommandSchema>;
export type BoardCommandType = BoardCommand['type'];

/** Body of POST /api/jobs/:id/acting-supervisor: an administrator names the acting supervisor when the outgoing one is unreachable. */
export const actingTransferSchema = z.object({ userId: z.uuid('Choose the supervisor'), reason });

/**
 * Commands accepted while the job is stopped; everything else waits for the resume. A stopped
 * job can still be made safe for the night (a wind stop at the end of the day) and handed over.
 */
export const commandsWhileStopped: ReadonlySet<BoardCommandType> = new Set([
  'job.stop',
  'job.stop.note',
  'weather.record',
  'defect.report',
  'job.resume',
  'briefing.acknowledge',
  'shift.end',
  'shift.item.done',
  'handover.write',
  'handover.acknowledge',
]);

/** Commands accepted while the make-safe checklist is being done: no work goes on. */
export const commandsWhileMakingSafe: ReadonlySet<BoardCommandType> = new Set([
  'job.stop',
  'job.stop.note',
  'weather.record',
  'defect.report',
  'job.resume',
  'briefing.acknowledge',
  'shift.item.done',
  'handover.write',
  'handover.acknowledge',
  'hold.withdraw',
]);

/** Commands accepted while the job is made safe: the handover, the start-of-shift hold and what prepares it. */
export const commandsWhileMadeSafe: ReadonlySet<BoardCommandType> = new Set([
  'weather.record',
  'defect.report',
  'briefing.acknowledge',
  'handover.write',
  'handover.acknowledge',
  'shift.inspect',
  'shift.acknowledge',
  'shift.start',
  'plan.revise',
  'job.cancel',
]);

/**
 * Commands only the acting supervisor sends: each lets work go on, ends or starts a shift, or
 * hands the job over. Another supervisor of the crew is refused (`not_acting_supervisor`).
 */
export const actingSupervisorCommands: ReadonlySet<BoardCommandType> = new Set(['hold.release', 'job.resume', 'stage.skip', 'shift.end', 'shift.start', 'handover.write']);

/** Commands a person may send before acknowledging the briefing for the current plan version and shift: reports that keep people safe, and the briefing itself. */
export const commandsBeforeBriefing: ReadonlySet<BoardCommandType> = new Set([
  'job.start',
  'job.cancel',
  'briefing.acknowledge',
  'job.stop',
  'job.stop.note',
  'weather.record',
  'defect.report',
  'hold.withdraw',
  'handover.write',
  'handover.acknowledge',
  'plan.revise',
]);

/**
 * Every code a board command's refusal can carry, over HTTP or the socket, so clients can react
 * without parsing words. tests/server/policies/refusal-codes.test.ts scans the server code a
 * command passes through and fails when a code sent there is missing here (or listed but never sent).
 */
export const refusalCodes = [
  // Who may act (server/policies/index.ts)
  'forbidden',
  'role_not_allowed',
  // The session and the transport
  'unauthenticated',
  'token_invalid',
  'token_expired',
  'session_ended',
  'account_inactive',
  'not_found',
  'validation',
  'malformed_json',
  'too_large',
  'unsupported_encoding',
  'bad_request',
  'internal',
  'command_id_reused',
  // The edge (server/middlewares/input-guard.ts, server/sockets/limits.ts, server/errors.ts): refused before any handler
  'too_deep',
  'forbidden_field',
  'too_many_commands',
  'malformed_path',
  // The server's storage and its restarts (server/db/faults.ts, server/db/write-queue.ts): 503, nothing recorded
  'storage_full',
  'storage_busy',
  'storage_readonly',
  'storage_failed',
  'server_restarting',
  // The board's state and rules (server/commands/board.ts)
  'invalid_state',
  'already_released',
  'already_acknowledged',
  'job_stopped',
  'job_closed',
  'not_inspector',
  'already_briefed',
  'briefing_required',
  'one_person_two_roles',
  'values_mismatch',
  'check_wait',
  'check_locked',
  'mandatory_hold',
  'stage_blocked',
  'weather_required',
  'out_of_limit',
  'out_of_order',
  'stop_cause_required',
  'stop_pressed_again',
  // Shifts (server/commands/board.ts, shared/board/shifts.ts)
  'not_acting_supervisor',
  'shift_busy',
  'making_safe',
  'made_safe',
  'shift_not_ready',
  'handover_missing',
  // A defect report quarantines its component through the fleet's inspection path
  'component_retired',
  // Evidence and defects (server/commands/uploads.ts attachUploads, server/commands/board.ts)
  'photo_already_used',
  'component_not_on_job',
] as const;
