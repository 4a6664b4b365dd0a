/**
 * The shape of the plan wording kept as data. Texts may hold `{name}` placeholders that the
 * generator fills from the configuration; a placeholder left unfilled is a bug the tests catch.
 */
import type { CrewRole } from '../../schemas/jobs.js';

/** What a step records, as the template states it (the generator adds the expected part). */
export interface RecordWording {
  kind: 'serial' | 'reading';
  label: string;
  unit: string | null;
}

/** One step's wording. */
export interface StepWording {
  text: string;
  /** Crew roles allowed to complete the step. */
  roles: readonly CrewRole[];
  photo?: boolean;
  caution?: string;
  record?: RecordWording;
}

/** A hold point's wording. */
export interface HoldWording {
  title: string;
  instruction: string;
  /** Roles that must each acknowledge, by different people. */
  roles: readonly CrewRole[];
  /** Can never be skipped, removed, or lose a role. */
  mandatory: boolean;
}

/** One stage's wording: its id (a pattern for repeated stages), texts, steps and hold. */
export interface StageWording {
  id: string;
  title: string;
  summary: string;
  cautions: readonly string[];
  involvesCraneMovement: boolean;
  steps: Readonly<Record<string, StepWording>>;
  hold: HoldWording | null;
}
