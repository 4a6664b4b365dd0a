/**
 * Site plan around the crane, as an SVG string: the crawler tracks at the centre, the boom reach
 * and the fall zone as circles, and each power line as a straight line at its measured distance
 * with the band of its minimum clearance on the crane side.
 *
 * Only the distance to each line is known, not its bearing, so the lines are spread round the
 * crane and the drawing says so: it is a plan for distances, not a map. Drawn to scale.
 * Pure: no DOM and no Node modules, explicit colours, every piece of text through `escapeXml`.
 */
import { CalcInputError } from '../calc/errors';
import { fmtDown, fmtUp } from '../format';
import type { PowerLineResult } from '../planner/types';
import { escapeXml } from './boom-makeup';

/** What the site plan needs. */
export interface SitePlanInput {
  boomLengthM: number;
  fallZoneRadiusM: number;
  /**
   * The crane's reach toward the power lines (boom foot, boom, auxiliary sheave, hook, load, tag
   * lines and sway); without it the boom length is drawn as the reach.
   */
  reachM?: number;
  powerLines: readonly PowerLineResult[];
  trackLengthM: number;
  /** Track gauge, centre to centre. */
  gaugeM: number;
  /** Shoe width; without it the tracks are drawn a sixth of the gauge wide (schematic). */
  trackWidthM?: number;
}

/** Drawing options. */
export interface SitePlanDrawingOptions {
  /** Day draws dark on white (also the PDF); night draws light on a dim background. */
  theme?: 'day' | 'night';
  /** Width and height of the square drawing area in SVG units. */
  sizePx?: number;
}

interface Palette {
  background: string;
  ink: string;
  muted: string;
  track: string;
  reach: string;
  fallZone: string;
  fallZoneFill: string;
  line: string;
  band: string;
  stop: string;
  pass: string;
}

const palettes: Record<'day' | 'night', Palette> = {
  day: {
    background: '#ffffff',
    ink: '#14181d',
    muted: '#3b434c',
    track: '#1d2b3a',
    reach: '#1d4e89',
    fallZone: '#8a5a00',
    fallZoneFill: '#fdf3dc',
    line: '#a8161b',
    band: '#f6c9c5',
    stop: '#a8161b',
    pass: '#1b5e20',
  },
  night: {
    background: '#1f1b16',
    ink: '#e8dcc6',
    muted: '#bfb197',
    track: '#d8c8a8',
    reach: '#8fb4e0',
    fallZone: '#e0b25a',
    fallZoneFill: '#2c2516',
    line: '#ef6a5f',
    band: '#4a2420',
    stop: '#ef6a5f',
    pass: '#8fd694',
  },
};

const FONT = 'Roboto, Helvetica, Arial, sans-serif';

function px(value: number): string {
  return String(Math.round(value * 100) / 100);
}

function text(x: number, y: number, content: string, attrs: string): string {
  return `<text x="${px(x)}" y="${px(y)}" font-family="${FONT}" ${attrs}>${escapeXml(content)}</text>`;
}

/** A label on a background-coloured plate, so the circles and lines never strike through it. */
function plate(x: number, y: number, content: string, fontSize: number, background: string, attrs: string): string {
  const w = content.length * fontSize * 0.58 + 8;
  return `<rect x="${px(x - w / 2)}" y="${px(y - fontSize)}" width="${px(w)}" height="${px(fontSize + 5)}" fill="${background}" fill-opacity="0.9"/>` + text(x, y, content, `font-size="${fontSize}" text-anchor="middle" ${attrs}`);
}

function positive(field: string, value: unknown): number {
  if (typeof value !== 'number' || !Number.isFinite(value) || value <= 0) {
    throw new CalcInputError(field, `must be a finite number greater than zero, got ${String(value)}`);
  }
  return value;
}

/** Words broken into lines of at most `max` characters: SVG text does not flow on its own. */
function wrap(words: string, max: number): string[] {
  const lines: string[] = [];
  let line = '';
  for (const word of words.split(' ')) {
    if (line && line.length + 1 + word.length > max) {
      lines.push(line);
      line = word;
    } else line = line ? `${line} ${word}` : word;
  }
  if (line) lines.push(line);
  return lines;
}

/** A scale-bar length of 1, 2 or 5 × 10ⁿ metres near a fifth of the extent. */
function scaleBarM(extentM: number): number {
  const target = extentM / 5;
  const power = 10 ** Math.floor(Math.log10(target));
  for (const f of [1, 2, 5, 10]) if (f * power >= target) return f * power;
  return 10 * power;
}

/** Bearings the lines are spread over, in degrees clockwise from the right: right, up, left, down, then the diagonals. */
const SPREAD_DEG = [0, 270, 180, 90, 315, 225, 135, 45];

/** Draws the crane's tracks, boom reach, fall zone and power lines with their clearance bands, to scale. */
export function sitePlanSvg(input: SitePlanInput, options: SitePlanDrawingOptions = {}): string {
  const p = palettes[options.theme ?? 'day'];
  const size = options.sizePx ?? 640;
  if (!Number.isFinite(size) || size < 320) throw new CalcInputError('sizePx', `must be at least 320, got ${String(size)}`);
  const boomM = positive('boomLengthM', input.boomLengthM);
  const reachM = input.reachM === undefined ? boomM : positive('reachM', input.reachM);
  const reachWords = input.reachM === undefined ? 'Boom' : 'Reach';
  const fallM = positive('fallZoneRadiusM', input.fallZoneRadiusM);
  const trackM = positive('trackLengthM', input.trackLengthM);
  const gaugeM = positive('gaugeM', input.gaugeM);
  const shoeM = input.trackWidthM === undefined ? gaugeM / 6 : positive('trackWidthM', input.trackWidthM);
  input.powerLines.forEach((l, i) => {
    positive(`powerLines.${i}.distanceM`, l.distanceM);
    if (l.voltageKv !== null) positive(`powerLines.${i}.voltageKv`, l.voltageKv);
    if (l.requiredClearanceM !== null) positive(`powerLines.${i}.requiredClearanceM`, l.requiredClearanceM);
    if (!Number.isFinite(l.availableClearanceM)) throw new CalcInputError(`powerLines.${i}.availableClearanceM`, 'must be a finite number');
  });

  const extentM = Math.max(fallM, reachM, trackM / 2 + gaugeM, ...input.powerLines.map((l) => l.distanceM)) * 1.12;
  // 12 px text is about 0.56 em wide per character; the words wrap to the drawing's width.
  const maxChars = Math.floor((size - 32) / (12 * 0.56));
  const notAMap = wrap('Not a map: the lines are drawn at their distance, their bearing is not known here.', maxChars);
  const header = 48 + notAMap.length * 16;
  // Room available is rounded down: the drawing never shows more room than there is.
  const lineWords = input.powerLines.map((l, i) => {
    const req = l.requiredClearanceM === null ? 'clearance: ask the line owner' : `clearance ${fmtUp(l.requiredClearanceM, 2)} m${l.basisWords ? ` (${l.basisWords})` : ''}`;
    const volts = l.voltageKv === null ? 'voltage unknown' : `${l.voltageKv} kV`;
    // Results stored before the assist crane was checked have no `assist`: read as not planned.
    const assist = !l.assist ? '' : `; assist crane ${l.assist.availableClearanceM === null ? 'not checked' : `${fmtDown(l.assist.availableClearanceM)} m available`}`;
    const clear = l.pass && (!l.assist || l.assist.pass);
    const status = clear ? 'CLEAR' : 'TOO CLOSE';
    const rows = wrap(`${status} ${i + 1}. ${l.label}: ${volts}, ${l.distanceM} m away; ${req}; ${fmtDown(l.availableClearanceM)} m available${assist}`, maxChars);
    return { clear, status, rows };
  });
  const footer = 48 + lineWords.reduce((sum, w) => sum + w.rows.length * 16 + 6, 0);
  const height = size + header + footer;
  const cx = size / 2;
  const cy = header + size / 2;
  const scale = (size / 2 - 16) / extentM;
  const title = `Site plan: boom ${boomM} m, reach ${fmtUp(reachM)} m, fall zone ${fmtUp(fallM)} m, ${input.powerLines.length} power line${input.powerLines.length === 1 ? '' : 's'}`;

  const out: string[] = [];

  // Fall zone, then the boom reach, both centred on the slewing centre.
  out.push(
    `<circle cx="${px(cx)}" cy="${px(cy)}" r="${px(fallM * scale)}" fill="${p.fallZoneFill}" stroke="${p.fallZone}" stroke-width="2" stroke-dasharray="10 6" data-fall-zone-m="${px(fallM)}"/>`,
  );
  out.push(`<circle cx="${px(cx)}" cy="${px(cy)}" r="${px(reachM * scale)}" fill="none" stroke="${p.reach}" stroke-width="2" data-reach-m="${px(reachM)}" data-boom-length-m="${px(boomM)}"/>`);
  // Labels on the lower-left diagonal, where the lines are spread last.
  const diag = Math.SQRT1_2;
  const labels: string[] = [
    plate(cx - fallM * scale * diag, cy + fallM * scale * diag + 4, `Fall zone ${fmtUp(fallM)} m`, 12, p.background, `font-weight="700" fill="${p.fallZone}"`),
    plate(cx - reachM * scale * diag, cy + reachM * scale * diag - 14, `${reachWords} ${fmtUp(reachM)} m`, 12, p.background, `font-weight="700" fill="${p.reach}"`),
  ];

  // Tracks: two rectangles either side of the centre, to scale.
  for (const side of [-1, 1]) {
    const x = cx - (trackM / 2) * scale;
    const y = cy + side * (gaugeM / 2) * scale - (shoeM / 2) * scale;
    out.push(`<rect x="${px(x)}" y="${px(y)}" width="${px(trackM * scale)}" height="${px(Math.max(2, shoeM * scale))}" fill="${p.track}" data-track="1"/>`);
  }
  out.push(`<circle cx="${px(cx)}" cy="${px(cy)}" r="3" fill="${p.ink}"/>`);

  // Power lines: a long straight line at its distance, the required clearance as a band on the crane side.
  input.powerLines.forEach((l, i) => {
    const deg = SPREAD_DEG[i % SPREAD_DEG.length];
    const a = (deg * Math.PI) / 180;
    const ux = Math.cos(a);
    const uy = Math.sin(a);
    // Perpendicular direction along the line.
    const vx = -uy;
    const vy = ux;
    const d = l.distanceM * scale;
    const half = size * 0.6;
    const lx = cx + ux * d;
    const ly = cy + uy * d;
    if (l.requiredClearanceM !== null) {
      const inner = Math.max(0, l.distanceM - l.requiredClearanceM) * scale;
      const ix = cx + ux * inner;
      const iy = cy + uy * inner;
      const band = [
        [ix + vx * half, iy + vy * half],
        [ix - vx * half, iy - vy * half],
        [lx - vx * half, ly - vy * half],
        [lx + vx * half, ly + vy * half],
      ]
        .map(([x, y]) => `${px(x)},${px(y)}`)
        .join(' ');
      out.push(`<polygon points="${band}" fill="${p.band}" fill-opacity="0.7" stroke="none" data-clearance-m="${px(l.requiredClearanceM)}"/>`);
    }
    out.push(
      `<line x1="${px(lx + vx * half)}" y1="${px(ly + vy * half)}" x2="${px(lx - vx * half)}" y2="${px(ly - vy * half)}" stroke="${p.line}" stroke-width="3" data-power-line="${i}" data-distance-m="${px(l.distanceM)}"/>`,
    );
    // Dimension from the centre to the line, labelled with the line's number.
    out.push(`<line x1="${px(cx)}" y1="${px(cy)}" x2="${px(lx)}" y2="${px(ly)}" stroke="${p.muted}" stroke-width="1" stroke-dasharray="3 3"/>`);
    const tagX = Math.min(Math.max(lx + ux * 30, 40), size - 40);
    const tagY = Math.min(Math.max(ly + uy * 14 + 4, header + 12), header + size - 4);
    labels.push(plate(tagX, tagY, `${i + 1}: ${l.voltageKv === null ? '? kV' : `${l.voltageKv} kV`}`, 13, p.background, `font-weight="700" fill="${p.line}"`));
  });
  out.push(...labels);
  // The long power lines run past the plan; the header and footer are painted over them.
  out.push(`<rect x="0" y="0" width="${size}" height="${header}" fill="${p.background}"/>`);
  out.push(text(16, 24, 'Plan, distances from the slewing centre', `font-size="15" font-weight="700" fill="${p.ink}"`));
  notAMap.forEach((row, i) => out.push(text(16, 44 + i * 16, row, `font-size="12" fill="${p.muted}"`)));

  // Footer: scale bar, then one line of words per power line.
  const fy = header + size;
  out.push(`<rect x="0" y="${px(fy)}" width="${size}" height="${px(footer)}" fill="${p.background}"/>`);
  const barM = scaleBarM(extentM);
  const barPx = barM * scale;
  out.push(`<line x1="16" y1="${px(fy + 22)}" x2="${px(16 + barPx)}" y2="${px(fy + 22)}" stroke="${p.ink}" stroke-width="3" data-scale-bar-m="${px(barM)}"/>`);
  out.push(`<line x1="16" y1="${px(fy + 16)}" x2="16" y2="${px(fy + 28)}" stroke="${p.ink}" stroke-width="2"/>`);
  out.push(`<line x1="${px(16 + barPx)}" y1="${px(fy + 16)}" x2="${px(16 + barPx)}" y2="${px(fy + 28)}" stroke="${p.ink}" stroke-width="2"/>`);
  out.push(text(24 + barPx, fy + 27, `${barM} m`, `font-size="12" font-weight="700" fill="${p.ink}"`));
  out.push(text(size - 16, fy + 27, `tracks ${trackM} m long, gauge ${gaugeM} m`, `font-size="12" text-anchor="end" fill="${p.muted}"`));
  let y = fy + 50;
  for (const w of lineWords) {
    w.rows.forEach((row, r) => {
      if (r === 0) {
        // The word first, bold and in its colour, then the rest of the row.
        const rest = row.slice(w.status.length);
        out.push(
          `<text x="16" y="${px(y)}" font-family="${FONT}" font-size="12" fill="${p.ink}"><tspan font-weight="700" fill="${w.clear ? p.pass : p.stop}">${w.status}</tspan>${escapeXml(rest)}</text>`,
        );
      } else out.push(text(16, y, row, `font-size="12" fill="${p.ink}"`));
      y += 16;
    });
    y += 6;
  }

  return (
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${size} ${px(height)}" width="${size}" height="${px(height)}" role="img" aria-label="${escapeXml(title)}">` +
    `<title>${escapeXml(title)}</title>` +
    `<rect x="0" y="0" width="${size}" height="${px(height)}" fill="${p.background}"/>` +
    out.join('') +
    '</svg>'
  );
}
