import type { WindLimit } from '../schemas/arrangement.js';
import type { BoardState } from './types.js';

/** Stages during which the boom goes up or comes down: the raising wind limit applies. */
const RAISING_STAGE = /(^|-)(preraise|raise|lower)$/;

/** Which wind limit applies now: raising while the boom is raised or lowered, assembly otherwise. */
export function windPhase(state: BoardState): 'assembly' | 'raising' {
  return state.stages.some((s) => (s.state === 'active' || s.state === 'holding') && RAISING_STAGE.test(s.id)) ? 'raising' : 'assembly';
}

/** Why a reading is over the limit for the phase, or null when it is within it. */
export function weatherOverLimit(
  reading: { meanMs: number; gustMs: number; lightning?: boolean; poorVisibility?: boolean; ice?: boolean },
  limit: WindLimit | null,
): string | null {
  if (reading.lightning) return 'Lightning reported';
  if (reading.ice) return 'Ice reported on the boom or the ground';
  if (reading.poorVisibility) return 'Visibility too poor to see the signaller';
  if (!limit) return null;
  if (reading.gustMs > limit.gustMs) return `Gust ${reading.gustMs} m/s is over the limit of ${limit.gustMs} m/s`;
  if (reading.meanMs > limit.meanMs) return `Mean wind ${reading.meanMs} m/s is over the limit of ${limit.meanMs} m/s`;
  return null;
}

/** A resume needs a reading this recent. */
export const WEATHER_FRESH_MS = 15 * 60 * 1000;

/** The stages whose dependencies are all done or skipped, for people planning who does what next. */
export function stagesReadyToStart(state: BoardState): string[] {
  const finished = new Set(state.stages.filter((s) => s.state === 'done' || s.state === 'skipped').map((s) => s.id));
  return state.stages.filter((s) => s.state === 'locked' && s.dependsOn.every((d) => finished.has(d))).map((s) => s.id);
}
