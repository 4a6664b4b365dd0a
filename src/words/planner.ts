import type { Figure, FigureStatus } from '../../shared/schemas/configuration';
import type { Tone } from './common';

/** A figure's result in words, with its icon and colour. FAIL is in capitals to stand out in glare. */
export const figureStatusWords: Record<FigureStatus, { label: string; icon: string; tone: Tone }> = {
  pass: { label: 'Pass', icon: 'check_circle', tone: 'done' },
  fail: { label: 'FAIL', icon: 'cancel', tone: 'stop' },
  info: { label: 'Info', icon: 'info', tone: 'info' },
  unverified: { label: 'Unverified', icon: 'help', tone: 'hold' },
  caution: { label: 'Caution', icon: 'warning', tone: 'hold' },
};

/** Headings of the figure groups, in the order the results panel shows them. */
export const figureGroups: { group: Figure['group']; label: string }[] = [
  { group: 'boom', label: 'Boom' },
  { group: 'rope', label: 'Hook and rope' },
  { group: 'ground', label: 'Ground' },
  { group: 'assist', label: 'Assist crane' },
  { group: 'site', label: 'Site' },
  { group: 'wind', label: 'Wind' },
];

/** Words for the configuration's fields, so a list of what is missing reads like the form. */
const names: Record<string, string> = {
  craneUnitId: 'Crane unit',
  boomLengthM: 'Boom length',
  'mainHook.hookBlockId': 'Main hook block',
  'mainHook.parts': 'Parts of line',
  'mainHook.lowestHookPositionM': 'Lowest hook position',
  'auxiliary.hookBlockId': 'Auxiliary hook or overhaul ball',
  'heaviestLoad.description': 'Heaviest load: what it is',
  'heaviestLoad.loadT': 'Heaviest load: load',
  'heaviestLoad.riggingT': 'Heaviest load: rigging',
  'heaviestLoad.radiusM': 'Heaviest load: radius',
  'ground.groundType': 'Ground type',
  'ground.allowablePressureKpa': 'Allowable ground pressure',
  'ground.source.reference': 'Ground: report or design reference',
  'ground.source.designer': 'Ground: temporary-works designer',
  'mats.lengthM': 'Mat length',
  'mats.widthM': 'Mat width',
  'mats.thicknessM': 'Mat thickness',
  'mats.weightKg': 'Weight of one mat',
  'assist.assistCraneId': 'Assist crane',
  'assist.chartId': 'Assist crane chart',
  'assist.pads.loadT': 'Assist crane: largest pad load',
  'assist.pads.lengthM': 'Assist crane: pad length',
  'assist.pads.widthM': 'Assist crane: pad width',
  'assist.pads.weightKg': 'Assist crane: pad weight',
  'assist.tandem.alongFromTipM': 'Tandem raise: in from the tip',
  'assist.tandem.sideM': 'Tandem raise: to the side',
  'assist.tandem.releaseAngleDeg': 'Tandem raise: release angle',
  'assist.tandem.hookBlockT': 'Tandem raise: its hook block',
  'assist.tandem.slingsT': 'Tandem raise: slings',
  'assist.tandem.shacklesT': 'Tandem raise: shackles',
  'assist.tandem.deductionsT': 'Tandem raise: chart deductions',
  chartCautionPercent: 'Caution share of the chart',
  fallZoneMarginM: 'Fall-zone margin',
  weatherFreshMinutes: 'Age of a wind reading',
  'siteHazards.buriedServices': 'Buried services',
  'siteHazards.neighbours': 'Neighbours',
  'siteHazards.loadAndTagLineAllowanceM': 'Hook, load and tag-line allowance',
  'siteHazards.swayAllowanceM': 'Sway allowance',
};

const liftFields: Record<string, string> = {
  label: 'what is lifted',
  liftT: 'weight',
  riggingT: 'other rigging',
  radiusM: 'radius',
  hookBlockT: 'its hook block',
  slingsT: 'slings',
  shacklesT: 'shackles',
  deductionsT: 'chart deductions',
  'legs.toCogAM': 'pick point A to centre of gravity',
  'legs.toCogBM': 'pick point B to centre of gravity',
  'legs.hookHeightM': 'hook above the pick points',
  'legs.legRatedLoadT': 'rated load per leg',
};
const lineFields: Record<string, string> = { label: 'which line', voltageKv: 'voltage', distanceM: 'distance', assistDistanceM: 'assist crane’s distance' };

/** A field's path ("assist.lifts.2.radiusM") in the words of the form ("Assist lift 3: radius"). */
export function fieldName(path: string): string {
  if (names[path]) return names[path];
  const lift = /^assist\.lifts\.(\d+)\.([\w.]+)$/.exec(path);
  if (lift) return `Assist lift ${Number(lift[1]) + 1}: ${liftFields[lift[2]] ?? lift[2]}`;
  const line = /^siteHazards\.powerLines\.(\d+)\.(\w+)$/.exec(path);
  if (line) return `Power line ${Number(line[1]) + 1}: ${lineFields[line[2]] ?? line[2]}`;
  return path;
}

/** Fields filled by choosing from a list or buttons: "choose one" reads better than "fill this in". */
const chosen = new Set(['craneUnitId', 'boomLengthM', 'mainHook.hookBlockId', 'auxiliary.hookBlockId', 'assist.assistCraneId', 'assist.chartId']);

/** What still needs doing for a field, in lower case to follow its name. */
export function missingWords(path: string, message: string): string {
  return chosen.has(path) ? 'choose one' : message.charAt(0).toLowerCase() + message.slice(1);
}
