import type { WindLimit } from '../schemas/arrangement.js';
import type { BoardHold, BoardStage, BoardState, WeatherReading } from './types.js';
import { METRIC, type Quantities } from '../units/quantity.js';

/**
 * The board's rules that both sides need: the one wind rule (the weather panel, wind `check`
 * steps, the holds before a raise and the resume all use it), step order within a stage, and the
 * retry rules of the blind configuration check. Pure: time comes in as a parameter.
 */

/** A wind reading as recorded (0.1 m/s), in the person's units, rounded up: never read as calmer than it was. */
const windReading = (q: Quantities, ms: number) => q.wind(ms, 'up', 1, true);
/** A wind limit in the person's units, rounded down: never shown as more permissive than it is. */
const windLimit = (q: Quantities, ms: number) => q.wind(ms, 'down', 1, true);

const NUMBER = /^[+-]?(\d+([.,]\d*)?|[.,]\d+)$/;

/**
 * A typed reading as a number: digits with an optional decimal point or comma, optionally
 * followed by the step's own unit ("6", "6.5", "6,5", "6.5 t" for a step in t). Anything else
 * (words, two numbers, another unit) is not a number: null.
 */
export function parseReading(value: string, unit: string | null): number | null {
  let text = value.trim();
  if (unit) {
    const u = unit.trim().toLowerCase();
    if (u && text.toLowerCase().endsWith(u)) text = text.slice(0, text.length - u.length).trim();
  }
  if (!NUMBER.test(text)) return null;
  const n = Number(text.replace(',', '.'));
  return Number.isFinite(n) ? n : null;
}

/** Plans written before stages declared their boom movement: known by the template's stage ids. */
const LEGACY_PREPARES = /(^|-)preraise$/;
const LEGACY_MOVES = /(^|-)(raise|lower)$/;

/** What a stage does with the boom: as the plan declares it, or by its id in an older plan. */
function boomRole(stage: Pick<BoardStage, 'id' | 'boom'>): 'moves' | 'prepares' | null {
  if (stage.boom) return stage.boom;
  if (LEGACY_MOVES.test(stage.id)) return 'moves';
  if (LEGACY_PREPARES.test(stage.id)) return 'prepares';
  return null;
}

/** Which wind limit applies now: raising while the boom is readied, raised or lowered, assembly otherwise. */
export function windPhase(state: BoardState): 'assembly' | 'raising' {
  return state.stages.some((s) => (s.state === 'active' || s.state === 'holding') && boomRole(s) !== null) ? 'raising' : 'assembly';
}

/** Does the boom go up or come down in this stage (erection's raise, dismantling's lowering)? */
export function movesBoom(stage: Pick<BoardStage, 'id' | 'boom'>): boolean {
  return boomRole(stage) === 'moves';
}

/**
 * Does releasing this stage's hold let a stage that raises or lowers the boom start? Such a hold
 * (the pre-raise hold, the site hold before lowering) needs a fresh reading within the raising limit.
 */
export function holdGatesBoomMovement(state: BoardState, stageId: string): boolean {
  return state.stages.some((s) => movesBoom(s) && s.dependsOn.includes(stageId));
}

/** Does releasing this stage's hold start a stage that moves the crane? It then needs a fresh reading within the limit. */
export function holdGatesCraneMovement(state: BoardState, stageId: string): boolean {
  return state.stages.some((s) => s.involvesCraneMovement && s.dependsOn.includes(stageId));
}

/**
 * Does completing a step of this stage need a fresh reading within the limit? Every step of a
 * raise or lowering (phase `raising`); the first step of any other stage that moves the crane
 * (starting it; the current phase).
 */
export function stepNeedsFreshWeather(stage: Pick<BoardStage, 'id' | 'boom' | 'involvesCraneMovement' | 'steps'>): 'raising' | 'current' | null {
  if (movesBoom(stage)) return 'raising';
  if (stage.involvesCraneMovement && stage.steps.every((s) => s.state !== 'done')) return 'current';
  return null;
}

/** Why a gust is over a wind limit, or null when it is within it (at the limit counts as within). */
export function gustOverLimit(gustMs: number, limit: WindLimit | null, phase?: 'assembly' | 'raising', q: Quantities = METRIC): string | null {
  const words = phase ? `the ${phase} limit` : 'the limit';
  if (!limit) return `No wind limit is known${phase ? ` for ${phase}` : ''}: get the manufacturer’s limit before going on`;
  if (gustMs > limit.gustMs) return `Gust ${windReading(q, gustMs)} is over ${words} of ${windLimit(q, limit.gustMs)}`;
  return null;
}

/** Why a reading is over the limit for the phase, or null when it is within it. */
export function weatherOverLimit(
  reading: { meanMs: number; gustMs: number; lightning?: boolean; poorVisibility?: boolean; ice?: boolean },
  limit: WindLimit | null,
  q: Quantities = METRIC,
): string | null {
  if (reading.lightning) return 'Lightning reported';
  if (reading.ice) return 'Ice reported on the boom or the ground';
  if (reading.poorVisibility) return 'Visibility too poor to see the signaller';
  if (!limit) return null;
  const gust = gustOverLimit(reading.gustMs, limit, undefined, q);
  if (gust) return gust;
  if (reading.meanMs > limit.meanMs) return `Mean wind ${windReading(q, reading.meanMs)} is over the limit of ${windLimit(q, limit.meanMs)}`;
  return null;
}

/**
 * How old a weather reading may be for a raise, a lowering, the hold before them and a resume,
 * unless the job sets its own (configuration `weatherFreshMinutes`). Common practice, no source:
 * a reading is taken just before the boom moves.
 */
export const WEATHER_FRESH_MS = 15 * 60 * 1000;

/** The freshness limit of a job's weather readings: the job's setting, or the default. */
export function weatherFreshMs(state: Pick<BoardState, 'weatherFreshMinutes'>): number {
  return state.weatherFreshMinutes !== undefined ? state.weatherFreshMinutes * 60_000 : WEATHER_FRESH_MS;
}

/**
 * Height below which a wind reading is flagged: wind speed is specified at 10 m above ground for
 * surface observations (WMO Guide to Instruments and Methods of Observation, WMO-No. 8, part I,
 * chapter 5, from memory), and crane wind limits usually mean the gust at the boom tip (from memory),
 * so a reading lower down reads low.
 */
export const WIND_READING_REFERENCE_HEIGHT_M = 10;

/** The one verdict on the weather, for the panel, the raise, the hold before it and the resume. */
export interface WeatherVerdict {
  phase: 'assembly' | 'raising';
  limit: WindLimit | null;
  reading: WeatherReading | null;
  /** Milliseconds since the reading; null without one. */
  ageMs: number | null;
  freshMs: number;
  fresh: boolean;
  /** Why the reading is over the limit for the phase (or lightning, ice, visibility); null when within it. */
  overLimit: string | null;
  /** Wind readings typed into steps that are over their limit (the panel shows them too). */
  stepsOverLimit: { stageId: string; stepId: string; text: string; reason: string }[];
  /** A caution about the reading that does not refuse anything (taken low down, or with no height). */
  caution: string | null;
  /** Fresh, within the limit for the phase, and a limit is known: a raise or lowering may go on. */
  ok: boolean;
  /** When not ok, what to do, in a sentence. */
  problem: string | null;
}

/**
 * The weather against the job's limit for `phase` (the current phase by default) at time `nowMs`,
 * worded in `q`'s units (metric for the server's refusals and the record).
 */
export function weatherVerdict(state: BoardState, nowMs: number, phase: 'assembly' | 'raising' = windPhase(state), q: Quantities = METRIC): WeatherVerdict {
  const limit = state.windLimits ? state.windLimits[phase] : null;
  const reading = state.weather;
  const freshMs = weatherFreshMs(state);
  const ageMs = reading ? Math.max(0, nowMs - Date.parse(reading.at)) : null;
  const fresh = ageMs !== null && ageMs <= freshMs;
  // A gust typed into a wind step after the last reading is the latest word on the wind: it counts too.
  const laterStepGust = state.stages
    .flatMap((stage) => stage.steps)
    .filter((s) => s.state === 'done' && s.records?.check?.kind === 'wind' && s.doneBy && (!reading || s.doneBy.at > reading.at))
    .map((s) => ({ text: s.text, gustMs: parseReading(s.doneBy!.value ?? '', 'm/s') }))
    .filter((g): g is { text: string; gustMs: number } => g.gustMs !== null)
    .map((g) => ({ ...g, over: gustOverLimit(g.gustMs, limit, phase, q) }))
    .find((g) => g.over && limit);
  const overLimit = (reading ? weatherOverLimit(reading, limit, q) : null) ?? (laterStepGust ? `${laterStepGust.over} (typed at “${laterStepGust.text}”)` : null);
  const stepsOverLimit = state.stages.flatMap((stage) =>
    stage.steps
      .filter((s) => s.outOfLimit?.kind === 'wind')
      .map((s) => ({ stageId: stage.id, stepId: s.id, text: s.text, reason: s.outOfLimit!.reason })),
  );
  const height = reading ? (reading.heightM ?? null) : null;
  const caution = !reading
    ? null
    : height === null
      ? 'The height of this reading was not recorded; the limit is for the gust at the boom tip.'
      : height < WIND_READING_REFERENCE_HEIGHT_M
        ? `Read at ${q.length(height, 'nearest', 1, true)} above ground: wind near the ground reads lower than at the boom tip, which the limit is for.`
        : null;
  const minutes = Math.round(freshMs / 60_000);
  let problem: string | null = null;
  if (overLimit) problem = `The latest reading is over the limits (${overLimit}). Wait and record a new reading.`;
  else if (!reading) problem = `Record a weather reading first: there is none yet, and one from the last ${minutes} minutes is needed.`;
  else if (!fresh) problem = `Record a new weather reading: the last one is older than ${minutes} minutes.`;
  else if (!limit) problem = `No ${phase} wind limit is known for this configuration: get the manufacturer’s limit first.`;
  return { phase, limit, reading, ageMs, freshMs, fresh, overLimit, stepsOverLimit, caution, ok: problem === null, problem };
}

/** The steps of the same stage that must be done before this one and are not yet; empty when it may be done. */
export function stepsNeededFirst(stage: BoardStage, stepId: string): { id: string; text: string }[] {
  const step = stage.steps.find((s) => s.id === stepId);
  if (!step) return [];
  return (step.after ?? [])
    .map((id) => stage.steps.find((s) => s.id === id))
    .filter((s): s is BoardStage['steps'][number] => !!s && s.state !== 'done')
    .map((s) => ({ id: s.id, text: s.text }));
}

/** Steps that must be reopened with this one: every step of the stage that was to come after it, directly or not. */
export function stepsAfter(stage: BoardStage, stepId: string): string[] {
  const out = new Set<string>();
  const queue = [stepId];
  while (queue.length) {
    const id = queue.shift()!;
    for (const s of stage.steps) {
      if (!out.has(s.id) && s.id !== stepId && (s.after ?? []).includes(id)) {
        out.add(s.id);
        queue.push(s.id);
      }
    }
  }
  return [...out];
}

/** Failed value checks after which the hold is locked until the supervisor reviews it. */
export const CHECK_FAILURES_BEFORE_REVIEW = 3;

/**
 * After a failed value check the same person waits this long before trying again, with a new
 * photo of the controller: time to read the screen again rather than type the next guess.
 * Common practice, no source.
 */
export const CHECK_RETRY_MS = 30_000;

/** When this person may try the hold's value check again (ISO time), or null when they may now. */
export function checkRetryAt(hold: Pick<BoardHold, 'checkFailures'>, userId: string, nowMs: number): string | null {
  const last = [...(hold.checkFailures ?? [])].reverse().find((f) => f.userId === userId);
  if (!last) return null;
  const at = Date.parse(last.at) + CHECK_RETRY_MS;
  return at > nowMs ? new Date(at).toISOString() : null;
}

/** The stages whose dependencies are all done or skipped, for people planning who does what next. */
export function stagesReadyToStart(state: BoardState): string[] {
  const finished = new Set(state.stages.filter((s) => s.state === 'done' || s.state === 'skipped').map((s) => s.id));
  return state.stages.filter((s) => s.state === 'locked' && s.dependsOn.every((d) => finished.has(d))).map((s) => s.id);
}
