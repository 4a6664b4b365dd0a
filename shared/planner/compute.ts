/**
 * The configuration planner's computation: every figure of a planned configuration, each with the
 * rule that produced it. Pure and deterministic; the browser runs it as the supervisor types and
 * the server runs it again as the authority.
 *
 * It never throws for a schema-valid configuration: a calculation that refuses its input
 * (CalcInputError) becomes a failing figure naming the field, so the screen can point at it.
 * Anything else unexpected also becomes a failing, non-overridable figure: a planner that cannot
 * compute a check must not let the plan through.
 */
import type { Configuration, Figure } from '../schemas/configuration.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { computeAssist } from './assist.js';
import { computeBoom } from './boom.js';
import { computeChart } from './chart.js';
import { guarded } from './figures.js';
import { computeGround } from './ground.js';
import { computeRope } from './rope.js';
import { computeSite } from './site.js';
import { computeWind } from './wind.js';
import type { ConfigurationResults, LoadCaseResult, PlannerInputs } from './types.js';

/**
 * Every figure of a planned configuration against the crane's data, parts and assist crane; never
 * throws for a schema-valid configuration. The figures' words are in `q`'s units: metric (the
 * default) is what the server stores and the record keeps; a person's screen may ask for theirs.
 */
export function computeConfiguration(config: Configuration, inputs: PlannerInputs, q: Quantities = METRIC): ConfigurationResults {
  const figures: Figure[] = [];
  const boom = computeBoom(config, inputs, figures, q);
  const { reeving, hookBlock } = computeRope(config, inputs, figures, q);
  const chart = computeChart(config, inputs, boom, hookBlock, figures, q);
  const assist = computeAssist(config, inputs, boom, hookBlock, figures, q);
  const loadCases = guarded(figures, 'ground.cases', 'ground', 'Ground pressure', [] as LoadCaseResult[], () => computeGround(config, inputs, boom, hookBlock, figures, q));

  const windLimits = computeWind(boom, figures, q);
  const site = computeSite(config, inputs, figures, q);
  return {
    figures,
    makeup: boom.makeup,
    reeving,
    loadCases,
    assistLifts: assist.lifts,
    chart,
    tandem: assist.tandem,
    powerLines: site.powerLines,
    fallZoneRadiusM: site.fallZoneRadiusM,
    platesRequired: boom.platesRequired,
    windLimits,
  };
}
