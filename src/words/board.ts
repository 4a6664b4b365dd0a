import type { BoardState, HoldState, StageState } from '../../shared/board/types';
import { valueCheckFieldLabels, type ValueCheckField } from '../../shared/schemas/plan';
import { jobStateLabels } from '../../shared/schemas/jobs';
import type { BoardStatus } from '../../shared/board/status';
import type { BoardView } from '../components/board/views';
import type { Tone } from './common';

/** Each view of the board in words, for the header's links. */
export const boardViewLabels: Record<BoardView, string> = {
  board: 'Whole board',
  cab: 'Cab',
  signaller: 'Signaller',
  rigger: 'Rigger checklist',
  console: 'Supervisor console',
  display: 'Site display',
};

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
  'made-safe': { label: 'MADE SAFE', icon: 'nightlight', tone: 'hold', shape: 'square', detail: 'The shift has ended and the crane is made safe. No work until the next shift is started.' },
  'making-safe': { label: 'Making safe', icon: 'nightlight', tone: 'hold', shape: 'triangle', detail: 'Shift ending: making safe. No work.' },
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

/** The job's final sign-off on the board: the inspector's slot, its control and the closed board. */
export const SIGN_OFF_WORDS = {
  slot: 'Qualified inspector',
  waiting: 'waiting',
  acknowledge: 'Hold to acknowledge as inspector',
  acknowledgeTitle: 'Acknowledge as inspector',
  /** Said beside the press-and-hold: what the acknowledgment stands for, by the job's kind. */
  meaning: {
    erection: 'You confirm that you inspected the assembled crane against this configuration and recorded the inspection.',
    dismantling: 'You confirm that you checked every part is set down, counted and stowed, and the crane is safe for transport.',
  },
  notQualified: 'Only a crew member the administrator marks as qualified to inspect cranes acknowledges as the inspector.',
  alreadyAcknowledged: 'You acknowledged this hold under another role: another qualified person acknowledges as the inspector.',
  releaseWaits: 'Release is possible once every role and the qualified inspector have acknowledged.',
  inspectorNotReleaser: 'You acknowledged as the inspector: another supervisor releases this hold.',
  releaseAfter: 'Releasing it completes the job: the board becomes read-only and the crane unit’s configuration is recorded as this job left it.',
  readOnly: 'This board is read-only: nothing more is recorded on it.',
  radio: 'Stop any movement by radio and signal.',
  record: 'Open the job’s record',
} as const;

/** The closed board's headline, large and plain; `when` formats the release time (services/time.ts). */
export function closedHeadline(board: BoardState, when: (iso: string) => string): string {
  if (board.job.state === 'cancelled') return board.job.cancelReason ? `Job cancelled: ${board.job.cancelReason}` : 'Job cancelled';
  const signOff = board.stages.find((s) => s.hold?.signOff && s.hold.state === 'released')?.hold;
  const inspector = signOff?.acknowledgments.find((a) => a.inspector);
  if (!signOff?.releasedBy || !inspector) return 'Job complete';
  return `Job complete: signed off by ${inspector.name} and released by ${signOff.releasedBy.name} at ${when(signOff.releasedBy.at)}`;
}

/** Why a control cannot act now, said beside it (never a blue button that fails on tap). */
export const BLOCKED_WORDS = {
  notLive: 'The board is not live: wait for it to reconnect.',
  restarting: 'The server is restarting: wait for the board to come back live.',
  stopped: 'Job stopped: wait for the supervisor’s resume.',
  makingSafe: 'Shift ending: making safe. No work until the next shift is started.',
  madeSafe: 'Made safe: no work until the acting supervisor starts the next shift.',
  notBriefed: 'Acknowledge the briefing for this shift first (at the top of this screen).',
  notActing: (name: string) => `Only the acting supervisor, ${name}, does this. Take over by acknowledging their handover note.`,
} as const;

/**
 * The cover over a board that is not live (NotLiveCover.vue): a connection that dropped, or the
 * server saying it restarts (`server:restarting`, sent on SIGTERM before it closes). Both say the
 * board cannot be relied on; the restart says why and that it comes back by itself.
 */
export const NOT_LIVE_WORDS = {
  title: 'NOT LIVE',
  restartingTitle: 'SERVER RESTARTING',
  stale: 'This board is not up to date. Do not rely on it.',
  restarting: 'The server is restarting. Everything it confirmed is kept.',
  reconnecting: 'Reconnecting by itself… Use radio and signal meanwhile.',
  restartReconnecting: 'The board reconnects and catches up by itself. Use radio and signal meanwhile.',
} as const;

/** The same rule in one line, for the fixed bar on a phone (the full rule is read out to screen readers). */
export const STOP_RULE_SHORT = 'Radio and signal first: this does not stop the crane.';

/** A value-check field in words. */
export function fieldLabel(field: ValueCheckField): string {
  return valueCheckFieldLabels[field];
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
    else if (after.job.state === 'made_safe') parts.push(`Job made safe on the board: shift ${after.shift?.number ?? 1} has ended.`);
    else if (before.job.state === 'made_safe' && after.job.state === 'live') parts.push(`Shift ${after.shift?.number ?? 1} started on the board.`);
    else parts.push(`Job now ${jobStateLabels[after.job.state].toLowerCase()}.`);
  }
  if (before.shift?.phase !== 'making_safe' && after.shift?.phase === 'making_safe') parts.push('Shift ending on the board: making safe, no work.');
  if (before.actingSupervisor?.userId !== after.actingSupervisor?.userId && after.actingSupervisor && before.actingSupervisor) parts.push(`${after.actingSupervisor.name} is now the acting supervisor.`);
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
