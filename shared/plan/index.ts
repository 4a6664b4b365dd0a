/** Plan templates, generation, checks and the briefing: pure code shared by the server and the plan editor. */
export { generatePlan } from './generate.js';
export { OPERATING_MODE_EXPECTED } from './erection.js';
export type { GeneratePlanInput } from './types.js';
export { commsProblems, commsWords, motionsFor, type CommsProblem } from './comms.js';
export { buildBriefing } from './briefing.js';
export { planProblems, revisionProblems, protectsMandatoryHold, MANDATORY_PROBLEM_CODES, holdsNeedPeople, activeStages, type CrewSlot } from './validate.js';
export { erectionStages } from './templates/erection.js';
export { dismantlingStages } from './templates/dismantling.js';
export { assistLiftsStage, assistStage, commsSteps, radioCheckStep, siteSteps } from './templates/common.js';
export type { StageWording, StepWording, HoldWording, RecordWording } from './templates/types.js';
