/**
 * Ground pressure under the more heavily loaded track for each load case, as an SVG string: the
 * pressure block along the track (uniform, trapezoid or triangle with the lifted length shown),
 * the allowable pressure as a dashed line, the maximum written in kPa and a word for the result.
 *
 * Pure: no DOM and no Node modules (shown in the browser and placed in the record PDF), plain
 * shapes with explicit colours, every piece of text through `escapeXml`. Pressures are to scale
 * (one kPa scale for every panel), so the cases can be compared by eye.
 */
import { CalcInputError } from '../calc/errors';
import type { LoadCaseResult } from '../planner/types';
import { escapeXml } from './boom-makeup';

/** Drawing options. */
export interface GroundPressureDrawingOptions {
  /** Day draws dark on white (also the PDF); night draws light on a dim background. */
  theme?: 'day' | 'night';
  widthPx?: number;
  /** Bearing length of a track; without it, it is read from a full-contact case. */
  trackLengthM?: number;
  /** The allowable pressure has no ground source: a case within it reads "UNVERIFIED", not "PASS". */
  unverified?: boolean;
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
const MARGIN_X = 24;
const PANEL_HEIGHT = 210;
const PLOT_TOP = 58;
const PLOT_HEIGHT = 110;

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

/**
 * The track length: given, or the contact length of a case in full contact, or for a lifted
 * track rebuilt from e = M ÷ V and the contact 3(L/2 − e) (eccentric footing, e.g. Das).
 */
function trackLength(cases: readonly LoadCaseResult[], given: number | undefined): number {
  if (given !== undefined) return finitePositive('trackLengthM', given);
  const full = cases.find((c) => !c.track.partialContact);
  if (full) return full.track.contactLengthM;
  const c = cases[0];
  const e = Math.abs(c.momentKnm / c.verticalLoadKn);
  return 2 * (c.track.contactLengthM / 3 + e);
}

/** A step for the kPa axis giving three to six gridlines. */
function gridStepKpa(maxKpa: number): number {
  for (const step of [10, 20, 25, 50, 100, 200, 250, 500, 1000, 2000, 5000]) if (maxKpa / step <= 6) return step;
  return 10 ** Math.ceil(Math.log10(maxKpa / 6));
}

/** Draws the pressure under the heavier track for each load case against the dashed allowable line. */
export function groundPressureSvg(
  loadCases: readonly LoadCaseResult[],
  allowablePressureKpa: number,
  options: GroundPressureDrawingOptions = {},
): string {
  const p = palettes[options.theme ?? 'day'];
  const width = options.widthPx ?? 720;
  if (!Number.isFinite(width) || width < 360) throw new CalcInputError('widthPx', `must be at least 360, got ${String(width)}`);
  const allowable = finitePositive('allowablePressureKpa', allowablePressureKpa);
  loadCases.forEach((c, i) => {
    finiteNonNegative(`loadCases.${i}.track.maxPressureKpa`, c.track.maxPressureKpa);
    finiteNonNegative(`loadCases.${i}.track.minPressureKpa`, c.track.minPressureKpa);
    finitePositive(`loadCases.${i}.track.contactLengthM`, c.track.contactLengthM);
    if (!Number.isFinite(c.momentKnm)) throw new CalcInputError(`loadCases.${i}.momentKnm`, 'must be a finite number');
    finitePositive(`loadCases.${i}.verticalLoadKn`, c.verticalLoadKn);
    if (c.mats) finiteNonNegative(`loadCases.${i}.mats.pressureKpa`, c.mats.pressureKpa);
  });
  const title = `Ground pressure under the heavier track for ${loadCases.length} load case${loadCases.length === 1 ? '' : 's'}, allowable ${allowable} kPa`;
  const open = (height: number) =>
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${px(height)}" width="${width}" height="${px(height)}" role="img" aria-label="${escapeXml(title)}">` +
    `<title>${escapeXml(title)}</title>` +
    `<rect x="0" y="0" width="${width}" height="${px(height)}" fill="${p.background}"/>`;
  if (loadCases.length === 0) {
    return open(60) + text(MARGIN_X, 36, 'No load cases to draw.', `font-size="15" fill="${p.ink}"`) + '</svg>';
  }

  const lengthM = trackLength(loadCases, options.trackLengthM);
  const topKpa = Math.max(allowable, ...loadCases.map((c) => Math.max(c.track.maxPressureKpa, c.mats?.pressureKpa ?? 0))) * 1.15;
  const plotLeft = MARGIN_X + 56;
  const plotRight = width - MARGIN_X - 110;
  const plotWidth = plotRight - plotLeft;
  const perMetre = plotWidth / lengthM;
  const perKpa = PLOT_HEIGHT / topKpa;
  const step = gridStepKpa(topKpa);

  const out: string[] = [];
  loadCases.forEach((c, i) => {
    const top = 12 + i * PANEL_HEIGHT;
    const base = top + PLOT_TOP + PLOT_HEIGHT;
    const yOf = (kpa: number) => base - kpa * perKpa;
    const t = c.track;
    const over = t.maxPressureKpa > allowable;
    const word = over ? 'FAIL' : options.unverified ? 'UNVERIFIED' : 'PASS';

    out.push(text(MARGIN_X, top + 18, c.label, `font-size="15" font-weight="700" fill="${p.ink}"`));
    out.push(
      text(
        MARGIN_X,
        top + 38,
        `vertical load ${c.verticalLoadKn.toFixed(0)} kN · moment ${c.momentKnm.toFixed(0)} kN·m · ${t.distribution}${t.partialContact ? `, ${t.contactLengthM.toFixed(2)} m in contact` : ''}`,
        `font-size="12" fill="${p.muted}"`,
      ),
    );

    // kPa gridlines and axis labels.
    for (let kpa = 0; kpa <= topKpa + 1e-9; kpa += step) {
      out.push(`<line x1="${px(plotLeft)}" y1="${px(yOf(kpa))}" x2="${px(plotRight)}" y2="${px(yOf(kpa))}" stroke="${p.muted}" stroke-width="0.5" stroke-opacity="0.5"/>`);
      out.push(text(plotLeft - 6, yOf(kpa) + 4, `${kpa} kPa`, `font-size="11" text-anchor="end" fill="${p.muted}"`));
    }

    // The heavy end: the front (boom side) for a forward moment, the rear for a backward one.
    // Over the side the block is uniform and either end will do.
    const heavyAtRight = c.momentKnm >= 0;
    const contactPx = Math.min(t.contactLengthM, lengthM) * perMetre;
    const heavyX = heavyAtRight ? plotRight : plotLeft;
    const lightX = heavyAtRight ? plotRight - contactPx : plotLeft + contactPx;
    const points = [`${px(heavyX)},${px(base)}`, `${px(heavyX)},${px(yOf(t.maxPressureKpa))}`, `${px(lightX)},${px(yOf(t.minPressureKpa))}`, `${px(lightX)},${px(base)}`];
    out.push(
      `<polygon points="${points.join(' ')}" fill="${p.block}" stroke="${p.blockStroke}" stroke-width="2" data-case="${c.key}" data-max-kpa="${px(t.maxPressureKpa)}" data-contact-m="${px(t.contactLengthM)}"/>`,
    );
    if (t.partialContact) {
      // The lifted length carries no pressure: drawn as a hatched gap with its length in words.
      const liftedLeft = heavyAtRight ? plotLeft : lightX;
      const liftedRight = heavyAtRight ? lightX : plotRight;
      for (let x = liftedLeft + 6; x < liftedRight; x += 10) {
        out.push(`<line x1="${px(x)}" y1="${px(base)}" x2="${px(Math.min(x + 8, liftedRight))}" y2="${px(base - 8)}" stroke="${p.lifted}" stroke-width="1"/>`);
      }
      const liftedM = lengthM - t.contactLengthM;
      out.push(plate((liftedLeft + liftedRight) / 2, base - 14, `track lifts: ${liftedM.toFixed(2)} m`, 12, liftedRight > plotRight - 60 ? 'end' : liftedLeft < plotLeft + 60 ? 'start' : 'middle', p.background, `fill="${p.ink}"`));
    }
    // Track outline under the plot and its ends named.
    out.push(`<rect x="${px(plotLeft)}" y="${px(base)}" width="${px(plotWidth)}" height="8" fill="${p.ink}" data-track-length-m="${px(lengthM)}"/>`);
    const [leftEnd, rightEnd] = c.key === 'overSide' ? ['track end', 'track end'] : ['rear', 'front (boom side)'];
    out.push(text(plotLeft, base + 24, leftEnd, `font-size="11" fill="${p.muted}"`));
    out.push(text(plotRight, base + 24, rightEnd, `font-size="11" text-anchor="end" fill="${p.muted}"`));
    out.push(text((plotLeft + plotRight) / 2, base + 24, `track ${lengthM.toFixed(2)} m`, `font-size="11" text-anchor="middle" fill="${p.muted}"`));

    // Allowable pressure: dashed across the plot, named at its right end.
    const yAllow = yOf(allowable);
    out.push(`<line x1="${px(plotLeft)}" y1="${px(yAllow)}" x2="${px(plotRight)}" y2="${px(yAllow)}" stroke="${p.allowable}" stroke-width="2" stroke-dasharray="8 5" data-allowable-kpa="${px(allowable)}"/>`);
    out.push(plate((plotLeft + plotRight) / 2, yAllow - 4, `allowable ${allowable} kPa`, 11, 'middle', p.background, `font-weight="700" fill="${p.ink}"`));

    // Maximum pressure at the heavy end, then the result word in a box (colour never alone).
    const maxLabel = `max ${t.maxPressureKpa.toFixed(1)} kPa`;
    out.push(plate(heavyX + (heavyAtRight ? -6 : 6), yOf(t.maxPressureKpa) - 6, maxLabel, 13, heavyAtRight ? 'end' : 'start', p.background, `font-weight="700" fill="${p.ink}"`));
    const [ink, fill] = word === 'FAIL' ? [p.stop, p.stopFill] : word === 'UNVERIFIED' ? [p.warn, p.warnFill] : [p.pass, p.passFill];
    const boxX = plotRight + 10;
    const boxY = top + PLOT_TOP - 8;
    out.push(`<rect x="${px(boxX)}" y="${px(boxY)}" width="96" height="24" fill="${fill}" stroke="${ink}" stroke-width="${word === 'FAIL' ? 2.5 : 1.5}"/>`);
    out.push(text(boxX + 48, boxY + 17, word, `font-size="13" font-weight="700" text-anchor="middle" fill="${ink}"`));
    if (c.mats) {
      const matsOver = c.mats.pressureKpa > allowable;
      const matsWord = matsOver ? 'FAIL' : options.unverified ? 'UNVERIFIED' : 'PASS';
      out.push(text(boxX, boxY + 46, 'with mats', `font-size="11" fill="${p.muted}"`));
      out.push(text(boxX, boxY + 62, `${c.mats.pressureKpa.toFixed(1)} kPa`, `font-size="12" font-weight="700" fill="${p.ink}"`));
      out.push(text(boxX, boxY + 78, matsWord, `font-size="12" font-weight="700" fill="${matsOver ? p.stop : p.ink}"`));
    }
  });
  const height = 12 + loadCases.length * PANEL_HEIGHT + 10;
  out.push(text(MARGIN_X, height - 10, 'Pressure under the heavier track, linear block (eccentric footing theory); kPa to scale, track length to scale.', `font-size="11" fill="${p.muted}"`));
  return open(height + 6) + out.join('') + '</svg>';
}
