/**
 * Ground pressure against slew angle for each load case, as an SVG string: the highest pressure
 * under the tracks at every slew angle from 0° to 360° (the larger of the per-track method and the
 * rigid pressure plane), the allowable pressure as a dashed line, the worst angle marked with a
 * triangle and written in words, and a word for the result (colour never alone).
 *
 * Pure: no DOM and no Node modules (shown in the browser and placed in the record PDF), plain
 * shapes with explicit colours, every piece of text through `escapeXml`. Pressures are to scale
 * (one kPa scale for every panel), so the cases can be compared by eye.
 */
import { CalcInputError } from '../calc/errors';
// Pressures are shown rounded up, as on the figures: never lower than computed.
import { fmtUp } from '../format';
import type { LoadCaseResult } from '../planner/types';
import { escapeXml } from './boom-makeup';

/** Drawing options. */
export interface GroundPressureDrawingOptions {
  /** Day draws dark on white (also the PDF); night draws light on a dim background. */
  theme?: 'day' | 'night';
  widthPx?: number;
  /** Bearing length of a track, named in the footnote. */
  trackLengthM?: number;
  /** The allowable pressure has no ground source: a case within it reads "UNVERIFIED", not "PASS". */
  unverified?: boolean;
  /** Weights are missing from the moments: a case within the allowable reads "CAUTION", not "PASS". */
  caution?: boolean;
}

interface Palette {
  background: string;
  ink: string;
  muted: string;
  block: string;
  blockStroke: string;
  lifted: string;
  allowable: string;
  pass: string;
  passFill: string;
  stop: string;
  stopFill: string;
  warn: string;
  warnFill: string;
}

const palettes: Record<'day' | 'night', Palette> = {
  day: {
    background: '#ffffff',
    ink: '#14181d',
    muted: '#3b434c',
    block: '#c9d7e8',
    blockStroke: '#1d4e89',
    lifted: '#6b737c',
    allowable: '#14181d',
    pass: '#1b5e20',
    passFill: '#e3f1e4',
    stop: '#a8161b',
    stopFill: '#fbe3e1',
    warn: '#2a1d00',
    warnFill: '#f2b53a',
  },
  night: {
    background: '#1f1b16',
    ink: '#e8dcc6',
    muted: '#bfb197',
    block: '#2f3d52',
    blockStroke: '#8fb4e0',
    lifted: '#9a8e78',
    allowable: '#e8dcc6',
    pass: '#8fd694',
    passFill: '#1e2e1f',
    stop: '#ef6a5f',
    stopFill: '#3a1e1a',
    warn: '#140e00',
    warnFill: '#c99a3c',
  },
};

const FONT = 'Roboto, Helvetica, Arial, sans-serif';
const PLOT_TOP = 64;
const PLOT_HEIGHT = 120;

function px(value: number): string {
  return String(Math.round(value * 100) / 100);
}

function text(x: number, y: number, content: string, attrs: string): string {
  return `<text x="${px(x)}" y="${px(y)}" font-family="${FONT}" ${attrs}>${escapeXml(content)}</text>`;
}

/** A label on a background-coloured plate, so gridlines and the allowable line never strike through it. */
function plate(x: number, y: number, content: string, fontSize: number, anchor: 'start' | 'middle' | 'end', background: string, attrs: string): string {
  const w = content.length * fontSize * 0.58 + 6;
  const left = anchor === 'start' ? x - 3 : anchor === 'middle' ? x - w / 2 : x - w + 3;
  return `<rect x="${px(left)}" y="${px(y - fontSize)}" width="${px(w)}" height="${px(fontSize + 4)}" fill="${background}" fill-opacity="0.9"/>` + text(x, y, content, `font-size="${fontSize}" text-anchor="${anchor}" ${attrs}`);
}

function finitePositive(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new CalcInputError(field, `must be a finite number greater than zero, got ${String(value)}`);
  }
  return value;
}

function finiteNonNegative(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value < 0) {
    throw new CalcInputError(field, `must be a finite number of zero or more, got ${String(value)}`);
  }
  return value;
}

/** A step for the kPa axis giving three to six gridlines. */
function gridStepKpa(maxKpa: number): number {
  for (const step of [10, 20, 25, 50, 100, 200, 250, 500, 1000, 2000, 5000]) if (maxKpa / step <= 6) return step;
  return 10 ** Math.ceil(Math.log10(maxKpa / 6));
}

const angleNames: Record<number, string> = { 0: 'end', 90: 'side', 180: 'end', 270: 'side', 360: 'end' };

/** Draws the highest ground pressure against slew angle for each load case, against the dashed allowable line. */
export function groundPressureSvg(
  loadCases: readonly LoadCaseResult[],
  allowablePressureKpa: number,
  options: GroundPressureDrawingOptions = {},
): string {
  const p = palettes[options.theme ?? 'day'];
  const width = options.widthPx ?? 720;
  if (!Number.isFinite(width) || width < 300) throw new CalcInputError('widthPx', `must be at least 300, got ${String(width)}`);
  const allowable = finitePositive('allowablePressureKpa', allowablePressureKpa);
  loadCases.forEach((c, i) => {
    if (c.slew.length === 0) throw new CalcInputError(`loadCases.${i}.slew`, 'has no slew angles');
    c.slew.forEach((pt, j) => {
      finiteNonNegative(`loadCases.${i}.slew.${j}.pressureKpa`, pt.pressureKpa);
      if (!Number.isFinite(pt.angleDeg) || pt.angleDeg < 0 || pt.angleDeg > 360) throw new CalcInputError(`loadCases.${i}.slew.${j}.angleDeg`, 'must be between 0° and 360°');
    });
    finiteNonNegative(`loadCases.${i}.worst.pressureKpa`, c.worst.pressureKpa);
    if (c.mats) finiteNonNegative(`loadCases.${i}.mats.pressureKpa`, c.mats.pressureKpa);
  });
  const title = `Ground pressure against slew angle for ${loadCases.length} load case${loadCases.length === 1 ? '' : 's'}, allowable ${allowable} kPa`;
  const open = (height: number) =>
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${px(height)}" width="${width}" height="${px(height)}" role="img" aria-label="${escapeXml(title)}">` +
    `<title>${escapeXml(title)}</title>` +
    `<rect x="0" y="0" width="${width}" height="${px(height)}" fill="${p.background}"/>`;
  if (loadCases.length === 0) {
    return open(60) + text(24, 36, 'No load cases to draw.', `font-size="15" fill="${p.ink}"`) + '</svg>';
  }

  const topKpa = Math.max(allowable, ...loadCases.map((c) => Math.max(c.worst.pressureKpa, ...c.slew.map((pt) => pt.pressureKpa), c.mats?.pressureKpa ?? 0))) * 1.15;
  const narrow = width < 560;
  const MARGIN_X = narrow ? 12 : 24;
  const PANEL_HEIGHT = narrow ? 286 : 240;
  const plotLeft = MARGIN_X + 56;
  const plotRight = width - MARGIN_X - (narrow ? 8 : 110);
  const plotWidth = plotRight - plotLeft;
  const perDeg = plotWidth / 360;
  const perKpa = PLOT_HEIGHT / topKpa;
  const step = gridStepKpa(topKpa);

  const out: string[] = [];
  loadCases.forEach((c, i) => {
    const top = 12 + i * PANEL_HEIGHT;
    const base = top + PLOT_TOP + PLOT_HEIGHT;
    const yOf = (kpa: number) => base - kpa * perKpa;
    const xOf = (deg: number) => plotLeft + deg * perDeg;
    const over = c.worst.pressureKpa > allowable;
    const word = over ? 'FAIL' : options.caution ? 'CAUTION' : options.unverified ? 'UNVERIFIED' : 'PASS';

    out.push(text(MARGIN_X, top + 18, c.label, `font-size="${narrow ? 14 : 15}" font-weight="700" fill="${p.ink}"`));
    const worstLine = `worst ${fmtUp(c.worst.pressureKpa)} kPa at ${c.worst.angleDeg}° slew (${c.worst.method})`;
    const endsLine = `over the end ${fmtUp(c.overEnd.pressureKpa)} kPa · over the side ${fmtUp(c.overSide.pressureKpa)} kPa`;
    if (narrow) {
      out.push(text(MARGIN_X, top + 36, worstLine, `font-size="12" fill="${p.muted}"`));
      out.push(text(MARGIN_X, top + 52, endsLine, `font-size="12" fill="${p.muted}"`));
    } else {
      out.push(text(MARGIN_X, top + 38, `${worstLine} · ${endsLine}`, `font-size="12" fill="${p.muted}"`));
    }

    // kPa gridlines and axis labels.
    for (let kpa = 0; kpa <= topKpa + 1e-9; kpa += step) {
      out.push(`<line x1="${px(plotLeft)}" y1="${px(yOf(kpa))}" x2="${px(plotRight)}" y2="${px(yOf(kpa))}" stroke="${p.muted}" stroke-width="0.5" stroke-opacity="0.5"/>`);
      out.push(text(plotLeft - 6, yOf(kpa) + 4, `${kpa} kPa`, `font-size="11" text-anchor="end" fill="${p.muted}"`));
    }
    // Slew angle axis: every quarter turn named, over the end or over the side.
    out.push(`<line x1="${px(plotLeft)}" y1="${px(base)}" x2="${px(plotRight)}" y2="${px(base)}" stroke="${p.ink}" stroke-width="1.5"/>`);
    for (const deg of [0, 90, 180, 270, 360]) {
      const x = xOf(deg);
      out.push(`<line x1="${px(x)}" y1="${px(base)}" x2="${px(x)}" y2="${px(base + 5)}" stroke="${p.ink}" stroke-width="1.5"/>`);
      const anchor = deg === 0 ? 'start' : deg === 360 ? 'end' : 'middle';
      out.push(text(x, base + 18, `${deg}°`, `font-size="11" text-anchor="${anchor}" fill="${p.muted}"`));
      out.push(text(x, base + 31, angleNames[deg], `font-size="11" text-anchor="${anchor}" fill="${p.muted}"`));
    }

    // The pressure curve over the full turn (closed back to 360° = 0°); a half turn given is mirrored
    // (the tracks are mirror images about their axis, so 360° − θ carries the pressure of θ).
    const given = [...c.slew].sort((a, b) => a.angleDeg - b.angleDeg);
    const half = given[given.length - 1].angleDeg <= 180;
    const pts = half ? [...given, ...given.filter((pt) => pt.angleDeg > 0 && pt.angleDeg < 180).map((pt) => ({ ...pt, angleDeg: 360 - pt.angleDeg })).reverse()] : given;
    const first = pts[0];
    const line = [...pts, { ...first, angleDeg: 360 }].map((pt) => `${px(xOf(pt.angleDeg))},${px(yOf(pt.pressureKpa))}`).join(' ');
    out.push(
      `<polyline points="${line}" fill="none" stroke="${p.blockStroke}" stroke-width="2.5" stroke-linejoin="round" data-case="${c.key}" data-worst-kpa="${px(c.worst.pressureKpa)}" data-worst-angle="${px(c.worst.angleDeg)}"/>`,
    );

    // Allowable pressure: dashed across the plot, named on a plate.
    const yAllow = yOf(allowable);
    out.push(`<line x1="${px(plotLeft)}" y1="${px(yAllow)}" x2="${px(plotRight)}" y2="${px(yAllow)}" stroke="${p.allowable}" stroke-width="2" stroke-dasharray="8 5" data-allowable-kpa="${px(allowable)}"/>`);
    // Named where the curve is lowest (furthest from the line), so the label hides none of the curve.
    const lowest = pts.reduce((lo, pt) => (pt.pressureKpa < lo.pressureKpa ? pt : lo));
    const allowLabel = `allowable ${allowable} kPa`;
    const halfLabelPx = (allowLabel.length * 11 * 0.58 + 6) / 2;
    const allowX = Math.min(plotRight - halfLabelPx, Math.max(plotLeft + halfLabelPx, xOf(lowest.angleDeg)));
    out.push(plate(allowX, yAllow - 5, allowLabel, 11, 'middle', p.background, `font-weight="700" fill="${p.ink}"`));

    // The worst angle: a dotted line down to the axis, a triangle on the curve and its value in words.
    const wx = xOf(c.worst.angleDeg);
    const wy = yOf(c.worst.pressureKpa);
    out.push(`<line x1="${px(wx)}" y1="${px(wy)}" x2="${px(wx)}" y2="${px(base)}" stroke="${p.ink}" stroke-width="1" stroke-dasharray="2 3"/>`);
    out.push(`<polygon points="${px(wx)},${px(wy - 7)} ${px(wx - 6)},${px(wy + 4)} ${px(wx + 6)},${px(wy + 4)}" fill="${over ? p.stop : p.ink}" data-worst="${c.key}"/>`);
    // The worst value is written at the foot of the dotted line, clear of the curve.
    const labelRight = c.worst.angleDeg <= 180;
    out.push(plate(wx + (labelRight ? 6 : -6), base - 8, `worst ${fmtUp(c.worst.pressureKpa)} kPa at ${c.worst.angleDeg}°`, 12, labelRight ? 'start' : 'end', p.background, `font-weight="700" fill="${p.ink}"`));

    // The result word in a box (colour never alone), then the mats.
    const [ink, fill] = word === 'FAIL' ? [p.stop, p.stopFill] : word === 'UNVERIFIED' || word === 'CAUTION' ? [p.warn, p.warnFill] : [p.pass, p.passFill];
    const boxX = narrow ? plotRight - 100 : plotRight + 10;
    const boxY = narrow ? base + 38 : top + PLOT_TOP - 8;
    out.push(`<rect x="${px(boxX)}" y="${px(boxY)}" width="100" height="24" fill="${fill}" stroke="${ink}" stroke-width="${word === 'FAIL' ? 2.5 : 1.5}"/>`);
    out.push(text(boxX + 50, boxY + 17, word, `font-size="13" font-weight="700" text-anchor="middle" fill="${ink}"`));
    if (c.mats) {
      const matsOver = c.mats.pressureKpa > allowable;
      const matsWord = matsOver ? 'FAIL' : options.caution ? 'CAUTION' : options.unverified ? 'UNVERIFIED' : 'PASS';
      const mx = narrow ? MARGIN_X : boxX;
      const my = narrow ? base + 80 : boxY + 46;
      if (narrow) {
        out.push(text(mx, my, `mats ${fmtUp(c.mats.pressureKpa)} kPa at ${c.mats.angleDeg}°: ${matsWord}`, `font-size="12" font-weight="700" fill="${matsOver ? p.stop : p.ink}"`));
      } else {
        out.push(text(mx, my, 'with mats', `font-size="11" fill="${p.muted}"`));
        out.push(text(mx, my + 16, `${fmtUp(c.mats.pressureKpa)} kPa`, `font-size="12" font-weight="700" fill="${p.ink}"`));
        out.push(text(mx, my + 32, `at ${c.mats.angleDeg}°`, `font-size="11" fill="${p.muted}"`));
        out.push(text(mx, my + 48, matsWord, `font-size="12" font-weight="700" fill="${matsOver ? p.stop : p.ink}"`));
      }
    }
  });
  const trackNote = options.trackLengthM !== undefined ? `Tracks ${finitePositive('trackLengthM', options.trackLengthM)} m long. ` : '';
  const notes = narrow
    ? ['Highest pressure under the tracks at each', 'slew angle: 0° boom over one end of the', 'tracks, 90° over the side. Larger of the', 'per-track method and the rigid pressure', `plane. ${trackNote}kPa to scale.`]
    : ['Highest pressure under the tracks at each slew angle: 0° boom over one end of the tracks, 90° over the side.', `${trackNote}Larger of the per-track method and the rigid pressure plane; kPa to scale.`];
  const height = 12 + loadCases.length * PANEL_HEIGHT + notes.length * 14 + 4;
  notes.forEach((n, k) => out.push(text(MARGIN_X, height - 4 - (notes.length - 1 - k) * 14, n, `font-size="11" fill="${p.muted}"`)));
  return open(height + 6) + out.join('') + '</svg>';
}
