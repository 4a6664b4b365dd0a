/** Site hazards: the fall zone and the clearance to power lines. */
import { fallZoneRadiusM, powerLineClearanceM } from '../calc/site.js';
import type { Configuration, Figure } from '../schemas/configuration.js';
import { figure, fmt, guarded, plain } from './figures.js';
import type { PowerLineResult } from './types.js';

/**
 * How far the auxiliary sheave reaches beyond the main boom tip, for the fall zone and the
 * * power-line clearance. Common practice, no source: the model's data carries no such dimension.
 */
export const AUX_SHEAVE_TIP_EXTENSION_M = 1.5;

const POWER_LINE_GEOMETRY_RULE =
  'available = distance from the slewing centre − (boom length + tip extension): the boom could swing or fall toward the line (common practice, no source for the geometry)';

/** The fall zone and one figure per power line. */
export function computeSite(config: Configuration, figures: Figure[]): { fallZoneRadiusM: number; powerLines: PowerLineResult[] } {
  const tipExtensionM = config.auxiliary.enabled ? AUX_SHEAVE_TIP_EXTENSION_M : 0;
  const extensionNote = config.auxiliary.enabled
    ? `tip extension ${plain(AUX_SHEAVE_TIP_EXTENSION_M)} m for the auxiliary sheave (common practice, no source)`
    : 'no tip extension';
  const fallZone = guarded(figures, 'site.fallZone', 'site', 'Fall zone radius', 0, () => {
    const r = fallZoneRadiusM({ boomLengthM: config.boomLengthM, tipExtensionM, marginM: config.fallZoneMarginM });
    figures.push(
      figure('site.fallZone', 'site', 'Fall zone radius', `${fmt(r.radiusM)} m`, 'info', false, `${r.rule}; ${extensionNote}; margin ${plain(config.fallZoneMarginM)} m; measured from the slewing centre (boom foot taken there)`),
    );
    return r.radiusM;
  });

  const reachM = config.boomLengthM + tipExtensionM;
  const powerLines = config.siteHazards.powerLines.map((line, i): PowerLineResult => {
    const key = `powerLine.${i}`;
    const label = `Power line: ${line.label}`;
    const availableM = Number.isFinite(line.distanceM - reachM) ? line.distanceM - reachM : -Number.MAX_VALUE;
    const failed: PowerLineResult = { label: line.label, voltageKv: line.voltageKv, distanceM: line.distanceM, requiredClearanceM: null, availableClearanceM: availableM, pass: false };
    return guarded(figures, key, 'site', label, failed, () => {
      const c = powerLineClearanceM(line.voltageKv);
      const rule = `${c.rule}; ${POWER_LINE_GEOMETRY_RULE}; ${extensionNote}`;
      if (c.clearanceM === null) {
        figures.push(figure(key, 'site', label, 'Get the line owner’s distance', 'fail', false, rule, c.reason));
        return failed;
      }
      const pass = availableM >= c.clearanceM;
      const value = `${fmt(availableM)} m available, ${fmt(c.clearanceM, 2)} m required (${plain(line.voltageKv)} kV)`;
      figures.push(
        figure(
          key,
          'site',
          label,
          value,
          pass ? 'pass' : 'fail',
          false,
          rule,
          pass ? undefined : `line ${plain(line.distanceM)} m from the slewing centre, boom reach ${fmt(reachM)} m: move the crane, shorten the boom, or have the line de-energised by its owner`,
        ),
      );
      return { label: line.label, voltageKv: line.voltageKv, distanceM: line.distanceM, requiredClearanceM: c.clearanceM, availableClearanceM: availableM, pass };
    });
  });
  return { fallZoneRadiusM: fallZone, powerLines };
}
