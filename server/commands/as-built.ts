import type { EntityManager } from 'typeorm';
import type { BoardState } from '../../shared/board/types.js';
import { parseJobEvent } from '../../shared/events/log.js';
import type { AsBuilt } from '../../shared/schemas/fleet.js';
import type { ValueCheckField } from '../../shared/schemas/plan.js';
import { CraneUnit } from '../entities/CraneUnit.js';
import type { Job } from '../entities/Job.js';
import { JobEvent } from '../entities/JobEvent.js';

/**
 * Sets the crane unit's as-built configuration from a job that is being signed off: the
 * configuration planned, the controller values typed at the blind checks that passed (the stored
 * log keeps them; the board never does), and every serial recorded at a position.
 */
export async function recordAsBuilt(manager: EntityManager, job: Job, board: BoardState, now: Date): Promise<void> {
  const unit = await manager.findOneBy(CraneUnit, { id: job.craneUnitId });
  if (!unit) return;
  const controllerValues: Partial<Record<ValueCheckField, string>> = {};
  const acknowledgments = await manager.find(JobEvent, { where: { jobId: job.id, type: 'hold.acknowledged' }, order: { seq: 'ASC' } });
  for (const row of acknowledgments) {
    const event = parseJobEvent({ ...row, by: { userId: row.byUserId, name: row.byName, role: row.role } });
    // A later check that passed stands for the crane as it is now.
    if (event.type === 'hold.acknowledged' && event.data.values) Object.assign(controllerValues, event.data.values);
  }
  const serials = board.stages.flatMap((stage) =>
    stage.steps.filter((s) => s.records?.kind === 'serial' && s.state === 'done' && s.doneBy?.value).map((s) => ({ stepId: s.id, position: s.text, serial: s.doneBy!.value! })),
  );
  const asBuilt: AsBuilt = {
    jobId: job.id,
    jobName: job.name,
    site: job.site,
    kind: job.kind,
    completedAt: now.toISOString(),
    planVersion: board.planVersion,
    boomLengthM: job.configuration?.boomLengthM ?? null,
    hookBlockId: job.configuration?.mainHook.hookBlockId ?? null,
    parts: job.configuration?.mainHook.parts ?? null,
    controllerValues,
    serials,
  };
  unit.asBuilt = asBuilt;
  unit.updatedAt = now.toISOString();
  await manager.save(unit);
}
