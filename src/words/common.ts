/**
 * Wording every area shares. The words of each area live beside this file (board.ts, jobs.ts,
 * planner.ts, plan.ts, fleet.ts, people.ts): one home for what the screens say, ready for
 * translation. Numbers are formatted by shared/format.ts, times by services/time.ts.
 */

/** Colour family of a badge; each maps to one of our CSS variables and never stands alone. */
export type Tone = 'stop' | 'hold' | 'done' | 'info' | 'plain';
