import { randomUUID } from 'node:crypto';
import fc from 'fast-check';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { replay } from '../../../shared/board/apply.js';
import type { BoardStage, BoardState } from '../../../shared/board/types.js';
import { jobEventListSchema } from '../../../shared/events/log.js';
import type { CrewRole } from '../../../shared/schemas/jobs.js';
import { Job } from '../../../server/entities/Job.js';
import { CommittedJobs } from '../../../server/db/committed-jobs.js';
import { JobEvent } from '../../../server/entities/JobEvent.js';
import { signedInUser, type SignedInUser } from '../../helpers/auth.js';
import { BoardClient, calmWeather, completeSteps, readingWithinLimit, signedInCrew, type CommandBody, type CrewByRole } from '../../helpers/board.js';
import { RESUME_AFTER_PRESS_MS } from '../../../server/commands/board.js';
import { addParts18m, seedModelAndUnit } from '../../helpers/fleet.js';
import { plannedJob } from '../../helpers/jobs.js';
import { startTestServer, type TestServer } from '../../helpers/server.js';

/**
 * Races on one board (issue 18): commands for the same hold or the same stage sent at once from
 * different sockets and over HTTP (a real listening server, not an in-process request), in orders
 * and with small delays that fast-check draws. Whatever order the write queue took them in, the
 * outcome must be one that some sequential order of the same commands gives:
 *
 * - every accepted command is accepted by a small model of the rule written here (not the server's
 *   code) at its place in the log, and every refused one is refused with the same code by the model
 *   at some point of that log (the command ran somewhere between the accepted ones);
 * - the log replayed through the shared reducer equals the board stored on the job row and the
 *   board GET /board answers, and the model's end state (acknowledgments, steps, who released)
 *   equals that board;
 * - seqs run 1..n without a gap, no command id has two events, a command id sent on two transports
 *   at once is applied once and both senders get its seq (sent with two different bodies, the
 *   second is refused as reused), the hash chain verifies, every socket on the board receives each
 *   event once, in seq order, and someone joining in the middle of a race misses nothing;
 * - never more than one release of a hold succeeds (exactly one when nobody's role changes), never
 *   after a stop pressed at the same moment; the others are refused with a code that says why;
 * - an acknowledgment racing a crew change that takes its sender off never stands afterwards;
 * - a read racing a write that then fails (a full disk) never shows what was not committed.
 *
 * All races run on one job, one after another (each starts from the board the last one left), so
 * the file builds one board; fast-check does not shrink (a smaller case cannot be re-run alone).
 *
 * The rules the models encode are the board's own (DEVELOPERS.md, "The board's rules"): a hold
 * is acknowledged once per required role by different people, withdrawn only by whoever
 * acknowledged it, released once by the acting supervisor after every required role; a step is
 * done once, after the steps it waits for; someone off the crew is refused before any rule, and a
 * crew change takes back the acknowledgments of whoever leaves; a stopped job takes nothing on a
 * hold, and a resume within RESUME_AFTER_PRESS_MS of a second stop press is refused. Common
 * practice, no source: these are the product's rules, not figures from a standard.
 */

type Key = 'S1' | 'S2' | 'O' | 'G' | 'R' | 'O2';
type Via = 'http' | 'socket' | 'socket2';
/** Everyone on the crew from the start, each with two sockets on the board; O2 is the operator who takes over from O in a crew change. */
const keys: readonly Key[] = ['S1', 'S2', 'O', 'G', 'R'];
/** Each person's one crew role. S1 starts the job and is the acting supervisor; S2 is the second supervisor. */
const roleOf: Record<Key, CrewRole> = { S1: 'supervisor', S2: 'supervisor', O: 'operator', G: 'signaller', R: 'rigger', O2: 'operator' };

type Transfer = { type: 'acting.transfer'; to: Key };
/** PUT /api/jobs/:id/crew by the supervisor: these people, each in their role. */
type CrewChange = { type: 'crew.set'; members: Key[] };
interface Attempt {
  label: string;
  /** Who sends it; the admin sends only the transfer, over HTTP. */
  who: Key | 'admin';
  via: Via;
  delayMs: number;
  commandId: ReturnType<typeof randomUUID>;
  command: CommandBody | Transfer | CrewChange;
}
/** An accepted command's seq (a crew change answers with the job: its seq is found in the log by its command id). */
type Answer = { ok: true; seq?: number } | { ok: false; code: string; message: string };
type Sent = Attempt & { answer: Answer };

/** A model's verdict on one command in one state. */
type Decision<S> = { ok: true; next: S } | { ok: false; code: string };

/** The refusal of a release that another release beat. */
const ALREADY_RELEASED = 'already_released';

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('races on one board', () => {
  let server: TestServer;
  let admin: SignedInUser;
  let crew: CrewByRole;
  let people: Record<Key, SignedInUser>;
  /** Two sockets for each person, so one person can race themself. */
  const sockets = {} as Record<Key, [BoardClient, BoardClient]>;
  /** People taken off the crew: the server takes their sockets off the board, so they are no longer checked. */
  const offBoard = new Set<Key>();
  let unitId: string;
  const idOf = (who: Key | 'admin') => (who === 'admin' ? admin : people[who]).user.id;

  beforeAll(async () => {
    server = await startTestServer();
    admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
    crew = await signedInCrew(server);
    people = {
      S1: crew.supervisor,
      S2: await signedInUser(server, { qualifications: ['supervisor'] }),
      O: crew.operator,
      G: crew.signaller,
      R: crew.rigger,
      O2: await signedInUser(server, { qualifications: ['operator'] }),
    };
    const { model, unit } = await seedModelAndUnit(server, admin.token);
    unitId = unit.id;
    await addParts18m(server, admin.token, model.id, unit.id, 'R');
    for (const key of keys) sockets[key] = [new BoardClient(server.url, people[key].token), new BoardClient(server.url, people[key].token)];
    await Promise.all(keys.flatMap((k) => sockets[k].map((s) => s.connected())));
  }, 60_000);

  afterAll(async () => {
    for (const key of keys) for (const s of sockets[key] ?? []) s.close();
    await server.stop();
  });

  // ---- talking to the server -------------------------------------------------------------

  async function api(who: SignedInUser, method: string, path: string, body?: unknown, headers: Record<string, string> = {}) {
    const res = await fetch(`${server.url}/api${path}`, {
      method,
      headers: { authorization: `Bearer ${who.token}`, ...(body === undefined ? {} : { 'content-type': 'application/json' }), ...headers },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    return { status: res.status, body: (await res.json()) as Record<string, unknown> & { seq?: number; error?: { code: string; message: string } } };
  }

  function answerOf(status: number, body: { seq?: number; error?: { code: string; message: string } }): Answer {
    if (status === 200) return { ok: true, seq: body.seq };
    expect(status, JSON.stringify(body)).toBeGreaterThanOrEqual(400);
    expect(status, JSON.stringify(body)).toBeLessThan(500);
    return { ok: false, code: body.error!.code, message: body.error!.message };
  }

  async function send(jobId: string, a: Attempt): Promise<Answer> {
    if (a.delayMs) await sleep(a.delayMs);
    if (a.command.type === 'acting.transfer') {
      const res = await api(admin, 'POST', `/jobs/${jobId}/acting-supervisor`, { userId: idOf(a.command.to), reason: 'The acting supervisor cannot be reached on site.' }, { 'x-command-id': a.commandId });
      return answerOf(res.status, res.body);
    }
    if (a.command.type === 'crew.set') {
      const members = a.command.members.map((k) => ({ userId: idOf(k), role: roleOf[k] }));
      const res = await api(people[a.who as Key], 'PUT', `/jobs/${jobId}/crew`, { members }, { 'x-command-id': a.commandId });
      return answerOf(res.status, res.body);
    }
    const who = a.who as Key;
    if (a.via === 'http') {
      const res = await api(people[who], 'POST', `/jobs/${jobId}/commands`, { ...a.command, commandId: a.commandId });
      return answerOf(res.status, res.body);
    }
    const answer = await sockets[who][a.via === 'socket' ? 0 : 1].command(jobId, a.command, a.commandId);
    return answer.ok ? { ok: true, seq: answer.seq } : { ok: false, code: answer.error.code, message: answer.error.message };
  }

  /** Sends every attempt at once (each after its own small delay) and waits for all answers. */
  async function race(jobId: string, attempts: Attempt[]): Promise<Sent[]> {
    const answers = await Promise.all(attempts.map((a) => send(jobId, a)));
    return attempts.map((a, i) => ({ ...a, answer: answers[i] }));
  }

  /** A command sent sequentially while setting a board up; it must be accepted. */
  async function must(jobId: string, who: Key, command: CommandBody): Promise<number> {
    const res = await api(people[who], 'POST', `/jobs/${jobId}/commands`, { ...command, commandId: randomUUID() });
    expect(res.status, `${who} ${command.type}: ${JSON.stringify(res.body)}`).toBe(200);
    return res.body.seq!;
  }

  const boardNow = async (jobId: string): Promise<BoardState> => {
    const { presence: _presence, ...board } = (await api(people.S1, 'GET', `/jobs/${jobId}/board`)).body as unknown as BoardState & { presence: unknown };
    return board;
  };

  // ---- boards to race on -----------------------------------------------------------------


  /**
   * The log of the job is whole and agrees with everything else: seqs 1..n, one event per command
   * id, the chain verifies, replay = stored board = GET board, and every socket got each event
   * after its join once and in order. Returns the stored events after `fromSeq` (with their
   * command ids, which clients never see) and the board.
   */
  async function checkLog(jobId: string, fromSeq: number): Promise<{ log: JobEvent[]; board: BoardState }> {
    const { rows, stored } = await server.context.queue.run(async () => ({
      rows: await server.context.dataSource.manager.find(JobEvent, { where: { jobId }, order: { seq: 'ASC', id: 'ASC' } }),
      // A cold read, as after a restart: the stored board snapshot and the events after it.
      stored: new CommittedJobs(server.context.dataSource).read(jobId)!,
    }));
    expect(rows.map((r) => r.seq)).toEqual(rows.map((_, i) => i + 1));
    expect(stored.lastSeq).toBe(rows.length);
    expect(new Set(rows.map((r) => r.commandId)).size).toBe(rows.length);
    const verify = (await api(people.S1, 'GET', `/jobs/${jobId}/record/verify`)).body;
    expect(verify).toMatchObject({ valid: true, checked: rows.length, firstBadSeq: null });
    const events = jobEventListSchema.parse((await api(people.S1, 'GET', `/jobs/${jobId}/events?after=0`)).body).items;
    const board = await boardNow(jobId);
    const replayed = replay(events);
    expect(replayed).toEqual(stored.board);
    expect(replayed).toEqual(board);
    for (const key of keys.filter((k) => !offBoard.has(k))) {
      for (const socket of sockets[key]) {
        if (rows.length > joinedAt) await socket.waitForSeq(rows.length);
        const seen = socket.events.filter((e) => e.jobId === jobId).map((e) => e.seq);
        expect(seen, `${key}'s socket`).toEqual(rows.slice(joinedAt).map((r) => r.seq));
      }
    }
    checked = { seq: rows.length, board };
    return { log: rows.filter((e) => e.seq > fromSeq), board };
  }

  /** The last checked log and board, checked again only when something was committed since (a race starts where the last one ended). */
  let checked: { seq: number; board: BoardState } | null = null;
  async function settled(): Promise<{ seq: number; board: BoardState }> {
    const lastSeq = await server.context.queue.run(async () => (await server.context.dataSource.manager.findOneByOrFail(Job, { id: jobId })).lastSeq);
    if (checked?.seq === lastSeq) return checked;
    await checkLog(jobId, 0);
    return checked!;
  }

  /**
   * Finds the sequential order the server took: the accepted commands in seq order. Each must be
   * accepted by the model at its place; each refused one must be refused with its code by the
   * model at some point of that order. Returns the model's end state.
   */
  function linearize<S>(initial: S, decide: (state: S, a: Attempt) => Decision<S>, sent: Sent[], log: JobEvent[]): S {
    const accepted = sent.filter((a) => a.answer.ok);
    expect(log.map((e) => e.commandId).sort()).toEqual([...new Set(accepted.map((a) => a.commandId))].sort());
    for (const a of accepted) if (a.answer.ok && a.answer.seq !== undefined) expect(a.answer.seq, a.label).toBe(log.find((e) => e.commandId === a.commandId)!.seq);
    const states = [initial];
    let state = initial;
    for (const event of log) {
      const a = accepted.find((x) => x.commandId === event.commandId)!;
      expect(event.type, a.label).toBe(eventTypeOf[a.command.type]);
      expect(event.byUserId, a.label).toBe(idOf(a.who));
      const decision = decide(state, a);
      expect(decision.ok ? 'accepted' : decision.code, `${a.label}, accepted as seq ${event.seq}`).toBe('accepted');
      if (decision.ok) state = decision.next;
      states.push(state);
    }
    for (const a of sent) {
      if (a.answer.ok) continue;
      const codes = states.map((s) => decide(s, a)).map((d) => (d.ok ? 'accepted' : d.code));
      expect(codes, `${a.label} was refused ${a.answer.code} (${a.answer.message})`).toContain(a.answer.code);
    }
    return state;
  }

  // ---- the models ------------------------------------------------------------------------

  const eventTypeOf: Record<string, string> = {
    'hold.acknowledge': 'hold.acknowledged',
    'hold.withdraw': 'hold.withdrawn',
    'hold.release': 'hold.released',
    'acting.transfer': 'acting.transferred',
    'step.complete': 'step.completed',
    'crew.set': 'crew.set',
    'job.stop': 'job.stopped',
    'job.resume': 'job.resumed',
  };
  const no = (code: string) => ({ ok: false as const, code });

  interface HoldModel {
    acks: { who: Key; role: CrewRole }[];
    /** Not on the crew: everything they send is refused before the rules (403 forbidden). */
    offCrew: Key[];
    releasedBy: Key | null;
    acting: Key;
    /** The job is stopped: nothing on a hold is accepted until the resume. */
    stopped: boolean;
  }

  /** One hold: acknowledged once per required role by different people, withdrawn by whoever acknowledged, released once by the acting supervisor. */
  const decideHold =
    (required: readonly CrewRole[]) =>
    (s: HoldModel, a: Attempt): Decision<HoldModel> => {
      const c = a.command;
      if (c.type === 'acting.transfer') return s.acting === c.to ? no('already_acting') : { ok: true, next: { ...s, acting: c.to } };
      const who = a.who as Key;
      if (s.offCrew.includes(who)) return no('forbidden');
      // Anyone on the crew may stop the job, live or already stopped (a second press is recorded too).
      if (c.type === 'job.stop') return { ok: true, next: { ...s, stopped: true } };
      if (s.stopped && c.type !== 'crew.set') return no('job_stopped');
      // A crew change takes back the acknowledgments of whoever leaves (or leaves that role).
      if (c.type === 'crew.set') {
        const on = (k: Key) => c.members.includes(k);
        return { ok: true, next: { ...s, offCrew: (Object.keys(roleOf) as Key[]).filter((k) => !on(k)), acks: s.acks.filter((x) => on(x.who)) } };
      }
      const full = required.every((r) => s.acks.some((x) => x.role === r));
      if (c.type === 'hold.acknowledge') {
        if (roleOf[who] !== c.role || !required.includes(c.role)) return no('role_not_allowed');
        if (s.releasedBy || full) return no('invalid_state');
        if (s.acks.some((x) => x.who === who)) return no(s.acks.some((x) => x.who === who && x.role === c.role) ? 'already_acknowledged' : 'one_person_two_roles');
        if (s.acks.some((x) => x.role === c.role)) return no('invalid_state');
        return { ok: true, next: { ...s, acks: [...s.acks, { who, role: c.role }] } };
      }
      if (c.type === 'hold.withdraw') {
        if (s.releasedBy || !s.acks.some((x) => x.who === who && x.role === c.role)) return no('invalid_state');
        return { ok: true, next: { ...s, acks: s.acks.filter((x) => !(x.who === who && x.role === c.role)) } };
      }
      if (c.type === 'hold.release') {
        if (who !== s.acting) return no('not_acting_supervisor');
        if (s.releasedBy) return no(ALREADY_RELEASED);
        if (!full) return no('invalid_state');
        return { ok: true, next: { ...s, releasedBy: who } };
      }
      throw new Error(`no hold rule for ${c.type}`);
    };

  const keyOf = (userId: string): Key => (Object.keys(people) as Key[]).find((k) => people[k].user.id === userId)!;

  function holdModelOf(board: BoardState, stageId: string): HoldModel {
    const hold = board.stages.find((s) => s.id === stageId)!.hold!;
    return {
      acks: hold.acknowledgments.map((a) => ({ who: keyOf(a.userId), role: a.role as CrewRole })),
      releasedBy: hold.releasedBy ? keyOf(hold.releasedBy.userId) : null,
      acting: keyOf(board.actingSupervisor!.userId),
      stopped: board.job.state === 'stopped',
      offCrew: (Object.keys(people) as Key[]).filter((k) => !board.crew.some((m) => m.userId === people[k].user.id)),
    };
  }

  /** The model's hold is the board's hold. */
  function expectHoldAsModel(board: BoardState, stageId: string, model: HoldModel, required: readonly CrewRole[]): void {
    const hold = board.stages.find((s) => s.id === stageId)!.hold!;
    const pairs = (list: { userId: string; role: string }[]) => list.map((x) => `${x.userId}/${x.role}`).sort();
    expect(pairs(hold.acknowledgments)).toEqual(pairs(model.acks.map((x) => ({ userId: people[x.who].user.id, role: x.role }))));
    const full = required.every((r) => model.acks.some((x) => x.role === r));
    expect(hold.state).toBe(model.releasedBy ? 'released' : full ? 'acknowledged' : 'open');
    expect(hold.releasedBy?.userId ?? null).toBe(model.releasedBy ? people[model.releasedBy].user.id : null);
    expect(board.actingSupervisor?.userId).toBe(people[model.acting].user.id);
  }

  interface StepModel {
    done: Record<string, Key>;
  }

  /** One stage's steps: each done once, only after the steps it waits for, while the stage is in progress. */
  const decideStep =
    (stage: BoardStage) =>
    (s: StepModel, a: Attempt): Decision<StepModel> => {
      const c = a.command;
      if (c.type !== 'step.complete') throw new Error(`no step rule for ${c.type}`);
      const step = stage.steps.find((x) => x.id === c.stepId)!;
      if (!step.allowedRoles.includes(roleOf[a.who as Key])) return no('role_not_allowed');
      if (stage.steps.every((x) => s.done[x.id])) return no('invalid_state');
      if (s.done[step.id]) return no('invalid_state');
      if ((step.after ?? []).some((id) => !s.done[id])) return no('out_of_order');
      return { ok: true, next: { done: { ...s.done, [step.id]: a.who as Key } } };
    };

  const groundHold = (board: BoardState) => board.stages.find((s) => s.id === 'er-ground')!.hold!;

  // ---- the races -------------------------------------------------------------------------

  /** Either transport, a second socket of the same person included. */
  const via = fc.constantFrom<Via>('http', 'socket', 'socket2');
  const delay = fc.integer({ min: 0, max: 3 });
  /** fast-check without shrinking: every run works on the same board, so a smaller case cannot be re-run alone. */
  const runs = (numRuns: number) => ({ numRuns, endOnFailure: true });

  let jobId: string;
  let joinedAt: number;

  beforeAll(async () => {
    const job = await plannedJob(server, crew, unitId, 'Races', [{ userId: people.S2.user.id, role: 'supervisor' }]);
    jobId = job.id;
    expect((await api(people.S1, 'POST', `/jobs/${jobId}/ready`)).status).toBe(200);
    await must(jobId, 'S1', { type: 'job.start' });
    for (const key of keys) await must(jobId, key, { type: 'briefing.acknowledge' });
    await completeSteps(server, crew, jobId, 'er-ground');
    // Fresh and calm, well inside the limits: releasing the ground hold starts a stage that moves the crane.
    await must(jobId, 'R', calmWeather);
    const joins = await Promise.all(keys.flatMap((k) => sockets[k].map((s) => s.join(jobId))));
    for (const j of joins) expect(j.ok && j.seq).toBeGreaterThan(0);
    joinedAt = joins[0].ok ? joins[0].seq : 0;
  }, 60_000);

  it('acknowledgments and withdrawals of one hold from every transport at once end as some order of them would', async () => {
    const required = groundHold(await boardNow(jobId)).requiredRoles as CrewRole[];
    expect(required).toEqual(['supervisor', 'operator', 'signaller']);
    // 'turn': whoever has acknowledged withdraws, whoever has not acknowledges (as the hold stood before the race), so runs keep moving the hold.
    const move = fc.record({ who: fc.constantFrom(...keys), kind: fc.constantFrom('turn', 'turn', 'ack', 'withdraw', 'release'), via, delayMs: delay, resend: fc.option(via, { nil: undefined }) });
    await fc.assert(
      fc.asyncProperty(fc.array(move, { minLength: 2, maxLength: 7 }), async (moves) => {
        const before = await settled();
        const attempts: Attempt[] = [];
        moves.forEach((m, i) => {
          // The acting supervisor's release would end the hold for the runs after; here only the second supervisor tries (and is refused).
          const who = m.kind === 'release' ? 'S2' : m.who;
          const kind = m.kind === 'turn' ? (groundHold(before.board).acknowledgments.some((a) => a.userId === people[who].user.id) ? 'withdraw' : 'ack') : m.kind;
          const command: CommandBody = kind === 'release' ? { type: 'hold.release', holdId: 'er-ground.hold' } : { type: kind === 'ack' ? 'hold.acknowledge' : 'hold.withdraw', holdId: 'er-ground.hold', role: roleOf[who] };
          const first: Attempt = { label: `#${i} ${who} ${command.type} via ${m.via}`, who, via: m.via, delayMs: m.delayMs, commandId: randomUUID(), command };
          attempts.push(first);
          // The same command id again on another transport at once (always for the first move): applied once.
          const again = i === 0 ? (m.via === 'http' ? 'socket' : 'http') : m.resend;
          if (again && again !== m.via) attempts.push({ ...first, label: `${first.label}, again via ${again}`, via: again, delayMs: 0 });
        });
        const sent = await race(jobId, attempts);
        const after = await checkLog(jobId, before.seq);
        const model = linearize(holdModelOf(before.board, 'er-ground'), decideHold(required), sent, after.log);
        expectHoldAsModel(after.board, 'er-ground', model, required);
      }),
      runs(6),
    );
  }, 90_000);

  it('the acting supervisor releasing from three places and the second supervisor from two: exactly one release, the rest refused with a reason', async () => {
    const required: CrewRole[] = ['supervisor', 'operator', 'signaller'];
    // Whatever the runs above left: every required role acknowledged, one person each.
    const left = holdModelOf(await boardNow(jobId), 'er-ground');
    for (const role of required) {
      if (left.acks.some((a) => a.role === role)) continue;
      const who = (['S1', 'O', 'G'] as const).find((k) => roleOf[k] === role)!;
      await must(jobId, who, { type: 'hold.acknowledge', holdId: 'er-ground.hold', role });
    }
    const before = await settled();
    const release: CommandBody = { type: 'hold.release', holdId: 'er-ground.hold' };
    const twice = randomUUID();
    const attempts: Attempt[] = [
      ...(['socket', 'socket2', 'http'] as const).map((v, i) => ({ label: `S1 release via ${v}`, who: 'S1' as const, via: v, delayMs: i % 2, commandId: randomUUID(), command: release })),
      { label: 'S1 release (one id) via http', who: 'S1', via: 'http', delayMs: 0, commandId: twice, command: release },
      { label: 'S1 release (one id) via socket', who: 'S1', via: 'socket', delayMs: 0, commandId: twice, command: release },
      ...(['socket', 'http'] as const).map((v) => ({ label: `S2 release via ${v}`, who: 'S2' as const, via: v, delayMs: 0, commandId: randomUUID(), command: release })),
    ];
    const sent = await race(jobId, attempts);
    const after = await checkLog(jobId, before.seq);
    const model = linearize(holdModelOf(before.board, 'er-ground'), decideHold(required), sent, after.log);
    expectHoldAsModel(after.board, 'er-ground', model, required);
    expect(after.log.map((e) => e.type)).toEqual(['hold.released']);
    expect(model.releasedBy).toBe('S1');
    for (const a of sent.filter((x) => x.who === 'S2')) expect(a.answer, a.label).toMatchObject({ ok: false, code: 'not_acting_supervisor' });
    for (const a of sent.filter((x) => x.who === 'S1' && !x.answer.ok)) {
      expect(a.answer, a.label).toMatchObject({ code: ALREADY_RELEASED });
      expect((a.answer as { message: string }).message, a.label).toContain(`is already released by ${people.S1.user.displayName} at `);
    }
    expect(after.board.stages.find((s) => s.id === 'er-upper')!.state).toBe('active');
  }, 30_000);

  it('completions of the same step and of steps that wait for each other, at once, end as some order of them would', async () => {
    const stage = (await boardNow(jobId)).stages.find((s) => s.id === 'er-upper')!;
    expect(stage.state).toBe('active');
    // People who may do a step, by role; either supervisor for a supervisor's step.
    const peopleFor = (roles: readonly CrewRole[]): Key[] => keys.filter((k) => roles.includes(roleOf[k]));
    // Mostly steps whose predecessors are done (as the stage stood before the race), some that still wait.
    const move = fc.record({ pick: fc.nat(), ready: fc.constantFrom(true, true, false), person: fc.nat(), via, delayMs: delay, twin: fc.boolean() });
    await fc.assert(
      fc.asyncProperty(fc.array(move, { minLength: 2, maxLength: 6 }), delay, async (moves, joinDelayMs) => {
        const before = await settled();
        const now = before.board.stages.find((s) => s.id === 'er-upper')!;
        const open = now.steps.filter((st) => st.state !== 'done');
        const ready = open.filter((st) => (st.after ?? []).every((id) => now.steps.find((x) => x.id === id)?.state === 'done'));
        const attempts: Attempt[] = [];
        moves.forEach((m, i) => {
          // Steps not yet done, whether or not the steps they wait for are: out of order is a refusal to see too.
          const from = m.ready && ready.length ? ready : open.length ? open : now.steps;
          const step = from[m.pick % from.length];
          const who = peopleFor(step.allowedRoles);
          const command: CommandBody = { type: 'step.complete', stepId: step.id, ...(step.records?.kind === 'reading' ? { value: readingWithinLimit(step) } : {}) };
          const first: Attempt = { label: `#${i} ${who[m.person % who.length]} completes ${step.id} via ${m.via}`, who: who[m.person % who.length], via: m.via, delayMs: m.delayMs, commandId: randomUUID(), command };
          attempts.push(first);
          // The same step at once by someone else allowed (or the same person on another transport), with its own command id.
          if (m.twin) {
            const other = who[(m.person + 1) % who.length];
            const otherVia: Via = other === first.who ? (m.via === 'http' ? 'socket2' : 'http') : m.via;
            attempts.push({ ...first, label: `#${i}' ${other} completes ${step.id} via ${otherVia}`, who: other, via: otherVia, delayMs: 0, commandId: randomUUID() });
          }
        });
        // Someone opens the board in the middle of it, from the last seq they had: the events they are
        // sent and the ones broadcast after their join leave no gap (a seq in both is dropped by seq).
        const joiner = new BoardClient(server.url, people.G.token);
        const joining = sleep(joinDelayMs).then(() => joiner.join(jobId, before.seq));
        const sent = await race(jobId, attempts);
        const joined = await joining;
        const after = await checkLog(jobId, before.seq);
        expect(joined).toMatchObject({ ok: true, mode: 'events' });
        if (joined.ok && joined.mode === 'events') {
          if (joined.seq < checked!.seq) await joiner.waitForSeq(checked!.seq);
          const seen = new Set([...joined.events, ...joiner.events.filter((e) => e.jobId === jobId)].map((e) => e.seq));
          expect([...seen].sort((x, y) => x - y)).toEqual(after.log.map((e) => e.seq));
        }
        joiner.close();
        const initial: StepModel = { done: Object.fromEntries(now.steps.filter((st) => st.doneBy).map((st) => [st.id, keyOf(st.doneBy!.userId)])) };
        const model = linearize(initial, decideStep(now), sent, after.log);
        const upper = after.board.stages.find((s) => s.id === 'er-upper')!;
        for (const st of upper.steps) expect(st.doneBy?.userId ?? null, st.id).toBe(model.done[st.id] ? people[model.done[st.id]].user.id : null);
        expect(upper.state).toBe(upper.steps.every((st) => model.done[st.id]) ? 'holding' : 'active');
      }),
      runs(6),
    );
  }, 90_000);

  it('an operator acknowledging while the supervisor takes them off the crew: their acknowledgment never stands after the change', async () => {
    // The rest of the stage, one step at a time; its hold is for the operator and the rigger.
    await completeSteps(server, crew, jobId, 'er-upper');
    const required = ((await boardNow(jobId)).stages.find((s) => s.id === 'er-upper')!.hold!.requiredRoles as CrewRole[]).slice().sort();
    expect(required).toEqual(['operator', 'rigger']);
    const before = await settled();
    const ack = (who: Key): CommandBody => ({ type: 'hold.acknowledge', holdId: 'er-upper.hold', role: roleOf[who] });
    const attempts: Attempt[] = [
      { label: 'O acknowledges via socket', who: 'O', via: 'socket', delayMs: 0, commandId: randomUUID(), command: ack('O') },
      { label: 'S1 puts O2 on the crew in place of O', who: 'S1', via: 'http', delayMs: 1, commandId: randomUUID(), command: { type: 'crew.set', members: ['S1', 'S2', 'O2', 'G', 'R'] } },
      { label: 'O acknowledges via http', who: 'O', via: 'http', delayMs: 2, commandId: randomUUID(), command: ack('O') },
      { label: 'R acknowledges via socket', who: 'R', via: 'socket2', delayMs: 1, commandId: randomUUID(), command: ack('R') },
    ];
    const sent = await race(jobId, attempts);
    offBoard.add('O');
    const after = await checkLog(jobId, before.seq);
    const model = linearize(holdModelOf(before.board, 'er-upper'), decideHold(required), sent, after.log);
    expectHoldAsModel(after.board, 'er-upper', model, required);
    expect(model.offCrew).toContain('O');
    expect(after.board.stages.find((s) => s.id === 'er-upper')!.hold!.acknowledgments.map((a) => a.userId)).not.toContain(people.O.user.id);
    expect(after.board.crew.map((m) => m.userId)).not.toContain(people.O.user.id);
  }, 60_000);

  it('the acting supervisor, the second supervisor, an administrator naming the second acting and a signaller pressing stop, all at once: at most one release, by whoever was acting then, never after the stop', async () => {
    // The hold acknowledged by whoever holds its roles now: O2, briefed first, in place of O.
    await must(jobId, 'O2', { type: 'briefing.acknowledge' });
    const standing = holdModelOf(await boardNow(jobId), 'er-upper');
    const required: CrewRole[] = ['operator', 'rigger'];
    if (!standing.acks.some((a) => a.role === 'operator')) await must(jobId, 'O2', { type: 'hold.acknowledge', holdId: 'er-upper.hold', role: 'operator' });
    if (!standing.acks.some((a) => a.role === 'rigger')) await must(jobId, 'R', { type: 'hold.acknowledge', holdId: 'er-upper.hold', role: 'rigger' });
    const before = await settled();
    const release: CommandBody = { type: 'hold.release', holdId: 'er-upper.hold' };
    const attempts: Attempt[] = [
      { label: 'S1 release via socket', who: 'S1', via: 'socket', delayMs: 1, commandId: randomUUID(), command: release },
      { label: 'admin names S2 acting', who: 'admin', via: 'http', delayMs: 0, commandId: randomUUID(), command: { type: 'acting.transfer', to: 'S2' } },
      { label: 'S2 release via http', who: 'S2', via: 'http', delayMs: 2, commandId: randomUUID(), command: release },
      { label: 'S2 release via socket', who: 'S2', via: 'socket', delayMs: 3, commandId: randomUUID(), command: release },
      { label: 'S1 release via http', who: 'S1', via: 'http', delayMs: 0, commandId: randomUUID(), command: release },
      { label: 'G presses stop via socket', who: 'G', via: 'socket', delayMs: 2, commandId: randomUUID(), command: { type: 'job.stop', pressedAt: new Date().toISOString(), reason: 'Someone walked under the boom' } },
    ];
    const sent = await race(jobId, attempts);
    const after = await checkLog(jobId, before.seq);
    const model = linearize(holdModelOf(before.board, 'er-upper'), decideHold(required), sent, after.log);
    expectHoldAsModel(after.board, 'er-upper', model, required);
    expect(model.acting).toBe('S2');
    const releases = after.log.filter((e) => e.type === 'hold.released');
    expect(releases.length).toBeLessThanOrEqual(1);
    const stop = after.log.find((e) => e.type === 'job.stopped')!;
    for (const released of releases) expect(released.seq).toBeLessThan(stop.seq);
    expect(after.board.job.state).toBe('stopped');
  }, 60_000);

  it('a reader racing a write that fails never sees what the write did not commit', async () => {
    const { seq: lastSeq, board } = await settled();
    // The race above left the job stopped: the failing write would have resumed it.
    expect(board.job.state).toBe('stopped');
    let fail!: () => void;
    const failing = new Promise<void>((resolve) => (fail = resolve));
    // A write that appends an event and moves the job row, as the command writer does, and then fails
    // before its commit (as a full disk or an I/O error makes it).
    const write = server.context.queue
      .transaction(async (manager) => {
        const last = await manager.findOneByOrFail(JobEvent, { jobId, seq: lastSeq });
        const { id: _id, ...fields } = last;
        await manager.save(JobEvent, manager.create(JobEvent, { ...fields, seq: lastSeq + 1, commandId: randomUUID() }));
        const job = await manager.findOneByOrFail(Job, { id: jobId });
        await manager.save(Job, { ...job, lastSeq: lastSeq + 1, state: 'live' });
        await failing;
        throw new Error('the disk is full');
      })
      .catch((error: Error) => error.message);
    await sleep(20);
    // Readers that arrive while it is open: the log, the job, the list of jobs.
    const reads = [
      api(people.S1, 'GET', `/jobs/${jobId}/events?after=${lastSeq}`),
      api(people.S1, 'GET', `/jobs/${jobId}`),
      api(people.S1, 'GET', '/jobs'),
    ];
    await sleep(150);
    fail();
    expect(await write).toBe('the disk is full');
    const [events, job, list] = await Promise.all(reads);
    expect(events.body).toMatchObject({ items: [], lastSeq });
    expect(job.body).toMatchObject({ job: { id: jobId, state: 'stopped' } });
    expect((list.body.items as { id: string; state: string }[]).find((j) => j.id === jobId)).toMatchObject({ state: 'stopped' });
    await checkLog(jobId, 0);
  });

  it('one command id sent with two different commands at once: one is applied, the other refused as a reused id', async () => {
    const before = await settled();
    const commandId = randomUUID();
    // Two readings (a stopped job still takes them), one id: as a client bug or a replay with an edited body would send.
    const attempts: Attempt[] = [
      { label: 'R reads 3/5 m/s via socket', who: 'R', via: 'socket', delayMs: 0, commandId, command: calmWeather },
      { label: 'R reads 4/6 m/s via http', who: 'R', via: 'http', delayMs: 0, commandId, command: { ...calmWeather, meanMs: 4, gustMs: 6 } },
      { label: 'G reads 3/5 m/s via socket, its own id', who: 'G', via: 'socket2', delayMs: 1, commandId: randomUUID(), command: calmWeather },
    ];
    const sent = await race(jobId, attempts);
    const after = await checkLog(jobId, before.seq);
    expect(after.log.map((e) => e.type)).toEqual(['weather.recorded', 'weather.recorded']);
    const mine = sent.filter((a) => a.commandId === commandId);
    expect(mine.map((a) => (a.answer.ok ? 'ok' : a.answer.code)).sort()).toEqual(['command_id_reused', 'ok']);
    const applied = mine.find((a) => a.answer.ok)!;
    const event = after.log.find((e) => e.commandId === commandId)!;
    expect(event.byUserId).toBe(people.R.user.id);
    expect((event.data as { reading: { meanMs: number } }).reading.meanMs).toBe((applied.command as { meanMs: number }).meanMs);
  });

  it('a stop pressed again at the moment the supervisor resumes: the press is never lost, the job ends stopped either way', async () => {
    const before = await settled();
    expect(before.board.job.state).toBe('stopped');
    expect(before.board.job.stop?.reason).toBeTruthy();
    // Pressed long enough ago to have been seen: the resume would be accepted on its own.
    server.advance(RESUME_AFTER_PRESS_MS);
    await must(jobId, 'R', calmWeather);
    const start = await settled();
    const attempts: Attempt[] = [
      { label: 'S2 resumes via socket', who: 'S2', via: 'socket', delayMs: 1, commandId: randomUUID(), command: { type: 'job.resume', reason: 'Wind eased and the area is clear' } },
      { label: 'R presses stop via http', who: 'R', via: 'http', delayMs: 0, commandId: randomUUID(), command: { type: 'job.stop', pressedAt: new Date().toISOString(), reason: 'A sling caught on the lattice' } },
    ];
    const sent = await race(jobId, attempts);
    const after = await checkLog(jobId, start.seq);
    // Stopped with the cause recorded; a press while stopped is "pressed again" and blocks a resume for a while.
    type StopModel = { stopped: boolean; pressedAgain: boolean };
    const decide = (m: StopModel, a: Attempt): Decision<StopModel> => {
      if (a.command.type === 'job.stop') return { ok: true, next: { stopped: true, pressedAgain: m.stopped } };
      if (a.command.type !== 'job.resume') throw new Error(`no stop rule for ${a.command.type}`);
      if (!m.stopped) return no('invalid_state');
      if (m.pressedAgain) return no('stop_pressed_again');
      return { ok: true, next: { stopped: false, pressedAgain: false } };
    };
    const model = linearize({ stopped: true, pressedAgain: false }, decide, sent, after.log);
    expect(model.stopped).toBe(true);
    expect(after.board.job.state).toBe('stopped');
    const press = after.log.find((e) => e.type === 'job.stopped')!;
    expect(press).toBeDefined();
    const resumed = after.log.find((e) => e.type === 'job.resumed');
    if (resumed) expect(resumed.seq).toBeLessThan(press.seq);
    else expect(sent[0].answer).toMatchObject({ ok: false, code: 'stop_pressed_again', message: expect.stringMatching(new RegExp(`^${people.R.user.displayName} pressed stop again \\d+ seconds? ago \\(“A sling caught on the lattice”\\)\\.`)) });
  });
});
