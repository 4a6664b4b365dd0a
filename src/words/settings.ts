import type { UnitSystem } from '../../shared/units/quantity';
import { quantityKinds, units } from '../../shared/units/quantity';

/** The account menu's entry and the dialog behind it. */
export const settingsWords = {
  menuItem: 'My settings',
  title: 'My settings',
  unitsLegend: 'Units on my screens',
  unitsNote: 'Only your own screens change. Holdline computes and records every figure in SI; loads and pressures are rounded up and capacities down in either system.',
  save: 'Save',
  cancel: 'Cancel',
  saved: 'Settings saved.',
};

/** Above the planner's figures, for a person who does not use metric: which units, and what stays in SI. */
export const plannerUnitsWords = {
  converted: 'Figures in US customary units (US ton = 2,000 lb): loads and pressures rounded up, capacities and allowables down. The workings under each figure, the drawings and the record stay in SI.',
  serverInMetric: "Shown in metric, as the server wrote them: this device's figures differ from the server's, and the server's count.",
};

/** Each system of units by name. */
export const unitSystemWords: Record<UnitSystem, string> = {
  metric: 'Metric',
  us: 'US customary',
};

/** The units of a system, named in full from the one table (shared/units/quantity.ts): "tonne (1,000 kg), kilonewton, …". */
export function unitSystemDetail(system: UnitSystem): string {
  return quantityKinds.map((kind) => `${units[kind][system].name} (${units[kind][system].word})`).join(', ');
}
