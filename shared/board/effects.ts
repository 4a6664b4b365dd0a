import type { BoardState } from './types.js';

/** What an event changed on the board, for people reading the event feed and the record. */
export interface BoardEffects {
  job?: { state: string };
  stages?: { id: string; state: string }[];
  holds?: { id: string; state: string }[];
}

/** The job, stage and hold states that differ between two boards; null when none do. */
export function boardEffects(before: BoardState | null, after: BoardState): BoardEffects | null {
  if (!before) return null;
  const effects: BoardEffects = {};
  if (before.job.state !== after.job.state) effects.job = { state: after.job.state };
  const old = new Map(before.stages.map((s) => [s.id, s]));
  const stages = after.stages.filter((s) => old.get(s.id)?.state !== s.state).map((s) => ({ id: s.id, state: s.state }));
  const holds = after.stages
    .filter((s) => s.hold && old.get(s.id)?.hold?.state !== s.hold.state)
    .map((s) => ({ id: s.hold!.id, state: s.hold!.state }));
  if (stages.length && before.stages.length) effects.stages = stages;
  if (holds.length && before.stages.length) effects.holds = holds;
  return Object.keys(effects).length ? effects : null;
}
