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
  acknowledgments: { role: CrewRole; userId: string; name: string; at: string }[];
  releasedBy: Actor | null;
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
  at: string;
  by: { userId: string; name: string };
}

export interface StopInfo {
  raisedBy: { userId: string; name: string; role: string };
  /** When the stop was pressed on the device (it may have been queued while offline). */
  pressedAt: string;
  /** When the server recorded it. */
  at: string;
  reason: string | null;
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
  };
  planVersion: number;
  stages: BoardStage[];
  crew: { userId: string; name: string; role: CrewRole }[];
  /** Plan version each person last acknowledged the briefing for. */
  briefed: { userId: string; name: string; planVersion: number; at: string }[];
  weather: WeatherReading | null;
  windLimits: { assembly: WindLimit; raising: WindLimit } | null;
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
