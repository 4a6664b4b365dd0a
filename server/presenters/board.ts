import type { BoardState } from '../../shared/board/types.js';
import type { JobEventDto } from '../../shared/events/log.js';

/**
 * The board and its events as people who do not plan the job may see them. The blind
 * configuration check must stay blind: the values a successful acknowledgment typed (which equal
 * the plan's) and the fields a failed check got wrong never reach them. The job's supervisors
 * (and admins) see everything; the stored log keeps everything (the hash chain covers it).
 * The reducer gives the same board from redacted events as the redacted snapshot.
 */
export function redactEventFor(event: JobEventDto, planner: boolean): JobEventDto {
  if (planner) return event;
  if (event.type === 'hold.check.failed') return { ...event, data: { ...event.data, fields: null } };
  if (event.type === 'hold.acknowledged' && event.data.values) return { ...event, data: { ...event.data, values: null } };
  return event;
}

/** Does this event carry something only the job's planners may see? */
export function eventNeedsRedaction(event: JobEventDto): boolean {
  return redactEventFor(event, false) !== event;
}

/** The board snapshot for a person: failed-check fields removed unless they plan the job. */
export function redactBoardFor<T extends BoardState>(board: T, planner: boolean): T {
  if (planner) return board;
  return {
    ...board,
    stages: board.stages.map((stage) =>
      stage.hold?.checkFailures?.length ? { ...stage, hold: { ...stage.hold, checkFailures: stage.hold.checkFailures.map((f) => ({ ...f, fields: null })) } } : stage,
    ),
  };
}
