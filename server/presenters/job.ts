import type { CrewMember, JobDto } from '../../shared/schemas/jobs.js';
import type { Job } from '../entities/Job.js';
import type { JobOverride } from '../entities/JobOverride.js';

/** A job as the API presents it to one person. */
export function presentJob(
  job: Job,
  rel: { crew: CrewMember[]; overrides: JobOverride[]; names: Map<string, string>; fleetNumber: string; can: JobDto['can'] },
): JobDto {
  const person = (id: string) => ({ userId: id, name: rel.names.get(id) ?? 'Unknown' });
  return {
    id: job.id,
    name: job.name,
    site: job.site,
    craneUnitId: job.craneUnitId,
    craneFleetNumber: rel.fleetNumber,
    kind: job.kind,
    state: job.state,
    timeZone: job.timeZone,
    configuration: job.configuration,
    figures: job.results?.figures ?? [],
    crew: rel.crew,
    distribution: job.distribution,
    holdReminderMinutes: job.holdReminderMinutes,
    commsPlan: job.commsPlan,
    overrides: rel.overrides.map((o) => ({
      id: o.id,
      figureKey: o.figureKey,
      figureLabel: o.figureLabel,
      reason: o.reason,
      requestedBy: person(o.requestedBy),
      requestedAt: o.requestedAt,
      approvedBy: o.approvedBy ? person(o.approvedBy) : null,
      approvedAt: o.approvedAt,
    })),
    lastSeq: job.lastSeq,
    headHash: job.headHash,
    planVersion: job.planVersion,
    createdAt: job.createdAt,
    updatedAt: job.updatedAt,
    can: rel.can,
  };
}
