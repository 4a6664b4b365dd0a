import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import { findStep } from '../../shared/board/apply.js';
import { WEATHER_FRESH_MS, weatherOverLimit, windPhase } from '../../shared/board/rules.js';
import type { BoardStage, BoardState } from '../../shared/board/types.js';
import { planProblems } from '../../shared/plan/index.js';
import { commandsWhileStopped, type BoardCommand } from '../../shared/schemas/commands.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import { valueCheckFieldLabels } from '../../shared/schemas/plan.js';
import type { AppContext } from '../context.js';
import { Component } from '../entities/Component.js';
import type { Job } from '../entities/Job.js';
import { JobPlan } from '../entities/JobPlan.js';
import type { User } from '../entities/User.js';
import { badRequest, HttpError } from '../errors.js';
import { redactPlan } from '../presenters/plan.js';
import { referencePlan, withFreshBriefing } from '../queries/plans.js';
import { recordInspection } from './fleet.js';
import { crewRolesOf } from './jobs.js';
import { runJobCommand, type CommandOutcome, type EventDraft } from './job-writer.js';
import { attachUploads } from './uploads.js';

const refuse = (status: number, code: string, message: string, fields?: { path: string; message: string }[]) => new HttpError(status, code, message, fields);
const invalidState = (message: string) => refuse(409, 'invalid_state', message);

/** Who may send each command, beyond being in the crew: the role it is recorded under. */
const supervisorOnly: ReadonlySet<BoardCommand['type']> = new Set(['job.start', 'job.complete', 'job.cancel', 'hold.release', 'stage.skip', 'job.resume', 'plan.revise']);

/**
 * Runs one board command through the command writer: checks the person, the state and the rules,
 * and returns the event it produced (or the first answer for a repeated command id).
 */
export async function runBoardCommand(context: AppContext, actor: User, jobId: string, command: BoardCommand): Promise<CommandOutcome> {
  return runJobCommand(context, jobId, { commandId: command.commandId, body: command, actor }, async (manager, job) => {
    const board = job.board;
    if (!board) throw invalidState('This job has no board yet.');
    const roles = (await crewRolesOf(manager, job.id, actor.id)).filter((r) => r !== 'viewer');
    if (roles.length === 0) {
      const viewer = (await crewRolesOf(manager, job.id, actor.id)).includes('viewer');
      throw refuse(403, viewer ? 'role_not_allowed' : 'not_crew', viewer ? 'Viewers watch the board; they cannot act on it.' : 'You are not in this job’s crew. Ask its supervisor to add you.');
    }
    if (board.job.state === 'stopped' && !commandsWhileStopped.has(command.type)) {
      throw refuse(409, 'job_stopped', 'The job is stopped. Only the supervisor’s resume (after a fresh weather reading), stop notes, weather readings and defect reports are accepted.');
    }
    if (supervisorOnly.has(command.type) && !roles.includes('supervisor')) {
      throw refuse(403, 'role_not_allowed', 'Only the job’s supervisor can do that.');
    }
    const ctx: HandlerContext = { context, manager, job, board, actor, roles, now: context.now() };
    return handlers[command.type](ctx, command as never);
  });
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

const handlers: { [T in BoardCommand['type']]: Handler<T> } = {
  async 'job.start'({ board }) {
    if (board.job.state !== 'ready') throw invalidState(`The job is ${board.job.state}; only a ready job can start.`);
    return { type: 'job.started', role: 'supervisor', data: {} };
  },

  async 'job.complete'({ board }) {
    requireLive(board, 'complete the job');
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
    if (board.briefed.some((b) => b.userId === actor.id && b.planVersion === board.planVersion)) {
      throw refuse(409, 'already_briefed', `You have already acknowledged the briefing for plan version ${board.planVersion}.`);
    }
    return { type: 'briefing.acknowledged', role: roles[0], data: { planVersion: board.planVersion } };
  },

  async 'step.complete'({ manager, job, board, actor, roles }, c) {
    requireLive(board, 'complete steps');
    const stage = stageOfStep(board, c.stepId);
    notBlocked(stage);
    const step = findStep(board, c.stepId);
    if (stage.state !== 'active') throw invalidState(`“${stage.title}” is ${stateWords[stage.state]}; its steps can be completed only while it is in progress.`);
    if (step.state === 'done') throw invalidState(`“${step.text}” is already done by ${step.doneBy?.name}.`);
    const role = roles.find((r) => step.allowedRoles.includes(r));
    if (!role) throw refuse(403, 'role_not_allowed', `This step is for: ${step.allowedRoles.join(', ')}.`);
    const fields = [];
    if (step.requiresPhoto && !c.photoId) fields.push({ path: 'photoId', message: 'This step needs a photo' });
    if (step.records && !c.value) fields.push({ path: 'value', message: `Enter the ${step.records.label.toLowerCase()}` });
    if (fields.length) throw badRequest('This step needs more before it can be marked done.', fields);
    if (step.records?.kind === 'serial' && c.value) {
      const component = await manager.findOneBy(Component, { serial: c.value });
      if (!component) throw badRequest('No component has that serial number.', [{ path: 'value', message: `${c.value} is not in the fleet records` }]);
      if (component.status !== 'serviceable') throw badRequest(`${c.value} is ${component.status}: it cannot be fitted.`, [{ path: 'value', message: `${c.value} is ${component.status}` }]);
      if (step.records.typeId && component.typeId !== step.records.typeId) {
        throw badRequest(`${c.value} is a ${component.typeId}, this position needs a ${step.records.typeId}.`, [{ path: 'value', message: 'Wrong component type for this position' }]);
      }
    }
    if (c.photoId) await attachUploads(manager, [c.photoId], 'step', job.id, actor.id, 'photoId');
    return { type: 'step.completed', role, data: { stageId: stage.id, stepId: step.id, value: c.value ?? null, photoId: c.photoId ?? null } };
  },

  async 'step.reopen'({ board, roles }, c) {
    requireLive(board, 'reopen steps');
    const stage = stageOfStep(board, c.stepId);
    const step = findStep(board, c.stepId);
    if (step.state !== 'done') throw invalidState(`“${step.text}” is not done.`);
    if (stage.state !== 'active' && stage.state !== 'holding') throw invalidState(`“${stage.title}” is ${stateWords[stage.state]}; its steps can no longer be reopened.`);
    const role = roles.includes('supervisor') ? 'supervisor' : roles.find((r) => step.allowedRoles.includes(r));
    if (!role) throw refuse(403, 'role_not_allowed', `This step is for: ${step.allowedRoles.join(', ')}.`);
    return { type: 'step.reopened', role, data: { stageId: stage.id, stepId: step.id, clearedAcknowledgments: stage.hold?.acknowledgments.length ?? 0 } };
  },

  async 'hold.acknowledge'({ manager, job, board, actor, roles }, c) {
    requireLive(board, 'acknowledge holds');
    const stage = stageOfHold(board, c.holdId);
    notBlocked(stage);
    const hold = stage.hold!;
    if (!roles.includes(c.role)) throw refuse(403, 'role_not_allowed', `You are not a ${c.role} on this job.`);
    if (!hold.requiredRoles.includes(c.role)) throw refuse(403, 'role_not_allowed', `This hold is acknowledged by: ${hold.requiredRoles.join(', ')}.`);
    if (!board.briefed.some((b) => b.userId === actor.id && b.planVersion === board.planVersion)) {
      throw refuse(409, 'briefing_required', `Acknowledge the briefing for plan version ${board.planVersion} first.`);
    }
    if (hold.state === 'waiting') throw invalidState(`“${hold.title}” is not open yet: the steps of “${stage.title}” are not all done.`);
    if (hold.state !== 'open') throw invalidState(`“${hold.title}” is already ${hold.state}.`);
    const mine = hold.acknowledgments.find((a) => a.userId === actor.id);
    if (mine) throw refuse(409, 'one_person_two_roles', `You have already acknowledged this hold as ${mine.role}; another person must acknowledge as ${c.role}.`);
    const taken = hold.acknowledgments.find((a) => a.role === c.role);
    if (taken) throw invalidState(`${taken.name} has already acknowledged as ${c.role}.`);
    if (hold.valueCheck) {
      const fields = [];
      if (!c.photoId) fields.push({ path: 'photoId', message: 'Attach a photo of the controller’s screen' });
      for (const field of hold.valueCheck.fields) if (!c.values?.[field]) fields.push({ path: `values.${field}`, message: `Enter what the controller shows for ${valueCheckFieldLabels[field].toLowerCase()}` });
      if (fields.length) throw badRequest('Type every value the controller shows and attach a photo of its screen.', fields);
      const plan = await manager.findOneByOrFail(JobPlan, { jobId: job.id, version: board.planVersion });
      const expected = plan.plan.stages.find((s) => s.hold?.id === hold.id)?.hold?.valueCheck?.fields ?? [];
      const differ = expected.filter((f) => !sameValue(c.values![f.field] ?? '', f.expected));
      if (differ.length) {
        // Name the fields that differ, never the values the plan expects.
        throw refuse(409, 'values_mismatch', `These do not match the plan: ${differ.map((f) => valueCheckFieldLabels[f.field]).join(', ')}. Check the controller with the supervisor before going on.`, differ.map((f) => ({ path: `values.${f.field}`, message: 'Does not match the plan' })));
      }
    }
    if (c.photoId) await attachUploads(manager, [c.photoId], 'hold', job.id, actor.id, 'photoId');
    return { type: 'hold.acknowledged', role: c.role, data: { stageId: stage.id, holdId: hold.id, role: c.role, photoId: c.photoId ?? null, values: c.values ?? null } };
  },

  async 'hold.withdraw'({ board, actor }, c) {
    requireLive(board, 'withdraw acknowledgments');
    const stage = stageOfHold(board, c.holdId);
    const hold = stage.hold!;
    if (hold.state === 'released' || hold.state === 'waived') throw invalidState(`“${hold.title}” is already ${hold.state}.`);
    if (!hold.acknowledgments.some((a) => a.userId === actor.id && a.role === c.role)) throw invalidState(`You have not acknowledged “${hold.title}” as ${c.role}.`);
    return { type: 'hold.withdrawn', role: c.role, data: { stageId: stage.id, holdId: hold.id, role: c.role } };
  },

  async 'hold.release'({ board }, c) {
    requireLive(board, 'release holds');
    const stage = stageOfHold(board, c.holdId);
    notBlocked(stage);
    const hold = stage.hold!;
    if (hold.state !== 'acknowledged') {
      const missing = hold.requiredRoles.filter((r) => !hold.acknowledgments.some((a) => a.role === r));
      throw invalidState(hold.state === 'open' ? `“${hold.title}” still needs: ${missing.join(', ')}.` : `“${hold.title}” is ${hold.state}; it cannot be released now.`);
    }
    return { type: 'hold.released', role: 'supervisor', data: { stageId: stage.id, holdId: hold.id } };
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

  async 'job.stop.note'({ board, roles }, c) {
    if (board.job.state !== 'stopped') throw invalidState('The job is not stopped.');
    return { type: 'job.stop.noted', role: roles[0], data: { reason: c.reason } };
  },

  async 'job.resume'({ board, now }, c) {
    if (board.job.state !== 'stopped') throw invalidState('The job is not stopped.');
    const w = board.weather;
    if (!w || now.getTime() - Date.parse(w.at) > WEATHER_FRESH_MS) {
      throw refuse(409, 'weather_required', 'Record a weather reading first: a resume needs one from the last 15 minutes.');
    }
    const limit = board.windLimits ? board.windLimits[windPhase(board)] : null;
    const over = weatherOverLimit(w, limit);
    if (over) throw refuse(409, 'weather_required', `The latest reading is over the limits (${over}). Wait and record a new reading.`);
    return { type: 'job.resumed', role: 'supervisor', data: { reason: c.reason } };
  },

  async 'weather.record'({ board, roles }, c) {
    if (!['ready', 'live', 'stopped'].includes(board.job.state)) throw invalidState(`The job is ${board.job.state}.`);
    const reading = { meanMs: c.meanMs, gustMs: c.gustMs, lightning: c.lightning ?? false, poorVisibility: c.poorVisibility ?? false, ice: c.ice ?? false };
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
    if (board.job.state !== 'live' && board.job.state !== 'stopped') throw invalidState(`The job is ${board.job.state}; record defects on the fleet screens instead.`);
    let stageId: string | null = null;
    let serial: string | null = null;
    if (c.stepId) stageId = stageOfStep(board, c.stepId).id;
    if (c.componentId) {
      const component = await manager.findOneBy(Component, { id: c.componentId });
      if (!component) throw badRequest('There is no such component.', [{ path: 'componentId', message: 'Unknown component' }]);
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
    if (!['ready', 'live', 'stopped'].includes(board.job.state)) throw invalidState(`The job is ${board.job.state}; the plan can be revised only after it is ready and before it ends.`);
    if (c.plan.kind !== job.kind) throw badRequest('The plan is for another kind of job.', [{ path: 'plan.kind', message: `This job is ${job.kind}` }]);
    const problems = planProblems(c.plan, await referencePlan(manager, job));
    const mandatory = problems.filter((p) => p.code === 'mandatory_hold_removed' || p.code === 'mandatory_role_removed');
    if (mandatory.length) throw refuse(409, 'mandatory_hold', 'Mandatory holds and their required roles cannot be removed.', mandatory.map((p) => ({ path: `plan.${p.path ?? ''}`, message: p.message })));
    if (problems.length) throw badRequest('The revised plan has problems.', problems.map((p) => ({ path: `plan.${p.path ?? ''}`, message: p.message })));
    const version = job.planVersion + 1;
    const plan = await withFreshBriefing(manager, job, c.plan);
    await manager.save(JobPlan, { jobId: job.id, version, plan, sourceHash: '', edited: true, reason: c.reason, createdBy: actor.id, createdAt: now.toISOString() });
    job.planVersion = version;
    return { type: 'plan.revised', role: 'supervisor', data: { planVersion: version, plan: redactPlan(plan), reason: c.reason } };
  },
};
