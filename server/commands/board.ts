import { randomUUID } from 'node:crypto';
import { In, type EntityManager } from 'typeorm';
import { findStep } from '../../shared/board/apply.js';
import { readingOutOfLimit, readingsBlockingRelease } from '../../shared/board/readings.js';
import { CHECK_FAILURES_BEFORE_REVIEW, CHECK_RETRY_MS, checkRetryAt, holdGatesBoomMovement, holdGatesCraneMovement, stepNeedsFreshWeather, stepsAfter, stepsNeededFirst, weatherOverLimit, weatherVerdict, windPhase } from '../../shared/board/rules.js';
import type { BoardStage, BoardState } from '../../shared/board/types.js';
import { holdsNeedPeople, protectsMandatoryHold, revisionProblems } from '../../shared/plan/index.js';
import { actingSupervisorCommands, commandsBeforeBriefing, commandsWhileMadeSafe, commandsWhileMakingSafe, commandsWhileStopped, type BoardCommand } from '../../shared/schemas/commands.js';
import { briefingShift, handoverFacts, isActingSupervisor, isBriefed, makeSafeChecklist, shiftEndBlockers, shiftOf, shiftStartMissing } from '../../shared/board/shifts.js';
import { JobOverride } from '../entities/JobOverride.js';
import { siteDateTime, siteTime } from '../../shared/time.js';
import { authorizeBoardCommand, boardCommandRoles } from '../policies/index.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import { valueCheckFieldLabels } from '../../shared/schemas/plan.js';
import type { AppContext } from '../context.js';
import { Component } from '../entities/Component.js';
import { JobCrew } from '../entities/JobCrew.js';
import { JobEvent } from '../entities/JobEvent.js';
import type { Job } from '../entities/Job.js';
import { JobPlan } from '../entities/JobPlan.js';
import { Upload } from '../entities/Upload.js';
import { User } from '../entities/User.js';
import { badRequest, HttpError } from '../errors.js';
import { redactPlan } from '../presenters/plan.js';
import { crewRolesOf } from '../queries/crew.js';
import { referencePlan, withFreshBriefing } from '../queries/plans.js';
import { recordAsBuilt } from './as-built.js';
import { identityKey, recordInspection } from './fleet.js';
import type { EventData, EventDraft } from '../../shared/events/log.js';
import { runJobCommand, type CommandOutcome } from './job-writer.js';
import { attachUploads } from './uploads.js';

/** A resume is refused this long after a stop was pressed again (common practice, no source: the time to see a press on the board and ask why). */
export const RESUME_AFTER_PRESS_MS = 10_000;

const refuse = (status: number, code: string, message: string, fields?: { path: string; message: string }[]) => new HttpError(status, code, message, fields);
const invalidState = (message: string) => refuse(409, 'invalid_state', message);

/**
 * The one way in for a board command, whatever the transport (POST /api/jobs/:jobId/commands and
 * the socket's `board:command` both call it). Inside the command writer's queued transaction it
 * reads the person's crew roles, asks the policy (`authorizeBoardCommand`: in the crew at all,
 * and a role that sends this command), then checks the state and the rules, and returns the event
 * it produced (or the first answer for a repeated command id). A failed blind value check is
 * recorded as its own event and then answered as a refusal (a repeated command id gets the same
 * refusal).
 */
export async function runBoardCommand(context: AppContext, actor: User, jobId: string, command: BoardCommand): Promise<CommandOutcome> {
  const outcome = await runJobCommand(context, jobId, { commandId: command.commandId, body: command, actor }, async (manager, job) => {
    // Read under the queue, so a crew change committed before this command counts.
    const roles = authorizeBoardCommand(actor, command.type, await crewRolesOf(manager, job.id, actor.id));
    const board = job.board;
    if (!board) throw invalidState('This job has no board yet.');
    if (board.job.state === 'complete' || board.job.state === 'cancelled') {
      throw refuse(409, 'job_closed', `The job is ${board.job.state}: its board is read-only and its record is closed. Stop any movement by radio and signal.`);
    }
    if (board.job.state === 'made_safe' && !commandsWhileMadeSafe.has(command.type)) {
      const safe = shiftOf(board).makeSafe?.madeSafe;
      throw refuse(
        409,
        'made_safe',
        `The job was made safe${safe ? ` on ${siteDateTime(safe.at, job.timeZone)} (last item by ${safe.name})` : ''}. No work until the acting supervisor releases the start-of-shift hold: the shift inspection, the operator’s and supervisor’s acknowledgments, everyone’s briefing and a fresh weather reading.`,
      );
    }
    if (board.job.state === 'stopped' && !commandsWhileStopped.has(command.type)) {
      throw refuse(409, 'job_stopped', 'The job is stopped. Only the supervisor’s resume (after a fresh weather reading), stop notes, weather readings, defect reports, briefings, the handover and making safe are accepted.');
    }
    if (shiftOf(board).phase === 'making_safe' && !commandsWhileMakingSafe.has(command.type)) {
      throw refuse(409, 'making_safe', 'The shift is ending: the crew is making the crane safe. No work until the next shift starts; finish the make-safe checklist.');
    }
    if (board.planVersion > 0 && !commandsBeforeBriefing.has(command.type) && !isBriefed(board, actor.id)) {
      throw refuse(409, 'briefing_required', `Acknowledge the briefing for plan version ${board.planVersion}, shift ${briefingShift(board)}, first: nobody acts on the board before they have been briefed for the shift.`);
    }
    if (actingSupervisorCommands.has(command.type)) requireActing(board, actor, actingWords[command.type] ?? 'does that');
    const ctx: HandlerContext = { context, manager, job, board, actor, roles, now: context.now() };
    return handlers[command.type](ctx, command as never);
  });
  if (outcome.event.type === 'hold.check.failed') throw checkFailedRefusal(outcome.event.data);
  return outcome;
}

/**
 * The answer to a failed blind check. It never says which fields differed (the supervisor sees
 * that) so the check cannot be solved by trying values one field at a time.
 */
function checkFailedRefusal(data: EventData<'hold.check.failed'>): HttpError {
  const attempt = data.failuresSinceReview ?? 1;
  const seconds = Math.round(CHECK_RETRY_MS / 1000);
  const locked = attempt >= CHECK_FAILURES_BEFORE_REVIEW;
  return refuse(
    409,
    'values_mismatch',
    locked
      ? `What you typed does not match the plan. That is ${attempt} failed checks: the hold is locked until the supervisor has reviewed them with you. Every failed check is recorded.`
      : `What you typed does not match the plan. Read the controller again and take a new photo of its screen; you can try again in ${seconds} seconds. Every failed check is recorded and shown to the supervisor.`,
  );
}

interface HandlerContext {
  context: AppContext;
  manager: EntityManager;
  job: Job;
  board: BoardState;
  actor: User;
  roles: CrewRole[];
  now: Date;
}

type Handler<T extends BoardCommand['type']> = (ctx: HandlerContext, command: Extract<BoardCommand, { type: T }>) => Promise<EventDraft>;

/** Who may record a weather reading, in words, for refusals that ask for one. */
const weatherRecorders = `${boardCommandRoles['weather.record'].join(', ').replace(/, ([^,]*)$/, ' or $1')} can record one on the weather panel`;

/**
 * Refuses a release that would count an acknowledgment by someone whose account is now disabled.
 * Disabling withdraws them at once (server/commands/users.ts), after its own commit; this holds
 * even if that step never ran.
 */
async function requireActiveAcknowledgers(manager: EntityManager, people: readonly { userId: string; name: string }[], what: string): Promise<void> {
  if (!people.length) return;
  const inactive = await manager.findBy(User, { id: In(people.map((p) => p.userId)), active: false });
  if (!inactive.length) return;
  const names = inactive.map((u) => u.displayName).join(', ');
  throw refuse(
    409,
    'account_inactive',
    `${what} cannot be released: ${names} acknowledged it and ${inactive.length === 1 ? 'their account is' : 'their accounts are'} disabled. Take them off the crew (their acknowledgment is withdrawn) and have someone else acknowledge.`,
  );
}

/** What the acting supervisor alone does, for the refusal. */
const actingWords: Partial<Record<BoardCommand['type'], string>> = {
  'hold.release': 'releases holds',
  'job.resume': 'resumes work after a stop',
  'stage.skip': 'skips stages',
  'shift.end': 'ends the shift',
  'shift.start': 'starts the shift',
  'handover.write': 'writes the handover note',
};

/** Refuses unless the acting supervisor sends it. */
function requireActing(board: BoardState, actor: User, doing: string): void {
  if (isActingSupervisor(board, actor.id)) return;
  const acting = board.actingSupervisor!;
  throw refuse(403, 'not_acting_supervisor', `Only the acting supervisor, ${acting.name}, ${doing}. To take over, acknowledge their handover note; if they cannot be reached, an administrator can make you the acting supervisor.`);
}

function requireLive(board: BoardState, doing: string): void {
  if (board.job.state !== 'live') throw invalidState(`The job is ${board.job.state}; you can ${doing} only while it is live.`);
}

function stageOfStep(board: BoardState, stepId: string): BoardStage {
  const stage = board.stages.find((s) => s.steps.some((st) => st.id === stepId));
  if (!stage) throw badRequest('There is no such step in the current plan.', [{ path: 'stepId', message: 'Unknown step' }]);
  return stage;
}

function stageOfHold(board: BoardState, holdId: string): BoardStage {
  const stage = board.stages.find((s) => s.hold?.id === holdId);
  if (!stage) throw badRequest('There is no such hold in the current plan.', [{ path: 'holdId', message: 'Unknown hold' }]);
  return stage;
}

function notBlocked(stage: BoardStage): void {
  if (stage.blockedBy) throw refuse(409, 'stage_blocked', `“${stage.title}” is blocked by a reported defect (${stage.blockedBy.description}). The supervisor must revise the plan first.`);
}

const stateWords: Record<string, string> = { locked: 'not started yet', active: 'in progress', holding: 'at its hold point', done: 'done', skipped: 'skipped' };

function sameValue(typed: string, expected: string): boolean {
  const a = typed.trim().toLowerCase().replace(',', '.');
  const b = expected.trim().toLowerCase();
  const na = Number(a);
  const nb = Number(b);
  if (a !== '' && Number.isFinite(na) && Number.isFinite(nb)) return Math.abs(na - nb) <= 1e-6 * Math.max(1, Math.abs(nb));
  return a === b;
}

/** Refuses unless the weather is fresh and within the raising limit: the one wind rule, for a stage that moves the boom and the hold before it. */
function requireRaisingWeather(board: BoardState, now: Date, why: string): void {
  requireWeather(board, now, why, 'raising');
}

/** Refuses unless the last reading is fresh and within the limit of the phase; says who may record one. */
function requireWeather(board: BoardState, now: Date, why: string, phase?: 'assembly' | 'raising'): void {
  const verdict = weatherVerdict(board, now.getTime(), phase);
  if (!verdict.ok) throw refuse(409, 'weather_required', `${why}: ${verdict.problem} The ${weatherRecorders}.`);
}


const handlers: { [T in BoardCommand['type']]: Handler<T> } = {
  async 'job.start'({ board }) {
    if (board.job.state !== 'ready') throw invalidState(`The job is ${board.job.state}; only a ready job can start.`);
    return { type: 'job.started', role: 'supervisor', data: {} };
  },

  async 'job.complete'({ board }) {
    requireLive(board, 'complete the job');
    const signOff = board.stages.find((s) => s.hold?.signOff);
    if (signOff) throw invalidState(`This plan ends with “${signOff.hold!.title}”: the job completes when that hold is released.`);
    const open = board.stages.filter((s) => s.state !== 'done' && s.state !== 'skipped');
    if (open.length) throw invalidState(`${open.length} stage${open.length > 1 ? 's are' : ' is'} not finished: ${open.map((s) => s.title).join('; ')}.`);
    return { type: 'job.completed', role: 'supervisor', data: {} };
  },

  async 'job.cancel'({ board }, c) {
    if (board.job.state === 'complete' || board.job.state === 'cancelled') throw invalidState(`The job is already ${board.job.state}.`);
    return { type: 'job.cancelled', role: 'supervisor', data: { reason: c.reason } };
  },

  async 'briefing.acknowledge'({ board, actor, roles }) {
    if (board.planVersion === 0) throw invalidState('There is no locked plan to be briefed on yet.');
    if (board.job.state === 'complete' || board.job.state === 'cancelled') throw invalidState(`The job is ${board.job.state}.`);
    const shift = briefingShift(board);
    if (isBriefed(board, actor.id)) {
      throw refuse(409, 'already_briefed', `You have already acknowledged the briefing for plan version ${board.planVersion}, shift ${shift}.`);
    }
    return { type: 'briefing.acknowledged', role: roles[0], data: { planVersion: board.planVersion, shift } };
  },

  async 'step.complete'({ manager, job, board, actor, roles, now }, c) {
    requireLive(board, 'complete steps');
    const stage = stageOfStep(board, c.stepId);
    notBlocked(stage);
    const step = findStep(board, c.stepId);
    if (stage.state !== 'active') throw invalidState(`“${stage.title}” is ${stateWords[stage.state]}; its steps can be completed only while it is in progress.`);
    if (step.state === 'done') throw invalidState(`“${step.text}” is already done by ${step.doneBy?.name}.`);
    const role = roles.find((r) => step.allowedRoles.includes(r));
    if (!role) throw refuse(403, 'role_not_allowed', `This step is for: ${step.allowedRoles.join(', ')}.`);
    const first = stepsNeededFirst(stage, step.id);
    if (first.length) throw refuse(409, 'out_of_order', `Not yet: ${first.map((f) => `“${f.text}”`).join(' and ')} must be done before “${step.text}”.`);
    const weatherNeed = stepNeedsFreshWeather(stage);
    if (weatherNeed === 'raising') requireRaisingWeather(board, now, `“${stage.title}” moves the boom`);
    else if (weatherNeed === 'current') requireWeather(board, now, `“${stage.title}” moves the crane`);
    const fields = [];
    if (step.requiresPhoto && !c.photoId) fields.push({ path: 'photoId', message: 'This step needs a photo' });
    if (step.records && !c.value) fields.push({ path: 'value', message: `Enter the ${step.records.label.toLowerCase()}` });
    if (fields.length) throw badRequest('This step needs more before it can be marked done.', fields);
    let value = c.value ?? null;
    if (step.records?.kind === 'serial' && c.value) {
      const component = await componentBySerial(manager, c.value);
      if (!component) throw badRequest('No component has that serial number.', [{ path: 'value', message: `${c.value} is not in the fleet records` }]);
      // Letter case does not make another part: the record keeps the serial as the fleet registers it.
      value = component.serial;
      if (component.status !== 'serviceable') throw badRequest(`${c.value} is ${component.status}: it cannot be fitted.`, [{ path: 'value', message: `${c.value} is ${component.status}` }]);
      if (step.records.typeId && component.typeId !== step.records.typeId) {
        throw badRequest(`${c.value} is a ${component.typeId}, this position needs a ${step.records.typeId}.`, [{ path: 'value', message: 'Wrong component type for this position' }]);
      }
    }
    if (c.photoId) await attachUploads(manager, [c.photoId], 'step', job.id, actor.id, 'photoId');
    // The comparison is written into the record for people reading it; the reducer works it out again.
    const outOfLimit = readingOutOfLimit(step.records, value, board.windLimits);
    return { type: 'step.completed', role, data: { stageId: stage.id, stepId: step.id, value, photoId: c.photoId ?? null, outOfLimit } };
  },

  async 'step.reopen'({ board, roles }, c) {
    requireLive(board, 'reopen steps');
    const stage = stageOfStep(board, c.stepId);
    const step = findStep(board, c.stepId);
    if (step.state !== 'done') throw invalidState(`“${step.text}” is not done.`);
    if (stage.state !== 'active' && stage.state !== 'holding') throw invalidState(`“${stage.title}” is ${stateWords[stage.state]}; its steps can no longer be reopened.`);
    const role = roles.includes('supervisor') ? 'supervisor' : roles.find((r) => step.allowedRoles.includes(r));
    if (!role) throw refuse(403, 'role_not_allowed', `This step is for: ${step.allowedRoles.join(', ')}.`);
    const alsoReopened = stepsAfter(stage, step.id).filter((id) => stage.steps.find((s) => s.id === id)?.state === 'done');
    return { type: 'step.reopened', role, data: { stageId: stage.id, stepId: step.id, alsoReopened, clearedAcknowledgments: stage.hold?.acknowledgments.length ?? 0 } };
  },

  async 'hold.acknowledge'({ manager, job, board, actor, roles, now }, c) {
    requireLive(board, 'acknowledge holds');
    const stage = stageOfHold(board, c.holdId);
    notBlocked(stage);
    const hold = stage.hold!;
    if (!roles.includes(c.role)) throw refuse(403, 'role_not_allowed', `You are not a ${c.role} on this job.`);
    if (c.asInspector) {
      if (!hold.signOff) throw invalidState(`“${hold.title}” is not the job’s final sign-off; it has no inspection to acknowledge.`);
      if (!actor.canInspect) {
        throw refuse(403, 'not_inspector', 'Only a person the administrator marks as qualified to inspect cranes can acknowledge the inspection. Ask the administrator, or the inspector on site.');
      }
    } else if (!hold.requiredRoles.includes(c.role)) {
      throw refuse(403, 'role_not_allowed', `This hold is acknowledged by: ${hold.requiredRoles.join(', ')}${hold.signOff ? ', and a qualified inspector' : ''}.`);
    }
    if (hold.state === 'waiting') throw invalidState(`“${hold.title}” is not open yet: the steps of “${stage.title}” are not all done.`);
    if (hold.state !== 'open') throw invalidState(`“${hold.title}” is already ${hold.state}.`);
    const slot = c.asInspector ? 'the inspector' : c.role;
    const mine = hold.acknowledgments.find((a) => a.userId === actor.id);
    // The same press from two of one person's screens is one acknowledgment, not a second role.
    if (mine && (c.asInspector ? mine.inspector : !mine.inspector && mine.role === c.role)) throw refuse(409, 'already_acknowledged', `You have already acknowledged this hold as ${slot}.`);
    if (mine) throw refuse(409, 'one_person_two_roles', `You have already acknowledged this hold as ${mine.inspector ? 'the inspector' : mine.role}; another person must acknowledge as ${slot}.`);
    const taken = hold.acknowledgments.find((a) => (c.asInspector ? a.inspector : !a.inspector && a.role === c.role));
    if (taken) throw invalidState(`${taken.name} has already acknowledged as ${slot}.`);
    if (hold.valueCheck) {
      if (hold.checkLocked) {
        throw refuse(409, 'check_locked', `“${hold.title}” is locked after ${hold.failuresSinceReview} failed checks. The supervisor must review them with the crew before anyone checks again.`);
      }
      const retryAt = checkRetryAt(hold, actor.id, now.getTime());
      if (retryAt) {
        const seconds = Math.max(1, Math.ceil((Date.parse(retryAt) - now.getTime()) / 1000));
        throw refuse(409, 'check_wait', `Read the controller again before the next try: wait ${seconds} more second${seconds === 1 ? '' : 's'} and take a new photo of its screen.`);
      }
      const fields = [];
      if (!c.photoId) fields.push({ path: 'photoId', message: 'Attach a photo of the controller’s screen' });
      for (const field of hold.valueCheck.fields) if (!c.values?.[field]) fields.push({ path: `values.${field}`, message: `Enter what the controller shows for ${valueCheckFieldLabels[field].toLowerCase()}` });
      if (fields.length) throw badRequest('Type every value the controller shows and attach a photo of its screen.', fields);
      if (hold.checkFailures?.some((f) => f.userId === actor.id)) {
        // After a failed check the photo must be new: the screen is read again, not the old picture.
        const photo = await manager.findOneBy(Upload, { id: c.photoId! });
        if (photo?.ownerKind) throw badRequest('Take a new photo of the controller’s screen for this check.', [{ path: 'photoId', message: 'This photo was used for an earlier check' }]);
      }
      const plan = await manager.findOneByOrFail(JobPlan, { jobId: job.id, version: board.planVersion });
      const expected = plan.plan.stages.find((s) => s.hold?.id === hold.id)?.hold?.valueCheck?.fields ?? [];
      const differ = expected.filter((f) => !sameValue(c.values![f.field] ?? '', f.expected));
      if (differ.length) {
        // Recorded as an event (the supervisor sees who, when and which fields, never the values),
        // then answered as a refusal that names no field.
        await attachUploads(manager, [c.photoId!], 'hold', job.id, actor.id, 'photoId');
        const failuresSinceReview = (hold.failuresSinceReview ?? 0) + 1;
        return { type: 'hold.check.failed', role: c.role, data: { stageId: stage.id, holdId: hold.id, role: c.role, photoId: c.photoId ?? null, fields: differ.map((f) => f.field), failuresSinceReview } };
      }
    }
    if (c.photoId) await attachUploads(manager, [c.photoId], 'hold', job.id, actor.id, 'photoId');
    return {
      type: 'hold.acknowledged',
      role: c.role,
      data: { stageId: stage.id, holdId: hold.id, role: c.role, photoId: c.photoId ?? null, values: c.values ?? null, ...(c.asInspector ? { inspector: true } : {}) },
    };
  },

  async 'hold.withdraw'({ board, actor }, c) {
    requireLive(board, 'withdraw acknowledgments');
    const stage = stageOfHold(board, c.holdId);
    const hold = stage.hold!;
    if (hold.state === 'released' || hold.state === 'waived') throw invalidState(`“${hold.title}” is already ${hold.state}.`);
    if (!hold.acknowledgments.some((a) => a.userId === actor.id && a.role === c.role)) throw invalidState(`You have not acknowledged “${hold.title}” as ${c.role}.`);
    return { type: 'hold.withdrawn', role: c.role, data: { stageId: stage.id, holdId: hold.id, role: c.role } };
  },

  async 'hold.release'({ manager, job, board, actor, now }, c) {
    requireLive(board, 'release holds');
    const stage = stageOfHold(board, c.holdId);
    notBlocked(stage);
    const hold = stage.hold!;
    // Two presses (two devices, a retry with a new id) race: the second is told who released it and when.
    if (hold.state === 'released') {
      const by = hold.releasedBy;
      throw refuse(409, 'already_released', `“${hold.title}” is already released${by ? ` by ${by.name} at ${siteTime(by.at, job.timeZone)}` : ''}. Nothing more to do for this hold.`);
    }
    if (hold.state !== 'acknowledged') {
      const missing: string[] = hold.requiredRoles.filter((r) => !hold.acknowledgments.some((a) => !a.inspector && a.role === r));
      if (hold.signOff && !hold.acknowledgments.some((a) => a.inspector)) missing.push('a qualified inspector');
      throw invalidState(hold.state === 'open' ? `“${hold.title}” still needs: ${missing.join(', ')}.` : `“${hold.title}” is ${hold.state}; it cannot be released now.`);
    }
    // A hold meant for two people is not passed by one: whoever acknowledged under another role, or as the inspector, does not release.
    const mine = hold.acknowledgments.find((a) => a.userId === actor.id && (a.role !== 'supervisor' || a.inspector));
    if (mine) {
      throw refuse(409, 'one_person_two_roles', `You acknowledged “${hold.title}” as ${mine.inspector ? 'the inspector' : mine.role}; another supervisor must release it: hand the job over to them first, since only the acting supervisor releases holds.`);
    }
    if (hold.signOff) {
      const open = board.stages.filter((s) => s.id !== stage.id && s.state !== 'done' && s.state !== 'skipped');
      if (open.length) throw invalidState(`The job cannot be signed off while ${open.length === 1 ? 'a stage is' : `${open.length} stages are`} not finished: ${open.map((s) => `“${s.title}”`).join(', ')}.`);
    }
    const blocking = readingsBlockingRelease(board, stage.id);
    if (blocking.length) {
      throw refuse(
        409,
        'out_of_limit',
        `“${hold.title}” cannot be released: ${blocking.map((b) => `“${b.text}” (${b.stageTitle}): ${b.outOfLimit.reason}`).join(' ')} ${
          blocking.every((b) => b.stageId === stage.id)
            ? 'Reopen the step and redo it within the limit, or revise the plan.'
            : 'Redo the step within the limit (reopen it while its stage is open; once its stage is finished, revise the plan so the step is done again).'
        }`,
        blocking.map((b) => ({ path: `steps.${b.stepId}`, message: b.outOfLimit.reason })),
      );
    }
    await requireActiveAcknowledgers(manager, hold.acknowledgments, `“${hold.title}”`);
    if (holdGatesBoomMovement(board, stage.id)) requireRaisingWeather(board, now, `Releasing “${hold.title}” lets the boom move`);
    else if (holdGatesCraneMovement(board, stage.id)) requireWeather(board, now, `Releasing “${hold.title}” starts a stage that moves the crane`);
    // The sign-off completes the job: the crane unit now stands as it was built, in the same transaction.
    if (hold.signOff) await recordAsBuilt(manager, job, board, now);
    return { type: 'hold.released', role: 'supervisor', data: { stageId: stage.id, holdId: hold.id } };
  },

  async 'hold.check.review'({ board }, c) {
    if (board.job.state !== 'live' && board.job.state !== 'stopped') throw invalidState(`The job is ${board.job.state}.`);
    const stage = stageOfHold(board, c.holdId);
    const hold = stage.hold!;
    if (!hold.valueCheck) throw invalidState(`“${hold.title}” has no value check to review.`);
    if (!(hold.failuresSinceReview > 0)) throw invalidState(`“${hold.title}” has no failed checks since the last review.`);
    return { type: 'hold.check.reviewed', role: 'supervisor', data: { stageId: stage.id, holdId: hold.id, note: c.note, failuresReviewed: hold.failuresSinceReview } };
  },

  async 'stage.skip'({ board }, c) {
    requireLive(board, 'skip stages');
    const stage = board.stages.find((s) => s.id === c.stageId);
    if (!stage) throw badRequest('There is no such stage in the current plan.', [{ path: 'stageId', message: 'Unknown stage' }]);
    if (stage.hold?.mandatory) throw refuse(409, 'mandatory_hold', `“${stage.title}” has a mandatory hold (${stage.hold.title}); it can never be skipped.`);
    if (stage.state === 'done' || stage.state === 'skipped') throw invalidState(`“${stage.title}” is already ${stage.state}.`);
    return { type: 'stage.skipped', role: 'supervisor', data: { stageId: stage.id, reason: c.reason } };
  },

  async 'job.stop'({ board, roles }, c) {
    if (board.job.state !== 'live' && board.job.state !== 'stopped') throw invalidState(`The job is ${board.job.state}, not live. Stop any movement by radio and signal.`);
    return { type: 'job.stopped', role: roles[0], data: { reason: c.reason || null, pressedAt: c.pressedAt, alreadyStopped: board.job.state === 'stopped' } };
  },

  async 'job.stop.note'({ board, actor, roles }, c) {
    if (board.job.state !== 'stopped' || !board.job.stop) throw invalidState('The job is not stopped.');
    const stop = board.job.stop;
    const pressed = stop.raisedBy.userId === actor.id || (stop.alsoPressedBy ?? []).some((p) => p.userId === actor.id);
    if (!pressed && !roles.includes('supervisor')) throw refuse(403, 'role_not_allowed', `The cause is recorded by whoever pressed stop (${stop.raisedBy.name}) or a supervisor.`);
    return { type: 'job.stop.noted', role: pressed ? roles[0] : 'supervisor', data: { reason: c.reason } };
  },

  async 'job.resume'({ manager, job, board, now }, c) {
    if (board.job.state !== 'stopped') throw invalidState('The job is not stopped.');
    if (!board.job.stop?.reason) {
      throw refuse(409, 'stop_cause_required', `Record why the job stopped first: ${board.job.stop?.raisedBy.name ?? 'whoever pressed stop'} or a supervisor adds the cause, then resume.`);
    }
    // A resume needs a fresh reading within the limit of the phase, whatever stopped the job; with
    // no known limit there is nothing to hold the wind to, so work does not go on until the
    // manufacturer's limit is known.
    requireWeather(board, now, 'Work cannot resume yet');
    // A stop pressed again while the supervisor was resuming is never resumed over unseen: the board
    // shows the press at once, so a resume sent within seconds of it was decided without it.
    const again = board.job.stop.alsoPressedBy?.at(-1);
    const since = again ? now.getTime() - Date.parse(again.at) : Infinity;
    if (again && since < RESUME_AFTER_PRESS_MS) {
      const seconds = Math.max(1, Math.round(since / 1000));
      // The board keeps a second press without its words; the log has them.
      const press = await manager.findOne(JobEvent, { where: { jobId: job.id, type: 'job.stopped' }, order: { seq: 'DESC' } });
      const reason = typeof press?.data.reason === 'string' && press.data.reason ? ` (“${press.data.reason}”)` : '';
      throw refuse(409, 'stop_pressed_again', `${again.name} pressed stop again ${seconds} second${seconds === 1 ? '' : 's'} ago${reason}. Find out why before work goes on, then resume.`);
    }
    return { type: 'job.resumed', role: 'supervisor', data: { reason: c.reason } };
  },

  async 'weather.record'({ board, roles }, c) {
    if (!['ready', 'live', 'stopped', 'made_safe'].includes(board.job.state)) throw invalidState(`The job is ${board.job.state}.`);
    const reading = { meanMs: c.meanMs, gustMs: c.gustMs, heightM: c.heightM, lightning: c.lightning ?? false, poorVisibility: c.poorVisibility ?? false, ice: c.ice ?? false };
    if (reading.gustMs < reading.meanMs) throw badRequest('A gust cannot be slower than the mean wind.', [{ path: 'gustMs', message: 'Gust is below the mean' }]);
    const phase = windPhase(board);
    const limit = board.windLimits ? board.windLimits[phase] : null;
    const over = weatherOverLimit(reading, limit);
    return {
      type: 'weather.recorded',
      role: roles[0],
      data: { reading, phase, limit, stop: over && board.job.state === 'live' ? { reason: over } : null, overLimit: over },
    };
  },

  async 'defect.report'({ manager, job, board, actor, roles, now }, c) {
    if (!['live', 'stopped', 'made_safe'].includes(board.job.state)) throw invalidState(`The job is ${board.job.state}; record defects on the fleet screens instead.`);
    let stageId: string | null = null;
    let serial: string | null = null;
    if (c.stepId) stageId = stageOfStep(board, c.stepId).id;
    if (c.componentId) {
      const component = await manager.findOneBy(Component, { id: c.componentId });
      if (!component) throw badRequest('There is no such component.', [{ path: 'componentId', message: 'Unknown component' }]);
      // Only a part of this job's crane: one registered on its unit, or one whose serial a step of
      // this board recorded as fitted. (An assist crane has no registered components.) A report
      // here must not quarantine another crane's part behind its own crew's back.
      const fittedHere = board.stages.some((s) => s.steps.some((st) => st.state === 'done' && st.records?.kind === 'serial' && st.doneBy?.value === component.serial));
      if (component.unitId !== job.craneUnitId && !fittedHere) {
        throw refuse(409, 'component_not_on_job', `${component.serial} is not a part of this job’s crane. Report a defect on another crane’s part on the fleet screens (an inspection), and tell that crane’s supervisor.`, [
          { path: 'componentId', message: 'Not a part of this job’s crane' },
        ]);
      }
      serial = component.serial;
      // Quarantine through the fleet's own inspection path, in this same transaction.
      await recordInspection(manager, component.id, { result: 'damaged', notes: `Defect reported on the board: ${c.description}`, photoIds: [c.photoId] }, actor, now);
      stageId ??= board.stages.find((s) => s.steps.some((st) => st.doneBy?.value === serial))?.id ?? null;
    } else {
      await attachUploads(manager, [c.photoId], 'defect', job.id, actor.id, 'photoId');
    }
    return { type: 'defect.reported', role: roles[0], data: { defectId: randomUUID(), componentId: c.componentId ?? null, serial, stageId, description: c.description, photoId: c.photoId } };
  },

  async 'plan.revise'({ manager, job, board, actor, now }, c) {
    if (!['ready', 'live', 'stopped', 'made_safe'].includes(board.job.state)) throw invalidState(`The job is ${board.job.state}; the plan can be revised only after it is ready and before it ends.`);
    if (c.plan.kind !== job.kind) throw badRequest('The plan is for another kind of job.', [{ path: 'plan.kind', message: `This job is ${job.kind}` }]);
    // The plan validator (shared/plan/validate.ts), against the generated plan and the version in
    // force, so nothing the crew is working to is weakened; and the crew must still cover every hold.
    const current = await manager.findOneBy(JobPlan, { jobId: job.id, version: job.planVersion });
    const crew = await manager.findBy(JobCrew, { jobId: job.id });
    const problems = [
      ...revisionProblems(c.plan, await referencePlan(manager, job), current?.plan ?? null),
      ...holdsNeedPeople(c.plan, crew.map((m) => ({ userId: m.userId, role: m.role }))),
    ];
    const mandatory = problems.filter((p) => protectsMandatoryHold(p));
    if (mandatory.length) {
      throw refuse(409, 'mandatory_hold', `The revision weakens a mandatory hold: ${mandatory[0].message}`, mandatory.map((p) => ({ path: `plan.${p.path ?? ''}`, message: p.message })));
    }
    if (problems.length) throw badRequest('The revised plan has problems.', problems.map((p) => ({ path: `plan.${p.path ?? ''}`, message: p.message })));
    const version = job.planVersion + 1;
    const plan = await withFreshBriefing(manager, job, c.plan);
    await manager.save(JobPlan, { jobId: job.id, version, plan, sourceHash: '', edited: true, reason: c.reason, createdBy: actor.id, createdAt: now.toISOString() });
    job.planVersion = version;
    return { type: 'plan.revised', role: 'supervisor', data: { planVersion: version, plan: redactPlan(plan), reason: c.reason } };
  },

  async 'shift.end'({ board }) {
    const blockers = shiftEndBlockers(board);
    if (blockers.length) throw refuse(409, 'shift_busy', `The shift cannot end yet. ${blockers.join(' ')}`);
    if (board.job.state === 'stopped' && !board.job.stop?.reason) {
      throw refuse(409, 'stop_cause_required', `Record why the job stopped first: ${board.job.stop?.raisedBy.name ?? 'whoever pressed stop'} or a supervisor adds the cause, then end the shift.`);
    }
    const { workPhase, items } = makeSafeChecklist(board);
    return { type: 'shift.ending', role: 'supervisor', data: { shift: shiftOf(board).number, workPhase, items } };
  },

  async 'shift.item.done'({ board, roles }, c) {
    const makeSafe = shiftOf(board).makeSafe;
    if (shiftOf(board).phase !== 'making_safe' || !makeSafe) throw invalidState('The shift is not ending: there is no make-safe checklist to tick.');
    const item = makeSafe.items.find((i) => i.id === c.itemId);
    if (!item) throw badRequest('There is no such item on the make-safe checklist.', [{ path: 'itemId', message: 'Unknown item' }]);
    if (item.doneBy) throw invalidState(`“${item.text}” was already ticked by ${item.doneBy.name}.`);
    const role = roles.find((r) => item.roles.includes(r));
    if (!role) throw refuse(403, 'role_not_allowed', `This item is for: ${item.roles.join(', ')}.`);
    if (item.asksNote && !c.note) throw badRequest('This item asks for a few words.', [{ path: 'note', message: 'Write what you found or noted' }]);
    const madeSafe = makeSafe.items.every((i) => i.id === item.id || i.doneBy);
    return { type: 'shift.item.done', role, data: { itemId: item.id, role, note: c.note ?? null, madeSafe } };
  },

  async 'handover.write'({ manager, job, board, actor }, c) {
    if (!['live', 'stopped', 'made_safe'].includes(board.job.state)) throw invalidState(`The job is ${board.job.state}; a handover is written while it is under way or made safe.`);
    let to: { userId: string; name: string } | null = null;
    if (c.toUserId) {
      const member = board.crew.find((m) => m.userId === c.toUserId && m.role === 'supervisor');
      if (!member || member.userId === actor.id) throw badRequest('Hand over to another supervisor in the crew.', [{ path: 'toUserId', message: 'Not another supervisor of this job' }]);
      to = { userId: member.userId, name: member.name };
    }
    const overrides = (await manager.findBy(JobOverride, { jobId: job.id })).filter((o) => o.approvedBy).map((o) => `${o.figureLabel}: ${o.reason}`);
    return { type: 'handover.written', role: 'supervisor', data: { shift: shiftOf(board).number, to, ...handoverFacts(board), overrides, hazards: c.hazards, note: c.note } };
  },

  async 'handover.acknowledge'({ board, actor }) {
    const note = board.handovers?.at(-1);
    if (!note || note.acknowledgedBy) throw refuse(409, 'handover_missing', 'There is no handover note waiting to be read: the acting supervisor writes one first.');
    // A note passes the role only from the person who holds it: one overtaken by a transfer or a later handover hands nothing over.
    if (board.actingSupervisor && note.from.userId !== board.actingSupervisor.userId) {
      throw refuse(409, 'handover_missing', `This handover note was written by ${note.from.name}, who is no longer the acting supervisor. ${board.actingSupervisor.name} writes a new one.`);
    }
    if (note.from.userId === actor.id) throw refuse(409, 'one_person_two_roles', 'You wrote this handover note; the supervisor taking over acknowledges it.');
    if (note.to && note.to.userId !== actor.id) throw refuse(403, 'role_not_allowed', `This handover note is for ${note.to.name}.`);
    return { type: 'handover.acknowledged', role: 'supervisor', data: { handoverSeq: note.seq, from: note.from } };
  },

  async 'shift.inspect'({ board, actor, roles }, c) {
    if (board.job.state !== 'made_safe') throw invalidState('The shift inspection is made while the job is made safe, before the next shift starts.');
    if (!actor.canInspect) {
      throw refuse(403, 'not_inspector', 'The shift inspection is made by a competent person: someone the administrator marks as qualified to inspect cranes.');
    }
    if (board.actingSupervisor?.userId === actor.id) {
      throw refuse(409, 'one_person_two_roles', 'The acting supervisor acknowledges the shift inspection, so another competent person makes it.');
    }
    const done = shiftOf(board).start?.inspection;
    if (done) throw invalidState(`${done.name} has already recorded the shift inspection.`);
    return { type: 'shift.inspected', role: roles[0], data: { shift: shiftOf(board).number + 1, note: c.note } };
  },

  async 'shift.acknowledge'({ board, actor, roles }, c) {
    if (board.job.state !== 'made_safe') throw invalidState('The start-of-shift hold is acknowledged while the job is made safe.');
    if (!roles.includes(c.role)) throw refuse(403, 'role_not_allowed', `You are not a ${c.role} on this job.`);
    if (c.role === 'supervisor') requireActing(board, actor, 'acknowledges the start-of-shift hold as supervisor');
    const start = shiftOf(board).start;
    if (!start?.inspection) throw refuse(409, 'shift_not_ready', 'The shift inspection comes first: a competent person records it, then the operator and the supervisor acknowledge.');
    const taken = start[c.role];
    if (taken) throw invalidState(`${taken.name} has already acknowledged as ${c.role}.`);
    if (start.operator?.userId === actor.id || start.supervisor?.userId === actor.id) throw refuse(409, 'one_person_two_roles', 'You have already acknowledged the start-of-shift hold; another person acknowledges the other role.');
    // The acknowledgments confirm someone else's inspection: as on the sign-off, nobody passes their own.
    if (start.inspection.userId === actor.id) throw refuse(409, 'one_person_two_roles', 'You made the shift inspection; the operator and the acting supervisor who acknowledge it must be other people.');
    return { type: 'shift.start.acknowledged', role: c.role, data: { shift: shiftOf(board).number + 1, role: c.role } };
  },

  async 'shift.start'({ manager, board, now }) {
    if (board.job.state !== 'made_safe') throw invalidState('The job is not made safe: there is no shift to start.');
    const missing = shiftStartMissing(board, now.getTime());
    if (missing.length) {
      const code = missing.some((m) => m.kind === 'inspection' || m.kind === 'acknowledgment') ? 'shift_not_ready' : missing[0].kind === 'weather' ? 'weather_required' : 'briefing_required';
      const weather = missing.some((m) => m.kind === 'weather') ? ` The ${weatherRecorders}.` : '';
      throw refuse(409, code, `The start-of-shift hold still needs: ${missing.map((m) => m.text).join('; ')}.${weather}`);
    }
    const start = shiftOf(board).start;
    await requireActiveAcknowledgers(manager, [start?.inspection, start?.operator, start?.supervisor].filter((p) => !!p), 'The start-of-shift hold');
    // The inspection counts only from someone still marked qualified to inspect.
    const inspector = start?.inspection ? await manager.findOneBy(User, { id: start.inspection.userId }) : null;
    if (start?.inspection && !inspector?.canInspect) {
      throw refuse(409, 'not_inspector', `${start.inspection.name} is no longer marked as qualified to inspect cranes: a competent person makes the shift inspection again.`);
    }
    return { type: 'shift.started', role: 'supervisor', data: { shift: shiftOf(board).number + 1 } };
  },
};

/** The registered part with this serial, letter case ignored as the fleet screens ignore it. */
async function componentBySerial(manager: EntityManager, serial: string): Promise<Component | null> {
  const exact = await manager.findOneBy(Component, { serial });
  if (exact) return exact;
  const key = identityKey(serial);
  const all = await manager.find(Component, { select: { id: true, serial: true } });
  const match = all.find((c) => identityKey(c.serial) === key);
  return match ? manager.findOneBy(Component, { id: match.id }) : null;
}
