/**
 * Reeving of the main hoist between the boom-tip sheaves and the hook block, as an SVG string:
 * one vertical line per part of line, the lead line coming off the first tip sheave towards the
 * drum, and the dead end at the tip (even parts) or at the block (odd parts).
 *
 * Pure: no DOM and no Node modules (shown in the browser and placed in the record PDF), plain
 * shapes with explicit colours, every piece of text through `escapeXml`. Schematic, not to scale.
 */
import { CalcInputError } from '../calc/errors';
import { fmtUp } from '../format';
import { escapeXml } from './boom-makeup';

/** What the reeving drawing needs; the planner's `reeving` result carries all of it. */
export interface ReevingDrawingInput {
  parts: number;
  /** Sheaves in the hook block (0 for an overhaul ball). */
  sheaveCount: number;
  hookBlockId: string;
  leadLinePullKn: number;
  /** The lead sheaves between the drum and the tip, with their bearings; drawn as a note when given. */
  leadSheaves?: readonly { id: string; bearing: 'plain' | 'rolling' }[];
}

/** Drawing options. */
export interface ReevingDrawingOptions {
  /** Day draws dark on white (also the PDF); night draws light on a dim background. */
  theme?: 'day' | 'night';
  widthPx?: number;
}

interface Palette {
  background: string;
  ink: string;
  muted: string;
  rope: string;
  lead: string;
  sheaveFill: string;
  blockFill: string;
  unused: string;
  stop: string;
}

const palettes: Record<'day' | 'night', Palette> = {
  day: {
    background: '#ffffff',
    ink: '#14181d',
    muted: '#3b434c',
    rope: '#1d2b3a',
    lead: '#1d4e89',
    sheaveFill: '#f4efe4',
    blockFill: '#e9e4d8',
    unused: '#6b737c',
    stop: '#a8161b',
  },
  night: {
    background: '#1f1b16',
    ink: '#e8dcc6',
    muted: '#bfb197',
    rope: '#d8c8a8',
    lead: '#8fb4e0',
    sheaveFill: '#2a251e',
    blockFill: '#332d24',
    unused: '#9a8e78',
    stop: '#ef6a5f',
  },
};

const FONT = 'Roboto, Helvetica, Arial, sans-serif';

function px(value: number): string {
  return String(Math.round(value * 100) / 100);
}

function text(x: number, y: number, content: string, attrs: string): string {
  return `<text x="${px(x)}" y="${px(y)}" font-family="${FONT}" ${attrs}>${escapeXml(content)}</text>`;
}

/** Sheaves a reeving of `parts` uses: the lead sheave and every top turn at the tip, every bottom turn in the block. */
export function sheavesUsed(parts: number): { tip: number; block: number } {
  return { tip: Math.ceil(parts / 2), block: Math.floor(parts / 2) };
}

/** Draws the reeving of `parts` parts of line between the tip sheaves and the hook block, with the lead-line pull written. */
export function reevingSvg(input: ReevingDrawingInput, options: ReevingDrawingOptions = {}): string {
  const p = palettes[options.theme ?? 'day'];
  const width = options.widthPx ?? 640;
  if (!Number.isFinite(width) || width < 320) throw new CalcInputError('widthPx', `must be at least 320, got ${String(width)}`);
  const { parts, sheaveCount, hookBlockId, leadLinePullKn } = input;
  if (!Number.isInteger(parts) || parts < 1 || parts > 100) throw new CalcInputError('parts', `must be a whole number from 1 to 100, got ${String(parts)}`);
  if (!Number.isInteger(sheaveCount) || sheaveCount < 0 || sheaveCount > 50) {
    throw new CalcInputError('sheaveCount', `must be a whole number from 0 to 50, got ${String(sheaveCount)}`);
  }
  if (typeof leadLinePullKn !== 'number' || !Number.isFinite(leadLinePullKn) || leadLinePullKn < 0) {
    throw new CalcInputError('leadLinePullKn', `must be a finite pull of zero or more, got ${String(leadLinePullKn)}`);
  }

  const used = sheavesUsed(parts);
  const unusedBlock = Math.max(0, sheaveCount - used.block);
  const tooFewSheaves = used.block > sheaveCount;
  const title = `Reeving: ${parts} parts of line on hook block ${hookBlockId}, lead-line pull ${fmtUp(leadLinePullKn)} kN`;

  // Part k hangs at x_k; the lead sheave sits left of part 1, unused block sheaves right of the last part.
  const marginLeft = 150;
  const marginRight = 40;
  const slots = parts + 2 + unusedBlock;
  const dx = Math.min(48, (width - marginLeft - marginRight) / slots);
  const r = dx / 2;
  const xOf = (k: number) => marginLeft + k * dx;
  const tipY = 110;
  const blockY = 314;
  const out: string[] = [];

  // Boom tip: a frame round the tip sheaves.
  const tipLeft = xOf(0) - dx / 2 - 10;
  const tipRight = xOf(Math.max(1, parts)) + dx / 2 + 10;
  out.push(`<rect x="${px(tipLeft)}" y="${px(tipY - r - 14)}" width="${px(tipRight - tipLeft)}" height="${px(2 * r + 28)}" fill="none" stroke="${p.muted}" stroke-width="1.5" stroke-dasharray="5 3"/>`);
  out.push(text(tipLeft, tipY - r - 22, `Boom tip: ${used.tip} sheave${used.tip === 1 ? '' : 's'} in use`, `font-size="13" font-weight="700" fill="${p.ink}"`));

  // Hook block: a frame round all its sheaves, used and unused, and a hook below.
  const blockLeft = xOf(1) - 14;
  const blockRight = xOf(parts + unusedBlock) + (unusedBlock > 0 ? dx : 14);
  out.push(`<rect x="${px(blockLeft)}" y="${px(blockY - r - 14)}" width="${px(Math.max(28, blockRight - blockLeft))}" height="${px(2 * r + 40)}" rx="6" fill="${p.blockFill}" stroke="${p.ink}" stroke-width="2"/>`);
  const hookX = (blockLeft + Math.max(blockLeft + 28, blockRight)) / 2;
  const hookTop = blockY + r + 26;
  out.push(`<path d="M ${px(hookX)} ${px(hookTop)} v 18 a 12 12 0 1 1 -12 12" fill="none" stroke="${p.ink}" stroke-width="4"/>`);
  const blockLabel = `Hook block ${hookBlockId}: ${sheaveCount} sheave${sheaveCount === 1 ? '' : 's'}, ${used.block} in use`;
  // About 7.5 px a character at 13 px bold: a label that would run off a narrow drawing ends at its right edge instead.
  const blockLabelFits = blockLeft + blockLabel.length * 7.5 <= width - 8;
  out.push(text(blockLabelFits ? blockLeft : width - 8, hookTop + 62, blockLabel, `font-size="13" font-weight="700" fill="${p.ink}"${blockLabelFits ? '' : ' text-anchor="end"'}`));

  // Sheaves: the lead sheave, then a top turn after every even part and a bottom turn after every odd part.
  const sheave = (cx: number, cy: number, state: 'used' | 'unused', kind: 'tip' | 'block') =>
    `<circle cx="${px(cx)}" cy="${px(cy)}" r="${px(r)}" fill="${p.sheaveFill}" stroke="${state === 'used' ? p.ink : p.unused}" stroke-width="${state === 'used' ? 2 : 1.2}"${state === 'unused' ? ' stroke-dasharray="3 2"' : ''} data-sheave="${kind}" data-state="${state}"/>`;
  out.push(sheave(xOf(0) + dx / 2, tipY, 'used', 'tip'));
  for (let k = 1; k < parts; k += 1) {
    const cx = (xOf(k) + xOf(k + 1)) / 2;
    out.push(sheave(cx, k % 2 === 0 ? tipY : blockY, 'used', k % 2 === 0 ? 'tip' : 'block'));
  }
  for (let u = 0; u < unusedBlock; u += 1) out.push(sheave(xOf(parts + 1 + u), blockY, 'unused', 'block'));

  // The parts of line, numbered below the tip.
  // Each sheave's sides touch the parts either side of it, so the rope reads as one continuous line.
  for (let k = 1; k <= parts; k += 1) {
    out.push(`<line x1="${px(xOf(k))}" y1="${px(tipY)}" x2="${px(xOf(k))}" y2="${px(blockY)}" stroke="${p.rope}" stroke-width="2" data-part="${k}"/>`);
  }
  const lead = xOf(0);
  out.push(`<line x1="${px(lead)}" y1="${px(tipY)}" x2="${px(24)}" y2="${px(blockY + 20)}" stroke="${p.lead}" stroke-width="3.5" data-lead="1"/>`);
  out.push(text(20, blockY + 44, 'Lead line to the drum', `font-size="13" font-weight="700" fill="${p.lead}"`));
  out.push(text(20, blockY + 62, `Pull ${fmtUp(leadLinePullKn)} kN`, `font-size="15" font-weight="700" fill="${p.ink}"`));
  const leadSheaves = input.leadSheaves ?? [];

  // Dead end: at the block for an odd number of parts, at the tip for an even number.
  const deadX = xOf(parts);
  const deadAtBlock = parts % 2 === 1;
  const deadY = deadAtBlock ? blockY : tipY;
  out.push(`<rect x="${px(deadX - 6)}" y="${px(deadY - 6)}" width="12" height="12" fill="${p.ink}" data-dead-end="${deadAtBlock ? 'block' : 'tip'}"/>`);
  const deadLabel = `Dead end (${deadAtBlock ? 'at the hook block' : 'at the boom tip'})`;

  out.push(text(20, 26, `${parts} part${parts === 1 ? '' : 's'} of line · lead-line pull ${fmtUp(leadLinePullKn)} kN`, `font-size="15" font-weight="700" fill="${p.ink}"`));
  let footerY = hookTop + 88;
  // The dead end is named in a key under the drawing: a label beside the square crossed the parts of line on narrow screens.
  out.push(`<rect x="20" y="${px(footerY - 10)}" width="10" height="10" fill="${p.ink}"/>`);
  out.push(text(36, footerY, deadLabel, `font-size="12" font-weight="700" fill="${p.ink}"`));
  footerY += 20;
  if (leadSheaves.length > 0) {
    // Each lead sheave's bearing sets its friction in the pull; a plain bearing is named so the rigger can check it.
    out.push(text(20, footerY, 'Lead sheaves from the drum to the tip:', `font-size="12" font-weight="700" fill="${p.ink}" data-lead-sheaves="${leadSheaves.length}"`));
    footerY += 18;
    for (const s of leadSheaves) {
      out.push(text(32, footerY, `${s.id}, ${s.bearing === 'plain' ? 'plain bearing' : 'rolling bearing'}`, `font-size="12" fill="${p.ink}"`));
      footerY += 18;
    }
    footerY += 2;
  }
  if (tooFewSheaves) {
    out.push(text(20, footerY, `WARNING: ${parts} parts need ${used.block} block sheaves; ${hookBlockId} has ${sheaveCount}`, `font-size="13" font-weight="700" fill="${p.stop}"`));
    footerY += 20;
  }
  out.push(text(20, footerY, 'Schematic, not to scale. Dashed sheaves are not reeved.', `font-size="12" fill="${p.muted}"`));
  const height = footerY + 14;

  return (
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${px(height)}" width="${width}" height="${px(height)}" role="img" aria-label="${escapeXml(title)}">` +
    `<title>${escapeXml(title)}</title>` +
    `<rect x="0" y="0" width="${width}" height="${px(height)}" fill="${p.background}"/>` +
    out.join('') +
    '</svg>'
  );
}
