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
import { computeAssist } from './assist.js';
import { computeBoom } from './boom.js';
import { computeChart } from './chart.js';
import { figure, guarded } from './figures.js';
import { plain } from '../format.js';
import { computeGround } from './ground.js';
import { computeRope } from './rope.js';
import { computeSite } from './site.js';
import type { ConfigurationResults, LoadCaseResult, PlannerInputs } from './types.js';

/** Every figure of a planned configuration against the crane's data, parts and assist crane; never throws for a schema-valid configuration. */
export function computeConfiguration(config: Configuration, inputs: PlannerInputs): ConfigurationResults {
  const figures: Figure[] = [];
  const boom = computeBoom(config, inputs, figures);
  const { reeving, hookBlock } = computeRope(config, inputs, figures);
  const chart = computeChart(config, inputs, boom, hookBlock, figures);
  const assist = computeAssist(config, inputs, boom, hookBlock, figures);
  const loadCases = guarded(figures, 'ground.cases', 'ground', 'Ground pressure', [] as LoadCaseResult[], () => computeGround(config, inputs, boom, hookBlock, figures));

  let windLimits: ConfigurationResults['windLimits'] = null;
  const windRule = 'limits for this boom length from the crane model data (manufacturer); Holdline has no wind limits of its own';
  // What the limits usually mean, said beside them (from memory: the crane's manual says which).
  const windBasis = 'usually the 3-second gust at the boom’s highest point';
  const windNote =
    'Manufacturers’ wind limits usually mean the 3-second gust at the highest point of the boom (from memory; the crane’s manual says which speed and height). The wind grows with height, so a reading taken at ground level under-reads the wind at the tip: read at the tip or allow for the difference.';
  if (boom.listed) {
    const { assembly, raising } = boom.listed.wind;
    windLimits = { assembly, raising };
    figures.push(figure('wind.assembly', 'wind', 'Wind limit for assembly', `gust ≤ ${plain(assembly.gustMs)} m/s, mean ≤ ${plain(assembly.meanMs)} m/s (${windBasis})`, 'info', false, windRule, windNote));
    figures.push(figure('wind.raising', 'wind', 'Wind limit for raising', `gust ≤ ${plain(raising.gustMs)} m/s, mean ≤ ${plain(raising.meanMs)} m/s (${windBasis})`, 'info', false, windRule, windNote));
  } else {
    for (const [key, label] of [['wind.assembly', 'Wind limit for assembly'], ['wind.raising', 'Wind limit for raising']] as const) {
      figures.push(figure(key, 'wind', label, 'No data for this boom length', 'fail', false, windRule));
    }
  }

  const site = computeSite(config, inputs, figures);
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
