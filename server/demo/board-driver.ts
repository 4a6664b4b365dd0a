import { randomUUID } from 'node:crypto';
import { committedJobs } from '../db/committed-jobs.js';
import { holdGatesBoomMovement, holdGatesCraneMovement, stepNeedsFreshWeather, weatherVerdict } from '../../shared/board/rules.js';
import type { BoardStep } from '../../shared/board/types.js';
import type { BoardCommand } from '../../shared/schemas/commands.js';
import type { CrewRole } from '../../shared/schemas/jobs.js';
import type { ValueCheckField } from '../../shared/schemas/plan.js';
import type { AppContext } from '../context.js';
import { runBoardCommand } from '../commands/board.js';
import { storeUpload } from '../commands/uploads.js';
import { Component } from '../entities/Component.js';
import { JobPlan } from '../entities/JobPlan.js';
import type { User } from '../entities/User.js';
import { demoPhoto } from './photos.js';

type DistributiveOmit<T, K extends PropertyKey> = T extends unknown ? Omit<T, K> : never;

/**
 * Works a demo job's board forward with the same commands a crew sends, so its log is genuine:
 * each step by someone allowed to, with the photo or serial it asks for; each hold acknowledged by
 * different people and released by the supervisor (`crew.supervisor`: the acting supervisor, so a
 * job over two shifts uses one driver per shift).
 */
export class DemoBoardDriver {
  private freshWeather: { who: User; reading: { meanMs: number; gustMs: number; heightM: number } } | null = null;

  constructor(
    private readonly context: AppContext,
    private readonly jobId: string,
    private readonly crew: Partial<Record<CrewRole, User>>,
    /** Who signs off the job's final inspection, in which of their crew roles. */
    private readonly inspector: { who: User; role: CrewRole } | null = null,
  ) {}

  async send(who: User, command: DistributiveOmit<BoardCommand, 'commandId'>): Promise<void> {
    await runBoardCommand(this.context, who, this.jobId, { ...command, commandId: randomUUID() } as BoardCommand);
  }

  /** Who reads the wind again, and what they read, whenever the boom is about to move on an old reading. */
  weatherBy(who: User, reading: { meanMs: number; gustMs: number; heightM: number }): void {
    this.freshWeather = { who, reading };
  }

  /**
   * Records the fresh reading a raise or lowering, the first step of a stage that moves the crane,
   * or the hold before either needs, when the last one is too old: by whoever `weatherBy` named,
   * else the crew's signaller (or supervisor) with a calm reading.
   */
  private async weatherIfNeeded(stageId: string, forRelease: boolean): Promise<void> {
    const { board } = await this.board();
    const stage = board.stages.find((s) => s.id === stageId)!;
    const phase = forRelease ? (holdGatesBoomMovement(board, stageId) ? 'raising' : holdGatesCraneMovement(board, stageId) ? 'current' : null) : stepNeedsFreshWeather(stage);
    if (!phase || weatherVerdict(board, this.context.now().getTime(), phase === 'raising' ? 'raising' : undefined).fresh) return;
    const reader = this.freshWeather ?? { who: (this.crew.signaller ?? this.crew.supervisor)!, reading: { meanMs: 4, gustMs: 7, heightM: 10 } };
    await this.send(reader.who, { type: 'weather.record', ...reader.reading });
  }

  /** A value within what the step is held to: the plan's figure, the limit, or the last wind gust. */
  private readingFor(step: BoardStep, gustMs: number | null): string {
    const check = step.records?.check;
    if (check?.kind === 'plan') return String(check.planned);
    if (check?.kind === 'max' || check?.kind === 'min') return String(check.limit);
    if (check?.kind === 'wind' || step.records?.unit === 'm/s') return String(gustMs ?? 4.5);
    return 'checked';
  }

  private async board() {
    const job = committedJobs(this.context.dataSource).read(this.jobId)!;
    return { job, board: job.board! };
  }

  private async photo(who: User, caption: string): Promise<string> {
    return (await storeUpload(this.context, who, { buffer: await demoPhoto(caption, 'weld') })).id;
  }

  /**
   * Completes the open steps of a stage (only the first `count` of them, in order, when given),
   * leaving open the steps named in `except` (for a person to do on screen).
   */
  async completeSteps(stageId: string, count?: number, except: readonly string[] = []): Promise<void> {
    const { board } = await this.board();
    const stage = board.stages.find((s) => s.id === stageId)!;
    // Steps in the order the plan asks for: a step waits for the steps it comes after.
    const open = stage.steps.filter((s) => s.state === 'open' && !except.includes(s.id));
    const done = new Set(stage.steps.filter((s) => s.state === 'done').map((s) => s.id));
    const ordered: BoardStep[] = [];
    while (ordered.length < open.length) {
      const next = open.find((s) => !ordered.includes(s) && (s.after ?? []).every((id) => done.has(id) || !open.some((o) => o.id === id)));
      if (!next) throw new Error(`demo: steps of ${stageId} wait for each other`);
      ordered.push(next);
      done.add(next.id);
    }
    for (const step of ordered.slice(0, count ?? ordered.length)) {
      // Every step of a raise or lowering, and the start of a stage that moves the crane, needs a fresh reading.
      await this.weatherIfNeeded(stageId, false);
      const role = step.allowedRoles.find((r) => this.crew[r])!;
      const who = this.crew[role]!;
      let value: string | undefined;
      if (step.records?.kind === 'reading') value = this.readingFor(step, board.weather?.gustMs ?? null);
      if (step.records?.kind === 'serial') {
        value = step.records.plannedSerial ?? (await this.context.dataSource.manager.findOneBy(Component, { typeId: step.records.typeId ?? '', status: 'serviceable' }))?.serial;
      }
      const photoId = step.requiresPhoto ? await this.photo(who, step.text.slice(0, 40)) : undefined;
      await this.send(who, { type: 'step.complete', stepId: step.id, ...(value ? { value } : {}), ...(photoId ? { photoId } : {}) });
    }
  }

  /** Acknowledges a stage's hold with the given roles (all required roles by default). */
  async acknowledge(stageId: string, roles?: CrewRole[]): Promise<void> {
    const { job, board } = await this.board();
    const hold = board.stages.find((s) => s.id === stageId)!.hold!;
    const plan = await this.context.dataSource.manager.findOneByOrFail(JobPlan, { jobId: job.id, version: job.planVersion });
    const expected = plan.plan.stages.find((s) => s.id === stageId)?.hold?.valueCheck?.fields ?? [];
    for (const role of roles ?? hold.requiredRoles) {
      const who = this.crew[role]!;
      const extra = hold.valueCheck ? { values: Object.fromEntries(expected.map((f) => [f.field, f.expected])) as Record<ValueCheckField, string>, photoId: await this.photo(who, 'Controller screen') } : {};
      await this.send(who, { type: 'hold.acknowledge', holdId: hold.id, role, ...extra });
    }
    if (hold.signOff && !roles) {
      if (!this.inspector) throw new Error(`demo: ${stageId} needs an inspector`);
      await this.send(this.inspector.who, { type: 'hold.acknowledge', holdId: hold.id, role: this.inspector.role, asInspector: true });
    }
  }

  async release(stageId: string): Promise<void> {
    await this.weatherIfNeeded(stageId, true);
    const { board } = await this.board();
    await this.send(this.crew.supervisor!, { type: 'hold.release', holdId: board.stages.find((s) => s.id === stageId)!.hold!.id });
  }

  /**
   * Ends the shift as the crew's (acting) supervisor and ticks the make-safe checklist: each item
   * by the first of its roles the crew has, with the note `notes[itemId]` where the item asks for one.
   */
  async makeSafe(notes: Record<string, string>): Promise<void> {
    await this.send(this.crew.supervisor!, { type: 'shift.end' });
    const { board } = await this.board();
    for (const item of board.shift!.makeSafe!.items) {
      const role = item.roles.find((r) => this.crew[r]);
      if (!role) throw new Error(`demo: nobody in the crew for make-safe item ${item.id}`);
      if (item.asksNote && !notes[item.id]) throw new Error(`demo: make-safe item ${item.id} asks for a note`);
      await this.send(this.crew[role]!, { type: 'shift.item.done', itemId: item.id, ...(item.asksNote ? { note: notes[item.id] } : {}) });
    }
  }

  /**
   * The start of the next shift on a made-safe job, with the crew's supervisor as the incoming
   * acting supervisor: they acknowledge the handover note, everyone in `briefed` acknowledges the
   * briefing for the new shift, the competent person records the shift inspection, the operator
   * and the supervisor acknowledge the start-of-shift hold, `reader` records a fresh reading and
   * the supervisor starts the shift.
   */
  async startShift(start: {
    briefed: User[];
    inspector: User;
    inspectionNote: string;
    reader: User;
    reading: { meanMs: number; gustMs: number; heightM: number };
  }): Promise<void> {
    const supervisor = this.crew.supervisor!;
    await this.send(supervisor, { type: 'handover.acknowledge' });
    for (const who of start.briefed) await this.send(who, { type: 'briefing.acknowledge' });
    await this.send(start.inspector, { type: 'shift.inspect', note: start.inspectionNote });
    await this.send(this.crew.operator!, { type: 'shift.acknowledge', role: 'operator' });
    await this.send(supervisor, { type: 'shift.acknowledge', role: 'supervisor' });
    await this.send(start.reader, { type: 'weather.record', ...start.reading });
    await this.send(supervisor, { type: 'shift.start' });
  }

  /** Works stages in plan order until `stopAt` is active or holding (or the board is finished). */
  async runUntil(stopAt?: string): Promise<void> {
    for (let guard = 0; guard < 200; guard++) {
      const { board } = await this.board();
      const target = stopAt ? board.stages.find((s) => s.id === stopAt) : undefined;
      if (target && (target.state === 'active' || target.state === 'holding')) return;
      const next = board.stages.find((s) => s.state === 'active' || s.state === 'holding');
      if (!next) return;
      if (next.state === 'active') await this.completeSteps(next.id);
      else {
        await this.acknowledge(next.id);
        await this.release(next.id);
      }
    }
    throw new Error('demo board did not settle');
  }
}
