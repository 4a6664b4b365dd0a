/**
 * The boom make-up drawn to scale, foot on the left, tip on the right, as an SVG string.
 *
 * Pure: no DOM and no Node modules, because the same text is shown in the browser (v-html) and
 * later placed in the erection record PDF through svg-to-pdfkit. For that reason the drawing uses
 * only plain shapes with explicit fill and stroke colours (no CSS, no ids, no patterns, no
 * clip paths), and every piece of text passes through `escapeXml`.
 */
import { CalcInputError } from '../calc/errors';
import { plain, tonnesUp } from '../format';

/** A section type as the arrangement data lists it; enough to draw a type-only boom. */
export interface DrawableSectionType {
  id: string;
  role: 'base' | 'insert' | 'tip';
  lengthM: number;
  /** Connecting pins in the joint at this section's foot. */
  pinsPerJoint?: number;
}

/** The parts of a BoomMakeup (shared/calc/boom.ts) the drawing needs. */
export interface DrawableMakeup {
  boomLengthM: number;
  buildable: boolean;
  sections: readonly { position: number; typeId: string; lengthM: number; startM: number; endM: number; serial: string | null }[];
  totalSectionWeightKg?: number;
  pinCount?: { jointPins: number; guyLinePins: number; total: number };
}

/** A part that may not go into the boom, so its position can be named on the drawing. */
export interface UnusablePart {
  typeId: string;
  serial: string;
  status: 'quarantined' | 'retired';
}

export interface BoomDrawingOptions {
  /** Day draws dark on white (also the PDF); night draws light on a dim background. */
  theme?: 'day' | 'night';
  /** Width of the drawing in SVG units; the height follows from the content. */
  widthPx?: number;
  /**
   * The model's section types: give the pins per joint for a make-up (which only carries type ids).
   * Without them the joints are drawn without a pin count rather than with a guessed one.
   */
  sectionTypes?: readonly DrawableSectionType[];
  /** Quarantined or retired parts of the unit: a position they would fill is marked with the word. */
  unusable?: readonly UnusablePart[];
  /** Read by screen readers; defaults to a sentence built from the boom. */
  title?: string;
}

/** Colours of one theme. Day colours hold at least 4.5:1 against white for text. */
interface Palette {
  background: string;
  ink: string;
  muted: string;
  chord: string;
  lacing: string;
  sectionFill: string;
  warningFill: string;
  warningInk: string;
  stop: string;
  stopFill: string;
  pinFill: string;
  pinInk: string;
}

const palettes: Record<'day' | 'night', Palette> = {
  day: {
    background: '#ffffff',
    ink: '#14181d',
    muted: '#3b434c',
    chord: '#1d2b3a',
    lacing: '#5b6570',
    sectionFill: '#f4efe4',
    warningFill: '#f2b53a',
    warningInk: '#2a1d00',
    stop: '#a8161b',
    stopFill: '#fbe3e1',
    pinFill: '#1d4e89',
    pinInk: '#ffffff',
  },
  night: {
    background: '#1f1b16',
    ink: '#e8dcc6',
    muted: '#bfb197',
    chord: '#d8c8a8',
    lacing: '#8c7f68',
    sectionFill: '#2a251e',
    warningFill: '#c99a3c',
    warningInk: '#140e00',
    stop: '#ef6a5f',
    stopFill: '#3a1e1a',
    pinFill: '#8fb4e0',
    pinInk: '#14110d',
  },
};

const FONT = 'Roboto, Helvetica, Arial, sans-serif';
const MARGIN_X = 24;
const BOOM_HEIGHT = 44;
const LABEL_FONT = 13;
const LINE_GAP = 16;
const LANE_GAP = 8;

/** Escapes text for XML content and attribute values. */
export function escapeXml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&apos;' })[c] ?? c);
}

/** A coordinate for the SVG: rounded so the text stays short and stable for tests. */
function px(value: number): string {
  return String(Math.round(value * 100) / 100);
}

/** Rough width of a label: Roboto-like fonts average a little over half the font size per character. */
function textWidth(text: string, fontSize: number): number {
  return text.length * fontSize * 0.58;
}

const roleWords: Record<DrawableSectionType['role'], string> = { base: 'Base', insert: 'Insert', tip: 'Tip' };

type PositionState = 'ok' | 'no-serial' | 'quarantined' | 'retired' | 'missing';

interface DrawnSection {
  position: number;
  typeId: string;
  role: DrawableSectionType['role'];
  lengthM: number;
  startM: number;
  /** Absent for a type-only drawing (model detail): no serial line at all. */
  serial?: string | null;
  state: PositionState;
  /** The unusable serial named at this position. */
  unusableSerial?: string;
  pinsAtFoot: number | null;
}

/** Role by position: the arrangement data always orders base, inserts, tip. */
function roleAt(index: number, count: number): DrawableSectionType['role'] {
  if (index === 0) return 'base';
  return index === count - 1 ? 'tip' : 'insert';
}

function fromTypes(types: readonly DrawableSectionType[]): DrawnSection[] {
  let startM = 0;
  return types.map((t, i) => {
    if (typeof t.lengthM !== 'number' || !Number.isFinite(t.lengthM) || t.lengthM <= 0) {
      throw new CalcInputError(`sections.${i}.lengthM`, `must be a length greater than zero, got ${String(t.lengthM)}`);
    }
    const drawn: DrawnSection = {
      position: i + 1,
      typeId: t.id,
      role: t.role,
      lengthM: t.lengthM,
      startM,
      state: 'ok',
      pinsAtFoot: t.pinsPerJoint ?? null,
    };
    startM += t.lengthM;
    return drawn;
  });
}

function fromMakeup(makeup: DrawableMakeup, options: BoomDrawingOptions): DrawnSection[] {
  const types = new Map((options.sectionTypes ?? []).map((t) => [t.id, t]));
  // Unusable serials of each type, handed out in order to the positions left without a part.
  const pending = new Map<string, UnusablePart[]>();
  const unusableSerials = new Map<string, UnusablePart>();
  for (const part of options.unusable ?? []) {
    unusableSerials.set(part.serial, part);
    pending.set(part.typeId, [...(pending.get(part.typeId) ?? []), part]);
  }
  const count = makeup.sections.length;
  return makeup.sections.map((s, i) => {
    if (typeof s.lengthM !== 'number' || !Number.isFinite(s.lengthM) || s.lengthM <= 0) {
      throw new CalcInputError(`sections.${i}.lengthM`, `must be a length greater than zero, got ${String(s.lengthM)}`);
    }
    if (!Number.isFinite(s.startM)) throw new CalcInputError(`sections.${i}.startM`, `must be a finite number, got ${String(s.startM)}`);
    const type = types.get(s.typeId);
    let state: PositionState = 'ok';
    let unusableSerial: string | undefined;
    if (s.serial !== null && unusableSerials.has(s.serial)) {
      const part = unusableSerials.get(s.serial)!;
      state = part.status;
      unusableSerial = part.serial;
    } else if (s.serial === null) {
      const part = pending.get(s.typeId)?.shift();
      if (part) {
        state = part.status;
        unusableSerial = part.serial;
      } else {
        state = 'missing';
      }
    }
    return {
      position: s.position,
      typeId: s.typeId,
      role: type?.role ?? roleAt(i, count),
      lengthM: s.lengthM,
      startM: s.startM,
      serial: s.serial,
      state,
      unusableSerial,
      pinsAtFoot: type?.pinsPerJoint ?? null,
    };
  });
}

/** A label block placed in the first lane where it does not overlap its neighbour. */
interface Placed {
  lane: number;
  left: number;
  right: number;
}

function placeInLanes(items: readonly { centre: number; width: number }[], minX: number, maxX: number): Placed[] {
  const laneEnds: number[] = [];
  return items.map(({ centre, width }) => {
    // Keep every label inside the drawing, even at the very foot or tip.
    const left = Math.min(Math.max(centre - width / 2, minX), maxX - width);
    const right = left + width;
    let lane = laneEnds.findIndex((end) => end + LANE_GAP <= left);
    if (lane === -1) {
      lane = laneEnds.length;
      laneEnds.push(right);
    } else {
      laneEnds[lane] = right;
    }
    return { lane, left, right };
  });
}

function text(x: number, y: number, content: string, attrs: string): string {
  return `<text x="${px(x)}" y="${px(y)}" font-family="${FONT}" ${attrs}>${escapeXml(content)}</text>`;
}

/** The lattice: two chords and a zigzag of lacings, so a section reads as a lattice, not a box. */
function lattice(x: number, y: number, w: number, h: number, p: Palette): string {
  const out: string[] = [];
  const inset = 5;
  const top = y + inset;
  const bottom = y + h - inset;
  const bays = Math.max(1, Math.round(w / 22));
  const bay = w / bays;
  const points: string[] = [];
  for (let i = 0; i <= bays; i += 1) points.push(`${px(x + i * bay)},${px(i % 2 === 0 ? bottom : top)}`);
  out.push(`<polyline points="${points.join(' ')}" fill="none" stroke="${p.lacing}" stroke-width="1.2"/>`);
  out.push(`<line x1="${px(x)}" y1="${px(top)}" x2="${px(x + w)}" y2="${px(top)}" stroke="${p.chord}" stroke-width="2.5"/>`);
  out.push(`<line x1="${px(x)}" y1="${px(bottom)}" x2="${px(x + w)}" y2="${px(bottom)}" stroke="${p.chord}" stroke-width="2.5"/>`);
  return out.join('');
}

/** A step for the scale bar's ticks that gives about five to ten ticks. */
function scaleStepM(totalM: number): number {
  for (const step of [1, 2, 5, 10, 20, 25, 50, 100]) if (totalM / step <= 10) return step;
  return 200;
}

const stateWords: Record<Exclude<PositionState, 'ok'>, string> = {
  'no-serial': 'no serial',
  quarantined: 'QUARANTINED',
  retired: 'RETIRED',
  missing: 'MISSING',
};

/**
 * Draws a boom make-up (a BoomMakeup, with serials) or a plain list of section types foot to tip
 * (a model's arrangement for one length), to scale, with joint pin counts and a scale bar.
 */
export function boomMakeupSvg(input: DrawableMakeup | readonly DrawableSectionType[], options: BoomDrawingOptions = {}): string {
  const p = palettes[options.theme ?? 'day'];
  const width = options.widthPx ?? 960;
  if (!Number.isFinite(width) || width < 200) throw new CalcInputError('widthPx', `must be at least 200, got ${String(width)}`);
  const isTypeList = Array.isArray(input);
  const sections = isTypeList ? fromTypes(input as readonly DrawableSectionType[]) : fromMakeup(input as DrawableMakeup, options);
  const totalM = sections.reduce((sum, s) => Math.max(sum, s.startM + s.lengthM), 0);
  const title = options.title ?? (totalM > 0 ? `Boom make-up, ${plain(totalM, 2)} m, ${sections.length} sections from foot to tip` : 'Boom make-up: no sections');

  const parts: string[] = [];
  const open = (height: number) =>
    `<svg xmlns="http://www.w3.org/2000/svg" viewBox="0 0 ${width} ${px(height)}" width="${width}" height="${px(height)}" role="img" aria-label="${escapeXml(title)}">` +
    `<title>${escapeXml(title)}</title>` +
    `<rect x="0" y="0" width="${width}" height="${px(height)}" fill="${p.background}"/>`;

  if (sections.length === 0 || totalM <= 0) {
    const height = 60;
    return open(height) + text(MARGIN_X, 36, 'No sections to draw for this boom length.', `font-size="15" fill="${p.ink}"`) + '</svg>';
  }

  const scale = (width - 2 * MARGIN_X) / totalM;
  const xOf = (m: number) => MARGIN_X + m * scale;

  // Header line: total length and, for a make-up, weight, pins and whether it can be built.
  let y = 24;
  const header = [`Total length ${plain(totalM, 2)} m`, `${sections.length} sections`];
  if (!isTypeList) {
    const m = input as DrawableMakeup;
    if (m.totalSectionWeightKg !== undefined && Number.isFinite(m.totalSectionWeightKg)) header.push(`sections ${tonnesUp(m.totalSectionWeightKg)} t`);
    if (m.pinCount && Number.isFinite(m.pinCount.total)) header.push(`${m.pinCount.total} pins (${m.pinCount.jointPins} in joints, ${m.pinCount.guyLinePins} in guy lines)`);
  }
  parts.push(text(MARGIN_X, y, header.join(' · '), `font-size="15" font-weight="700" fill="${p.ink}"`));
  if (!isTypeList && !(input as DrawableMakeup).buildable) {
    // On its own line: beside a long header it would collide at narrow widths.
    y += 26;
    const warning = 'NOT BUILDABLE from the parts at hand';
    const w = textWidth(warning, 13) + 16;
    parts.push(`<rect x="${px(MARGIN_X)}" y="${px(y - 15)}" width="${px(w)}" height="20" fill="${p.stopFill}" stroke="${p.stop}" stroke-width="1.5"/>`);
    parts.push(text(MARGIN_X + 8, y, warning, `font-size="13" font-weight="700" fill="${p.stop}"`));
  }

  // Joint marks above the boom: a pin circle and its count, in lanes so close joints stay legible.
  y += 18;
  const joints = sections.slice(1).map((s) => ({ xAt: xOf(s.startM), pins: s.pinsAtFoot }));
  const jointLabels = joints.map((j) => (j.pins === null ? 'joint' : `${j.pins} pins`));
  const jointPlaced = placeInLanes(
    joints.map((j, i) => ({ centre: j.xAt, width: textWidth(jointLabels[i], 12) + 24 })),
    0,
    width,
  );
  const jointLanes = jointPlaced.reduce((max, pl) => Math.max(max, pl.lane + 1), 0);
  const jointLaneHeight = 22;
  const boomTop = y + jointLanes * jointLaneHeight + 10;
  const boomBottom = boomTop + BOOM_HEIGHT;
  const boomMid = boomTop + BOOM_HEIGHT / 2;

  sections.forEach((s) => {
    const x = xOf(s.startM);
    const w = s.lengthM * scale;
    const flagged = s.state === 'quarantined' || s.state === 'retired' || s.state === 'missing';
    const stroke = flagged ? p.stop : p.chord;
    const dash = s.state === 'missing' ? ' stroke-dasharray="6 4"' : '';
    parts.push(
      `<rect x="${px(x)}" y="${px(boomTop)}" width="${px(w)}" height="${BOOM_HEIGHT}" fill="${flagged ? p.stopFill : p.sectionFill}" stroke="${stroke}" stroke-width="${flagged ? 2.5 : 1.5}"${dash} data-position="${s.position}" data-length-m="${plain(s.lengthM, 2)}"/>`,
    );
    if (s.state === 'ok' || s.state === 'no-serial') parts.push(lattice(x, boomTop, w, BOOM_HEIGHT, p));
    if (s.state === 'quarantined' || s.state === 'retired') {
      // A cross says "not to be used" without relying on the red.
      parts.push(`<line x1="${px(x)}" y1="${px(boomTop)}" x2="${px(x + w)}" y2="${px(boomBottom)}" stroke="${p.stop}" stroke-width="2.5"/>`);
      parts.push(`<line x1="${px(x)}" y1="${px(boomBottom)}" x2="${px(x + w)}" y2="${px(boomTop)}" stroke="${p.stop}" stroke-width="2.5"/>`);
    }
    // The position number inside the section when there is room for it.
    const number = String(s.position);
    if (w >= textWidth(number, 14) + 10) {
      const cw = textWidth(number, 14) + 8;
      parts.push(`<rect x="${px(x + w / 2 - cw / 2)}" y="${px(boomMid - 10)}" width="${px(cw)}" height="20" fill="${p.background}" stroke="${stroke}" stroke-width="1"/>`);
      parts.push(text(x + w / 2, boomMid + 5, number, `font-size="14" font-weight="700" text-anchor="middle" fill="${p.ink}"`));
    }
  });

  joints.forEach((j, i) => {
    const placed = jointPlaced[i];
    const labelY = boomTop - 10 - placed.lane * jointLaneHeight;
    parts.push(`<line x1="${px(j.xAt)}" y1="${px(labelY + 4)}" x2="${px(j.xAt)}" y2="${px(boomBottom)}" stroke="${p.ink}" stroke-width="1.5"/>`);
    parts.push(`<circle cx="${px(j.xAt)}" cy="${px(labelY - 4)}" r="6" fill="${p.pinFill}" stroke="${p.ink}" stroke-width="1"/>`);
    const labelX = Math.min(Math.max(j.xAt + 10, 0), width - textWidth(jointLabels[i], 12) - 2);
    parts.push(text(labelX, labelY, jointLabels[i], `font-size="12" font-weight="500" fill="${p.ink}"`));
  });

  // Labels below the boom: type, serial (or what is wrong), each in the first free lane.
  const labelBlocks = sections.map((s) => {
    const lines: { content: string; kind: 'type' | 'serial' | 'warning' | 'stop' }[] = [{ content: `${roleWords[s.role]} ${plain(s.lengthM, 2)} m`, kind: 'type' }];
    if (s.state === 'quarantined' || s.state === 'retired') {
      lines.push({ content: stateWords[s.state], kind: 'stop' });
      if (s.unusableSerial) lines.push({ content: s.unusableSerial, kind: 'serial' });
    } else if (s.state === 'missing') {
      lines.push({ content: stateWords.missing, kind: 'stop' });
      lines.push({ content: 'no serial', kind: 'warning' });
    } else if (s.serial !== undefined) {
      lines.push(s.serial === null ? { content: 'no serial', kind: 'warning' } : { content: s.serial, kind: 'serial' });
    }
    const widest = Math.max(...lines.map((l) => textWidth(l.content, LABEL_FONT)));
    return { section: s, lines, width: widest + 12 };
  });
  const labelPlaced = placeInLanes(
    labelBlocks.map((b) => ({ centre: xOf(b.section.startM + b.section.lengthM / 2), width: b.width })),
    MARGIN_X / 2,
    width - MARGIN_X / 2,
  );
  const blockHeight = Math.max(...labelBlocks.map((b) => b.lines.length)) * LINE_GAP + 6;
  const labelsTop = boomBottom + 14;
  const labelLanes = labelPlaced.reduce((max, pl) => Math.max(max, pl.lane + 1), 0);
  labelBlocks.forEach((b, i) => {
    const placed = labelPlaced[i];
    const top = labelsTop + placed.lane * (blockHeight + 6);
    const mid = xOf(b.section.startM + b.section.lengthM / 2);
    const anchorX = Math.min(Math.max(mid, placed.left + 4), placed.right - 4);
    parts.push(`<line x1="${px(mid)}" y1="${px(boomBottom)}" x2="${px(anchorX)}" y2="${px(top)}" stroke="${p.muted}" stroke-width="1"/>`);
    b.lines.forEach((line, k) => {
      const baseline = top + 13 + k * LINE_GAP;
      const x = placed.left + 6;
      if (line.kind === 'warning') {
        const w = textWidth(line.content, LABEL_FONT) + 8;
        parts.push(`<rect x="${px(x - 4)}" y="${px(baseline - 12)}" width="${px(w)}" height="16" fill="${p.warningFill}"/>`);
        parts.push(text(x, baseline, line.content, `font-size="${LABEL_FONT}" font-weight="700" fill="${p.warningInk}"`));
      } else if (line.kind === 'stop') {
        parts.push(text(x, baseline, line.content, `font-size="${LABEL_FONT}" font-weight="700" fill="${p.stop}"`));
      } else {
        parts.push(text(x, baseline, line.content, `font-size="${LABEL_FONT}" ${line.kind === 'type' ? 'font-weight="700"' : ''} fill="${line.kind === 'type' ? p.ink : p.muted}"`));
      }
    });
  });

  // Scale bar with ticks every few metres, and the foot and tip named at its ends.
  const scaleY = labelsTop + labelLanes * (blockHeight + 6) + 16;
  const step = scaleStepM(totalM);
  parts.push(`<line x1="${px(xOf(0))}" y1="${px(scaleY)}" x2="${px(xOf(totalM))}" y2="${px(scaleY)}" stroke="${p.ink}" stroke-width="2"/>`);
  for (let m = 0; m <= totalM + 1e-9; m += step) {
    const x = xOf(m);
    parts.push(`<line x1="${px(x)}" y1="${px(scaleY - 5)}" x2="${px(x)}" y2="${px(scaleY + 5)}" stroke="${p.ink}" stroke-width="1.5"/>`);
    const label = `${plain(m, 2)} m`;
    // The last regular tick gives way to the total when they would collide.
    if (totalM - m < step / 2 && m !== 0 && Math.abs(totalM - m) > 1e-9) continue;
    parts.push(text(x, scaleY + 20, label, `font-size="12" text-anchor="middle" fill="${p.ink}"`));
  }
  if (Math.abs(totalM / step - Math.round(totalM / step)) > 1e-9) {
    const x = xOf(totalM);
    parts.push(`<line x1="${px(x)}" y1="${px(scaleY - 5)}" x2="${px(x)}" y2="${px(scaleY + 5)}" stroke="${p.ink}" stroke-width="1.5"/>`);
    parts.push(text(x, scaleY + 20, `${plain(totalM, 2)} m`, `font-size="12" text-anchor="middle" fill="${p.ink}"`));
  }
  const endsY = scaleY + 38;
  parts.push(text(MARGIN_X, endsY, 'Foot (boom base pins)', `font-size="12" font-weight="700" fill="${p.muted}"`));
  parts.push(text(width - MARGIN_X, endsY, 'Tip', `font-size="12" font-weight="700" text-anchor="end" fill="${p.muted}"`));
  const legend = joints.some((j) => j.pins !== null) ? 'Drawn to scale. Pins: connecting pins in each joint.' : 'Drawn to scale.';
  parts.push(text(width / 2, endsY, legend, `font-size="12" text-anchor="middle" fill="${p.muted}"`));

  return open(endsY + 12) + parts.join('') + '</svg>';
}
