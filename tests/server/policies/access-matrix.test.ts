import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { io as connect } from 'socket.io-client';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { BoardCommandType } from '../../../shared/schemas/commands.js';
import { boardCommandSchema } from '../../../shared/schemas/commands.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import { signInAuditListSchema } from '../../../shared/schemas/audit.js';
import { User } from '../../../server/entities/User.js';
import { plannerRoom } from '../../../server/sockets/publisher.js';
import { policyTable } from '../../../server/policies/index.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { BoardClient, boardOf, briefEveryone, calmWeather, completeSteps, controllerValues18m, httpCommand, uploadPhoto, type CommandBody } from '../../helpers/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

// Who gets an answer is asked here, not what is drawn (tests/server/pdf reads the real PDFs): a
// stand-in renderer answers at once, so the PDF and site-file rows cost no drawing.
vi.mock('../../../server/pdf/pool.js', () => ({ renderPdf: async (task: { kind: string }) => Buffer.from(`%PDF-1.4 stand-in for ${task.kind}`) }));

/**
 * THE ACCESS-CONTROL MATRIX. One row per route (method and path, as server/policies/index.ts names
 * it), per board command and per socket event; one column per kind of person. Every cell is sent
 * to the real app on one server and checked:
 *
 *   Y  the policy admits the person: the answer is never 401 or 403 (a 2xx, or a refusal about the
 *      request itself: 400 for an empty body, 404 for an id that points at nothing, 409 for the
 *      board's state). Routes that check a proof the request carries (a password, the refresh
 *      cookie, an e-mailed link) may refuse for want of it, never as unauthenticated/forbidden.
 *   -  refused: 401 for nobody and for a deactivated person's token, 403 for anyone else signed in
 *      (`forbidden` outside the rule, `role_not_allowed` for a crew role that does not send that
 *      command, `not_acting_supervisor` for the acting supervisor's own commands).
 *
 * The people, all on job A (the job every row acts on; live, everyone briefed):
 *   adm  an administrator, on no crew
 *   sup  a qualified supervisor in job A's crew as supervisor, not the acting supervisor
 *   act  job A's acting supervisor (made it ready and started it)
 *   opr, sig, rig, vwr   job A's operator, signaller, rigger and viewer, each qualified for that role only
 *   out  a qualified rigger, signed in, in job B's crew and not in job A's
 *   osp  a qualified supervisor who created and supervises job B and is on no crew of job A: reads
 *        nothing of job A (a job's data is its crew's and the administrators')
 *   dis  job A's second rigger, deactivated after signing in (the access token still in hand)
 *   non  nobody: no token
 *
 * Ids: `:jobId` is job A, `:userId` the person's own (own) or a bystander's (other), `:token` a
 * made-up link, every other id a UUID that names nothing. Bodies are empty (`{}`); the board
 * commands carry a valid body naming a step, hold or stage that does not exist, so an admitted
 * person is refused by the board's rules and nothing moves. The rows that do move the board
 * (handover note, end of shift, stop, cancel) come last, in that order: the acting supervisor
 * writes the note and ends the shift, then the crew's stop and the cancel find the job making safe.
 *
 * Beside the table: no job's data or photo reaches another job's crew by changing an id, one person
 * never acknowledges for two roles of one hold, a deactivated person's sockets close within a
 * second, a crew change takes a removed person off the live board, and an administrator's change
 * to their own account or crew place needs a second administrator.
 */
const matrix: readonly (readonly [row: string, cells: string])[] = [
  //                                                     adm sup act opr sig rig vwr out osp dis non
  ['GET /api/health',                                   'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
  ['POST /api/auth/login',                              'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
  ['POST /api/auth/refresh',                            'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
  ['POST /api/auth/set-password',                       'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
  ['GET /api/auth/links/:token',                        'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
  ['POST /api/auth/password-reset',                     'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
  ['GET /api/auth/me',                                  'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/users',                                    'Y   -   -   -   -   -   -   -   -   -   -'],
  ['POST /api/users',                                   'Y   -   -   -   -   -   -   -   -   -   -'],
  ['POST /api/users/:userId/invitation (own)',          'Y   -   -   -   -   -   -   -   -   -   -'],
  ['POST /api/users/:userId/invitation (other)',        'Y   -   -   -   -   -   -   -   -   -   -'],
  ['GET /api/users/:userId (own)',                      'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/users/:userId (other)',                    'Y   -   -   -   -   -   -   -   -   -   -'],
  ['PATCH /api/users/:userId (own)',                    'Y   -   -   -   -   -   -   -   -   -   -'],
  ['PATCH /api/users/:userId (other)',                  'Y   -   -   -   -   -   -   -   -   -   -'],
  ['PATCH /api/users/:userId/preferences (own)',        'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['PATCH /api/users/:userId/preferences (other)',      '-   -   -   -   -   -   -   -   -   -   -'],
  ['GET /api/audit/sign-ins',                           'Y   -   -   -   -   -   -   -   -   -   -'],
  ['GET /api/dev/inbox',                                'Y   -   -   -   -   -   -   -   -   -   -'],
  ['GET /api/mail/problems',                            'Y   -   -   -   -   -   -   -   -   -   -'],
  ['GET /api/crane-models',                             'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/crane-models/:modelId',                    'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/crane-models/:modelId/arrangement',        'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/crane-units',                              'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/crane-units/:unitId',                      'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/crane-units/:unitId/boom-makeup',          'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/assist-cranes',                            'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/assist-cranes/:assistCraneId',             'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/components',                               'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/components/:componentId',                  'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/components/:componentId/inspections',      'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['POST /api/crane-models',                            'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['PATCH /api/crane-models/:modelId',                  'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['POST /api/crane-models/import',                     'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['POST /api/crane-units',                             'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['PATCH /api/crane-units/:unitId',                    'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['POST /api/assist-cranes',                           'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['POST /api/components',                              'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['PATCH /api/components/:componentId',                'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['POST /api/components/:componentId/inspections',     'Y   Y   Y   -   -   Y   -   Y   Y   -   -'],
  ['POST /api/uploads',                                 'Y   Y   Y   Y   Y   Y   -   Y   Y   -   -'],
  ['GET /api/uploads/:uploadId',                        'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/uploads/:uploadId/thumbnail',              'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/jobs',                                     'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/records',                                  'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['GET /api/crew-candidates',                          'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  ['POST /api/jobs',                                    'Y   Y   Y   -   -   -   -   -   Y   -   -'],
  // A qualified supervisor reads every job's planning and record (they plan across the fleet); its
  // board and its board photos stay with its crew (see "board photos" below).
  ['GET /api/jobs/:jobId',                              'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/events',                       'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/readiness',                    'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/record/verify',                'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/events.jsonl',                 'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/events.csv',                   'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/site-file.zip',                'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/record.pdf',                   'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/configuration.pdf',            'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/plan',                         'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/plan/versions',                'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/plan.pdf',                     'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['GET /api/jobs/:jobId/paper.pdf',                    'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['PATCH /api/jobs/:jobId',                            'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['PUT /api/jobs/:jobId/crew',                         'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['PUT /api/jobs/:jobId/configuration',                'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['PUT /api/jobs/:jobId/plan',                         'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['POST /api/jobs/:jobId/plan/generate',               'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['POST /api/jobs/:jobId/ready',                       'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['POST /api/jobs/:jobId/overrides',                   'Y   Y   Y   -   -   -   -   -   -   -   -'],
  ['POST /api/jobs/:jobId/acting-supervisor',           'Y   -   -   -   -   -   -   -   -   -   -'],
  ['GET /api/jobs/:jobId/board',                        'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['POST /api/jobs/:jobId/commands',                    '-   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  // The live connection.
  ['socket connect',                                    'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  ['socket board:join',                                 'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['socket jobs:follow',                                'Y   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['socket board:command',                              '-   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['socket session:renew',                              'Y   Y   Y   Y   Y   Y   Y   Y   Y   -   -'],
  // Board commands (POST /api/jobs/:jobId/commands; the socket's board:command takes the same path).
  ['command job.start',                                 '-   Y   Y   -   -   -   -   -   -   -   -'],
  ['command job.complete',                              '-   Y   Y   -   -   -   -   -   -   -   -'],
  ['command briefing.acknowledge',                      '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command step.complete',                             '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command step.reopen',                               '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command hold.acknowledge',                          '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command hold.withdraw',                             '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command hold.release',                              '-   -   Y   -   -   -   -   -   -   -   -'],
  ['command hold.check.review',                         '-   Y   Y   -   -   -   -   -   -   -   -'],
  ['command stage.skip',                                '-   -   Y   -   -   -   -   -   -   -   -'],
  ['command job.stop.note',                             '-   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['command job.resume',                                '-   -   Y   -   -   -   -   -   -   -   -'],
  ['command weather.record',                            '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command defect.report',                             '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command plan.revise',                               '-   Y   Y   -   -   -   -   -   -   -   -'],
  ['command shift.item.done',                           '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command handover.acknowledge',                      '-   Y   Y   -   -   -   -   -   -   -   -'],
  ['command shift.inspect',                             '-   Y   Y   Y   Y   Y   -   -   -   -   -'],
  ['command shift.acknowledge',                         '-   Y   Y   Y   -   -   -   -   -   -   -'],
  ['command shift.start',                               '-   -   Y   -   -   -   -   -   -   -   -'],
  // These move the board, in this order (see above).
  ['command handover.write',                            '-   -   Y   -   -   -   -   -   -   -   -'],
  ['command shift.end',                                 '-   -   Y   -   -   -   -   -   -   -   -'],
  ['command job.stop',                                  '-   Y   Y   Y   Y   Y   Y   -   -   -   -'],
  ['command job.cancel',                                '-   Y   Y   -   -   -   -   -   -   -   -'],
  // Anyone may sign out; it ends the session whose cookie or access token is sent, so it runs last.
  ['POST /api/auth/logout',                             'Y   Y   Y   Y   Y   Y   Y   Y   Y   Y   Y'],
];

/** The rows that move job A's board; they run last, in this order, each person after the one to their left. */
const movesTheBoard = new Set(['command handover.write', 'command shift.end', 'command job.stop', 'command job.cancel']);
const columns = ['adm', 'sup', 'act', 'opr', 'sig', 'rig', 'vwr', 'out', 'osp', 'dis', 'non'] as const;
type Column = (typeof columns)[number];
/** A made-up id that names nothing of any kind. */
const NOTHING = '00000000-0000-4000-8000-000000000000';
/** Socket and HTTP refusals that say who the person is or what they may do, never about the request. */
const refusalCodes = new Set(['unauthenticated', 'token_invalid', 'token_expired', 'account_inactive', 'session_ended', 'forbidden', 'role_not_allowed', 'not_acting_supervisor']);

function cellsOf(row: string, marks: string): Record<Column, boolean> {
  const list = marks.trim().split(/\s+/);
  if (list.length !== columns.length || list.some((m) => m !== 'Y' && m !== '-')) throw new Error(`row ${row}: ${columns.length} marks of Y or -`);
  return Object.fromEntries(columns.map((c, i) => [c, list[i] === 'Y'])) as Record<Column, boolean>;
}

describe('the access-control matrix', () => {
  let server: TestServer;
  const people = {} as Record<Exclude<Column, 'non'>, SignedInUser>;
  /** A person on no crew whose id is the `other` of the :userId rows. */
  let bystander: SignedInUser;
  let jobA: string;
  let jobB: string;
  let unitId: string;
  let modelId: string;
  const crewA: { userId: string; role: CrewRole }[] = [];
  const as = (who: SignedInUser) => ({ Authorization: `Bearer ${who.token}` });
  const sockets: BoardClient[] = [];
  const client = (who: SignedInUser) => {
    const c = new BoardClient(server.url, who.token);
    sockets.push(c);
    return c;
  };

  beforeAll(async () => {
    server = await startTestServer();
    people.adm = await signedInUser(server, { isAdmin: true, qualifications: [] });
    people.act = await signedInUser(server, { qualifications: ['supervisor'] });
    people.sup = await signedInUser(server, { qualifications: ['supervisor'] });
    people.opr = await signedInUser(server, { qualifications: ['operator'] });
    people.sig = await signedInUser(server, { qualifications: ['signaller'] });
    people.rig = await signedInUser(server, { qualifications: ['rigger'] });
    people.vwr = await signedInUser(server, { qualifications: ['viewer'] });
    people.out = await signedInUser(server, { qualifications: ['rigger'] });
    people.osp = await signedInUser(server, { qualifications: ['supervisor'] });
    people.dis = await signedInUser(server, { qualifications: ['rigger'] });
    bystander = await signedInUser(server, { qualifications: ['rigger'] });
    const fleet = await seedModelAndUnit(server, people.adm.token);
    unitId = fleet.unit.id;
    modelId = fleet.model.id;
    await addParts18m(server, people.adm.token, modelId, unitId, 'M');

    // Job A: planned by the acting supervisor, everyone on it, ready, started, briefed.
    const crew = { supervisor: people.act, operator: people.opr, signaller: people.sig, rigger: people.rig };
    const extra = [
      { userId: people.sup.user.id, role: 'supervisor' as const },
      { userId: people.vwr.user.id, role: 'viewer' as const },
      { userId: people.dis.user.id, role: 'rigger' as const },
    ];
    jobA = (await plannedJob(server, crew, unitId, 'Matrix job A', extra)).id;
    crewA.push(...Object.entries(crew).map(([role, who]) => ({ userId: who.user.id, role: role as CrewRole })), ...extra);
    await request(server.app).post(`/api/jobs/${jobA}/ready`).set(as(people.act)).expect(200);
    expect((await httpCommand(server, people.act, jobA, { type: 'job.start' })).status).toBe(200);
    await briefEveryone(server, { ...crew }, jobA);
    for (const who of [people.sup, people.dis]) expect((await httpCommand(server, who, jobA, { type: 'briefing.acknowledge' })).status).toBe(200);
    expect((await boardOf(server, people.act, jobA)).actingSupervisor?.userId).toBe(people.act.user.id);

    // Job B: supervised by osp, with out as its rigger.
    const b = await request(server.app).post('/api/jobs').set(as(people.osp)).send({ name: 'Matrix job B', site: 'South yard', craneUnitId: unitId, kind: 'erection' }).expect(201);
    jobB = b.body.job.id as string;
    // Its creator is on its crew as its supervisor, so reads it.
    expect(b.body.job.crew).toEqual([expect.objectContaining({ userId: people.osp.user.id, role: 'supervisor' })]);
    await request(server.app)
      .put(`/api/jobs/${jobB}/crew`)
      .set(as(people.osp))
      .send({ members: [{ userId: people.osp.user.id, role: 'supervisor' }, { userId: people.out.user.id, role: 'rigger' }] })
      .expect(200);
  });
  afterAll(async () => {
    for (const c of sockets) c.close();
    await server.stop();
  });

  it('lets nobody acknowledge one hold for two roles', async () => {
    // Work job A's first stage to its hold, then put someone in the crew in two of its roles.
    const crew = { supervisor: people.act, operator: people.opr, signaller: people.sig, rigger: people.rig };
    const first = (await boardOf(server, people.act, jobA)).stages[0];
    await completeSteps(server, crew, jobA, first.id);
    const hold = (await boardOf(server, people.act, jobA)).stages[0].hold!;
    expect(hold.state).toBe('open');
    const twoRoles = hold.requiredRoles.filter((r) => r !== 'supervisor').slice(0, 2) as CrewRole[];
    expect(twoRoles.length, `the first hold needs two roles besides the supervisor: ${hold.requiredRoles.join(', ')}`).toBe(2);
    const dual = await signedInUser(server, { qualifications: twoRoles });
    crewA.push(...twoRoles.map((role) => ({ userId: dual.user.id, role })));
    await request(server.app).put(`/api/jobs/${jobA}/crew`).set(as(people.act)).send({ members: crewA }).expect(200);
    expect((await httpCommand(server, dual, jobA, { type: 'briefing.acknowledge' })).status).toBe(200);

    const check = hold.valueCheck ? { values: controllerValues18m, photoId: await uploadPhoto(server, dual) } : {};
    const firstAck = await httpCommand(server, dual, jobA, { type: 'hold.acknowledge', holdId: hold.id, role: twoRoles[0], ...check });
    expect(firstAck.status, JSON.stringify(firstAck.body)).toBe(200);
    // The second role, over HTTP and over the socket.
    const second = await httpCommand(server, dual, jobA, { type: 'hold.acknowledge', holdId: hold.id, role: twoRoles[1] });
    expect([second.status, second.body.error?.code]).toEqual([409, 'one_person_two_roles']);
    const socket = client(dual);
    await socket.connected();
    const overSocket = await socket.command(jobA, { type: 'hold.acknowledge', holdId: hold.id, role: twoRoles[1] });
    expect(overSocket).toMatchObject({ ok: false, error: { code: 'one_person_two_roles' } });
    const after = (await boardOf(server, people.act, jobA)).stages[0].hold!;
    expect(after.acknowledgments.filter((a) => a.userId === dual.user.id).map((a) => a.role)).toEqual([twoRoles[0]]);
    // Taken back, so the matrix below finds the hold as the crew left it.
    expect((await httpCommand(server, dual, jobA, { type: 'hold.withdraw', holdId: hold.id, role: twoRoles[0] })).status).toBe(200);
  });

  it('takes a person taken off the crew off the live board on the socket already open, and tells them why', async () => {
    const leaver = await signedInUser(server, { qualifications: ['rigger'] });
    const demoted = await signedInUser(server, { qualifications: ['supervisor', 'rigger'] });
    const withBoth = [...crewA, { userId: leaver.user.id, role: 'rigger' as const }, { userId: demoted.user.id, role: 'supervisor' as const }];
    await request(server.app).put(`/api/jobs/${jobA}/crew`).set(as(people.act)).send({ members: withBoth }).expect(200);
    const leaving = client(leaver);
    const stepping = client(demoted);
    const staying = client(people.opr);
    for (const c of [leaving, stepping, staying]) expect((await c.join(jobA)).ok).toBe(true);
    const planners = () => server.io.of('/').adapter.rooms.get(plannerRoom(jobA)) ?? new Set<string>();
    expect(planners().has(stepping.socket.id!)).toBe(true);
    const told = new Promise<{ jobId: string; reason: string }>((resolve) => leaving.socket.once('board:removed', resolve));
    // The leaver's job list follows job A's line too.
    const lines: number[] = [];
    leaving.socket.on('jobs:summary', (line) => lines.push(line.lastSeq));
    expect(await leaving.socket.emitWithAck('jobs:follow', { jobIds: [jobA] })).toEqual({ ok: true, following: [jobA] });

    // The leaver goes; the demoted supervisor stays as a rigger only.
    const changed = await request(server.app)
      .put(`/api/jobs/${jobA}/crew`)
      .set(as(people.act))
      .send({ members: [...crewA, { userId: demoted.user.id, role: 'rigger' }] })
      .expect(200);
    const crewSeq = changed.body.job.lastSeq as number;
    // The next event reaches the crew and not the leaver; the demoted rigger gets it, out of the planners' room.
    const weather = await httpCommand(server, people.rig, jobA, calmWeather);
    expect(weather.status).toBe(200);
    await staying.waitForSeq(weather.body.seq!);
    await stepping.waitForSeq(weather.body.seq!);
    expect(planners().has(stepping.socket.id!)).toBe(false);
    expect(leaving.events.some((e) => e.seq === crewSeq)).toBe(true);
    expect(leaving.events.filter((e) => e.seq > crewSeq).map((e) => e.type)).toEqual([]);
    expect(lines.filter((seq) => seq > crewSeq)).toEqual([]);
    // Told why, on the connection that stays open for the person's other boards.
    const notice = await Promise.race([told, new Promise<null>((resolve) => setTimeout(() => resolve(null), 1000))]);
    expect(notice).toEqual({ jobId: jobA, reason: expect.stringMatching(/no longer on its crew/) });
    expect(leaving.socket.connected).toBe(true);
    const board = await boardOf(server, people.act, jobA);
    expect(board.presence.map((p) => (p as { userId: string }).userId)).not.toContain(leaver.user.id);
    expect(await leaving.join(jobA)).toMatchObject({ ok: false, error: { code: 'forbidden' } });
    crewA.push({ userId: demoted.user.id, role: 'rigger' });

    // An administrator watches any board; made no longer one, they leave the boards of crews they are not on.
    const formerAdmin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const watching = client(formerAdmin);
    expect((await watching.join(jobA)).ok).toBe(true);
    const toldAdmin = new Promise<{ jobId: string; reason: string }>((resolve) => watching.socket.once('board:removed', resolve));
    await request(server.app).patch(`/api/users/${formerAdmin.user.id}`).set(as(people.adm)).send({ isAdmin: false }).expect(200);
    const adminNotice = await Promise.race([toldAdmin, new Promise<null>((resolve) => setTimeout(() => resolve(null), 1000))]);
    expect(adminNotice).toEqual({ jobId: jobA, reason: expect.stringMatching(/no longer an administrator/) });
    expect(await watching.join(jobA)).toMatchObject({ ok: false, error: { code: 'forbidden' } });
  });

  it('closes a deactivated person’s open sockets within a second, and refuses their refresh token', async () => {
    const watching = client(people.dis);
    expect((await watching.join(jobA)).ok).toBe(true);
    const ended = new Promise<string>((resolve) => watching.socket.once('session:ended', (p) => resolve(p.reason)));
    const closed = new Promise<number>((resolve) => watching.socket.once('disconnect', () => resolve(Date.now())));
    const start = Date.now();
    await request(server.app).patch(`/api/users/${people.dis.user.id}`).set(as(people.adm)).send({ active: false }).expect(200);
    const closedAt = await Promise.race([closed, new Promise<number>((resolve) => setTimeout(() => resolve(Number.POSITIVE_INFINITY), 1000))]);
    expect(closedAt - start).toBeLessThan(1000);
    expect(await ended).toMatch(/deactivated/);
    const refresh = await request(server.app).post('/api/auth/refresh').set('Cookie', people.dis.cookie);
    expect(refresh.status).toBe(401);
    // Nor can the old access token open a new connection.
    const again = connect(server.url, { transports: ['websocket'], auth: { token: people.dis.token }, reconnection: false, forceNew: true });
    const refused = await new Promise<string>((resolve) => {
      again.on('connect', () => resolve('connected'));
      again.on('connect_error', (e) => resolve(e.message));
    });
    again.close();
    expect(refused).not.toBe('connected');
    // The crew changes above are over: a deactivated person cannot be named in a crew again.
  });

  it('keeps each job’s data and board photos to those the policy admits, whatever id is asked for', async () => {
    const get = (who: SignedInUser, path: string) => request(server.app).get(path).set(as(who));
    // A photo on job A's board: the rigger reports a defect on its first step (it blocks that stage; nothing below works it).
    const board = await boardOf(server, people.rig, jobA);
    const photoA = await uploadPhoto(server, people.rig);
    const reported = await httpCommand(server, people.rig, jobA, { type: 'defect.report', stepId: board.stages[0].steps[0].id, description: 'Bent lacing on the base section', photoId: photoA });
    expect(reported.status, JSON.stringify(reported.body)).toBe(200);
    // The photo on job A's board: its crew sees it; the crew of job B does not, its supervisor neither.
    for (const path of [`/api/uploads/${photoA}`, `/api/uploads/${photoA}/thumbnail`]) {
      expect((await get(people.vwr, path)).status, path).toBe(200);
      expect((await get(people.out, path)).status, path).toBe(403);
      expect((await get(people.osp, path)).status, path).toBe(403);
    }
    // Job A's crew takes its site file with the photo in it.
    const zipOf = async (who: SignedInUser) => (await get(who, `/api/jobs/${jobA}/site-file.zip`).buffer(true).parse((res, done) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => done(null, Buffer.concat(chunks)));
    })).body as Buffer;
    expect((await zipOf(people.vwr)).includes('photos/')).toBe(true);
    // Job B's supervisor and rigger ask for job A's record, log, exports, site file, plan and board by
    // its id: each refused as forbidden. A qualified supervisor reads only the jobs whose crew they are on.
    const jobAData = ['', '/events?after=0', '/events.jsonl', '/events.csv', '/record.pdf', '/configuration.pdf', '/site-file.zip', '/plan', '/plan/versions', '/plan.pdf', '/paper.pdf', '/readiness', '/record/verify', '/board'];
    for (const who of [people.osp, people.out]) {
      for (const tail of jobAData) {
        const res = await get(who, `/api/jobs/${jobA}${tail}`);
        expect([res.status, res.body?.error?.code], `${tail || '/'} as ${who.user.email}`).toEqual([403, 'forbidden']);
      }
    }
    // Their job list, records list and followed list lines hold job B alone; job A's crew sees job A
    // alone; an administrator sees both.
    const ids = (body: { items: { id: string }[] }) => body.items.map((j) => j.id).sort();
    for (const [who, expected] of [[people.osp, [jobB]], [people.out, [jobB]], [people.vwr, [jobA]], [people.sup, [jobA]], [people.adm, [jobA, jobB].sort()]] as const) {
      expect(ids((await get(who, '/api/jobs').expect(200)).body), `GET /api/jobs as ${who.user.email}`).toEqual(expected);
      const records = (await get(who, '/api/records').expect(200)).body;
      expect([ids(records), records.total], `GET /api/records as ${who.user.email}`).toEqual([expected, expected.length]);
    }
    for (const who of [people.osp, people.out]) {
      const follower = client(who);
      await follower.connected();
      expect(await follower.socket.emitWithAck('jobs:follow', { jobIds: [jobA, jobB] })).toEqual({ ok: true, following: [jobB] });
    }
    // Job B's log holds job B's events alone.
    const logB = jobEventListSchema.parse((await get(people.osp, `/api/jobs/${jobB}/events?after=0`).expect(200)).body);
    expect(logB.items.every((e) => e.jobId === jobB)).toBe(true);
  });

  it('needs a second administrator for an administrator’s own account and crew place, and audits every administrator’s change', async () => {
    const first = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const second = await signedInUser(server, { isAdmin: true, qualifications: [] });
    const own = `/api/users/${first.user.id}`;
    for (const change of [{ qualifications: ['supervisor'] }, { canInspect: true }, { displayName: 'Someone else' }]) {
      const res = await request(server.app).patch(own).set(as(first)).send(change);
      expect([res.status, res.body.error?.code], JSON.stringify(change)).toEqual([403, 'second_admin_needed']);
    }
    expect((await request(server.app).get(own).set(as(first)).expect(200)).body.user).toMatchObject({ qualifications: [], canInspect: false });
    // The second administrator makes the change; the audit names who did what.
    await request(server.app).patch(own).set(as(second)).send({ qualifications: ['supervisor'] }).expect(200);

    // On a crew: the first administrator cannot put themself on job B's crew, the second can.
    const crewB = [{ userId: people.osp.user.id, role: 'supervisor' }, { userId: people.out.user.id, role: 'rigger' }];
    const self = await request(server.app).put(`/api/jobs/${jobB}/crew`).set(as(first)).send({ members: [...crewB, { userId: first.user.id, role: 'supervisor' }] });
    expect([self.status, self.body.error?.code]).toEqual([403, 'second_admin_needed']);
    expect(self.body.error.message).toMatch(/another administrator or the job’s supervisor/);
    await request(server.app).put(`/api/jobs/${jobB}/crew`).set(as(second)).send({ members: [...crewB, { userId: first.user.id, role: 'supervisor' }] }).expect(200);
    // The job's record says who changed its crew, as administrator.
    const log = jobEventListSchema.parse((await request(server.app).get(`/api/jobs/${jobB}/events?after=0`).set(as(second)).expect(200)).body);
    const crewSet = log.items.filter((e) => e.type === 'crew.set').at(-1)!;
    expect(crewSet.by).toMatchObject({ userId: second.user.id, role: 'admin' });
    expect(crewSet.type === 'crew.set' && crewSet.data.added).toEqual([{ userId: first.user.id, role: 'supervisor' }]);
    // Now a supervisor of job B, the first administrator changes their own roles there as any supervisor does.
    await request(server.app).put(`/api/jobs/${jobB}/crew`).set(as(first)).send({ members: crewB }).expect(200);

    const invited = await request(server.app).post('/api/users').set(as(second)).send({ email: 'new.rigger@example.test', displayName: 'New rigger', qualifications: ['rigger'] }).expect(201);
    const audit = signInAuditListSchema.parse((await request(server.app).get('/api/audit/sign-ins?limit=50').set(as(second)).expect(200)).body).items;
    expect(audit).toEqual(
      expect.arrayContaining([
        expect.objectContaining({ kind: 'user_changed', userId: first.user.id, detail: `by ${second.user.email}: qualifications none → supervisor` }),
        expect.objectContaining({ kind: 'crew_changed', userId: second.user.id, detail: expect.stringMatching(new RegExp(`^Matrix job B \\(${jobB}\\): added ${first.user.displayName} as supervisor$`)) }),
        expect.objectContaining({ kind: 'user_invited', userId: invited.body.user.id, detail: `by ${second.user.email}: qualifications rigger` }),
      ]),
    );
    // Made as job B's supervisor, the first administrator's change is still an administrator's change in the audit.
    expect(audit.filter((a) => a.kind === 'crew_changed' && a.userId === first.user.id).map((a) => a.detail)).toEqual([`Matrix job B (${jobB}): took off ${first.user.displayName} as supervisor`]);
    // The refused changes wrote nothing.
    expect(audit.filter((a) => a.userId === first.user.id && a.kind === 'user_changed')).toHaveLength(1);
  });

  it('names every route and socket event of the policy table and every board command in the matrix, once', () => {
    const rows = matrix.map(([row]) => row.replace(/ \((own|other)\)$/, ''));
    // `board:leave` only takes the socket out of a board it joined: nothing to refuse, nothing answered.
    const events = policyTable.flatMap((r) => ('events' in r ? (r.events as readonly string[]) : [])).filter((e) => e !== 'board:leave');
    expect(rows.filter((r) => r.startsWith('socket ')).map((r) => r.slice('socket '.length)).sort()).toEqual([...events].sort());
    const routes = policyTable.flatMap((r) => r.routes as readonly string[]);
    const commands = boardCommandSchema.options.map((o) => `command ${o.shape.type.value}`);
    expect([...new Set(rows.filter((r) => r.startsWith('GET ') || r.startsWith('POST ') || r.startsWith('PUT ') || r.startsWith('PATCH ') || r.startsWith('DELETE ')))].sort()).toEqual([...routes].sort());
    expect(rows.filter((r) => r.startsWith('command ')).sort()).toEqual(commands.sort());
    expect(matrix.length).toBe(new Set(matrix.map(([row]) => row)).size);
    for (const [row, marks] of matrix) cellsOf(row, marks);
  });

  it('answers every cell as the table says', { timeout: 60_000 }, async () => {
    // The deactivated column's person, should this test run alone.
    if ((await server.context.dataSource.manager.findOneByOrFail(User, { id: people.dis.user.id })).active) {
      await request(server.app).patch(`/api/users/${people.dis.user.id}`).set(as(people.adm)).send({ active: false }).expect(200);
    }
    const plan = (await request(server.app).get(`/api/jobs/${jobA}/plan`).set(as(people.act)).expect(200)).body.plan as { kind: string };
    const crewRoleOf = (column: Column): CrewRole => (['opr', 'sig'].includes(column) ? (column === 'opr' ? 'operator' : 'signaller') : column === 'sup' || column === 'act' ? 'supervisor' : 'rigger');
    const bodies: { [T in BoardCommandType]: (column: Column) => CommandBody } = {
      'job.start': () => ({ type: 'job.start' }),
      'job.complete': () => ({ type: 'job.complete' }),
      'job.cancel': () => ({ type: 'job.cancel', reason: 'The access matrix ends here' }),
      'briefing.acknowledge': () => ({ type: 'briefing.acknowledge' }),
      'step.complete': () => ({ type: 'step.complete', stepId: 'no-such-step' }),
      'step.reopen': () => ({ type: 'step.reopen', stepId: 'no-such-step' }),
      'hold.acknowledge': (c) => ({ type: 'hold.acknowledge', holdId: 'no-such-hold', role: crewRoleOf(c) }),
      'hold.withdraw': (c) => ({ type: 'hold.withdraw', holdId: 'no-such-hold', role: crewRoleOf(c) }),
      'hold.release': () => ({ type: 'hold.release', holdId: 'no-such-hold' }),
      'hold.check.review': () => ({ type: 'hold.check.review', holdId: 'no-such-hold', note: 'Reviewed with the crew' }),
      'stage.skip': () => ({ type: 'stage.skip', stageId: 'no-such-stage', reason: 'Not needed today' }),
      'job.stop': () => ({ type: 'job.stop', pressedAt: new Date().toISOString(), reason: 'Matrix stop' }),
      'job.stop.note': () => ({ type: 'job.stop.note', reason: 'Gusts' }),
      'job.resume': () => ({ type: 'job.resume', reason: 'Wind dropped' }),
      'weather.record': () => calmWeather,
      'defect.report': () => ({ type: 'defect.report', stepId: 'no-such-step', description: 'Bent lacing', photoId: randomUUID() }),
      // A plan for the other kind of job: refused after the policy, and nothing is revised.
      'plan.revise': () => ({ type: 'plan.revise', plan: { ...plan, kind: plan.kind === 'erection' ? 'dismantling' : 'erection' } as never, reason: 'Matrix revision' }),
      'shift.end': () => ({ type: 'shift.end' }),
      'shift.item.done': () => ({ type: 'shift.item.done', itemId: 'no-such-item' }),
      'handover.write': () => ({ type: 'handover.write', hazards: 'none', note: 'Matrix handover' }),
      'handover.acknowledge': () => ({ type: 'handover.acknowledge' }),
      'shift.inspect': () => ({ type: 'shift.inspect', note: 'Walked round the crane' }),
      'shift.acknowledge': (c) => ({ type: 'shift.acknowledge', role: c === 'opr' ? 'operator' : 'supervisor' }),
      'shift.start': () => ({ type: 'shift.start' }),
    };

    /** The socket of each column that could connect, opened once. */
    const connected = new Map<Column, BoardClient | string>();
    async function socketOf(column: Column): Promise<BoardClient | string> {
      if (!connected.has(column)) {
        const c = new BoardClient(server.url, column === 'non' ? '' : people[column].token);
        sockets.push(c);
        connected.set(column, await c.connected().then(() => c, (e: Error) => e.message));
      }
      return connected.get(column)!;
    }

    /** The answer to one cell: admitted or refused, and what was seen. */
    async function answer(row: string, column: Column): Promise<{ admitted: boolean; seen: string }> {
      const who = column === 'non' ? null : people[column];
      if (row.startsWith('socket ')) {
        const socket = await socketOf(column);
        if (typeof socket === 'string') return { admitted: false, seen: `connect_error ${socket}` };
        if (row === 'socket connect') return { admitted: true, seen: 'connected' };
        if (row === 'socket session:renew') {
          const ack = await socket.socket.emitWithAck('session:renew', { token: who!.token });
          return { admitted: ack.ok, seen: ack.ok ? 'ok' : `${ack.error.code}: ${ack.error.message}` };
        }
        if (row === 'socket jobs:follow') {
          const ack = await socket.socket.emitWithAck('jobs:follow', { jobIds: [jobA] });
          return { admitted: ack.ok && ack.following.includes(jobA), seen: JSON.stringify(ack) };
        }
        const ack = row === 'socket board:join' ? await socket.join(jobA) : await socket.command(jobA, { type: 'job.stop.note', reason: 'Gusts' });
        return { admitted: ack.ok || !refusalCodes.has(ack.error.code), seen: ack.ok ? 'ok' : `${ack.error.code}: ${ack.error.message}` };
      }
      let method: string;
      let path: string;
      let body: object = {};
      if (row.startsWith('command ')) {
        method = 'POST';
        path = `/api/jobs/${jobA}/commands`;
        body = { ...bodies[row.slice('command '.length) as BoardCommandType](column), commandId: randomUUID() };
      } else {
        const [m, pattern, target] = row.split(' ') as [string, string, string | undefined];
        method = m;
        const userId = target === '(own)' ? (who?.user.id ?? bystander.user.id) : bystander.user.id;
        path = pattern
          .replace(':jobId', jobA)
          .replace(':userId', userId)
          .replace(':token', 'not-a-sign-in-link')
          .replace(/:[a-zA-Z]+Id/g, NOTHING);
      }
      let req = request(server.app)[method.toLowerCase() as 'get' | 'post' | 'put' | 'patch'](path);
      if (who) req = req.set(as(who));
      const res = await (method === 'GET' ? req : req.send(body));
      const code = (res.body as { error?: { code?: string; message?: string } } | undefined)?.error;
      const seen = `${res.status}${code ? ` ${code.code}: ${code.message}` : ''}`;
      const proof = policyTable.some((r) => 'proof' in r && (r.routes as readonly string[]).includes(row));
      if (proof) return { admitted: !['unauthenticated', 'forbidden'].includes(code?.code ?? ''), seen };
      const refusedAs = who && column !== 'dis' ? 403 : 401;
      return { admitted: res.status !== 401 && res.status !== 403, seen: res.status === 401 || res.status === 403 ? (res.status === refusedAs ? seen : `${seen} (expected ${refusedAs})`) : seen };
    }

    const wrong: string[] = [];
    const started = Date.now();
    for (const [row, marks] of matrix) {
      const cells = cellsOf(row, marks);
      const check = async (column: Column) => {
        const { admitted, seen } = await answer(row, column);
        const badStatus = !admitted && seen.includes('(expected');
        if (admitted !== cells[column] || badStatus) wrong.push(`${row} as ${column}: expected ${cells[column] ? 'admitted' : 'refused'}, got ${seen}`);
      };
      // A row that moves the board asks its people one after another, left to right (the acting
      // supervisor's command is refused to the other supervisor before it moves anything); the
      // others ask everyone at once.
      if (movesTheBoard.has(row)) for (const column of columns) await check(column);
      else await Promise.all(columns.map(check));
    }
    console.log(`access matrix: ${matrix.length} rows × ${columns.length} people in ${((Date.now() - started) / 1000).toFixed(1)} s`);
    expect(wrong).toEqual([]);
  });
});
