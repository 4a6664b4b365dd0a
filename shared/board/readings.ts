import { asStated } from '../format.js';
import type { StepRecord } from '../schemas/plan.js';
import { gustOverLimit, parseReading } from './rules.js';
import type { BoardStage, BoardState, OutOfLimit } from './types.js';

export { parseReading };

/**
 * Readings compared with what they are held to. One pure function decides whether a recorded
 * value is out of limit; the reducer stores its answer on the step, so every screen and the
 * server's refusals say the same thing.
 */

/** Typed decimals are not exact in binary: 6.4 − 6.5 is 0.1000000000000005. Differences this small are the representation, not the reading. */
const REPRESENTATION_EPSILON = 1e-9;

/** A reading or limit as stated (never rounded: it is compared, not estimated), with its unit. */
function withUnit(n: number, unit: string | null): string {
  const text = asStated(n);
  return unit ? `${text} ${unit}` : text;
}

/**
 * Whether a value recorded on a step is out of what the step is held to; null when it is within
 * it or the step compares nothing. A value that is not a number is out of limit for every numeric
 * check. At a max or min limit counts as within it; a plan figure allows its stated tolerance.
 * Wind gusts go through the board's one wind rule (`gustOverLimit`).
 */
export function readingOutOfLimit(
  records: StepRecord | null,
  value: string | null,
  windLimits: BoardState['windLimits'],
): OutOfLimit | null {
  const check = records?.check;
  if (!records || !check || value === null) return null;
  const unit = check.kind === 'wind' ? 'm/s' : records.unit;
  const n = parseReading(value, unit);
  const base = { kind: check.kind, value, valueNumber: n, unit, planned: null, tolerance: null, limit: null } as const;
  const typed = n === null ? `“${value}” is not a number` : `${withUnit(n, unit)} was recorded`;
  switch (check.kind) {
    case 'plan': {
      const within = n !== null && Math.abs(n - check.planned) <= check.tolerance + REPRESENTATION_EPSILON * Math.max(1, Math.abs(check.planned));
      if (within) return null;
      const tol = check.tolerance > 0 ? ` (±${withUnit(check.tolerance, unit)})` : '';
      return { ...base, planned: check.planned, tolerance: check.tolerance, source: check.source || null, reason: `${typed}; the plan says ${withUnit(check.planned, unit)}${tol}.` };
    }
    case 'max': {
      if (n !== null && n <= check.limit + REPRESENTATION_EPSILON * Math.max(1, Math.abs(check.limit))) return null;
      return { ...base, limit: check.limit, source: check.source || null, reason: `${typed}; the limit is at most ${withUnit(check.limit, unit)}.` };
    }
    case 'min': {
      if (n !== null && n >= check.limit - REPRESENTATION_EPSILON * Math.max(1, Math.abs(check.limit))) return null;
      return { ...base, limit: check.limit, source: check.source || null, reason: `${typed}; it must be at least ${withUnit(check.limit, unit)}.` };
    }
    case 'wind': {
      const limit = windLimits ? windLimits[check.phase] : null;
      const source = `${check.phase} wind limit from the crane data`;
      if (n === null) return { ...base, limit: limit?.gustMs ?? null, source, reason: `${typed}; record the gust in m/s.` };
      const over = gustOverLimit(n, limit, check.phase);
      return over ? { ...base, limit: limit?.gustMs ?? null, source, reason: `${over}.` } : null;
    }
  }
}

/** One out-of-limit step, where it is and who recorded it. */
export interface OutOfLimitEntry {
  stageId: string;
  stageTitle: string;
  stageOrder: number;
  stepId: string;
  text: string;
  /** What the step records ("Parts of line"), for wording the entry; null when it names none. */
  label: string | null;
  by: { userId: string; name: string; role: string; at: string } | null;
  outOfLimit: OutOfLimit;
}

function entries(stages: readonly BoardStage[]): OutOfLimitEntry[] {
  return [...stages].sort((a, b) => a.order - b.order).flatMap((stage) =>
    stage.steps
      .filter((s) => s.state === 'done' && s.outOfLimit)
      .map((s) => ({
        stageId: stage.id,
        stageTitle: stage.title,
        stageOrder: stage.order,
        stepId: s.id,
        text: s.text,
        label: s.records?.label ?? null,
        by: s.doneBy ? { userId: s.doneBy.userId, name: s.doneBy.name, role: s.doneBy.role, at: s.doneBy.at } : null,
        outOfLimit: s.outOfLimit!,
      })),
  );
}

/** Every done step whose reading is out of limit, in plan order: the supervisor's list on the console and in the alerts. */
export function outOfLimitSteps(state: BoardState): OutOfLimitEntry[] {
  return entries(state.stages);
}

/**
 * The stage and every stage it waits for, directly or not (plan order). The walk does not stop at
 * an upstream hold already released: a non-mandatory hold lets a reading out of limit pass, and a
 * later mandatory hold must still see it (the screens and the server's refusal use this one walk).
 */
export function stageAndUpstream(state: BoardState, stageId: string): BoardStage[] {
  const byId = new Map(state.stages.map((s) => [s.id, s]));
  const seen = new Set<string>();
  const queue = [stageId];
  while (queue.length) {
    const id = queue.shift()!;
    if (seen.has(id) || !byId.has(id)) continue;
    seen.add(id);
    queue.push(...byId.get(id)!.dependsOn);
  }
  return state.stages.filter((s) => seen.has(s.id));
}

/**
 * The out-of-limit readings that stand before a stage's hold: its own steps and those of every
 * stage it waits for, released holds or not. For a mandatory hold, any of them blocks the release
 * until the step is redone within limit or the plan is revised; the hold card and the cab list
 * the same entries.
 */
export function outOfLimitBeforeHold(state: BoardState, stageId: string): OutOfLimitEntry[] {
  return entries(stageAndUpstream(state, stageId));
}

/** Why the supervisor cannot release this stage's hold because of readings (mandatory holds only); empty when nothing blocks it. */
export function readingsBlockingRelease(state: BoardState, stageId: string): OutOfLimitEntry[] {
  const stage = state.stages.find((s) => s.id === stageId);
  if (!stage?.hold?.mandatory) return [];
  return outOfLimitBeforeHold(state, stageId);
}
