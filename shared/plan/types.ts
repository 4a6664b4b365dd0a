/** The types of plan generation that the briefing and the server share with the generator. */
import type { ConfigurationResults } from '../planner/types.js';
import type { ArrangementData } from '../schemas/arrangement.js';
import type { Configuration } from '../schemas/configuration.js';
import type { CommsPlan } from '../schemas/jobs.js';

/** What a plan is generated from. */
export interface GeneratePlanInput {
  kind: 'erection' | 'dismantling';
  configuration: Configuration;
  results: ConfigurationResults;
  arrangement: ArrangementData;
  commsPlan: CommsPlan;
  /** Names by user id, to put names beside call signs. */
  crewNames?: Record<string, string>;
}
