/**
 * The configuration planner: its computation and the drawings the planner screen and the record
 * show beside the figures. Pure, no DOM and no Node modules.
 */
export { AUX_SHEAVE_TIP_EXTENSION_M, computeConfiguration } from './compute.js';
export type { AssistLiftResultRow, ConfigurationResults, LoadCaseResult, PlannerInputs, PowerLineResult } from './types.js';
export { reevingSvg, sheavesUsed, type ReevingDrawingInput, type ReevingDrawingOptions } from '../drawings/reeving.js';
export { groundPressureSvg, type GroundPressureDrawingOptions } from '../drawings/ground-pressure.js';
export { sitePlanSvg, type SitePlanInput, type SitePlanDrawingOptions } from '../drawings/site-plan.js';
