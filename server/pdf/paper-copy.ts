import QRCode from 'qrcode';
import { movesBoom } from '../../shared/board/rules.js';
import type { BoardHold, BoardStage, BoardState, BoardStep, MakeSafeItem } from '../../shared/board/types.js';
import type { JobState } from '../../shared/schemas/jobs.js';
import { valueCheckFieldLabels, type Plan, type StepRecord } from '../../shared/schemas/plan.js';
import { roleLabel } from '../../shared/schemas/users.js';
import { siteDateTime, siteTime } from '../../shared/time.js';
import { PdfWriter, SAFETY_TEXT } from './document.js';

/** What the paper copy is drawn from: the board as committed, read for one person. */
export interface PaperCopyInput {
  job: { id: string; name: string; site: string; craneFleetNumber: string; state: JobState; timeZone: string };
  /** The board at the moment of printing (redacted for the reader as every board is). */
  board: BoardState;
  /** The plan in force (the board's version), redacted with `redactPlan` for anyone who does not plan the job. */
  plan: Plan;
  /** The reader plans the job: only then is the supervisor's page of value-check figures printed. */
  planner: boolean;
  /** Where the code on every page leads: the job's board (`/jobs/:id/open`). */
  boardUrl: string;
  printedAt: string;
}

// Sizes in points (1/72 inch). Boxes are at least 12 mm high and 20 mm wide: written in pencil on
// a clipboard, with gloves off, standing up (common practice, no source).
const BOX_H = 36;
const INITIALS_W = 62;
const TIME_W = 70;
const NAME_W = 150;
const VALUE_W = 180;
const GAP = 6;
const HEADER_H = 112;
const QR_SIZE = 80;
const INK = '#14181d';
const MUTED = '#3b434c';
const LINE = '#7a6f5c';
const ACCENT = '#f2b53a';
const STOP_RED = '#9a1c12';

type Doc = PDFKit.PDFDocument;

/** An empty box with its label in small type at the top left, for a pencil. */
function box(doc: Doc, x: number, y: number, w: number, label: string, h = BOX_H): void {
  doc.lineWidth(1).strokeColor(LINE).rect(x, y, w, h).stroke();
  doc.font('Body').fontSize(7).fillColor(MUTED).text(label, x + 3, y + 2, { width: w - 6, lineBreak: false, ellipsis: true });
}

/** A box already filled in live: the words in it, greyed, so nobody writes over it. */
function filledBox(doc: Doc, x: number, y: number, w: number, label: string, words: string, h = BOX_H): void {
  doc.rect(x, y, w, h).fill('#ece8df');
  doc.lineWidth(0.5).strokeColor(LINE).rect(x, y, w, h).stroke();
  doc.font('Body').fontSize(7).fillColor(MUTED).text(label, x + 3, y + 2, { width: w - 6, lineBreak: false, ellipsis: true });
  doc.font('Body').fontSize(9).fillColor(INK).text(words, x + 3, y + 13, { width: w - 6, height: h - 14, ellipsis: true });
}

/** What a reading is held to, in words, as the plan states it (the crew check it on paper; the server compares it when entered). */
function heldTo(records: StepRecord, board: BoardState): string | null {
  const check = records.check;
  if (!check) return null;
  const unit = records.unit ? ` ${records.unit}` : '';
  switch (check.kind) {
    case 'plan':
      return `Must read ${check.planned}${unit}${check.tolerance ? ` ± ${check.tolerance}${unit}` : ''} (the plan). Anything else: stop and tell the supervisor.`;
    case 'max':
      return `At most ${check.limit}${unit}. Over it: stop and tell the supervisor.`;
    case 'min':
      return `At least ${check.limit}${unit}. Under it: stop and tell the supervisor.`;
    case 'wind': {
      const limit = board.windLimits?.[check.phase];
      return limit ? `Gust at most ${limit.gustMs} m/s (the ${check.phase} limit). Over it: stop.` : `No ${check.phase} wind limit is known: get the manufacturer’s limit before going on.`;
    }
  }
}

/**
 * The plan from the board's current state onward, for when the site network is down: every stage
 * not yet done, each open step with boxes for initials, time and the value it records, each hold
 * with a line per required role and the release, the crew to write their initials against, the
 * cautions, and on every page the job, the plan version, the print time and a code that leads back
 * to the job's board. Nothing on it is a record until the supervisor enters it from paper.
 */
export async function paperCopyPdf(input: PaperCopyInput): Promise<Buffer> {
  const { job, board, plan, planner } = input;
  const zone = job.timeZone;
  const printedAt = new Date(input.printedAt);
  const printed = siteDateTime(printedAt, zone);
  const at = (iso: string) => siteTime(iso, zone);
  // Eight pixels a module with the standard four-module quiet zone (ISO/IEC 18004), so a print
  // or a viewer that smooths the picture still shows sharp modules. As a data URI pdfkit keeps one
  // copy of the picture and places it on every page.
  const qr = await QRCode.toBuffer(input.boardUrl, { type: 'png', errorCorrectionLevel: 'M', margin: 4, scale: 8, color: { dark: '#000000', light: '#ffffff' } });
  const qrUri = `data:image/png;base64,${qr.toString('base64')}`;

  const header = (doc: Doc) => {
    const left = doc.page.margins.left;
    const width = doc.page.width - left - doc.page.margins.right;
    const qrX = left + width - QR_SIZE;
    doc.image(qrUri, qrX, 16, { width: QR_SIZE, height: QR_SIZE });
    const textW = width - QR_SIZE - 12;
    doc.font('Body-Bold').fontSize(8).fillColor(STOP_RED).text('PAPER COPY — for when the network is down', left, 20, { width: textW, lineBreak: false });
    doc.font('Body-Bold').fontSize(14).fillColor(INK).text(job.name, left, 32, { width: textW, height: 20, ellipsis: true, lineBreak: false });
    doc.font('Body').fontSize(9).fillColor(INK).text(`Crane ${job.craneFleetNumber} · ${job.site} · plan version ${board.planVersion}`, left, 52, { width: textW, lineBreak: false, ellipsis: true });
    doc.text(`Printed ${printed} site time`, left, 64, { width: textW, lineBreak: false });
    doc.font('Body').fontSize(7.5).fillColor(MUTED).text(`Scan the code to open the job: ${input.boardUrl}`, left, 78, { width: textW, lineBreak: false, ellipsis: true });
    doc.moveTo(left, HEADER_H - 10).lineTo(left + width, HEADER_H - 10).lineWidth(1.5).strokeColor(INK).stroke();
  };

  const pdf = new PdfWriter(`Paper copy — ${job.name}`, `Holdline paper copy · ${job.name} · plan v${board.planVersion} · printed ${printed} site time`, {
    marginTop: HEADER_H,
    eachPage: (doc) => header(doc),
  });
  carriesOn = null;
  const remaining = board.stages.filter((s) => s.state !== 'done' && s.state !== 'skipped');
  const finished = board.stages.length - remaining.length;
  const stepsDoneLive = board.stages.reduce((n, s) => n + s.steps.filter((st) => st.state === 'done').length, 0);

  pdf.notice(SAFETY_TEXT);
  pdf.paragraph(
    `This copy was printed from the board as it stood at ${printed}. ${finished} of ${board.stages.length} stages were finished then and are not printed; ${stepsDoneLive} steps were done live in all. Work on in the same order and by the same rules as on the board. Write every time as the site’s clock, 24-hour (${zone}). Stop by radio and signal first.`,
    { size: 10 },
  );
  pdf.paragraph('When the network is back, the supervisor enters what was done on these sheets into Holdline, with a photo of each sheet. Keep the sheets with the job’s papers.', { size: 10 });

  jobBanners(pdf, board, at);
  crewList(pdf, board);
  if (remaining.some((s) => movesBoom(s) || s.involvesCraneMovement)) windLog(pdf, board);

  const titleOf = new Map(board.stages.map((s) => [s.id, `${s.order}. ${s.title}`]));
  for (const stage of remaining) drawStage(pdf, stage, board, titleOf, at);

  if (!remaining.length) pdf.paragraph('Every stage of the plan was finished when this was printed.', { size: 11 });

  if (planner) supervisorPage(pdf, plan, board);
  return pdf.finish();
}

function jobBanners(pdf: PdfWriter, board: BoardState, at: (iso: string) => string): void {
  const stop = board.job.stop;
  if (stop) {
    banner(pdf, `ALL STOP in force when printed: pressed by ${stop.raisedBy.name} (${roleLabel(stop.raisedBy.role)}) at ${at(stop.pressedAt)}${stop.reason ? `; cause: ${stop.reason}` : '; no cause recorded yet'}. Nothing moves until the supervisor resumes.`);
  }
  const shift = board.shift;
  if (shift?.phase === 'making_safe' && shift.makeSafe) {
    banner(pdf, `The supervisor ended shift ${shift.number}: the crane is being made safe. Finish the make-safe checklist below before anything else.`);
    makeSafeList(pdf, shift.makeSafe.items, at);
  } else if (shift?.phase === 'made_safe') {
    banner(pdf, `The crane was made safe at the end of shift ${shift.number}. The start-of-shift hold comes first: the inspection, the operator and the supervisor sign before any work.`);
    startOfShift(pdf, board, at);
  }
  if (board.actingSupervisor) pdf.paragraph(`Acting supervisor when printed: ${board.actingSupervisor.name}. Only the acting supervisor releases holds.`, { size: 10 });
}

function banner(pdf: PdfWriter, text: string): void {
  const doc = pdf.doc;
  pdf.ensure(60);
  const x = doc.page.margins.left;
  const y = doc.y;
  const h = doc.font('Body-Bold').fontSize(11).heightOfString(text, { width: pdf.width - 20 }) + 14;
  doc.lineWidth(2.5).strokeColor(STOP_RED).rect(x, y, pdf.width, h).stroke();
  doc.fillColor(STOP_RED).text(text, x + 10, y + 7, { width: pdf.width - 20 });
  doc.x = x;
  doc.y = y + h + 8;
}

function makeSafeList(pdf: PdfWriter, items: MakeSafeItem[], at: (iso: string) => string): void {
  pdf.heading('Make-safe checklist');
  for (const item of items) {
    const extra = item.asksNote ? [{ label: 'Note', width: VALUE_W }] : [];
    const sub = `For ${item.roles.map((r) => roleLabel(r).toLowerCase()).join(', ')}`;
    if (item.doneBy) doneLine(pdf, '', item.text, `done live by ${item.doneBy.name} at ${at(item.doneBy.at)}${item.doneBy.note ? `: ${item.doneBy.note}` : ''}`);
    else writeRow(pdf, '', item.text, [sub], extra);
  }
}

function startOfShift(pdf: PdfWriter, board: BoardState, at: (iso: string) => string): void {
  const start = board.shift?.start ?? null;
  pdf.heading('Start-of-shift hold');
  const lines: [string, { name: string; at: string } | null, string[]][] = [
    ['Shift inspection (walk-round)', start?.inspection ?? null, ['What was inspected and found']],
    ['Operator', start?.operator ?? null, []],
    ['Supervisor (acting)', start?.supervisor ?? null, []],
  ];
  for (const [who, done, notes] of lines) signLine(pdf, who, done ? `${done.name}, ${at(done.at)}` : null, notes);
}

function crewList(pdf: PdfWriter, board: BoardState): void {
  const doc = pdf.doc;
  pdf.heading('Crew');
  pdf.paragraph('Each person writes their initials here once, so the initials on these sheets can be read back.', { size: 9.5, color: MUTED });
  const nameW = pdf.width - INITIALS_W - 150 - 2 * GAP;
  const rowH = 30;
  for (const member of board.crew) {
    pdf.ensure(rowH + 4);
    const y = doc.y;
    doc.font('Body-Bold').fontSize(11).fillColor(INK).text(member.name, left(doc), y + 9, { width: nameW, lineBreak: false, ellipsis: true });
    doc.font('Body').fontSize(10.5).fillColor(INK).text(roleLabel(member.role), left(doc) + nameW + GAP, y + 9, { width: 150, lineBreak: false });
    box(doc, left(doc) + pdf.width - INITIALS_W, y, INITIALS_W, 'Initials', rowH);
    doc.y = y + rowH + 4;
  }
  doc.x = left(doc);
  doc.moveDown(0.4);
}

function windLog(pdf: PdfWriter, board: BoardState): void {
  const doc = pdf.doc;
  pdf.heading('Wind readings');
  const limits = board.windLimits;
  const minutes = board.weatherFreshMinutes ?? 15;
  pdf.paragraph(
    limits
      ? `Limits of this configuration, gust / mean at the boom tip: assembly ${limits.assembly.gustMs} / ${limits.assembly.meanMs} m/s; raising and lowering ${limits.raising.gustMs} / ${limits.raising.meanMs} m/s. Every step of a raise or lowering, and the first step of a stage that moves the crane, needs a reading from the last ${minutes} minutes within its limit.`
      : `No wind limit is known for this configuration: get the manufacturer’s limit before anything moves. A reading from the last ${minutes} minutes is needed before each step of a raise or lowering.`,
    { size: 9.5 },
  );
  const cols = [
    { label: 'Time (hh:mm)', width: TIME_W },
    { label: 'Mean (m/s)', width: 80 },
    { label: 'Gust (m/s)', width: 80 },
    { label: 'Height read at (m)', width: 96 },
    { label: 'Initials', width: INITIALS_W },
  ];
  for (let i = 0; i < 5; i++) {
    pdf.ensure(BOX_H + 4);
    const y = doc.y;
    let x = left(doc);
    for (const c of cols) {
      box(doc, x, y, c.width, c.label);
      x += c.width + GAP;
    }
    doc.y = y + BOX_H + 4;
  }
  doc.x = left(doc);
}

const left = (doc: Doc) => doc.page.margins.left;

const WIND_NOTICE = 'WIND: the boom goes up or comes down in this stage. Before every step, a wind reading within the raising limit and no older than the job allows, written in the wind readings.';

/**
 * Where a page break falls in the middle of a stage or a hold, the new page says which one it
 * carries on: a sheet picked up alone from the clipboard still names its stage. Module state is
 * safe here: a copy is drawn synchronously from start to finish (only the code is made before),
 * and `paperCopyPdf` clears it first.
 */
let carriesOn: string | null = null;

/** Starts a new page when fewer than `points` remain, naming the stage or hold it carries on. */
function need(pdf: PdfWriter, points: number): void {
  const doc = pdf.doc;
  if (doc.y + points <= doc.page.height - doc.page.margins.bottom) return;
  doc.addPage();
  if (!carriesOn) return;
  doc.font('Body-Bold').fontSize(10).fillColor(MUTED).text(`${carriesOn} (continued)`, left(doc), doc.y, { width: pdf.width });
  doc.moveDown(0.4);
}

function stageStateWords(stage: BoardStage, titleOf: Map<string, string>): string {
  switch (stage.state) {
    case 'active':
      return 'UNDER WAY when printed';
    case 'holding':
      return 'AT ITS HOLD when printed: every step was done';
    default:
      return stage.dependsOn.length ? `NOT STARTED when printed: starts after ${stage.dependsOn.map((d) => titleOf.get(d) ?? d).join('; ')}` : 'NOT STARTED when printed';
  }
}

function drawStage(pdf: PdfWriter, stage: BoardStage, board: BoardState, titleOf: Map<string, string>, at: (iso: string) => string): void {
  const doc = pdf.doc;
  // The stage's heading, words and cautions stay together with its first step, so a page never
  // starts with a caution whose stage is on the page before (at most half a page is kept together).
  const notices = [...(movesBoom(stage) ? [WIND_NOTICE] : []), ...stage.cautions.map((c) => `CAUTION: ${c}`)];
  const introH =
    40 +
    [stageStateWords(stage, titleOf), stage.summary].reduce((h, t) => h + (t ? doc.font('Body').fontSize(10).heightOfString(t, { width: pdf.width }) + 4 : 0), 0) +
    notices.reduce((h, t) => h + doc.font('Body').fontSize(9).heightOfString(t, { width: pdf.width - 16 }) + 18, 0);
  need(pdf, Math.min(introH + 90, (doc.page.height - doc.page.margins.top - doc.page.margins.bottom) / 2));
  doc.moveDown(0.6);
  const y = doc.y;
  doc.rect(left(doc), y, pdf.width, 26).fill('#14181d');
  doc.font('Body-Bold').fontSize(13).fillColor('#ffffff').text(`Stage ${stage.order} of ${board.stages.length} — ${stage.title}`, left(doc) + 8, y + 6, { width: pdf.width - 16, lineBreak: false, ellipsis: true });
  doc.x = left(doc);
  doc.y = y + 32;
  pdf.paragraph(stageStateWords(stage, titleOf), { size: 10 });
  if (stage.summary) pdf.paragraph(stage.summary, { size: 9.5, color: MUTED });
  if (stage.blockedBy) banner(pdf, `WORK STOPPED ON THIS STAGE: defect reported by ${stage.blockedBy.by} at ${at(stage.blockedBy.at)}: ${stage.blockedBy.description}. Nothing here until the plan is revised.`);
  carriesOn = `Stage ${stage.order} of ${board.stages.length} — ${stage.title}`;
  for (const text of notices) {
    need(pdf, 70);
    pdf.notice(text);
  }

  const numbers = new Map(stage.steps.map((s, i) => [s.id, `${stage.order}.${i + 1}`]));
  const done = stage.steps.filter((s) => s.state === 'done');
  const openIds = new Set(stage.steps.filter((s) => s.state === 'open').map((s) => s.id));
  if (done.length && done.length === stage.steps.length) pdf.paragraph(`All ${done.length} steps of this stage were done live.`, { size: 10 });
  stage.steps.forEach((step) => {
    const num = numbers.get(step.id)!;
    if (step.state === 'done') {
      if (done.length === stage.steps.length) return;
      const d = step.doneBy;
      doneLine(pdf, num, step.text, d ? `done live by ${d.name} (${roleLabel(d.role)}) at ${at(d.at)}${d.value ? `: ${d.value}${step.records?.unit ? ` ${step.records.unit}` : ''}` : ''}` : 'done live');
      return;
    }
    openStep(pdf, num, step, board, numbers, openIds);
  });
  if (stage.hold) drawHold(pdf, stage, stage.hold, at);
  carriesOn = null;
}

function doneLine(pdf: PdfWriter, num: string, text: string, how: string): void {
  const doc = pdf.doc;
  const words = `${num ? `${num}  ` : ''}${text} — ${how}`;
  const h = doc.font('Body').fontSize(9).heightOfString(words, { width: pdf.width - 50 }) + 6;
  need(pdf, h);
  const y = doc.y;
  doc.font('Body-Bold').fontSize(8).fillColor('#2b6a3a').text('DONE', left(doc), y + 3, { width: 44, lineBreak: false });
  doc.font('Body').fontSize(9).fillColor(MUTED).text(words, left(doc) + 48, y + 3, { width: pdf.width - 50 });
  doc.x = left(doc);
  doc.y = y + h;
}

function openStep(pdf: PdfWriter, num: string, step: BoardStep, board: BoardState, numbers: Map<string, string>, open: ReadonlySet<string>): void {
  const notes: string[] = [`For ${step.allowedRoles.map((r) => roleLabel(r).toLowerCase()).join(', ')}`];
  const waitsFor = step.after.filter((id) => open.has(id)).map((id) => numbers.get(id)).filter(Boolean);
  if (waitsFor.length) notes.push(`after ${waitsFor.join(', ')}`);
  if (step.requiresPhoto) notes.push('photo needed: take it now, it goes in with the entry from paper');
  if (step.records?.plannedSerial) notes.push(`planned serial ${step.records.plannedSerial}; any serviceable one of this type may be fitted`);
  const lines = [notes.join(' · ')];
  const check = step.records ? heldTo(step.records, board) : null;
  if (check) lines.push(check);
  const boxes = step.records ? [{ label: `${step.records.label}${step.records.unit ? ` (${step.records.unit})` : ''}`, width: VALUE_W }] : [];
  writeRow(pdf, num, step.text, lines, boxes, step.caution);
}

/**
 * One thing to do: its number and words on the left, boxes for initials and time always in the same
 * place on the right, and any value it records in a box under its words.
 */
function writeRow(pdf: PdfWriter, num: string, text: string, notes: string[], extra: { label: string; width: number }[], caution: string | null = null): void {
  const doc = pdf.doc;
  const boxes = [{ label: 'Initials', width: INITIALS_W }, { label: 'Time (hh:mm)', width: TIME_W }];
  const boxesW = boxes.reduce((w, b) => w + b.width + GAP, 0);
  const numW = num ? 34 : 0;
  const textW = pdf.width - numW - boxesW - 4;
  const main = () => doc.font('Body').fontSize(11);
  let textH = main().heightOfString(text, { width: textW });
  for (const n of notes) textH += doc.font('Body').fontSize(8.5).heightOfString(n, { width: textW }) + 1;
  if (caution) textH += doc.font('Body-Bold').fontSize(9).heightOfString(`CAUTION: ${caution}`, { width: textW }) + 1;
  const extraH = extra.length ? BOX_H + 6 : 0;
  const rowH = Math.max(textH + extraH + 10, BOX_H + 8);
  need(pdf, rowH);
  const y = doc.y;
  const x0 = left(doc);
  if (num) doc.font('Body-Bold').fontSize(11).fillColor(INK).text(num, x0, y + 4, { width: numW - 4, lineBreak: false });
  main().fillColor(INK).text(text, x0 + numW, y + 4, { width: textW });
  for (const n of notes) doc.font('Body').fontSize(8.5).fillColor(MUTED).text(n, x0 + numW, doc.y + 1, { width: textW });
  if (caution) doc.font('Body-Bold').fontSize(9).fillColor(STOP_RED).text(`CAUTION: ${caution}`, x0 + numW, doc.y + 1, { width: textW });
  let ex = x0 + numW;
  const ey = doc.y + 4;
  for (const b of extra) {
    box(doc, ex, ey, b.width, b.label);
    ex += b.width + GAP;
  }
  let bx = x0 + pdf.width - boxesW + GAP;
  for (const b of boxes) {
    box(doc, bx, y + 4, b.width, b.label);
    bx += b.width + GAP;
  }
  doc.moveTo(x0, y + rowH).lineTo(x0 + pdf.width, y + rowH).lineWidth(0.4).strokeColor('#b9ad97').stroke();
  doc.x = x0;
  doc.y = y + rowH + 2;
}

/** A line to sign: who, then name, initials and time boxes (and any value boxes beneath), or what was signed live. */
function signLine(pdf: PdfWriter, who: string, doneLive: string | null, values: string[]): void {
  const doc = pdf.doc;
  const whoW = pdf.width - NAME_W - INITIALS_W - TIME_W - 3 * GAP;
  const valuesH = values.length && !doneLive ? BOX_H + 6 : 0;
  need(pdf, BOX_H + 8 + valuesH);
  const y = doc.y;
  const x0 = left(doc);
  doc.font('Body-Bold').fontSize(10.5).fillColor(INK).text(who, x0, y + 4, { width: whoW - 4 });
  let x = x0 + whoW + GAP;
  if (doneLive) {
    filledBox(doc, x, y, NAME_W + INITIALS_W + TIME_W + 2 * GAP, 'Done live', doneLive);
  } else {
    box(doc, x, y, NAME_W, 'Name (capitals)');
    x += NAME_W + GAP;
    box(doc, x, y, INITIALS_W, 'Initials');
    x += INITIALS_W + GAP;
    box(doc, x, y, TIME_W, 'Time (hh:mm)');
  }
  let bottom = y + BOX_H;
  if (valuesH) {
    const vy = y + BOX_H + 6;
    const vx0 = x0 + 24;
    const each = (pdf.width - 24 - GAP * (values.length - 1)) / values.length;
    values.forEach((label, i) => box(doc, vx0 + i * (each + GAP), vy, each, label));
    bottom = vy + BOX_H;
  }
  doc.x = x0;
  doc.y = bottom + 6;
}

function drawHold(pdf: PdfWriter, stage: BoardStage, hold: BoardHold, at: (iso: string) => string): void {
  const doc = pdf.doc;
  const title = `HOLD${hold.mandatory ? ' (mandatory)' : ''}, stage ${stage.order}: ${hold.title}`;
  const fields = hold.valueCheck?.fields.map((f) => valueCheckFieldLabels[f]) ?? [];
  const acknowledged = hold.requiredRoles.filter((r) => hold.acknowledgments.some((a) => a.role === r && !a.inspector)).length;
  const words: [string, number, string][] = [
    [hold.instruction, 9.5, INK],
    ['Nothing after this hold starts until every line below is signed and the acting supervisor releases it. Whoever signs for a role other than supervisor does not release it.', 9, MUTED],
  ];
  if (hold.state === 'acknowledged') words.push(['Every role had acknowledged it live when this was printed: only the release is left.', 9.5, INK]);
  else if (acknowledged) words.push([`${acknowledged} of ${hold.requiredRoles.length} roles had acknowledged it live when this was printed.`, 9.5, INK]);
  if (hold.reopenedBecause) words.push([`Acknowledgments were taken back: ${hold.reopenedBecause.reason}.`, 9, MUTED]);
  if (fields.length) {
    words.push([`Value check: each person reads ${fields.join(', ').toLowerCase()} from the crane’s controller themselves and writes what it shows. Never copy them from the plan or another sheet.`, 9.5, INK]);
    if (hold.checkLocked) words.push(['The value check was locked after three failed tries: the supervisor reviews it before anyone tries again.', 9.5, STOP_RED]);
  }
  // The hold's words stay on the page with its first line to sign.
  const titleH = doc.font('Body-Bold').fontSize(12).heightOfString(title, { width: pdf.width - 18 }) + 8;
  const wordsH = words.reduce((h, [text, size]) => h + doc.font('Body').fontSize(size).heightOfString(text, { width: pdf.width }) + size * 0.4, 0);
  need(pdf, titleH + wordsH + 2 * BOX_H + 30);
  doc.moveDown(0.3);
  const x0 = left(doc);
  const y = doc.y;
  doc.rect(x0, y, 6, titleH).fill(ACCENT);
  doc.font('Body-Bold').fontSize(12).fillColor(INK).text(title, x0 + 14, y + 4, { width: pdf.width - 18 });
  doc.x = x0;
  doc.y = y + titleH + 2;
  for (const [text, size, color] of words) pdf.paragraph(text, { size, color });
  const outer = carriesOn;
  carriesOn = `HOLD, stage ${stage.order}: ${hold.title}`;
  for (const role of hold.requiredRoles) {
    const ack = hold.acknowledgments.find((a) => a.role === role && !a.inspector);
    signLine(pdf, roleLabel(role), ack ? `${ack.name}, ${at(ack.at)}` : null, fields);
  }
  if (hold.signOff) {
    const ack = hold.acknowledgments.find((a) => a.inspector);
    signLine(pdf, 'Qualified inspector', ack ? `${ack.name}, ${at(ack.at)}` : null, []);
  }
  signLine(pdf, 'Released by the acting supervisor', hold.releasedBy ? `${hold.releasedBy.name}, ${at(hold.releasedBy.at)}` : null, []);
  carriesOn = outer;
}

/** The figures a value check is compared with, for the job's planners only, on a page of its own. */
function supervisorPage(pdf: PdfWriter, plan: Plan, board: BoardState): void {
  const open = new Set(board.stages.filter((s) => s.state !== 'done' && s.state !== 'skipped').map((s) => s.id));
  const checks = plan.stages.flatMap((s, i) => (open.has(s.id) && s.hold?.valueCheck ? [{ order: i + 1, hold: s.hold.title, fields: s.hold.valueCheck.fields }] : []));
  if (!checks.length) return;
  pdf.doc.addPage();
  pdf.heading('Supervisor’s page: value-check figures');
  pdf.notice('Keep this page apart from the sheets the crew fill in: the readings are taken blind. Before releasing the hold, compare what each person wrote with the figures below; any difference is a failed check, and the hold stays until it is found and put right.');
  for (const c of checks) {
    pdf.paragraph(`Stage ${c.order}: ${c.hold}`, { size: 11 });
    pdf.table(['Reading', 'The plan’s figure'], [0.5, 0.5], c.fields.map((f) => [valueCheckFieldLabels[f.field], f.expected]), { size: 11 });
  }
}
