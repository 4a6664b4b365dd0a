import { boomMakeupSvg } from '../../shared/drawings/boom-makeup.js';
import type { ConfigurationResults } from '../../shared/planner/types.js';
import type { JobRecord, RecordEntry, RecordHandover, RecordHold, RecordHoldEntry, RecordShift, RecordStage } from '../../shared/record/record.js';
import type { ArrangementData } from '../../shared/schemas/arrangement.js';
import type { Configuration } from '../../shared/schemas/configuration.js';
import { roleLabel } from '../../shared/schemas/users.js';
import { siteDateTime } from '../../shared/time.js';
import { configurationDrawings, configurationFacts, statusWords } from './configuration-sheet.js';
import { PdfWriter, SAFETY_TEXT, svgAspect } from './document.js';

/** What the record PDF is drawn from; plain data, so it can be sent to a worker thread. */
export interface RecordPdfInput {
  record: JobRecord;
  /** The configuration in force with the server's results and the crane's arrangement data, for the drawings; null when never planned. */
  drawings: { configuration: Configuration; results: ConfigurationResults; arrangement: ArrangementData } | null;
  /** Thumbnails of the photos the record names, as JPEG bytes; a photo missing here is listed as not found. */
  photos: { id: string; jpeg: Uint8Array }[];
  printedAt: string;
}

/**
 * A time as the record prints it: the site's clock to the second with its offset from UTC
 * ("3 Dec 2026, 18:04:12 (UTC+01:00)"), so a record read in another country is not misread.
 */
export const recordTime = (iso: string | null, zone: string) => (iso ? siteDateTime(iso, zone, { seconds: true }) : '—');
const who = (e: Pick<RecordEntry, 'name' | 'role'>) => `${e.name} (${roleLabel(e.role).toLowerCase()})`;

/** The record's times in its site's zone: a time alone, and who did something and when. */
interface Times {
  at: (iso: string | null) => string;
  by: (e: RecordEntry) => string;
}
function timesIn(zone: string): Times {
  const at = (iso: string | null) => recordTime(iso, zone);
  return { at, by: (e) => `${who(e)}, ${at(e.at)}` };
}

const statusText = { in_progress: 'IN PROGRESS: live job, this record is not final', complete: 'Complete', cancelled: 'Cancelled' } as const;
const holdEntryWords = {
  acknowledged: 'Acknowledged',
  withdrawn: 'Withdrew acknowledgment',
  check_failed: 'Configuration check did not match',
  check_reviewed: 'Failed checks reviewed',
  taken_back: 'TAKEN BACK (crew change or account disabled)',
} as const;
const shiftPhaseWords = { working: 'working', making_safe: 'ending: the make-safe checklist is being done', made_safe: 'MADE SAFE: no work until the next shift starts' } as const;
const signatureWords = { inspection: 'Shift inspection', operator: 'Operator', supervisor: 'Supervisor' } as const;
const actingHowWords = { job_start: 'Started the job', handover: 'Acknowledged the handover note', admin_transfer: 'Named by an administrator' } as const;

/**
 * The job's record as a site file: cover and crew, the configuration with every figure, its rule
 * and every override, the drawings, stage by stage with every step and hold, stops, weather,
 * defects, plan versions and briefings, the final sign-off, photos and the whole log in words.
 * Every page carries the final hash and "page N of M"; a live job is marked in progress on each.
 */
export async function recordPdf(input: RecordPdfInput): Promise<Buffer> {
  const { record } = input;
  const t = timesIn(record.timeZone);
  const live = record.status === 'in_progress';
  const kindWord = record.job.kind === 'erection' ? 'Erection' : 'Dismantling';
  const hashLine = `Final hash: ${record.finalHash}`;
  const name = record.job.name.length > 48 ? `${record.job.name.slice(0, 47)}…` : record.job.name;
  const footer = `${kindWord} record · ${name} · crane ${record.job.craneFleetNumber}${live ? ' · IN PROGRESS' : ''}`;
  const pdf = new PdfWriter(`${kindWord} record — ${record.job.name}`, [hashLine, footer], {
    stamp: live ? 'IN PROGRESS — live job, not a final record' : undefined,
  });

  cover(pdf, input, kindWord, t);
  configuration(pdf, input, t);
  planVersions(pdf, record, t);
  stages(pdf, record, t);
  shifts(pdf, record, t);
  stopsAndWeather(pdf, record, t);
  defects(pdf, record, t);
  signOff(pdf, record, t);
  photos(pdf, input, t);
  timeline(pdf, record, t);
  return pdf.finish();
}

function cover(pdf: PdfWriter, input: RecordPdfInput, kindWord: string, t: Times) {
  const { record } = input;
  pdf.title(`${kindWord} record`, `${record.job.name} — ${record.job.site}`);
  pdf.facts([
    ['State', record.status === 'in_progress' && record.shiftNow?.phase === 'made_safe' ? 'MADE SAFE: job in progress, no work until the next shift starts; this record is not final' : statusText[record.status]],
    ['Site time', `${record.timeZone}: every time in this record is the site’s clock, with its offset from UTC${record.timeZoneFrom === 'default' ? ' (the job names no zone of its own: the server’s zone is used)' : ''}`],
    ...(record.shiftNow ? [['Shift', shiftNowWords(record, t)] as [string, string]] : []),
    ...(record.actingSupervisor ? [['Acting supervisor', `${record.actingSupervisor.name}, since ${t.at(record.actingSupervisor.since)}`] as [string, string]] : []),
    ['Crane unit', record.job.crane ?? record.job.craneFleetNumber],
    ['Created', t.at(record.dates.created)],
    ['Started on the board', record.dates.started ? t.at(record.dates.started) : 'not started'],
    [record.status === 'cancelled' ? 'Cancelled' : 'Completed', record.dates.finished ? t.at(record.dates.finished) : 'not yet'],
    ['Log', `${record.lastSeq} events, the last at ${t.at(record.dates.lastEvent)}`],
    ['Printed', t.at(input.printedAt)],
    ['In this record', summary(record)],
  ]);
  pdf.paragraph(`Final hash (SHA-256, event ${record.lastSeq}):`, { size: 10 });
  pdf.paragraph(record.finalHash, { size: 9 });
  if (record.cancelled) pdf.paragraph(`Cancelled by ${t.by(record.cancelled)}. Reason: ${record.cancelled.reason}`);
  pdf.paragraph(
    'The final hash is the SHA-256 chain over every event of the job’s log, up to the last event printed here. Ask the server to verify the job’s log and compare the hash it gives with this one, and with any hash e-mailed or printed earlier: a log that was changed after this was printed leads to a different hash.',
    { size: 8.5, color: '#3b434c' },
  );
  pdf.notice(SAFETY_TEXT);

  pdf.heading('Crew');
  if (record.crew.length === 0) pdf.paragraph('No crew recorded.');
  else
    pdf.table(
      ['Name', 'Roles on this job', 'Qualifications held when printed'],
      [0.34, 0.33, 0.33],
      record.crew.map((c) => {
        const held = c.qualifications === null ? [] : [...c.qualifications.map(roleLabel), ...(c.mayInspect ? ['qualified to inspect'] : [])];
        return [c.name, c.roles.map(roleLabel).join(', '), c.qualifications === null ? 'not given' : held.length ? held.join(', ') : 'none'];
      }),
    );
}

/** Where the shifts stood at the end of the log, and when the job was made safe. */
function shiftNowWords(record: JobRecord, t: Times): string {
  const now = record.shiftNow!;
  const madeSafe = record.shifts.find((s) => s.number === now.number)?.end?.madeSafe;
  return `${now.number}, ${shiftPhaseWords[now.phase]}${now.phase === 'made_safe' && madeSafe ? ` (${t.at(madeSafe.at)}, last item by ${madeSafe.name})` : ''}`;
}

/** The record in one line, so a reader sees at once what to look for: failing figures, open holds, stops. */
function summary(record: JobRecord): string {
  const figures = record.configuration?.figures ?? [];
  const count = (status: string) => figures.filter((f) => f.status === status).length;
  const holds = record.stages.flatMap((s) => (s.hold ? [s.hold] : []));
  const outOfLimit = record.stages.flatMap((s) => s.steps.flatMap((st) => st.history)).filter((h) => h.outOfLimit).length;
  return [
    figures.length ? `figures: ${count('fail')} failing, ${count('caution')} needing care, ${count('unverified')} unverified` : 'no figures',
    `${record.overrides.length} override${record.overrides.length === 1 ? '' : 's'}`,
    `holds: ${holds.filter((h) => h.released).length} of ${holds.length} released`,
    `${outOfLimit} reading${outOfLimit === 1 ? '' : 's'} out of limit`,
    `${record.stops.length} stop${record.stops.length === 1 ? '' : 's'}`,
    `${record.shifts.filter((s) => s.started).length} shift${record.shifts.filter((s) => s.started).length === 1 ? '' : 's'} begun`,
    `${record.handovers.length} handover note${record.handovers.length === 1 ? '' : 's'}`,
    `${record.defects.length} defect${record.defects.length === 1 ? '' : 's'}`,
    `plan version ${record.revisions.at(-1)?.version ?? 'none'}`,
  ].join('; ');
}

function configuration(pdf: PdfWriter, input: RecordPdfInput, t: Times) {
  const { record } = input;
  pdf.doc.addPage();
  pdf.heading('Configuration');
  const saved = record.configuration;
  if (!saved) {
    pdf.paragraph('No configuration was saved for this job.');
    return;
  }
  pdf.paragraph(`Saved by ${t.by(saved.saved)}.`, { size: 9, color: '#3b434c' });
  pdf.facts(configurationFacts(saved.configuration));

  pdf.heading('Computed figures');
  if (saved.figuresFrom === 'log')
    pdf.paragraph('The server’s figures for this configuration were not available: the values and states below are the log’s copy, which does not carry the rules.', { size: 9 });
  for (const f of saved.figures) {
    const state = statusWords[f.status] + ((f.status === 'fail' || f.status === 'caution') && !f.overridable ? ', cannot be overridden' : '');
    pdf.table([], [0.4, 0.42, 0.18], [[f.label, f.value, state]]);
    if (f.rule) pdf.paragraph(`Rule and source: ${f.rule}${f.detail ? ` — ${f.detail}` : ''}`, { size: 7.5, color: '#3b434c' });
  }

  pdf.heading('Overrides');
  if (record.overrides.length === 0) pdf.paragraph('None asked for.');
  else
    pdf.table(
      ['Figure', 'Reason', 'Asked by', 'Approved by'],
      [0.22, 0.38, 0.2, 0.2],
      record.overrides.map((o) => [
        `${o.figureLabel} (${o.figureValue})${o.withdrawn ? `; withdrawn when the configuration was saved again, ${t.at(o.withdrawn.at)}` : ''}`,
        o.reason,
        t.by(o.requested),
        o.approved ? t.by(o.approved) : 'NOT APPROVED',
      ]),
    );

  const d = input.drawings;
  if (!d) return;
  pdf.heading('Boom make-up');
  const svg = boomMakeupSvg(d.results.makeup, { sectionTypes: d.arrangement.sectionTypes, widthPx: 960 });
  pdf.drawing(svg, svgAspect(svg));
  for (const drawn of configurationDrawings(d.configuration, d.results, d.arrangement)) {
    pdf.heading(drawn.title);
    pdf.drawing(drawn.svg, svgAspect(drawn.svg));
  }
}

function planVersions(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.heading('Plan versions and briefings');
  if (record.revisions.length === 0) {
    pdf.paragraph('The plan was never locked for the board.');
    return;
  }
  pdf.table(
    ['Version', 'Put in force', 'Reason', 'Briefing acknowledged by'],
    [0.1, 0.28, 0.27, 0.35],
    record.revisions.map((r) => [String(r.version), t.by(r.made), r.reason ?? 'first version', r.briefings.length ? r.briefings.map(t.by).join('; ') : 'nobody yet']),
  );
}

function holdTable(pdf: PdfWriter, hold: RecordHold, t: Times) {
  // A hold's rows read only under its title: keep a short hold on one page (about 30 pt a row).
  pdf.ensure(Math.min(60 + (hold.entries.length + 2) * 30, 320));
  pdf.paragraph(`HOLD POINT${hold.mandatory ? ' (mandatory)' : ''}: ${hold.title}${hold.requiredRoles.length ? ` — acknowledged by: ${hold.requiredRoles.map(roleLabel).join(', ')}; released by the supervisor` : ''}`, { size: 10 });
  const rows = hold.entries.map((e) => [holdEntryWords[e.kind], e.name, roleLabel(e.role), t.at(e.at), e.sentence]);
  rows.push(hold.released ? ['RELEASED', hold.released.name, roleLabel(hold.released.role), t.at(hold.released.at), hold.released.sentence] : ['NOT RELEASED', '', '', '', '']);
  pdf.table(['', 'Name', 'Role', 'Time', 'What the log says'], [0.15, 0.16, 0.11, 0.22, 0.36], rows, { size: 8 });
}

function stage(pdf: PdfWriter, s: RecordStage, n: number, t: Times) {
  pdf.heading(`${n}. ${s.title}`);
  if (!s.inPlan) pdf.paragraph('A revision removed this stage from the plan after work was recorded in it.', { size: 9 });
  if (s.skipped) pdf.paragraph(`Skipped by ${t.by(s.skipped)}. Reason: ${s.skipped.reason}`, { size: 9 });
  const rows: string[][] = [];
  for (const step of s.steps) {
    if (step.history.length === 0) {
      rows.push([step.text, 'not done', '', '']);
      continue;
    }
    step.history.forEach((h, i) => {
      const recorded = [h.value !== null ? `Value: ${h.value}` : '', h.photoId ? `Photo ${h.photoId.slice(0, 8)}` : ''].filter(Boolean).join('; ');
      rows.push([i === 0 ? step.text : '', `${h.kind === 'done' ? 'Done' : 'REOPENED'} by ${t.by(h)}`, recorded, h.outOfLimit ? `OUT OF LIMIT: ${h.outOfLimit}` : '']);
    });
  }
  if (rows.length) pdf.table(['Step', 'Who, when', 'Recorded', 'Against its limit'], [0.38, 0.27, 0.15, 0.2], rows, { size: 8 });
  if (s.hold) holdTable(pdf, s.hold, t);
}

function stages(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.doc.addPage();
  pdf.title('Stage by stage');
  if (record.stages.length === 0) pdf.paragraph('No stages: the plan was never locked for the board.');
  record.stages.forEach((s, i) => stage(pdf, s, i + 1, t));
}

function shiftStart(pdf: PdfWriter, shift: RecordShift, t: Times) {
  if (!shift.started && shift.startHold.length === 0) pdf.paragraph(shift.number === 1 ? 'Not started on the board yet.' : 'Start-of-shift hold: nothing recorded yet. NOT STARTED.', { size: 9.5 });
  else if (shift.number === 1 || shift.startHold.length === 0) pdf.paragraph(`Started by ${shift.started ? t.by(shift.started) : '—'}: the job’s start on the board.`, { size: 9.5 });
  else {
    pdf.paragraph(shift.started ? `START-OF-SHIFT HOLD released by ${t.by(shift.started)}.` : 'START-OF-SHIFT HOLD: NOT RELEASED yet.', { size: 9.5 });
    pdf.table(
      ['', 'Name', 'Time', 'Found, or taken back'],
      [0.18, 0.2, 0.27, 0.35],
      shift.startHold.map((g) => [
        signatureWords[g.kind],
        g.name,
        t.at(g.at),
        [g.note ?? '', g.takenBack ? `TAKEN BACK ${t.at(g.takenBack.at)}: ${g.takenBack.sentence}` : ''].filter(Boolean).join(' ') || 'acknowledged',
      ]),
      { size: 8 },
    );
  }
  const briefed = shift.briefed.map((b) => `${b.name} (plan version ${b.planVersion}, ${t.at(b.at)})`);
  pdf.paragraph(`Briefing for shift ${shift.number} acknowledged by: ${briefed.length ? briefed.join('; ') : 'nobody recorded'}.`, { size: 9 });
}

function shiftEnd(pdf: PdfWriter, shift: RecordShift, t: Times) {
  const end = shift.end;
  if (!end) {
    if (shift.started) pdf.paragraph(`Shift ${shift.number} was not ended when this was printed.`, { size: 9.5 });
    return;
  }
  pdf.ensure(120);
  pdf.paragraph(`END OF SHIFT ${shift.number}: ended by ${t.by(end.ended)}. Phase of the work: ${end.workPhaseWords}. Make-safe checklist:`, { size: 9.5 });
  pdf.table(
    ['Make-safe item', 'Done by', 'Time', 'Note'],
    [0.38, 0.18, 0.2, 0.24],
    end.items.map((i) => [i.text, i.done ? `${i.done.name} (${roleLabel(i.done.role).toLowerCase()})` : 'NOT DONE', i.done ? t.at(i.done.at) : '', i.done?.note ?? (i.asksNote ? 'no note' : '')]),
    { size: 8 },
  );
  const open = end.items.filter((i) => !i.done).length;
  pdf.paragraph(end.madeSafe ? `MADE SAFE ${t.at(end.madeSafe.at)}, last item by ${end.madeSafe.name}.` : `NOT MADE SAFE: ${open} item${open === 1 ? '' : 's'} open.`, { size: 10 });
}

function handoverNote(pdf: PdfWriter, note: RecordHandover, t: Times) {
  const list = (items: string[], none: string) => (items.length ? items.join('; ') : none);
  pdf.ensure(140);
  pdf.paragraph(`HANDOVER NOTE from ${t.by(note.written)}${note.to ? `, to ${note.to.name}` : ''}:`, { size: 9.5 });
  pdf.facts([
    ['Hazards', note.hazards],
    ['Note', note.note || '(no note)'],
    ['Done', list(note.done, 'nothing listed')],
    ['Open', list(note.open, 'nothing listed')],
    ['Open defects', list(note.defects, 'none')],
    ['Overrides', list(note.overrides, 'none')],
    ['Read and acknowledged', note.acknowledged ? `${t.by(note.acknowledged)}: the acting supervisor from then` : 'NOT ACKNOWLEDGED yet'],
  ]);
}

/** Each shift's start and end with the make-safe checklist, the handover notes, the acting supervisors and crew changes. */
function shifts(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.doc.addPage();
  pdf.title('Shifts', 'How each shift started and ended, the make-safe checklist, handover notes, who was acting supervisor, and crew changes.');
  if (record.shifts.length === 0) pdf.paragraph('The job has not started on the board: no shift is recorded.');
  for (const shift of record.shifts) {
    pdf.heading(`Shift ${shift.number}`);
    shiftStart(pdf, shift, t);
    shiftEnd(pdf, shift, t);
    for (const note of shift.handovers) handoverNote(pdf, note, t);
  }

  pdf.heading('Acting supervisor');
  if (record.actingChanges.length === 0) pdf.paragraph('No acting supervisor was recorded (a job from before the role: any supervisor acted).', { size: 9 });
  else
    pdf.table(
      ['When', 'How', 'From', 'To', 'Reason'],
      [0.24, 0.2, 0.15, 0.15, 0.26],
      record.actingChanges.map((c) => [t.at(c.entry.at), `${actingHowWords[c.how]} (${c.entry.name})`, c.from?.name ?? '—', c.to.name, c.reason ?? '']),
      { size: 8 },
    );

  pdf.heading('Crew changes during the job');
  if (record.crewChanges.length === 0) pdf.paragraph('None: the crew was not changed after the job started, and no account was disabled.', { size: 9 });
  else
    pdf.table(
      ['When, by', 'Change', 'Acknowledgments taken back'],
      [0.28, 0.36, 0.36],
      record.crewChanges.map((c) => [
        t.by(c.entry),
        c.disabled
          ? `${c.disabled.name}’s account was disabled`
          : [c.added.length ? `Added: ${c.added.map((m) => `${m.name} as ${roleLabel(m.role).toLowerCase()}`).join(', ')}` : '', c.removed.length ? `Removed: ${c.removed.map((m) => `${m.name} as ${roleLabel(m.role).toLowerCase()}`).join(', ')}` : '']
              .filter(Boolean)
              .join('. ') || 'Crew saved unchanged',
        c.takenBack.length ? c.takenBack.map((w) => `${w.name} as ${w.role === 'inspector' ? 'the inspector' : roleLabel(w.role).toLowerCase()} at “${w.hold}”`).join('; ') + ': those holds are open again' : 'none',
      ]),
      { size: 8 },
    );
}

function stopsAndWeather(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.heading('Stops and resumes');
  if (record.stops.length === 0) pdf.paragraph('No stop was raised.');
  else
    pdf.table(
      ['Stop', 'Cause', 'Resumed'],
      [0.3, 0.35, 0.35],
      record.stops.map((s) => [
        `${s.byWeather ? 'Stopped by a weather reading' : 'ALL STOP'} — ${t.by(s.pressed)}${s.alsoPressed.length ? `; also pressed by ${s.alsoPressed.map(t.by).join('; ')}` : ''}`,
        [s.pressed.reason, ...s.causes.map((c) => `${c.reason} (${who(c)})`)].filter(Boolean).join('; ') || 'NO CAUSE RECORDED',
        s.resumed ? `${t.by(s.resumed)}: ${s.resumed.reason}` : 'NOT RESUMED',
      ]),
    );

  pdf.heading('Weather readings');
  if (record.weather.length === 0) pdf.paragraph('No reading recorded.');
  else
    pdf.table(
      ['Time', 'By', 'Mean / gust', 'Height', 'Limit (mean / gust)', 'Verdict'],
      [0.23, 0.16, 0.13, 0.09, 0.15, 0.24],
      record.weather.map((w) => [
        t.at(w.at),
        who(w),
        `${w.meanMs} / ${w.gustMs} m/s`,
        w.heightM === null ? 'not given' : `${w.heightM} m`,
        w.limit ? `${w.limit.meanMs} / ${w.limit.gustMs} m/s (${w.phase})` : `none set (${w.phase})`,
        [w.overLimit ? `OVER: ${w.overLimit}` : 'within the limit', ...w.flags].join('; '),
      ]),
      { size: 8 },
    );
}

function defects(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.heading('Defects');
  if (record.defects.length === 0) pdf.paragraph('No defect reported.');
  else
    pdf.table(
      ['Reported', 'Part', 'Stage', 'Description'],
      [0.28, 0.14, 0.2, 0.38],
      record.defects.map((d) => [t.by(d), d.serial ?? 'not named', d.stageTitle ?? '—', d.description + (d.photoId ? ` (photo ${d.photoId.slice(0, 8)})` : '')]),
    );
}

function signOff(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.heading('Final sign-off');
  if (!record.signOff) {
    pdf.paragraph('This job’s plan has no final sign-off hold (a plan written before jobs had an ending), so none is recorded.');
    return;
  }
  pdf.paragraph(`Stage: ${record.signOff.stageTitle}.`, { size: 9 });
  holdTable(pdf, record.signOff.hold, t);
  const hold = record.signOff.hold;
  const withdrawn = (e: RecordHoldEntry) =>
    hold.entries.some(
      (w) => w.seq > e.seq && w.userId === e.userId && ((w.kind === 'withdrawn' && w.role === e.role) || (w.kind === 'taken_back' && (w.inspector ? e.inspector : !e.inspector && w.role === e.role))),
    );
  const inspectors = hold.entries.filter((e) => e.kind === 'acknowledged' && !withdrawn(e) && record.crew.find((c) => c.userId === e.userId)?.mayInspect === true);
  const known = record.crew.some((c) => c.mayInspect !== null);
  if (known)
    pdf.paragraph(
      inspectors.length
        ? `Acknowledged by a person qualified to inspect (as the people list stood when this was printed): ${[...new Set(inspectors.map((e) => e.name))].join(', ')}.`
        : 'NO acknowledgment of this hold is by a person the people list marks as qualified to inspect (as it stood when this was printed).',
      { size: 9.5 },
    );
  if (!record.signOff.hold.released) pdf.paragraph('Not signed off yet: the job is not complete.', { size: 10 });
}

/** Where a photo is named in the record, for its caption: who and when first, so a cut caption keeps them. */
function photoCaption(record: JobRecord, id: string, t: Times): string {
  for (const s of record.stages) {
    for (const step of s.steps) {
      const h = step.history.find((x) => x.photoId === id);
      if (h) return `${t.by(h)} · ${s.title}: ${step.text}`;
    }
    const e = s.hold?.entries.find((x) => x.photoId === id);
    if (e) return `${t.by(e)} · ${s.hold!.title}: ${holdEntryWords[e.kind].toLowerCase()}`;
  }
  const d = record.defects.find((x) => x.photoId === id);
  return d ? `${t.by(d)} · Defect: ${d.description}` : 'Named in the log';
}

function photos(pdf: PdfWriter, input: RecordPdfInput, t: Times) {
  const { record } = input;
  pdf.heading('Photos');
  if (record.photoIds.length === 0) {
    pdf.paragraph('No photo was taken.');
    return;
  }
  pdf.paragraph('Thumbnails; the full photos are kept with the job and listed by their id.', { size: 8.5, color: '#3b434c' });
  const cols = 3;
  const gap = 10;
  const cell = (pdf.width - gap * (cols - 1)) / cols;
  const imageH = cell * 0.75;
  const rowH = imageH + 44;
  const bytes = new Map(input.photos.map((p) => [p.id, p.jpeg]));
  for (let i = 0; i < record.photoIds.length; i += cols) {
    pdf.ensure(rowH);
    const y = pdf.doc.y;
    record.photoIds.slice(i, i + cols).forEach((id, j) => {
      const x = pdf.doc.page.margins.left + j * (cell + gap);
      const jpeg = bytes.get(id);
      pdf.doc.rect(x, y, cell, imageH).lineWidth(0.5).strokeColor('#b9ad97').stroke();
      if (jpeg) pdf.image(jpeg, x, y, { width: cell, height: imageH });
      else pdf.doc.font('Body').fontSize(8).fillColor('#9a1c12').text('PHOTO NOT FOUND in storage', x + 6, y + imageH / 2 - 5, { width: cell - 12, align: 'center' });
      pdf.doc.font('Body').fontSize(7).fillColor('#14181d').text(`${id.slice(0, 8)} · ${photoCaption(record, id, t)}`, x, y + imageH + 3, { width: cell, height: 40, ellipsis: true });
    });
    pdf.doc.x = pdf.doc.page.margins.left;
    pdf.doc.y = y + rowH;
  }
}

function timeline(pdf: PdfWriter, record: JobRecord, t: Times) {
  pdf.doc.addPage();
  pdf.title('The whole log', 'Every event in order, in the words the board showed.');
  pdf.table(
    ['#', 'Time', 'Who', 'What'],
    [0.06, 0.24, 0.18, 0.52],
    record.timeline.map((e) => [String(e.seq), t.at(e.at), who(e), e.sentence]),
    { size: 7.5 },
  );
}
