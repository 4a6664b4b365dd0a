/** Plan templates, generation, checks and the briefing: pure code shared by the server and the plan editor. */
export { generatePlan } from './generate.js';
export { OPERATING_MODE_EXPECTED } from './erection.js';
export type { GeneratePlanInput } from './types.js';
export { commsProblems } from './comms.js';
export { buildBriefing } from './briefing.js';
export { planProblems, revisionProblems, protectsMandatoryHold, MANDATORY_PROBLEM_CODES, holdsNeedPeople, activeStages } from './validate.js';
