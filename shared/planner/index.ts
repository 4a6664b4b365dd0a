/**
 * The configuration planner: its computation and the drawings the planner screen and the record
 * show beside the figures. Pure, no DOM and no Node modules.
 */
export { AUX_SHEAVE_TIP_EXTENSION_M, computeConfiguration } from './compute.js';
export type { AssistLiftResultRow, ConfigurationResults, LoadCaseResult, PlannerInputs, PowerLineResult } from './types.js';
