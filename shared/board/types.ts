import type { WindLimit } from '../schemas/arrangement.js';
import type { CrewRole, JobKind, JobState } from '../schemas/jobs.js';
import type { StepRecord, ValueCheckField } from '../schemas/plan.js';

export type StageState = 'locked' | 'active' | 'holding' | 'done' | 'skipped';
export type HoldState = 'waiting' | 'open' | 'acknowledged' | 'released' | 'waived';
export type StepState = 'open' | 'done';

/** Who did something, in which role, when. */
export interface Actor {
  userId: string;
  name: string;
  role: string;
  at: string;
}

export interface BoardStep {
  id: string;
  text: string;
  state: StepState;
  allowedRoles: CrewRole[];
  requiresPhoto: boolean;
  records: StepRecord | null;
  caution: string | null;
  doneBy: (Actor & { value: string | null; photoId: string | null }) | null;
  /** The template marks it as protecting a mandatory hold: a revision cannot remove it. */
  required: boolean;
  /** Step ids of the same stage that must be done before this one can be. */
  after: string[];
  /** The recorded value against what the step is held to (`records.check`); null when within it or not compared. */
  outOfLimit: OutOfLimit | null;
}

/**
 * Why a recorded reading is out of limit, from `readingOutOfLimit` (shared/board/readings.ts):
 * a sentence for people, and the figures it was compared with for screens that lay them out.
 */
export interface OutOfLimit {
  /** A sentence naming the value and the planned value or limit. */
  reason: string;
  /** What the step is held to. */
  kind: 'plan' | 'max' | 'min' | 'wind';
  /** The value as it was typed. */
  value: string;
  /** The typed value as a number; null when it is not a number (which is out of limit). */
  valueNumber: number | null;
  /** The plan's figure (kind plan) and its absolute tolerance. */
  planned: number | null;
  tolerance: number | null;
  /** The limit (kinds max, min, wind). */
  limit: number | null;
  unit: string | null;
  /** Where the figure comes from (the plan's `source`, or the wind limit's phase). */
  source: string | null;
}

/** One failed blind configuration check. The values typed are never kept, only which fields differed. */
export interface CheckFailure {
  userId: string;
  name: string;
  role: string;
  at: string;
  /** The fields that differed; null on the copy sent to people who do not plan the job (see redaction in server/presenters/board.ts). */
  fields: ValueCheckField[] | null;
}

export interface BoardHold {
  id: string;
  state: HoldState;
  title: string;
  instruction: string;
  mandatory: boolean;
  requiredRoles: CrewRole[];
  /** The fields a value check asks for; the expected values never reach the board. */
  valueCheck: { fields: ValueCheckField[] } | null;
  /** `inspector`: the qualified inspector's acknowledgment of the final sign-off. */
  acknowledgments: { role: CrewRole; userId: string; name: string; at: string; inspector?: boolean }[];
  releasedBy: Actor | null;
  /** Every failed value check on this hold, kept for the record (never the values). */
  checkFailures: CheckFailure[];
  /** Failed value checks since the supervisor last reviewed the hold. */
  failuresSinceReview: number;
  /** Three failures since the last review: nobody can try the value check until the supervisor reviews it. */
  checkLocked: boolean;
  /** The supervisor's last review of the failed checks. */
  lastReview: { userId: string; name: string; at: string; note: string } | null;
  /** The job's final sign-off: a qualified inspector acknowledges too, and its release completes the job. */
  signOff?: boolean;
  /** Why acknowledgments were last taken back without their author withdrawing them (a crew change, a disabled account); shown on the hold. */
  reopenedBecause?: { reason: string; at: string } | null;
}

export interface BoardStage {
  id: string;
  order: number;
  title: string;
  summary: string;
  state: StageState;
  dependsOn: string[];
  cautions: string[];
  involvesCraneMovement: boolean;
  /** The boom goes up or comes down in this stage, or the stage readies it; absent in older plans. */
  boom?: 'moves' | 'prepares';
  steps: BoardStep[];
  hold: BoardHold | null;
  skipReason: string | null;
  /** A reported defect stops work on the stage until the plan is revised. */
  blockedBy: { description: string; at: string; by: string } | null;
}

export interface WeatherReading {
  meanMs: number;
  gustMs: number;
  lightning: boolean;
  poorVisibility: boolean;
  ice: boolean;
  /** Height above ground at which the wind was read, metres; null for readings recorded before the height was asked. */
  heightM: number | null;
  at: string;
  by: { userId: string; name: string };
}

export interface StopInfo {
  raisedBy: { userId: string; name: string; role: string };
  /** When the stop was pressed on the device (it may have been queued while offline). */
  pressedAt: string;
  /** When the server recorded it. */
  at: string;
  /** The cause; the supervisor cannot resume until it is recorded (by whoever pressed a stop, or a supervisor). */
  reason: string | null;
  /** Others who pressed stop while the job was already stopped. */
  alsoPressedBy: { userId: string; name: string; role: string; pressedAt: string; at: string }[];
}

/** One acknowledgment of the start-of-shift hold or its shift inspection. */
export interface ShiftSignature {
  userId: string;
  name: string;
  at: string;
}

/** One item of the make-safe checklist, drawn from the plan templates for the phase of the work. */
export interface MakeSafeItem {
  id: string;
  text: string;
  /** Crew roles any of whom may tick it. */
  roles: CrewRole[];
  /** The item asks for a few words (the forecast, where the key is). */
  asksNote: boolean;
  doneBy: (ShiftSignature & { role: CrewRole; note: string | null }) | null;
}

/** The outgoing supervisor's note to the next one, with what the board listed for them. */
export interface HandoverNote {
  seq: number;
  shift: number;
  from: { userId: string; name: string };
  /** The supervisor it is meant for, when one was named. */
  to: { userId: string; name: string } | null;
  at: string;
  /** Listed from the board when it was written. */
  done: string[];
  open: string[];
  defects: string[];
  overrides: string[];
  /** Typed by the outgoing supervisor. */
  hazards: string;
  note: string;
  acknowledgedBy: ShiftSignature | null;
}

/**
 * Shifts (absent on boards from before them: one shift, working). `working`: normal work;
 * `making_safe`: the supervisor ended the shift and the make-safe checklist is being done (no work
 * commands); when its last item is done the job is `made_safe` (job state) until the start-of-shift
 * hold of the next shift is released.
 */
export interface ShiftState {
  /** The shift under way, or the one that ended while the job is made safe. */
  number: number;
  phase: 'working' | 'making_safe' | 'made_safe';
  startedAt: string | null;
  makeSafe: {
    begunBy: ShiftSignature;
    /** The phase of the work the checklist was drawn for (shared/plan/templates/shift.ts). */
    workPhase: string;
    items: MakeSafeItem[];
    /** When the last item was done, and by whom. */
    madeSafe: ShiftSignature | null;
  } | null;
  /** The start-of-shift hold of the next shift, while the job is made safe. */
  start: {
    inspection: (ShiftSignature & { note: string }) | null;
    operator: ShiftSignature | null;
    supervisor: ShiftSignature | null;
    /** Why acknowledgments of this hold were last taken back by a crew change or a disabled account. */
    reopenedBecause?: { reason: string; at: string } | null;
  } | null;
}

/** The event-sourced state of a job's board: what the shared reducer builds from the log. */
export interface BoardState {
  seq: number;
  job: {
    id: string;
    name: string;
    site: string;
    kind: JobKind;
    state: JobState;
    craneFleetNumber: string;
    stop: StopInfo | null;
    /** The last resume, so whoever raised the stop can see why work went on. */
    lastResume: { by: { userId: string; name: string }; at: string; reason: string } | null;
    cancelReason: string | null;
    /** The site's IANA time zone; absent on boards from before it (the server's zone applies). */
    timeZone?: string;
  };
  planVersion: number;
  stages: BoardStage[];
  crew: { userId: string; name: string; role: CrewRole }[];
  /** Plan version (and shift: absent is shift 1) each person last acknowledged the briefing for. */
  briefed: { userId: string; name: string; planVersion: number; at: string; shift?: number }[];
  weather: WeatherReading | null;
  windLimits: { assembly: WindLimit; raising: WindLimit } | null;
  /** The job's setting for how old a wind reading may be; absent on older boards (the default applies). */
  weatherFreshMinutes?: number;
  /** Shifts, make-safe and start of shift; absent on boards from before them. */
  shift?: ShiftState;
  /** The one supervisor who releases holds and runs the shift; absent on boards from before it (any supervisor). */
  actingSupervisor?: { userId: string; name: string; since: string } | null;
  /** The handover notes, newest last. */
  handovers?: HandoverNote[];
  defects: { id: string; description: string; componentId: string | null; stageId: string | null; photoId: string | null; at: string; by: string }[];
}

/** Who is connected to a board, in which roles. */
export interface PresenceEntry {
  userId: string;
  name: string;
  roles: CrewRole[];
}

/** The snapshot a client starts from: the reducer's state plus who is connected. */
export interface BoardSnapshot extends BoardState {
  presence: PresenceEntry[];
}
