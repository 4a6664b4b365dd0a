import type { Withdrawn } from '../events/log.js';
import { makeSafeItems, type WorkPhase } from '../plan/templates/shift.js';
import type { CrewRole } from '../schemas/jobs.js';
import { movesBoom, weatherVerdict } from './rules.js';
import type { BoardState, MakeSafeItem, ShiftState } from './types.js';

/**
 * The rules of shifts that both sides need: which shift the board is in, who the acting
 * supervisor is, whether a person is briefed for the shift, when a shift may end, the make-safe
 * checklist for the phase of the work, what the start-of-shift hold still needs, and whose
 * acknowledgments leave with a crew change. Pure: time comes in as a parameter.
 */

/** The start-of-shift hold is not a stage's hold; withdrawals and the record name it by this id. */
export const SHIFT_START_HOLD_ID = 'shift-start';

/** The board's shift; a board from before shifts is in its first, working. */
export function shiftOf(board: Pick<BoardState, 'shift'>): ShiftState {
  return board.shift ?? { number: 1, phase: 'working', startedAt: null, makeSafe: null, start: null };
}

/** The shift people are briefed for now: while the job is made safe, the next one. */
export function briefingShift(board: Pick<BoardState, 'shift' | 'job'>): number {
  const shift = shiftOf(board);
  return board.job.state === 'made_safe' ? shift.number + 1 : shift.number;
}

/** Has this person acknowledged the briefing for the plan version in force and the shift? */
export function isBriefed(board: Pick<BoardState, 'shift' | 'job' | 'briefed' | 'planVersion'>, userId: string): boolean {
  const shift = briefingShift(board);
  return board.briefed.some((b) => b.userId === userId && b.planVersion === board.planVersion && (b.shift ?? 1) === shift);
}

/** Crew members (by person) who work on the board and are not briefed for the plan version and the shift; viewers only watch. */
export function unbriefedCrew(board: Pick<BoardState, 'shift' | 'job' | 'briefed' | 'planVersion' | 'crew'>): { userId: string; name: string }[] {
  const people = new Map(board.crew.filter((m) => m.role !== 'viewer').map((m) => [m.userId, m.name]));
  return [...people].filter(([userId]) => !isBriefed(board, userId)).map(([userId, name]) => ({ userId, name }));
}

/**
 * Is this person the acting supervisor? A board from before the role (no `actingSupervisor`
 * recorded) lets any supervisor act, as it always did.
 */
export function isActingSupervisor(board: Pick<BoardState, 'actingSupervisor'>, userId: string): boolean {
  return board.actingSupervisor === undefined || board.actingSupervisor === null || board.actingSupervisor.userId === userId;
}

/** Where the work stands, for the make-safe checklist. */
export function workPhase(board: Pick<BoardState, 'job' | 'stages'>): WorkPhase {
  // A raise (or lowering) whose steps are all done is up (or down) while its hold waits.
  const moved = board.stages.some((s) => movesBoom(s) && (s.state === 'done' || s.state === 'holding'));
  if (board.job.kind === 'dismantling') return moved ? 'boom-lowered' : 'boom-up';
  return moved ? 'boom-up' : 'boom-on-ground';
}

/** The make-safe checklist for the job's kind and the phase of the work, from the plan templates. */
export function makeSafeChecklist(board: Pick<BoardState, 'job' | 'stages'>): { workPhase: WorkPhase; items: Omit<MakeSafeItem, 'doneBy'>[] } {
  const phase = workPhase(board);
  const items = Object.entries(makeSafeItems[board.job.kind])
    .filter(([, item]) => !item.phases || item.phases.includes(phase))
    .map(([id, item]) => ({ id, text: item.text, roles: [...item.roles], asksNote: item.asksNote ?? false }));
  return { workPhase: phase, items };
}

/**
 * Why the shift cannot end now, in sentences; empty when it can. Not while a hold is partly
 * acknowledged (its acknowledgments would outlive the shift and the people who gave them), nor
 * while the crane is part-way through a movement (a stage that moves the crane with some of its
 * steps done and some not).
 */
export function shiftEndBlockers(board: Pick<BoardState, 'stages' | 'job' | 'shift'>): string[] {
  const problems: string[] = [];
  const shift = shiftOf(board);
  if (shift.phase !== 'working') problems.push(shift.phase === 'making_safe' ? 'The shift is already ending: finish the make-safe checklist.' : 'The job is already made safe.');
  if (board.job.state !== 'live' && board.job.state !== 'stopped') problems.push(`The job is ${board.job.state.replace('_', ' ')}; only a job under way can end a shift.`);
  for (const stage of board.stages) {
    const hold = stage.hold;
    if (hold && (hold.state === 'open' || hold.state === 'acknowledged') && hold.acknowledgments.length > 0) {
      problems.push(`“${hold.title}” is partly acknowledged (${hold.acknowledgments.map((a) => a.name).join(', ')}): release it, or have them withdraw, before the shift ends.`);
    }
    if (stage.state === 'active' && (stage.involvesCraneMovement || movesBoom(stage))) {
      const done = stage.steps.filter((s) => s.state === 'done').length;
      if (done > 0 && done < stage.steps.length) problems.push(`“${stage.title}” moves the crane and is part-way done: finish the movement or bring it to a safe stop first.`);
    }
  }
  return problems;
}

/** What the start-of-shift hold still needs, each with its kind; empty when the acting supervisor may release it. */
export interface ShiftStartGap {
  kind: 'state' | 'inspection' | 'acknowledgment' | 'weather' | 'briefing';
  text: string;
}

/** What the start-of-shift hold still needs before the acting supervisor may release it; empty when ready. */
export function shiftStartMissing(board: BoardState, nowMs: number): ShiftStartGap[] {
  const shift = shiftOf(board);
  const start = shift.start;
  if (board.job.state !== 'made_safe') return [{ kind: 'state', text: 'The job is not made safe: there is no shift to start.' }];
  const missing: ShiftStartGap[] = [];
  if (!start?.inspection) missing.push({ kind: 'inspection', text: 'the shift inspection by a competent person' });
  if (!start?.operator) missing.push({ kind: 'acknowledgment', text: 'the operator’s acknowledgment' });
  // Only the acting supervisor's own acknowledgment counts: one given before the role passed does not.
  if (!start?.supervisor || (board.actingSupervisor && start.supervisor.userId !== board.actingSupervisor.userId)) {
    missing.push({ kind: 'acknowledgment', text: 'the acting supervisor’s acknowledgment' });
  }
  const verdict = weatherVerdict(board, nowMs);
  if (!verdict.ok) missing.push({ kind: 'weather', text: verdict.problem! });
  const unbriefed = unbriefedCrew(board);
  if (unbriefed.length) missing.push({ kind: 'briefing', text: `the briefing for plan version ${board.planVersion}, shift ${shift.number + 1}, from ${unbriefed.map((p) => p.name).join(', ')}` });
  return missing;
}

/** What a handover note lists from the board: stages done, what is open, open defects. Overrides come from the job. */
export function handoverFacts(board: Pick<BoardState, 'stages' | 'defects'>): { done: string[]; open: string[]; defects: string[] } {
  const done = board.stages.filter((s) => s.state === 'done' || s.state === 'skipped').map((s) => (s.state === 'skipped' ? `${s.title} (skipped)` : s.title));
  const open = board.stages
    .filter((s) => s.state === 'active' || s.state === 'holding')
    .map((s) => {
      const left = s.steps.filter((st) => st.state !== 'done').length;
      if (s.state === 'holding' && s.hold) return `${s.title}: at its hold “${s.hold.title}” (${s.hold.state})`;
      return `${s.title}: ${left} of ${s.steps.length} steps to do`;
    });
  const blocked = new Set(board.stages.filter((s) => s.blockedBy).map((s) => s.blockedBy!.description));
  const defects = board.defects.map((d) => `${d.description} (reported by ${d.by}${blocked.has(d.description) ? ', blocks its stage' : ''})`);
  return { done, open, defects };
}

/**
 * The acknowledgments that leave with a crew change: on every hold not yet released (and the
 * start-of-shift hold), each acknowledgment whose person no longer holds that role in the crew
 * (an inspector's: whose person is no longer in the crew at all). `stillIn(userId, role)` says
 * who stays; `role` null asks about the person in any role.
 */
export function acknowledgmentsLeaving(board: BoardState, stillIn: (userId: string, role: CrewRole | null) => boolean): Withdrawn[] {
  const out: Withdrawn[] = [];
  for (const stage of board.stages) {
    const hold = stage.hold;
    if (!hold || hold.state === 'released' || hold.state === 'waived') continue;
    for (const a of hold.acknowledgments) {
      if (!stillIn(a.userId, a.inspector ? null : a.role)) out.push({ stageId: stage.id, holdId: hold.id, userId: a.userId, name: a.name, role: a.inspector ? 'inspector' : a.role });
    }
  }
  const start = shiftOf(board).start;
  if (start) {
    if (start.inspection && !stillIn(start.inspection.userId, null)) out.push({ stageId: null, holdId: SHIFT_START_HOLD_ID, userId: start.inspection.userId, name: start.inspection.name, role: 'inspector' });
    if (start.operator && !stillIn(start.operator.userId, 'operator')) out.push({ stageId: null, holdId: SHIFT_START_HOLD_ID, userId: start.operator.userId, name: start.operator.name, role: 'operator' });
    if (start.supervisor && !stillIn(start.supervisor.userId, 'supervisor')) out.push({ stageId: null, holdId: SHIFT_START_HOLD_ID, userId: start.supervisor.userId, name: start.supervisor.name, role: 'supervisor' });
  }
  return out;
}

/** Takes the withdrawn acknowledgments off the board (the reducer's half of a crew change), saying why on each hold. */
export function withdrawAcknowledgments(board: BoardState, withdrawn: readonly Withdrawn[], reason: string, at: string): void {
  for (const w of withdrawn) {
    if (w.holdId === SHIFT_START_HOLD_ID) {
      const start = board.shift?.start;
      if (!start) continue;
      if (w.role === 'inspector' && start.inspection?.userId === w.userId) start.inspection = null;
      else if (w.role === 'operator' && start.operator?.userId === w.userId) start.operator = null;
      else if (w.role === 'supervisor' && start.supervisor?.userId === w.userId) start.supervisor = null;
      else continue;
      start.reopenedBecause = { reason, at };
      continue;
    }
    const hold = board.stages.find((s) => s.id === w.stageId)?.hold;
    if (!hold || hold.state === 'released' || hold.state === 'waived') continue;
    const before = hold.acknowledgments.length;
    hold.acknowledgments = hold.acknowledgments.filter((a) => !(a.userId === w.userId && (w.role === 'inspector' ? a.inspector : !a.inspector && a.role === w.role)));
    if (hold.acknowledgments.length < before) {
      if (hold.state === 'acknowledged') hold.state = 'open';
      hold.reopenedBecause = { reason, at };
    }
  }
}

/** Which roles of open holds (and of the start-of-shift hold) a crew would leave with nobody; empty when it covers them. */
export function rolesLeftUncovered(board: BoardState, crew: readonly { userId: string; role: CrewRole }[]): { role: CrewRole; hold: string }[] {
  const has = (role: CrewRole) => crew.some((m) => m.role === role);
  const out: { role: CrewRole; hold: string }[] = [];
  for (const stage of board.stages) {
    const hold = stage.hold;
    if (!hold || hold.state === 'released' || hold.state === 'waived') continue;
    if (stage.state !== 'active' && stage.state !== 'holding') continue;
    for (const role of hold.requiredRoles) if (!has(role)) out.push({ role, hold: hold.title });
  }
  if (board.job.state === 'made_safe') {
    for (const role of ['operator', 'supervisor'] as const) if (!has(role)) out.push({ role, hold: 'the start-of-shift hold' });
  }
  const shift = shiftOf(board);
  if (shift.phase === 'making_safe') {
    // An item nobody left in the crew may tick would keep the job from ever being made safe.
    for (const item of shift.makeSafe?.items ?? []) {
      if (!item.doneBy && !item.roles.some(has)) out.push({ role: item.roles[0]!, hold: `the make-safe item “${item.text}”` });
    }
  }
  return out;
}
