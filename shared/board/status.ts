import type { CrewRole } from '../schemas/jobs.js';
import type { OutOfLimitEntry } from './readings.js';
import type { BoardHold, BoardStage, BoardState, BoardStep, OutOfLimit } from './types.js';

/**
 * What the board says now, derived from its state alone: which stages are current, what comes
 * next, the board's status in a word, what a person still has to answer, and the readings out of
 * limit. Pure, so every view and its tests read the same answer.
 */

/** Stages the crew is working on now (in progress or at their hold point), in plan order. */
export function currentStages(board: Pick<BoardState, 'stages'>): BoardStage[] {
  return board.stages.filter((s) => s.state === 'active' || s.state === 'holding').sort((a, b) => a.order - b.order);
}

/** The one stage a single-line view (cab, TV) leads with: the earliest stage in progress or holding. */
export function focusStage(board: Pick<BoardState, 'stages'>): BoardStage | null {
  return currentStages(board)[0] ?? null;
}

/** The next thing to happen in a stage, said as a fact about the board, never as an order. */
export type NextStep =
  | { kind: 'step'; step: BoardStep }
  | { kind: 'hold'; hold: BoardHold }
  | { kind: 'blocked'; description: string }
  | { kind: 'none' };

/**
 * What comes next in a stage: a reported defect blocks it first; then its first open step in plan
 * order; when every step is done, its hold point; otherwise nothing.
 */
export function nextStep(stage: BoardStage | null): NextStep {
  if (!stage) return { kind: 'none' };
  if (stage.blockedBy) return { kind: 'blocked', description: stage.blockedBy.description };
  const step = stage.steps.find((s) => s.state === 'open');
  if (step && stage.state === 'active') return { kind: 'step', step };
  if (stage.hold && (stage.hold.state === 'open' || stage.hold.state === 'acknowledged')) return { kind: 'hold', hold: stage.hold };
  return { kind: 'none' };
}

/** The overall state of the board the cab and the TV show, in three words a crew uses. */
export type BoardStatus = 'stopped' | 'made-safe' | 'making-safe' | 'holding' | 'open' | 'not-started' | 'finished';

/**
 * Stopped wins over everything; then a job made safe (no work until the next shift starts) and a
 * shift ending (the make-safe checklist, no work); a stage at its hold point makes the board
 * holding; otherwise open. A board that is not working never reads "open".
 */
export function boardStatus(board: Pick<BoardState, 'job' | 'stages' | 'shift'>): BoardStatus {
  const state = board.job.state;
  if (state === 'stopped') return 'stopped';
  if (state === 'made_safe') return 'made-safe';
  if (state === 'planning' || state === 'ready') return 'not-started';
  if (state === 'complete' || state === 'cancelled') return 'finished';
  if (board.shift?.phase === 'making_safe') return 'making-safe';
  return board.stages.some((s) => s.state === 'holding') ? 'holding' : 'open';
}

/** A hold that needs this person's acknowledgment under one of their roles. */
export interface PendingAcknowledgment {
  stage: BoardStage;
  hold: BoardHold;
  role: CrewRole;
}

/**
 * The holds open now that still need one of this person's roles: the role is required, nobody has
 * acknowledged under it, and this person has not acknowledged the hold under another role (one
 * person never answers one hold twice). The hold card offers exactly these, so what a person is
 * asked to acknowledge is decided here only.
 */
export function pendingAcknowledgments(board: Pick<BoardState, 'stages'>, userId: string, roles: readonly CrewRole[]): PendingAcknowledgment[] {
  const out: PendingAcknowledgment[] = [];
  for (const stage of currentStages(board)) {
    const hold = stage.hold;
    if (!hold || hold.state !== 'open' || stage.blockedBy) continue;
    if (hold.acknowledgments.some((a) => a.userId === userId)) continue;
    // The inspector's acknowledgment of a sign-off fills the inspector's slot, not the role they hold on the crew.
    const role = hold.requiredRoles.find((r) => roles.includes(r) && !hold.acknowledgments.some((a) => a.role === r && !a.inspector));
    if (role) out.push({ stage, hold, role });
  }
  return out;
}

/**
 * The stages whose hold this person has something to do at now: an acknowledgment still theirs to
 * give (`pendingAcknowledgments`), or one they gave under one of these roles and may withdraw until
 * the release. Plan order.
 */
export function holdsForMe(board: Pick<BoardState, 'stages'>, userId: string, roles: readonly CrewRole[]): BoardStage[] {
  const pending = new Set(pendingAcknowledgments(board, userId, roles).map((p) => p.stage.id));
  return currentStages(board).filter(
    (s) => pending.has(s.id) || ((s.hold?.state === 'open' || s.hold?.state === 'acknowledged') && s.hold.acknowledgments.some((a) => a.userId === userId && !a.inspector && roles.includes(a.role))),
  );
}

/** Open steps of the current stages this person's roles may complete, in plan order. */
export function myOpenSteps(board: Pick<BoardState, 'stages'>, roles: readonly CrewRole[]): { stage: BoardStage; step: BoardStep }[] {
  return currentStages(board).flatMap((stage) =>
    stage.state === 'active' && !stage.blockedBy ? stage.steps.filter((s) => s.state === 'open' && s.allowedRoles.some((r) => roles.includes(r))).map((step) => ({ stage, step })) : [],
  );
}

/** Whether a stage asks for a radio check: its plan has the radio-check step, or it moves the crane. */
export function radioCheckOf(stage: BoardStage | null): { done: boolean } | null {
  if (!stage) return null;
  const step = stage.steps.find((s) => /(^|\.)radio-check$/.test(s.id));
  if (step) return { done: step.state === 'done' };
  return stage.involvesCraneMovement ? { done: false } : null;
}

/** Stage titles by id, for naming dependencies. */
export function stageTitles(board: Pick<BoardState, 'stages'>): Map<string, string> {
  return new Map(board.stages.map((s) => [s.id, `${s.order}. ${s.title}`]));
}

/** How old a reading is, in words: "just now", "4 min ago", "2 h 5 min ago". */
export function ageWords(iso: string, nowMs: number): string {
  const minutes = Math.floor((nowMs - Date.parse(iso)) / 60_000);
  if (!Number.isFinite(minutes)) return 'unknown age';
  if (minutes < 1) return 'just now';
  if (minutes < 60) return `${minutes} min ago`;
  const hours = Math.floor(minutes / 60);
  return `${hours} h ${minutes % 60} min ago`;
}

/** A reading out of limit, said in words beside the planned value or the limit. */
export interface OutOfLimitLine {
  stageId: string;
  stageOrder: number;
  stepId: string;
  /** "Stage 9, Reeve the main hoist: Parts of line 5, planned 6." */
  words: string;
}

const withUnit = (n: number | null, unit: string | null) => `${n}${unit ? (unit === '%' ? ' %' : ` ${unit}`) : ''}`;

/** The reading beside what it is held to, in words: "Parts of line: 5 recorded, the plan says 6." */
export function outOfLimitWords(step: Pick<BoardStep, 'records' | 'outOfLimit'>): string {
  return step.outOfLimit ? readingWords(step.records?.label ?? null, step.outOfLimit) : '';
}

function readingWords(stepLabel: string | null, o: OutOfLimit): string {
  const label = stepLabel ?? 'Reading';
  const value = o.valueNumber === null ? `“${o.value}” (not a number)` : withUnit(o.valueNumber, o.unit);
  if (o.kind === 'plan' && o.planned !== null) return `${label}: ${value} recorded, the plan says ${withUnit(o.planned, o.unit)}${o.tolerance ? ` ± ${withUnit(o.tolerance, o.unit)}` : ''}.`;
  if (o.kind === 'max' && o.limit !== null) return `${label}: ${value} recorded, over the limit of ${withUnit(o.limit, o.unit)}.`;
  if (o.kind === 'min' && o.limit !== null) return `${label}: ${value} recorded, under the minimum of ${withUnit(o.limit, o.unit)}.`;
  if (o.kind === 'wind' && o.limit !== null) return `${label}: ${value} recorded, over the ${o.source ?? 'wind'} limit of ${withUnit(o.limit, 'm/s')}.`;
  return `${label}: ${o.reason.replace(/\.+$/, '')}.`;
}

/**
 * The entries of `outOfLimitSteps` or `outOfLimitBeforeHold` (shared/board/readings.ts) in words.
 * Which readings count is decided there, once, for the screens and the server's refusal alike.
 */
export function outOfLimitLines(entries: readonly OutOfLimitEntry[]): OutOfLimitLine[] {
  return entries.map((e) => ({ stageId: e.stageId, stageOrder: e.stageOrder, stepId: e.stepId, words: `Stage ${e.stageOrder}, ${readingWords(e.label, e.outOfLimit)}` }));
}
