/**
 * The wind limits for assembly and raising, read from the crane model data for this boom length.
 * Holdline has no wind limits of its own: without data for the length, both figures fail.
 */
import type { Figure } from '../schemas/configuration.js';
import type { BoomOutcome } from './boom.js';
import { figure, ratingOf } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import type { ConfigurationResults } from './types.js';

/** The wind figures for the listed arrangement; null limits when the boom length is not listed. */
export function computeWind(boom: Pick<BoomOutcome, 'listed'>, figures: Figure[], q: Quantities = METRIC): ConfigurationResults['windLimits'] {
  const windRule = 'limits for this boom length from the crane model data (manufacturer); Holdline has no wind limits of its own';
  // What the limits usually mean, said beside them (from memory: the crane's manual says which).
  const windBasis = 'usually the 3-second gust at the boom’s highest point';
  const windNote =
    'Manufacturers’ wind limits usually mean the 3-second gust at the highest point of the boom (from memory; the crane’s manual says which speed and height). The wind grows with height, so a reading taken at ground level under-reads the wind at the tip: read at the tip or allow for the difference.';
  if (boom.listed) {
    const { assembly, raising } = boom.listed.wind;
    figures.push(figure('wind.assembly', 'wind', 'Wind limit for assembly', `gust ≤ ${ratingOf(q, 'windSpeed', assembly.gustMs)}, mean ≤ ${ratingOf(q, 'windSpeed', assembly.meanMs)} (${windBasis})`, 'info', false, windRule, windNote));
    figures.push(figure('wind.raising', 'wind', 'Wind limit for raising', `gust ≤ ${ratingOf(q, 'windSpeed', raising.gustMs)}, mean ≤ ${ratingOf(q, 'windSpeed', raising.meanMs)} (${windBasis})`, 'info', false, windRule, windNote));
    return { assembly, raising };
  }
  for (const [key, label] of [['wind.assembly', 'Wind limit for assembly'], ['wind.raising', 'Wind limit for raising']] as const) {
    figures.push(figure(key, 'wind', label, 'No data for this boom length', 'fail', false, windRule));
  }
  return null;
}
