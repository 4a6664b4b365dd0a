/**
 * The configuration planner: its computation and the drawings the planner screen and the record
 * show beside the figures. Pure, no DOM and no Node modules.
 */
export { computeConfiguration } from './compute.js';
export { ASSIST_FOOT_AND_HEAD_ALLOWANCE_M, AUX_SHEAVE_ALLOWANCE_M, BOOM_FOOT_ALLOWANCE_M } from './site.js';
export type { AssistLiftResultRow, ConfigurationResults, LoadCaseResult, PlannerInputs, PowerLineResult } from './types.js';
export { reevingSvg, sheavesUsed, type ReevingDrawingInput, type ReevingDrawingOptions } from '../drawings/reeving.js';
export { groundPressureSvg, type GroundPressureDrawingOptions } from '../drawings/ground-pressure.js';
export { sitePlanSvg, type SitePlanInput, type SitePlanDrawingOptions } from '../drawings/site-plan.js';
