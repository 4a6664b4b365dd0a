import type { BoardHold, BoardState, MakeSafeItem, ShiftState } from '../../shared/board/types';
import { shiftOf, type ShiftStartGap } from '../../shared/board/shifts';
import { workPhaseWords, type WorkPhase } from '../../shared/plan/templates/shift';
import { roleLabel } from '../../shared/schemas/users';

/**
 * The words of shifts on the board: ending a shift, the make-safe checklist, the made-safe board,
 * the handover and the start-of-shift hold. Times come in as a function (services/time.ts), so
 * the words stay checkable in tests.
 */
export const SHIFT_WORDS = {
  makingSafeBanner: 'Shift ending: making safe — no work',
  makingSafeDetail: 'Tick each item as it is done, by one of the roles named on it. Work controls stay off until the next shift is started.',
  checklistTitle: 'Make-safe checklist',
  checklistDone: 'Make-safe checklist: every item done',
  notYourItem: 'Ticked by',
  tickHold: 'Hold: done',
  /** The held button's accessible name: the item it ticks, in full. */
  tickName: (text: string) => `Hold to mark done: ${text}`,
  notePlaceholder: 'A few words (needed)',
  madeSafeRule: 'No work on this crane until the acting supervisor starts the next shift. Stop any movement by radio and signal.',
  manualFirst: 'Holdline records the checks; the crane manufacturer’s manual and the site’s rules for leaving a crane come first.',
  endShift: 'End the shift…',
  endShiftTitle: 'End the shift and make the crane safe?',
  endShiftAfter: 'Once the shift ends, no work is accepted on the board: each item below is ticked by one of its roles, and when the last is done the job is made safe.',
  endShiftHold: 'Hold to end the shift',
  endShiftCannot: 'The shift cannot end now:',
  endShiftNotActing: (name: string) => `Only the acting supervisor (${name}) ends the shift.`,
  releaseNotActing: (name: string) => `Only the acting supervisor (${name}) releases holds.`,
  startNotActing: (name: string) => `Only the acting supervisor (${name}) starts the next shift.`,
  handoverTitle: 'Handover',
  handoverWrite: 'Write the handover note',
  handoverWriteOpen: 'Write a handover note…',
  handoverListed: 'Listed from the board for you (the server records these with your note):',
  handoverHazards: 'Hazards the next shift must watch for (or “none”)',
  handoverNote: 'Note to the next supervisor',
  handoverTo: 'Meant for (optional)',
  handoverAnyone: 'Any supervisor of the crew',
  handoverOnlyActing: 'The acting supervisor writes the handover note.',
  handoverNone: 'No handover note written yet.',
  handoverAcknowledge: 'I have read this handover',
  handoverAcknowledgeAfter: 'Acknowledging makes you the acting supervisor: you release holds and start the next shift.',
  handoverOwn: 'You wrote this note: another supervisor acknowledges it.',
  overridesByServer: 'Overrides approved on the job are added by the server.',
  startTitle: 'Start-of-shift hold',
  startInstruction:
    'Before any stage goes on: a shift inspection by a competent person, acknowledged by the operator and the acting supervisor; a fresh wind reading within the limit; and the briefing acknowledged by everyone in the crew for this shift.',
  inspection: 'Shift inspection (competent person)',
  inspectionNote: 'What you inspected and found',
  inspect: 'Record the shift inspection',
  inspectionOnlyQualified: 'Recorded by a crew member the administrator marks as qualified to inspect cranes.',
  operatorAck: 'Operator',
  supervisorAck: 'Acting supervisor',
  acknowledge: 'Acknowledge',
  briefingTitle: 'Briefing for the next shift',
  everyoneBriefed: 'Everyone in the crew has acknowledged the briefing for this shift.',
  missingTitle: 'Still needed before the shift can start:',
  nothingMissing: 'Everything the start-of-shift hold needs is in place.',
  waiting: 'waiting',
  actingNone: 'not named yet',
} as const;

/** "Acting supervisor: …" for the board's header. */
export function actingLine(board: Pick<BoardState, 'actingSupervisor'>): string | null {
  if (board.actingSupervisor === undefined) return null;
  return `Acting supervisor: ${board.actingSupervisor?.name ?? SHIFT_WORDS.actingNone}`;
}

/** The name to give in "only the acting supervisor (…)". */
export function actingName(board: Pick<BoardState, 'actingSupervisor'>): string {
  return board.actingSupervisor?.name ?? SHIFT_WORDS.actingNone;
}

/**
 * The made-safe board's headline, large and plain: when, the last item's author and who ended the
 * shift. Never claims a time the board does not hold.
 */
export function madeSafeHeadline(board: Pick<BoardState, 'shift'>, when: (iso: string) => string): string {
  const makeSafe = shiftOf(board).makeSafe;
  const made = makeSafe?.madeSafe;
  if (!makeSafe || !made) return 'MADE SAFE';
  return `MADE SAFE at ${when(made.at)} — last item by ${made.name}, shift ended by ${makeSafe.begunBy.name}`;
}

/** The making-safe banner's second line: who ended the shift, when, and how far the checklist is. */
export function makingSafeLine(board: Pick<BoardState, 'shift'>, when: (iso: string) => string): string {
  const makeSafe = shiftOf(board).makeSafe;
  if (!makeSafe) return SHIFT_WORDS.makingSafeDetail;
  const done = makeSafe.items.filter((i) => i.doneBy).length;
  return `Shift ${shiftOf(board).number} ended by ${makeSafe.begunBy.name} at ${when(makeSafe.begunBy.at)}. ${done} of ${makeSafe.items.length} items done.`;
}

/** The phase of the work the checklist was drawn for, in words. */
export function workPhaseLine(phase: string): string {
  const words = workPhaseWords[phase as WorkPhase];
  return words ? `Drawn for the work as it stands: ${words}.` : '';
}

/** Who may tick an item, in words. */
export function itemRolesWords(item: Pick<MakeSafeItem, 'roles'>): string {
  const names = item.roles.map((r) => roleLabel(r).toLowerCase());
  return `For ${names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} or ${names[names.length - 1]}`}`;
}

/** Who ticked an item and when, with their note. */
export function itemDoneWords(item: MakeSafeItem, when: (iso: string) => string): string {
  const d = item.doneBy;
  if (!d) return 'Not done yet';
  return `Done by ${d.name} (${roleLabel(d.role).toLowerCase()}) at ${when(d.at)}${d.note ? `: ${d.note}` : ''}`;
}

/** Why a hold asks again for acknowledgments it had (a crew change, a disabled account), for its card on every view. */
export function reopenedWords(hold: Pick<BoardHold, 'reopenedBecause' | 'state'>, when: (iso: string) => string): string | null {
  const r = hold.reopenedBecause;
  if (!r || hold.state === 'released' || hold.state === 'waived') return null;
  return `Acknowledgments taken back at ${when(r.at)}: ${r.reason}. The roles named below acknowledge again.`;
}

/**
 * Why the start-of-shift hold asks again for an inspection or an acknowledgment it had (a crew
 * change, a disabled account), on every view while the hold stands (it goes when the shift starts).
 */
export function startReopenedWords(start: Pick<NonNullable<ShiftState['start']>, 'reopenedBecause'> | null | undefined, when: (iso: string) => string): string | null {
  const r = start?.reopenedBecause;
  if (!r) return null;
  return `Taken back at ${when(r.at)}: ${r.reason}. What shows as waiting below is signed again.`;
}

/** The acting supervisor's start button: the shift it starts. */
export function startShiftLabel(board: Pick<BoardState, 'shift'>): string {
  return `Hold to start shift ${shiftOf(board).number + 1}`;
}

/** One thing the start-of-shift hold still needs, as a line of its list (the shared rule words it mid-sentence). */
export function gapWords(gap: ShiftStartGap): string {
  const text = gap.text.trim().replace(/\.+$/, '');
  return text ? `${text.charAt(0).toUpperCase()}${text.slice(1)}.` : '';
}
