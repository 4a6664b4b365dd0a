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
  'mats.lengthM': 'Mat length',
  'mats.widthM': 'Mat width',
  'mats.thicknessM': 'Mat thickness',
  'mats.weightKg': 'Weight of one mat',
  'assist.assistCraneId': 'Assist crane',
  'assist.chartId': 'Assist crane chart',
  fallZoneMarginM: 'Fall-zone margin',
  'siteHazards.buriedServices': 'Buried services',
  'siteHazards.neighbours': 'Neighbours',
  'siteHazards.loadAndTagLineAllowanceM': 'Hook, load and tag-line allowance',
  'siteHazards.swayAllowanceM': 'Sway allowance',
};

const liftFields: Record<string, string> = { label: 'what is lifted', liftT: 'weight', riggingT: 'rigging', radiusM: 'radius' };
const lineFields: Record<string, string> = { label: 'which line', voltageKv: 'voltage', distanceM: 'distance', assistDistanceM: 'assist crane’s distance' };

/** A field's path ("assist.lifts.2.radiusM") in the words of the form ("Assist lift 3: radius"). */
export function fieldName(path: string): string {
  if (names[path]) return names[path];
  const lift = /^assist\.lifts\.(\d+)\.(\w+)$/.exec(path);
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
