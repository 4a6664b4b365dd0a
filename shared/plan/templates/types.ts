/**
 * The shape of the plan wording kept as data. Texts may hold `{name}` placeholders that the
 * generator fills from the configuration; a placeholder left unfilled is a bug the tests catch.
 */
import type { CrewRole } from '../../schemas/jobs.js';

/**
 * What a recorded reading is held to, as the template declares it; the generator fills in the
 * figure from the configuration or the crane data. `null` says on purpose that the reading is
 * only recorded (who switched a mode, a report reference, a serial).
 */
export type RecordCheckKind = 'plan' | 'max' | 'min' | 'wind' | null;

/** What a step records, as the template states it (the generator adds the expected part). */
export interface RecordWording {
  kind: 'serial' | 'reading';
  label: string;
  unit: string | null;
  /** Every record declares its check, so a reading can never be left uncompared by omission. */
  check: RecordCheckKind;
}

/** One step's wording. */
export interface StepWording {
  text: string;
  /** Crew roles allowed to complete the step. */
  roles: readonly CrewRole[];
  photo?: boolean;
  caution?: string;
  record?: RecordWording;
  /**
   * The step protects the stage's mandatory hold (the hold attests what this step does): it can
   * never be removed from the plan nor moved out of its stage.
   */
  required?: boolean;
  /**
   * Steps of the same stage, by their id suffix, that must be done before this one. A suffix the
   * stage does not have in this configuration (an optional step) is left out.
   */
  after?: readonly string[];
  /**
   * The crane or the assist crane moves in this step: in a stage that opens with the radio check,
   * it comes after that check ("no movement without a clear answer").
   */
  moves?: boolean;
}

/** A hold point's wording. */
export interface HoldWording {
  title: string;
  instruction: string;
  /** Roles that must each acknowledge, by different people. */
  roles: readonly CrewRole[];
  /** Can never be skipped, removed, or lose a role. */
  mandatory: boolean;
  /** The job's final sign-off: an inspector acknowledges too, and its release completes the job. */
  signOff?: true;
}

/** One stage's wording: its id (a pattern for repeated stages), texts, steps and hold. */
export interface StageWording {
  id: string;
  title: string;
  summary: string;
  cautions: readonly string[];
  involvesCraneMovement: boolean;
  /** The boom goes up or comes down in this stage, or the stage readies it (see the plan schema). */
  boom?: 'moves' | 'prepares';
  steps: Readonly<Record<string, StepWording>>;
  hold: HoldWording | null;
}
