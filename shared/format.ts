/**
 * Numbers for people, the one way: the planner's figures, the drawings, the board's readings and
 * the client's screens all format through here. Pure (no DOM, no Node modules).
 *
 * The direction of rounding is the caller's choice and part of the safety case: loads, pulls,
 * pressures and what is needed round UP (`fmtUp`); capacities, clearances, what is left and design
 * factors round DOWN (`fmtDown`); values that are only information round to the nearest. No
 * function here ever shows "-0".
 */

/**
 * Multiplying a typed decimal by a power of ten is not exact in binary (1.15 × 10 is
 * 11.499999999999998); twelve significant digits clear that noise before a nearest rounding, so a
 * number rounds as it is written.
 */
function clean(value: number): number {
  return Number(value.toPrecision(12));
}

/** 0 instead of -0, so nothing reads "-0". */
function unsigned(value: number): number {
  return value === 0 ? 0 : value;
}

/** Rounds to the nearest multiple of 10^-decimals (a half goes up, as Math.round does). */
function nearest(value: number, maxDecimals: number): number {
  const f = 10 ** maxDecimals;
  return unsigned(Math.round(clean(value * f)) / f);
}

/**
 * A number with fixed decimals, rounded to the nearest as `plain` rounds (the decimal as written,
 * so 1.15 shows 1.2 in both); for information only, never against a limit.
 */
export function fmt(value: number, decimals = 1): string {
  // The value is already on the grid, so toFixed only pads the zeros; it cannot round again.
  return nearest(value, decimals).toFixed(decimals);
}

/** Rounds up (toward the limit it is checked against) for loads, pulls, pressures and what is needed. */
export function fmtUp(value: number, decimals = 1): string {
  const f = 10 ** decimals;
  // Clearing the binary noise first keeps 32.5 (stored as 32.50000000000001) from showing as 32.6;
  // a fixed tolerance did not scale (33118.2 × 1000 is 33118199.999999996, a floor of ...199).
  return fmt(Math.ceil(clean(value * f)) / f, decimals);
}

/** Rounds down for what is left or allowed (capacities, clearances, wraps, ratios, design factors). */
export function fmtDown(value: number, decimals = 1): string {
  const f = 10 ** decimals;
  // Clearing the binary noise first keeps 15.6 (stored as 15.599999999999998) from showing as 15.5.
  return fmt(Math.floor(clean(value * f)) / f, decimals);
}

/** A number from the data without trailing zeros, to the nearest of `maxDecimals` places: "12.5", "40". */
export function plain(value: number, maxDecimals = 3): string {
  return String(nearest(value, maxDecimals));
}

/**
 * As `plain` (no trailing zeros), rounded up as `fmtUp` rounds: a load, a share of a chart or a
 * weight written inside a sentence.
 */
export function plainUp(value: number, maxDecimals = 3): string {
  return String(Number(fmtUp(value, maxDecimals)));
}

/** As `plain`, rounded down as `fmtDown` rounds: a clearance left or a capacity inside a sentence. */
export function plainDown(value: number, maxDecimals = 3): string {
  return String(Number(fmtDown(value, maxDecimals)));
}

/**
 * A weight in kilograms as tonnes, rounded up to 0.01 t: the one way a weight in tonnes is written,
 * so the fleet screen, the boom drawing and the configuration sheet show the same figure.
 */
export function tonnesUp(weightKg: number): string {
  return fmtUp(weightKg / 1000, 2);
}

/** As `plain`, with thousands grouped the British way: "1,234.5". */
export function grouped(value: number, maxDecimals: number): string {
  return nearest(value, maxDecimals).toLocaleString('en-GB', { maximumFractionDigits: maxDecimals });
}

/**
 * A number as it was typed or stated, unrounded: only the binary noise of arithmetic on typed
 * decimals is cleared (6.4 − 6.5 reads -0.1, not -0.10000000000000053).
 */
export function asStated(value: number): string {
  return String(unsigned(clean(value)));
}
