import { plain, tonnesUp } from '../../shared/format';
import type { Drum, SectionType, Sheave } from '../../shared/schemas/arrangement';
import type { ComponentKind, ComponentStatus, InspectionResult } from '../../shared/schemas/fleet';

/** A component's status in words, with the icon that goes with its colour. */
export const componentStatusWords: Record<ComponentStatus, { label: string; icon: string; hint: string }> = {
  serviceable: { label: 'Serviceable', icon: 'check_circle', hint: 'May go into a boom.' },
  quarantined: { label: 'Quarantined', icon: 'report', hint: 'Do not use. Keep apart until a competent person clears it.' },
  retired: { label: 'Retired', icon: 'remove_circle_outline', hint: 'Out of the fleet for good; its history is kept.' },
};

/** What an inspection found, as the buttons and the history say it. */
export const inspectionResultWords: Record<InspectionResult, { label: string; icon: string; effect: string }> = {
  serviceable: { label: 'Serviceable', icon: 'check_circle', effect: 'No defects found.' },
  damaged: { label: 'Damaged', icon: 'report', effect: 'The component is quarantined until it is re-inspected.' },
  repaired: { label: 'Repaired', icon: 'build_circle', effect: 'Repaired and checked; the component returns to service.' },
};

/**
 * What to look for, by kind, from the trade's general knowledge. Shown as hints only: the
 * manufacturer's inspection criteria for the part always govern.
 */
export const inspectionChecklist: Record<ComponentKind, string[]> = {
  section: ['Straightness of chords', 'Dents', 'Bent or missing lacings', 'Cracked welds', 'Corrosion', 'Pin hole wear'],
  guy_line: ['Straightness of the bar or line', 'Cracked welds at the connectors', 'Corrosion', 'Pin hole wear', 'Legible mark on the connectors'],
  hook_block: ['Sheaves turn freely and are not cracked', 'Hook latch works', 'Cracked welds', 'Corrosion', 'Pin hole wear'],
  rope: ['Broken wires', 'Kinks', 'Crushing', 'Bird-caging', 'Core protrusion', 'Heat damage', 'Loss of diameter'],
};

/** What each part of the arrangement data does, as the model's page lists it. */
export const sectionRoleWords: Record<SectionType['role'], string> = { base: 'Base', insert: 'Insert', tip: 'Tip' };
export const drumRoleWords: Record<Drum['role'], string> = { mainHoist: 'Main hoist', auxiliaryHoist: 'Auxiliary hoist', boomHoist: 'Boom hoist' };
export const sheaveRoleWords: Record<Sheave['role'], string> = { load: 'Load', boomHoist: 'Boom hoist', idler: 'Idler' };

/** Where an inspection photo is on its way to the server. */
export const photoStateWords = { uploading: 'Uploading…', done: 'Uploaded', failed: 'Not uploaded' } as const;

/** The weight of a part in tonnes, rounded up to 0.01 t as the drawing and the configuration sheet write it; the data keeps kilograms. */
export function tonnes(weightKg: number): string {
  return `${tonnesUp(weightKg)} t`;
}

/** A length from the data to the nearest centimetre, without trailing zeros. */
export function metres(lengthM: number): string {
  return `${plain(lengthM, 2)} m`;
}

/** The unit's as-built panel: the configuration the last signed-off job left the crane in. */
export const AS_BUILT_WORDS = {
  title: 'As built',
  empty: 'No job has been signed off on this unit yet. The configuration is recorded here when a job’s final sign-off is released.',
  caution: 'As the job’s sign-off recorded it. Parts may have been changed since: check the crane itself before relying on it.',
  job: 'Job',
  kind: 'Signed off',
  kinds: { erection: 'Erection: post-assembly inspection and hand-over', dismantling: 'Dismantling: crane made safe and off hire' },
  site: 'Site',
  date: 'Date',
  planVersion: 'Plan version',
  boom: 'Boom length',
  hook: 'Hook block',
  parts: 'Parts of line',
  notRecorded: 'Not recorded',
  controller: 'Controller values that passed the blind check',
  noController: 'No controller values were checked on this job.',
  serials: 'Serials by position',
  noSerials: 'No serials were recorded on this job.',
  position: 'Position',
  serial: 'Serial',
} as const;
