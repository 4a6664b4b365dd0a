import { randomUUID } from 'node:crypto';
import sharp from 'sharp';
import { io as connect, type Socket } from 'socket.io-client';
import request from 'supertest';
import { holdGatesBoomMovement, holdGatesCraneMovement, stepNeedsFreshWeather, weatherVerdict } from '../../shared/board/rules.js';
import type { BoardState, BoardStep } from '../../shared/board/types.js';
import type { ClientToServerEvents, CommandAnswer, JoinAnswer, ServerToClientEvents } from '../../shared/events/socket.js';
import type { BoardCommand } from '../../shared/schemas/commands.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { JobEventDto } from '../../shared/events/log.js';
import { Component } from '../../server/entities/Component.js';
import { signedInUser, type SignedInUser } from './auth.js';
import { addParts18m, seedModelAndUnit } from './fleet.js';
import { plannedJob } from './jobs.js';
import type { TestServer } from './server.js';

type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;
/** A command without its id; the helpers add a fresh UUID. */
export type CommandBody = DistributiveOmit<BoardCommand, 'commandId'>;

/** A real Socket.IO client on a board, recording every event and tick it receives. */
export class BoardClient {
  readonly socket: Socket<ServerToClientEvents, ClientToServerEvents>;
  readonly events: JobEventDto[] = [];
  readonly ticks: { seq: number; at: string }[] = [];

  constructor(url: string, token: string) {
    this.socket = connect(url, { transports: ['websocket'], auth: { token }, reconnection: false, forceNew: true });
    this.socket.on('board:event', (e) => this.events.push(e));
    this.socket.on('board:tick', (t) => this.ticks.push(t));
  }

  connected(): Promise<void> {
    if (this.socket.connected) return Promise.resolve();
    return new Promise((resolve, reject) => {
      this.socket.once('connect', () => resolve());
      this.socket.once('connect_error', reject);
    });
  }

  async join(jobId: string, afterSeq?: number): Promise<JoinAnswer> {
    await this.connected();
    return this.socket.emitWithAck('board:join', afterSeq === undefined ? { jobId } : { jobId, afterSeq });
  }

  command(jobId: string, command: CommandBody, commandId = randomUUID()): Promise<CommandAnswer> {
    return this.socket.emitWithAck('board:command', { jobId, command: { ...command, commandId } as BoardCommand });
  }

  /** Waits until an event with this seq has arrived. */
  async waitForSeq(seq: number, timeoutMs = 5000): Promise<void> {
    const until = Date.now() + timeoutMs;
    while (!this.events.some((e) => e.seq >= seq)) {
      if (Date.now() > until) throw new Error(`no event ${seq}; have ${this.events.map((e) => e.seq).join(',')}`);
      await new Promise((r) => setTimeout(r, 10));
    }
  }

  close(): void {
    this.socket.close();
  }
}

/**
 * Sends a command over HTTP (the same command path) and returns the answer body and status. A test
 * walking a whole plan as one person sends faster than anyone by hand: a refusal for the person's
 * command rate is sent again with the same id after a tenth of a second (a twentieth refills the
 * bucket), as the board resends a kept stop. The rate itself is tested in tests/server/hostile/.
 */
export async function httpCommand(server: TestServer, who: SignedInUser, jobId: string, command: CommandBody, commandId = randomUUID()) {
  for (;;) {
    const res = await request(server.app).post(`/api/jobs/${jobId}/commands`).set('Authorization', `Bearer ${who.token}`).send({ ...command, commandId });
    const body = res.body as { ok?: boolean; seq?: number; error?: { code: string; message: string; fields?: { path: string }[] } };
    if (res.status === 429 && body.error?.code === 'too_many_commands') {
      await new Promise((resolve) => setTimeout(resolve, 100));
      continue;
    }
    return { status: res.status, body };
  }
}

/** Uploads a small generated photo and returns its id. */
export async function uploadPhoto(server: TestServer, who: SignedInUser): Promise<string> {
  const png = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#557799' } }).png().toBuffer();
  const res = await request(server.app).post('/api/uploads').set('Authorization', `Bearer ${who.token}`).attach('file', png, 'photo.png').expect(201);
  return res.body.id as string;
}

/** The board as the server holds it now. */
export async function boardOf(server: TestServer, who: SignedInUser, jobId: string): Promise<BoardState & { presence: unknown[] }> {
  return (await request(server.app).get(`/api/jobs/${jobId}/board`).set('Authorization', `Bearer ${who.token}`).expect(200)).body;
}

export type CrewByRole = Record<Exclude<CrewRole, 'viewer'>, SignedInUser>;

/** A calm weather reading at 10 m, well inside the test crane's limits (18 m boom: gust 13 m/s, mean 9 m/s). */
export const calmWeather = { type: 'weather.record', meanMs: 3, gustMs: 5, heightM: 10 } as const;

/**
 * Records a calm reading, on an old or missing one, when the next step or release needs a fresh
 * one: every step of a raise or lowering, the first step of a stage that moves the crane, and the
 * release of a hold that lets either start. The same rule the server applies (shared/board/rules.ts)
 * and the demo driver follows (server/demo/board-driver.ts).
 */
export async function weatherIfNeeded(server: TestServer, crew: CrewByRole, jobId: string, stageId: string, forRelease: boolean): Promise<void> {
  const board = await boardOf(server, crew.supervisor, jobId);
  const stage = board.stages.find((s) => s.id === stageId)!;
  const phase = forRelease ? (holdGatesBoomMovement(board, stageId) ? 'raising' : holdGatesCraneMovement(board, stageId) ? 'current' : null) : stepNeedsFreshWeather(stage);
  if (!phase || weatherVerdict(board, server.context.now().getTime(), phase === 'raising' ? 'raising' : undefined).fresh) return;
  const answer = await httpCommand(server, crew.rigger, jobId, calmWeather);
  if (answer.status !== 200) throw new Error(`weather: ${JSON.stringify(answer.body)}`);
}

/** A reading within what the step is held to: the plan's figure, the limit, or a calm gust; '5' when it compares nothing. */
export function readingWithinLimit(step: BoardStep): string {
  const check = step.records?.check;
  if (check?.kind === 'plan') return String(check.planned);
  if (check?.kind === 'max' || check?.kind === 'min') return String(check.limit);
  return '5';
}

/** The open steps of a stage in an order that respects each step's `after`. */
export function inStepOrder(steps: readonly BoardStep[]): BoardStep[] {
  const open = steps.filter((s) => s.state === 'open');
  const done = new Set(steps.filter((s) => s.state === 'done').map((s) => s.id));
  const ordered: BoardStep[] = [];
  while (ordered.length < open.length) {
    const next = open.find((s) => !ordered.includes(s) && (s.after ?? []).every((id) => done.has(id) || !open.some((o) => o.id === id)));
    if (!next) throw new Error('steps wait for each other');
    ordered.push(next);
    done.add(next.id);
  }
  return ordered;
}

/** Completes every open step of a stage with a person allowed to, in step order, adding the photos and values within limit it asks for. */
export async function completeSteps(server: TestServer, crew: CrewByRole, jobId: string, stageId: string): Promise<void> {
  const board = await boardOf(server, crew.supervisor, jobId);
  const stage = board.stages.find((s) => s.id === stageId)!;
  for (const step of inStepOrder(stage.steps)) {
    await weatherIfNeeded(server, crew, jobId, stageId, false);
    const role = step.allowedRoles.find((r) => r !== 'viewer') as keyof CrewByRole;
    const who = crew[role];
    let value: string | undefined;
    if (step.records?.kind === 'reading') value = readingWithinLimit(step);
    if (step.records?.kind === 'serial') {
      value = step.records.plannedSerial ?? undefined;
      if (!value) {
        const c = await server.context.dataSource.manager.findOneBy(Component, { typeId: step.records.typeId ?? '', status: 'serviceable' });
        value = c?.serial;
      }
    }
    const photoId = step.requiresPhoto ? await uploadPhoto(server, who) : undefined;
    const answer = await httpCommand(server, who, jobId, { type: 'step.complete', stepId: step.id, ...(value ? { value } : {}), ...(photoId ? { photoId } : {}) });
    if (answer.status !== 200) throw new Error(`step ${step.id}: ${JSON.stringify(answer.body)}`);
  }
}

/** The values the configuration-entry hold expects for the 18 m test configuration. */
export const controllerValues18m = { boomLengthM: '18', hookBlockId: 'HB120', parts: '6', counterweightT: '65', operatingMode: 'lifting' };

/** Who acknowledges a job's final sign-off as its qualified inspector (marked `canInspect`), in which of their crew roles. */
export interface SignOffInspector {
  who: SignedInUser;
  role: CrewRole;
}

/**
 * Acknowledges a stage's open hold with each required role, by different people, then releases it.
 * A sign-off hold also needs `inspector`; without one the helper throws before sending anything.
 */
export async function acknowledgeAndRelease(server: TestServer, crew: CrewByRole, jobId: string, stageId: string, inspector?: SignOffInspector): Promise<void> {
  const board = await boardOf(server, crew.supervisor, jobId);
  const hold = board.stages.find((s) => s.id === stageId)!.hold;
  if (!hold) return;
  // Before anything is sent, so the board is left as it was.
  if (hold.signOff && !inspector) throw new Error(`${hold.id} is the job's final sign-off: pass a qualified inspector`);
  for (const role of hold.requiredRoles) {
    const who = crew[role as keyof CrewByRole];
    const extra = hold.valueCheck ? { values: controllerValues18m, photoId: await uploadPhoto(server, who) } : {};
    const answer = await httpCommand(server, who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role, ...extra });
    if (answer.status !== 200) throw new Error(`ack ${hold.id} as ${role}: ${JSON.stringify(answer.body)}`);
  }
  if (hold.signOff && inspector) {
    const answer = await httpCommand(server, inspector.who, jobId, { type: 'hold.acknowledge', holdId: hold.id, role: inspector.role, asInspector: true });
    if (answer.status !== 200) throw new Error(`ack ${hold.id} as inspector: ${JSON.stringify(answer.body)}`);
  }
  await weatherIfNeeded(server, crew, jobId, stageId, true);
  const released = await httpCommand(server, crew.supervisor, jobId, { type: 'hold.release', holdId: hold.id });
  if (released.status !== 200) throw new Error(`release ${hold.id}: ${JSON.stringify(released.body)}`);
}

/** Works the board forward, stage by stage in plan order, until `target` is active (or everything is done, the sign-off by `inspector`). */
export async function advanceUntilActive(server: TestServer, crew: CrewByRole, jobId: string, target?: string, inspector?: SignOffInspector): Promise<void> {
  for (let guard = 0; guard < 100; guard++) {
    const board = await boardOf(server, crew.supervisor, jobId);
    if (target && board.stages.find((s) => s.id === target)?.state === 'active') return;
    const next = board.stages.find((s) => s.state === 'active' || s.state === 'holding');
    if (!next) return;
    if (next.state === 'active') await completeSteps(server, crew, jobId, next.id);
    else await acknowledgeAndRelease(server, crew, jobId, next.id, inspector);
  }
  throw new Error('board did not settle');
}

/** A signed-in person for each working crew role, each qualified for that role only. */
export async function signedInCrew(server: TestServer): Promise<CrewByRole> {
  return {
    supervisor: await signedInUser(server, { qualifications: ['supervisor'] }),
    operator: await signedInUser(server, { qualifications: ['operator'] }),
    signaller: await signedInUser(server, { qualifications: ['signaller'] }),
    rigger: await signedInUser(server, { qualifications: ['rigger'] }),
  };
}

/** Everyone in the crew acknowledges the briefing for the current plan version. */
export async function briefEveryone(server: TestServer, crew: CrewByRole, jobId: string): Promise<void> {
  for (const who of Object.values(crew)) {
    const answer = await httpCommand(server, who, jobId, { type: 'briefing.acknowledge' });
    if (answer.status !== 200 && answer.body.error?.code !== 'already_briefed') throw new Error(JSON.stringify(answer.body));
  }
}

/** A started job on an 18 m boom with its whole crew briefed: where most board tests begin. */
export async function startedJob(server: TestServer): Promise<{ crew: CrewByRole; jobId: string }> {
  const crew = await signedInCrew(server);
  const admin = await signedInUser(server, { isAdmin: true, qualifications: [] });
  const { model, unit } = await seedModelAndUnit(server, admin.token);
  await addParts18m(server, admin.token, model.id, unit.id, 'F');
  const jobId = (await plannedJob(server, crew, unit.id)).id;
  await request(server.app).post(`/api/jobs/${jobId}/ready`).set('Authorization', `Bearer ${crew.supervisor.token}`).expect(200);
  await httpCommand(server, crew.supervisor, jobId, { type: 'job.start' });
  await briefEveryone(server, crew, jobId);
  return { crew, jobId };
}
