// The paper copy (GET /api/jobs/:id/paper.pdf) of a job worked partway: read back with poppler's
// pdftotext (the words, page by page), pdfimages (the code on every page, decoded module by module
// against the qrcode library's own matrix for the job's address) and pdftoppm (pages kept as PNG
// under test-results/paper-copy/ to be looked at).
import { randomUUID } from 'node:crypto';
import { execFileSync } from 'node:child_process';
import { mkdirSync, readdirSync, rmSync, writeFileSync } from 'node:fs';
import path from 'node:path';
import QRCode from 'qrcode';
import sharp from 'sharp';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BoardState } from '../../../shared/board/types.js';
import { valueCheckFieldLabels } from '../../../shared/schemas/plan.js';
import { siteTime } from '../../../shared/time.js';
import { Job } from '../../../server/entities/Job.js';
import { JobPlan } from '../../../server/entities/JobPlan.js';
import { redactPlan } from '../../../server/presenters/plan.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { acknowledgeAndRelease, boardOf, completeSteps, httpCommand, inStepOrder, readingWithinLimit, startedJob, uploadPhoto, weatherIfNeeded, type CrewByRole } from '../../helpers/board.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

let server: TestServer;
let crew: CrewByRole;
let jobId: string;
let board: BoardState;
const scratch = path.resolve('test-results', 'paper-copy');
rmSync(scratch, { recursive: true, force: true });
mkdirSync(scratch, { recursive: true });

async function paperPdf(who: SignedInUser): Promise<Buffer> {
  const res = await request(server.app)
    .get(`/api/jobs/${jobId}/paper.pdf`)
    .set('Authorization', `Bearer ${who.token}`)
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    })
    .expect(200);
  expect(res.headers['content-type']).toMatch(/application\/pdf/);
  return res.body as Buffer;
}

/** The PDF's text page by page in writing order, whitespace collapsed, a line broken after a hyphen joined again. */
function pagesOf(file: string): string[] {
  const text = execFileSync('pdftotext', ['-raw', '-enc', 'UTF-8', file, '-'], { encoding: 'utf8' });
  return text
    .split('\f')
    .map((p) => p.replace(/\s+/g, ' ').replace(/- /g, '-').trim())
    .filter(Boolean);
}

const squeeze = (s: string) => s.replace(/\s+/g, ' ').replace(/- /g, '-').trim();

/** A step's number as printed: the stage's order, then its place in the stage. */
const stepNumber = (b: BoardState, stageId: string, stepId: string) => {
  const stage = b.stages.find((s) => s.id === stageId)!;
  return `${stage.order}.${stage.steps.findIndex((s) => s.id === stepId) + 1}`;
};

beforeAll(async () => {
  server = await startTestServer();
  ({ crew, jobId } = await startedJob(server));
  // Worked partway: the ground stage done and its mandatory hold released; two steps of the upper
  // works done; the boom check's steps all done and its hold acknowledged by the rigger only.
  await completeSteps(server, crew, jobId, 'er-ground');
  await acknowledgeAndRelease(server, crew, jobId, 'er-ground');
  let now = await boardOf(server, crew.supervisor, jobId);
  for (const step of inStepOrder(now.stages.find((s) => s.id === 'er-upper')!.steps).slice(0, 2)) {
    await weatherIfNeeded(server, crew, jobId, 'er-upper', false);
    const role = step.allowedRoles.find((r) => r !== 'viewer') as keyof CrewByRole;
    const photoId = step.requiresPhoto ? await uploadPhoto(server, crew[role]) : undefined;
    const value = step.records ? readingWithinLimit(step) : undefined;
    const answer = await httpCommand(server, crew[role], jobId, { type: 'step.complete', stepId: step.id, ...(value ? { value } : {}), ...(photoId ? { photoId } : {}) });
    expect(answer.status).toBe(200);
  }
  await completeSteps(server, crew, jobId, 'er-check');
  now = await boardOf(server, crew.supervisor, jobId);
  expect(now.stages.find((s) => s.id === 'er-check')!.state).toBe('holding');
  const ack = await httpCommand(server, crew.rigger, jobId, { type: 'hold.acknowledge', holdId: 'er-check.hold', role: 'rigger' });
  expect(ack.status).toBe(200);
  board = await boardOf(server, crew.supervisor, jobId);
}, 180_000);

afterAll(async () => {
  await server?.stop();
});

describe('the paper copy', { timeout: 120_000 }, () => {
  let pages: string[];
  let text: string;
  let file: string;

  beforeAll(async () => {
    file = path.join(scratch, 'supervisor.pdf');
    writeFileSync(file, await paperPdf(crew.supervisor));
    pages = pagesOf(file);
    text = pages.join(' ');
    // Kept to be looked at: the first two pages at 60 dpi, and at 100 dpi for the boxes' detail.
    execFileSync('pdftoppm', ['-png', '-r', '60', '-f', '1', '-l', '2', file, path.join(scratch, 'supervisor-60')]);
    execFileSync('pdftoppm', ['-png', '-r', '100', '-f', '1', '-l', pages.length.toString(), file, path.join(scratch, 'supervisor-100')]);
  });

  it('prints the stages left from where the board stands, and no finished stage as open', () => {
    const ground = board.stages.find((s) => s.id === 'er-ground')!;
    expect(ground.state).toBe('done');
    expect(text).not.toContain(`Stage 1 of ${board.stages.length} — ${squeeze(ground.title)}`);
    expect(text).not.toContain(squeeze(ground.hold!.title));
    expect(text).toContain(`1 of ${board.stages.length} stages were finished then and are not printed`);
    for (const stage of board.stages.filter((s) => s.state !== 'done')) {
      expect(text).toContain(`Stage ${stage.order} of ${board.stages.length} — ${squeeze(stage.title)}`);
    }
    // In the plan's order.
    const at = board.stages.filter((s) => s.state !== 'done').map((s) => text.indexOf(`Stage ${s.order} of ${board.stages.length} — `));
    expect([...at].sort((a, b) => a - b)).toEqual(at);
  });

  it('gives every open step its words and boxes for initials, time and the value it records; steps done live say who and when', () => {
    const upper = board.stages.find((s) => s.id === 'er-upper')!;
    const open = upper.steps.filter((s) => s.state === 'open');
    const done = upper.steps.filter((s) => s.state === 'done');
    expect(done).toHaveLength(2);
    for (const step of open) {
      const num = stepNumber(board, upper.id, step.id);
      const start = text.indexOf(`${num} ${squeeze(step.text)}`);
      expect(start, `${num} ${step.text}`).toBeGreaterThan(-1);
      // The step's row: its words, its notes, then its boxes' labels, before the next thing printed.
      const row = text.slice(start, start + squeeze(step.text).length + 400);
      const boxes = step.records ? `${squeeze(step.records.label)}${step.records.unit ? ` (${step.records.unit})` : ''} Initials Time (hh:mm)` : 'Initials Time (hh:mm)';
      expect(row).toContain(boxes);
    }
    for (const step of done) {
      expect(text).toContain(`DONE ${stepNumber(board, upper.id, step.id)} ${squeeze(step.text)} — done live by ${step.doneBy!.name}`);
    }
  });

  it('gives each hold a line per required role and the release, with the controller readings of a value check as boxes', () => {
    const holdingStage = board.stages.find((s) => s.id === 'er-check')!;
    const section = text.slice(text.indexOf(`HOLD, stage ${holdingStage.order}: ${squeeze(holdingStage.hold!.title)}`));
    // The rigger acknowledged live; the supervisor's line is left to sign.
    expect(section).toMatch(
      new RegExp(`^HOLD, stage 3: .*? 1 of 2 roles had acknowledged it live .*? Rigger Done live ${crew.rigger.user.displayName}, \\d\\d:\\d\\d \\(UTC[+−]\\d\\d:\\d\\d\\) Supervisor Name \\(capitals\\) Initials Time \\(hh:mm\\) Released by the acting supervisor Name \\(capitals\\) Initials Time \\(hh:mm\\)`),
    );

    for (const stage of board.stages.filter((s) => s.hold && s.state !== 'done')) {
      const hold = stage.hold!;
      const from = text.indexOf(`stage ${stage.order}: ${squeeze(hold.title)}`);
      expect(from, hold.title).toBeGreaterThan(-1);
      const next = text.indexOf('Released by the acting supervisor', from);
      const lines = text.slice(from, next);
      const fields = hold.valueCheck?.fields.map((f) => valueCheckFieldLabels[f]).join(' ') ?? '';
      for (const role of hold.requiredRoles.filter((r) => !hold.acknowledgments.some((a) => a.role === r))) {
        const label = role[0].toUpperCase() + role.slice(1);
        expect(lines, `${hold.title}: ${role}`).toContain(`${label} Name (capitals) Initials Time (hh:mm)${fields ? ` ${fields}` : ''}`);
      }
    }
    expect(text).toContain('HOLD (mandatory), stage 11: Configuration checked against the plan');
  });

  it('lists the crew by name and role, the cautions and the safety notice', () => {
    for (const member of board.crew) expect(text).toMatch(new RegExp(`${member.name} ${member.role[0].toUpperCase()}${member.role.slice(1)} Initials`));
    expect(text).toContain(squeeze('Holdline is a coordination record, not a safety device.'));
    const cautions = board.stages.filter((s) => s.state !== 'done').flatMap((s) => s.cautions);
    expect(cautions.length).toBeGreaterThan(0);
    for (const caution of cautions) expect(text).toContain(`CAUTION: ${squeeze(caution)}`);
    const stepCautions = board.stages.filter((s) => s.state !== 'done').flatMap((s) => s.steps.filter((st) => st.state === 'open' && st.caution).map((st) => st.caution!));
    for (const caution of stepCautions) expect(text).toContain(`CAUTION: ${squeeze(caution)}`);
  });

  it('names the job, the plan version, the print time and page N of M on every page, with a code leading to the job’s board', async () => {
    expect(pages.length).toBeGreaterThan(3);
    const url = `${server.config.publicUrl}/jobs/${jobId}/open`;
    const expected = QRCode.create(url, { errorCorrectionLevel: 'M' }).modules;
    const list = execFileSync('pdfimages', ['-list', file], { encoding: 'utf8' })
      .split('\n')
      .slice(2)
      .filter(Boolean)
      .map((line) => line.trim().split(/\s+/))
      // pdfkit keeps a PNG's alpha channel as a soft mask beside the picture: pictures only.
      .filter((cols) => cols[2] === 'image')
      .map((cols) => Number(cols[0]));
    for (let n = 1; n <= pages.length; n++) {
      const page = pages[n - 1];
      expect(page).toContain('PAPER COPY');
      expect(page).toContain(`plan version ${board.planVersion}`);
      expect(page).toMatch(/Printed \d{1,2} [A-Z][a-z]{2} \d{4}, \d\d:\d\d \(UTC[+−]\d\d:\d\d\) site time/);
      expect(page).toContain(`page ${n} of ${pages.length}`);
      expect(page).toContain(url);
      // One picture on each page, and it is the code of the job's address, module by module.
      expect(list.filter((p) => p === n)).toHaveLength(1);
      const prefix = path.join(scratch, `qr-${n}`);
      execFileSync('pdfimages', ['-png', '-f', String(n), '-l', String(n), file, prefix]);
      const png = readdirSync(scratch).find((f) => f.startsWith(`qr-${n}-`))!;
      const { data, info } = await sharp(path.join(scratch, png)).greyscale().raw().toBuffer({ resolveWithObject: true });
      const modulePx = info.width / (expected.size + 8);
      expect(Number.isInteger(modulePx)).toBe(true);
      for (let r = 0; r < expected.size; r++) {
        for (let c = 0; c < expected.size; c++) {
          const px = data[Math.floor((r + 4 + 0.5) * modulePx) * info.width + Math.floor((c + 4 + 0.5) * modulePx)];
          expect(px < 128, `module ${r},${c} on page ${n}`).toBe(expected.get(r, c) === 1);
        }
      }
    }
  });

  it('prints the blind check’s figures for the job’s planners only, on a page of their own', async () => {
    const { manager } = server.context.dataSource;
    const row = await manager.findOneByOrFail(JobPlan, { jobId, version: board.planVersion });
    const check = row.plan.stages.find((s) => s.hold?.valueCheck)!.hold!.valueCheck!;
    const supervisorsPage = pages.find((p) => p.includes('Supervisor’s page: value-check figures'))!;
    expect(supervisorsPage).toBeDefined();
    for (const f of check.fields) expect(supervisorsPage).toContain(`${valueCheckFieldLabels[f.field]} ${f.expected}`);

    // The generated plan's steps name the controller's values in their words ("hook block HB120"),
    // so a figure is set on the stored plan that appears nowhere else: only the value check can
    // carry it onto paper. Set on the row directly: this test is about what leaves, not how plans change.
    const marker = 'ZQ-BLIND-7731';
    const hold = row.plan.stages.find((s) => s.hold?.valueCheck)!.hold!;
    hold.valueCheck = { fields: hold.valueCheck!.fields.map((f) => (f.field === 'operatingMode' ? { ...f, expected: marker } : f)) };
    await manager.update(JobPlan, { jobId, version: row.version }, { plan: row.plan });
    expect(JSON.stringify(redactPlan(row.plan))).not.toContain(marker);

    const plannersFile = path.join(scratch, 'supervisor-marked.pdf');
    writeFileSync(plannersFile, await paperPdf(crew.supervisor));
    expect(pagesOf(plannersFile).join(' ')).toContain(`${valueCheckFieldLabels.operatingMode} ${marker}`);

    const riggerFile = path.join(scratch, 'rigger.pdf');
    writeFileSync(riggerFile, await paperPdf(crew.rigger));
    const riggers = pagesOf(riggerFile).join(' ');
    expect(riggers).toContain('Configuration checked against the plan');
    expect(riggers).not.toContain('Supervisor’s page');
    expect(riggers).not.toContain(marker);
    for (const f of check.fields) expect(riggers).not.toContain(`${valueCheckFieldLabels[f.field]} ${f.expected}`);
  });

  it('says an all stop in force at the top; a job with no plan in force, or closed, has no paper copy', async () => {
    const pressedAt = server.context.now().toISOString();
    const stop = await httpCommand(server, crew.rigger, jobId, { type: 'job.stop', pressedAt, reason: 'Sling frayed at the tip' });
    expect(stop.status).toBe(200);
    const stoppedFile = path.join(scratch, 'stopped.pdf');
    writeFileSync(stoppedFile, await paperPdf(crew.supervisor));
    const first = pagesOf(stoppedFile)[0];
    const { manager } = server.context.dataSource;
    const row = await manager.findOneByOrFail(Job, { id: jobId });
    expect(first).toContain(`ALL STOP in force when printed: pressed by ${crew.rigger.user.displayName} (Rigger) at ${siteTime(pressedAt, row.timeZone)}; cause: Sling frayed at the tip.`);

    const unitId = row.craneUnitId;
    const planning = await plannedJob(server, crew, unitId, 'Still planning');
    const early = await request(server.app).get(`/api/jobs/${planning.id}/paper.pdf`).set('Authorization', `Bearer ${crew.supervisor.token}`);
    expect([early.status, early.body.error.code]).toEqual([409, 'no_plan_in_force']);

    const cancel = await httpCommand(server, crew.supervisor, planning.id, { type: 'job.cancel', reason: 'Planned again on another crane' });
    expect(cancel.status, JSON.stringify(cancel.body)).toBe(200);
    const closed = await request(server.app).get(`/api/jobs/${planning.id}/paper.pdf`).set('Authorization', `Bearer ${crew.rigger.token}`);
    expect([closed.status, closed.body.error.code]).toEqual([409, 'job_closed']);
  });

  it('answers 404 for an unknown job, 403 to someone outside the crew, 401 without sign-in', async () => {
    const unknown = await request(server.app).get(`/api/jobs/${randomUUID()}/paper.pdf`).set('Authorization', `Bearer ${crew.supervisor.token}`);
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.code).toBe('not_found');
    const outsider = await signedInUser(server, { qualifications: ['supervisor'] });
    const refused = await request(server.app).get(`/api/jobs/${jobId}/paper.pdf`).set('Authorization', `Bearer ${outsider.token}`);
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('forbidden');
    expect((await request(server.app).get(`/api/jobs/${jobId}/paper.pdf`)).status).toBe(401);
  });
});

describe('the paper copy at the end of a shift', { timeout: 120_000 }, () => {
  // A server of its own: the test crane's fleet number is taken on the first one.
  let shiftServer: TestServer;
  beforeAll(async () => {
    shiftServer = await startTestServer();
  });
  afterAll(async () => {
    await shiftServer?.stop();
  });

  it('puts the make-safe checklist first while the crane is made safe, then the start-of-shift hold', async () => {
    const server = shiftServer;
    const started = await startedJob(server);
    const pdfOf = async (name: string) => {
      const res = await request(server.app)
        .get(`/api/jobs/${started.jobId}/paper.pdf`)
        .set('Authorization', `Bearer ${started.crew.signaller.token}`)
        .buffer(true)
        .parse((r, done) => {
          const chunks: Buffer[] = [];
          r.on('data', (c: Buffer) => chunks.push(c));
          r.on('end', () => done(null, Buffer.concat(chunks)));
        })
        .expect(200);
      const file = path.join(scratch, name);
      writeFileSync(file, res.body as Buffer);
      return pagesOf(file).join(' ');
    };
    expect((await httpCommand(server, started.crew.supervisor, started.jobId, { type: 'shift.end' })).status).toBe(200);
    const items = (await boardOf(server, started.crew.supervisor, started.jobId)).shift!.makeSafe!.items;
    const [first, ...rest] = items;
    const firstRole = first.roles.find((r) => r !== 'viewer') as keyof CrewByRole;
    const ticked = await httpCommand(server, started.crew[firstRole], started.jobId, { type: 'shift.item.done', itemId: first.id, ...(first.asksNote ? { note: 'Key in the site office safe.' } : {}) });
    expect(ticked.status).toBe(200);

    const making = await pdfOf('making-safe.pdf');
    expect(making).toContain('The supervisor ended shift 1: the crane is being made safe.');
    const list = making.slice(making.indexOf('Make-safe checklist'), making.indexOf('Crew '));
    expect(list).toContain(`DONE ${squeeze(first.text)} — done live by ${started.crew[firstRole].user.displayName}`);
    for (const item of rest) expect(list).toContain(`${squeeze(item.text)} For ${item.roles.map((r) => r).join(', ')}${item.asksNote ? ' Note' : ''} Initials Time (hh:mm)`);

    for (const item of rest) {
      const role = item.roles.find((r) => r !== 'viewer') as keyof CrewByRole;
      expect((await httpCommand(server, started.crew[role], started.jobId, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: 'Forecast calm.' } : {}) })).status).toBe(200);
    }
    const madeSafe = await pdfOf('made-safe.pdf');
    expect(madeSafe).toContain('The crane was made safe at the end of shift 1.');
    expect(madeSafe).toMatch(/Start-of-shift hold Shift inspection \(walk-round\) Name \(capitals\) Initials Time \(hh:mm\) What was inspected and found Operator Name \(capitals\) Initials Time \(hh:mm\) Supervisor \(acting\) Name \(capitals\) Initials Time \(hh:mm\)/);
    expect(madeSafe).not.toContain('Make-safe checklist');
  });
});
