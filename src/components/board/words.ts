import type { BoardState, HoldState, StageState } from '../../../shared/board/types';
import type { JobEventDto } from '../../../shared/events/log';
import { valueCheckFieldLabels, type ValueCheckField } from '../../../shared/schemas/plan';
import { roleLabel, type Tone } from '../jobs/words';
import type { BoardStatus } from '../../../shared/board/status';

export { formatWhen } from '../../services/time';
export { roleLabel };

/** A state in words with its icon and colour family; the word always carries the meaning. */
export interface StateWords {
  label: string;
  icon: string;
  tone: Tone;
}

export const stageStateWords: Record<StageState, StateWords> = {
  locked: { label: 'Not started', icon: 'lock', tone: 'plain' },
  active: { label: 'In progress', icon: 'construction', tone: 'info' },
  holding: { label: 'At hold point', icon: 'pause_circle', tone: 'hold' },
  done: { label: 'Done', icon: 'check_circle', tone: 'done' },
  skipped: { label: 'Skipped', icon: 'redo', tone: 'plain' },
};

export const holdStateWords: Record<HoldState, StateWords> = {
  waiting: { label: 'Not open yet', icon: 'schedule', tone: 'plain' },
  open: { label: 'Hold open: acknowledgments needed', icon: 'pause_circle', tone: 'hold' },
  acknowledged: { label: 'Acknowledged: waiting for release', icon: 'how_to_reg', tone: 'hold' },
  released: { label: 'Released', icon: 'lock_open', tone: 'done' },
  waived: { label: 'Waived (stage skipped)', icon: 'redo', tone: 'plain' },
};

/**
 * The board's overall state. "Open" is blue information, never green: an open board says work is
 * in progress on the plan, not that anything may move.
 */
export const boardStatusWords: Record<BoardStatus, StateWords & { shape: 'octagon' | 'triangle' | 'circle' | 'square'; detail: string }> = {
  stopped: { label: 'STOPPED', icon: 'pan_tool', tone: 'stop', shape: 'octagon', detail: 'All stop recorded. Nothing moves until the supervisor resumes.' },
  holding: { label: 'Holding', icon: 'pause_circle', tone: 'hold', shape: 'triangle', detail: 'A hold point is open.' },
  open: { label: 'Board open', icon: 'construction', tone: 'info', shape: 'circle', detail: 'Work in progress on the plan.' },
  'not-started': { label: 'Not started', icon: 'flag', tone: 'plain', shape: 'square', detail: 'The job has not started on the board.' },
  finished: { label: 'Finished', icon: 'task_alt', tone: 'plain', shape: 'square', detail: 'The job is closed.' },
};

/** The line every crew view carries with the board's state. */
export const SIGNAL_RULE = 'Move only on the signaller’s signal.';

/** What every stop control says, so nobody takes it for the crane's stop. */
export const STOP_RULE = 'Stop by radio and signal first. This records an all stop and alerts the crew; it does not stop the crane.';

/** The mark on a step whose reading is outside its limit or differs from the plan. */
export const OUT_OF_LIMIT = 'Out of limit';

/** Words of the press-and-hold buttons that let work go on (release, resume). */
export const HOLD_WORDS = {
  howLong: 'Press and hold 1.5 s',
  keyboard: '(or hold Space)',
  keepHolding: 'Keep holding…',
  sending: 'Sending…',
  release: 'Hold to release',
  resume: 'Hold to resume the job',
} as const;

/** Why a control cannot act now, said beside it (never a blue button that fails on tap). */
export const BLOCKED_WORDS = {
  notLive: 'The board is not live: wait for it to reconnect.',
  stopped: 'Job stopped: wait for the supervisor’s resume.',
} as const;

/**
 * Joins sentences, each ending with exactly one full stop: text from the plan or typed by a person
 * may already end with one, and a doubled stop reads as a typo in the record.
 */
export function sentences(...parts: (string | null | undefined | false)[]): string {
  return parts
    .map((p) => (p || '').trim())
    .filter(Boolean)
    .map((p) => (/[.!?…]$/.test(p) ? p : `${p}.`))
    .join(' ');
}

/** Text without its closing full stop, for putting inside a longer sentence. */
export function clause(text: string | null | undefined): string {
  return (text ?? '').trim().replace(/\.+$/, '');
}

/** The same rule in one line, for the fixed bar on a phone (the full rule is read out to screen readers). */
export const STOP_RULE_SHORT = 'Radio and signal first: this does not stop the crane.';

/** A value-check field in words. */
export function fieldLabel(field: ValueCheckField): string {
  return valueCheckFieldLabels[field];
}

function text(value: unknown): string {
  return typeof value === 'string' ? value : typeof value === 'number' ? String(value) : '';
}

/** What event sentences need to name steps, holds and stages: a board, or a plan carried by an event. */
export interface Named {
  stages: { id: string; title: string; steps: { id: string; text: string; records?: { label: string; unit: string | null } | null }[]; hold: { id: string; title: string } | null }[];
}

function findStep(board: Named | null, stepId: unknown) {
  for (const stage of board?.stages ?? []) {
    const step = stage.steps.find((s) => s.id === stepId);
    if (step) return step;
  }
  return null;
}
function stepText(board: Named | null, stepId: unknown): string {
  return clause(findStep(board, stepId)?.text ?? 'a step no longer in the plan');
}
function holdTitle(board: Named | null, holdId: unknown): string {
  return board?.stages.find((s) => s.hold?.id === holdId)?.hold?.title ?? 'a hold point no longer in the plan';
}
function stageTitle(board: Named | null, stageId: unknown): string {
  return board?.stages.find((s) => s.id === stageId)?.title ?? 'a stage no longer in the plan';
}
function record(value: unknown): Record<string, unknown> {
  return value !== null && typeof value === 'object' && !Array.isArray(value) ? (value as Record<string, unknown>) : {};
}
function roleWords(role: unknown): string {
  return roleLabel(text(role)).toLowerCase();
}

/**
 * One plain sentence (or two) for an event of the board, for a supervisor or the client's engineer:
 * what was done, to what, with what value. Who did it is shown beside it. Never the event's internal
 * name or a list of its fields, also for a kind of event this screen does not know yet.
 */
export function boardEventLine(event: Pick<JobEventDto, 'type' | 'data' | 'by'>, board: Named | null): string {
  const d = event.data;
  switch (event.type) {
    case 'job.started':
      return 'Started the job on the board.';
    case 'briefing.acknowledged':
      return `Acknowledged the briefing for plan version ${text(d.planVersion)}.`;
    case 'step.completed': {
      const step = findStep(board, d.stepId);
      const value = text(d.value);
      const unit = step?.records?.unit ? ` ${step.records.unit}` : '';
      const out = record(d.outOfLimit);
      return sentences(
        `Marked done: ${stepText(board, d.stepId)}`,
        value && `Recorded ${step?.records ? step.records.label.toLowerCase() : 'the value'} ${value}${unit}`,
        text(out.reason) && `OUT OF LIMIT: ${clause(text(out.reason))}`,
        !!d.photoId && 'Photo kept with the record',
      );
    }
    case 'step.reopened':
      return sentences(`Reopened: ${stepText(board, d.stepId)}`, Array.isArray(d.alsoReopened) && d.alsoReopened.length > 0 && `${d.alsoReopened.length} later step${d.alsoReopened.length === 1 ? '' : 's'} reopened with it`);
    case 'hold.acknowledged':
      return sentences(`Acknowledged the hold point “${holdTitle(board, d.holdId)}” as ${roleWords(d.role)}`, !!d.values && 'The controller readings typed matched the plan', !!d.photoId && 'Photo of the controller kept');
    case 'hold.withdrawn':
      return `Withdrew the ${roleWords(d.role)}’s acknowledgment of the hold point “${holdTitle(board, d.holdId)}”.`;
    case 'hold.released':
      return `Released the hold point “${holdTitle(board, d.holdId)}”.`;
    case 'hold.check.failed': {
      const fields = Array.isArray(d.fields) ? d.fields.map((f) => (typeof f === 'string' && f in valueCheckFieldLabels ? fieldLabel(f as ValueCheckField).toLowerCase() : '')).filter(Boolean) : [];
      return sentences(`The configuration check at “${holdTitle(board, d.holdId)}” did not match the plan`, fields.length > 0 && `Differed: ${fields.join(', ')}`);
    }
    case 'hold.check.reviewed':
      return sentences(`Reviewed the failed configuration checks at “${holdTitle(board, d.holdId)}” with the crew`, text(d.note) && `Found: ${text(d.note)}`);
    case 'stage.skipped':
      return sentences(`Skipped the stage “${stageTitle(board, d.stageId)}”`, `Reason: ${text(d.reason)}`);
    case 'job.stopped':
      return d.alreadyStopped ? sentences('Pressed stop while the job was already stopped', text(d.reason) && `Reason: ${text(d.reason)}`) : sentences('Raised an ALL STOP', text(d.reason) && `Reason: ${text(d.reason)}`);
    case 'job.stop.noted':
      return sentences(`Recorded the cause of the stop: ${text(d.reason)}`);
    case 'job.resumed':
      return sentences('Resumed the job after the stop', `Reason: ${text(d.reason)}`);
    case 'weather.recorded': {
      const r = record(d.reading);
      const flags = [r.lightning ? 'lightning' : '', r.ice ? 'ice' : '', r.poorVisibility ? 'poor visibility' : ''].filter(Boolean);
      const height = typeof r.heightM === 'number' ? ` at ${r.heightM} m` : '';
      return sentences(
        `Recorded the wind: mean ${text(r.meanMs)} m/s, gust ${text(r.gustMs)} m/s${height}`,
        flags.length > 0 && `Also reported: ${flags.join(', ')}`,
        d.overLimit ? `Over the limit: ${text(d.overLimit)}` : 'Within the limit',
      );
    }
    case 'defect.reported':
      return sentences(`Reported a defect${d.serial ? ` on ${text(d.serial)}` : ''}: ${text(d.description)}`, 'Photo kept with the record');
    case 'plan.revised':
      return sentences(`Revised the plan to version ${text(d.planVersion)}`, `Reason: ${text(d.reason)}`);
    case 'job.completed':
      return 'Completed the job.';
    case 'job.cancelled':
      return sentences('Cancelled the job', `Reason: ${text(d.reason)}`);
    default:
      return 'Made a change this screen does not describe yet; it is kept in the record.';
  }
}

/**
 * A sentence for what changed between two boards, for the live region, the flash and speech; null
 * when no job, stage or hold state changed. Always a statement of what the board shows, never an
 * instruction: speech must not sound like a signal.
 */
export function describeChange(before: BoardState | null, after: BoardState | null): string | null {
  if (!before || !after || before.job.id !== after.job.id) return null;
  const parts: string[] = [];
  if (before.job.state !== after.job.state) {
    if (after.job.state === 'stopped') parts.push(`Job stopped on the board by ${after.job.stop?.raisedBy.name ?? 'a crew member'}.`);
    else if (before.job.state === 'stopped' && after.job.state === 'live') parts.push('Stop cleared on the board by the supervisor.');
    else parts.push(`Job now ${after.job.state}.`);
  }
  const old = new Map(before.stages.map((s) => [s.id, s]));
  for (const stage of after.stages) {
    const prev = old.get(stage.id);
    if (!prev) continue;
    if (prev.hold && stage.hold && prev.hold.state !== stage.hold.state) {
      if (stage.hold.state === 'open') parts.push(`Hold point open: ${stage.hold.title}.`);
      else if (stage.hold.state === 'acknowledged') parts.push(`Hold point acknowledged by every role: ${stage.hold.title}.`);
      else if (stage.hold.state === 'released') parts.push(`Hold point released: ${stage.hold.title}.`);
      continue;
    }
    if (prev.state !== stage.state && stage.state === 'active') parts.push(`Stage ${stage.order} in progress: ${stage.title}.`);
    if (prev.state !== stage.state && stage.state === 'skipped') parts.push(`Stage ${stage.order} skipped: ${stage.title}.`);
    if (!prev.blockedBy && stage.blockedBy) parts.push(`Stage ${stage.order} blocked by a defect.`);
  }
  if (before.planVersion !== after.planVersion) parts.push(`Plan revised to version ${after.planVersion}.`);
  return parts.length ? parts.join(' ') : null;
}
