/** Site hazards: the fall zone and the distance to power lines, for the main crane and the assist crane. */
import { fallZoneRadiusM, powerLineClearanceCheck, powerLineMinimumDistance } from '../calc/site.js';
import type { Configuration, Figure, PowerLine } from '../schemas/configuration.js';
import { figure, guarded } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { fmt, plain } from '../format.js';
import type { PlannerInputs, PowerLineResult } from './types.js';

/**
 * Taken for the boom foot's offset ahead of the slewing centre when the crane data does not give
 * it: more than the foot sits ahead on the crawler cranes we know of (common practice, no source).
 */
const BOOM_FOOT_ALLOWANCE_M = 3;

/**
 * Taken for the auxiliary sheave's reach beyond the main tip when the crane data does not give it
 * (common practice, no source; twice the 1.5 m this used to assume).
 */
const AUX_SHEAVE_ALLOWANCE_M = 3;

/**
 * Added to the assist crane's boom length for its boom foot and head: its data gives neither
 * (common practice, no source).
 */
const ASSIST_FOOT_AND_HEAD_ALLOWANCE_M = 2;

/** Local rules may ask for more; said beside every power-line figure. */
const LOCAL_RULES_CAUTION =
  'Local rules may differ and may ask for more (for example in the UK, HSE GS6 exclusion zones with ground-level barriers and goalposts): the stricter rule applies.';

const GEOMETRY_RULE =
  'available = distance from the slewing centre − reach; the reach counts the boom lying flat toward the line, because the boom can slew, be lowered or fall (common practice, no source for the geometry)';

/** Room left, rounded down to 0.1 m: the figure never shows more room than there is (1e-9 absorbs float noise). */
function roomWords(m: number): string {
  return fmt(Math.floor(m * 10 + 1e-9) / 10);
}

/** A required distance, rounded up to 0.01 m (the fall zone and the reach are rounded up to 0.1 m as well). */
function requiredWords(m: number): string {
  return fmt(Math.ceil(m * 100 - 1e-9) / 100, 2);
}

/** A distance available, in the person's units: metric as `roomWords` writes it, another system rounded down. */
function roomIn(q: Quantities, m: number): string {
  return q.system === 'metric' ? `${roomWords(m)} m` : q.length(m, 'down', 1);
}

/** A distance required, in the person's units: metric as `requiredWords` writes it, another system rounded up. */
function requiredIn(q: Quantities, m: number): string {
  return q.system === 'metric' ? `${requiredWords(m)} m` : q.length(m, 'up', 1);
}

/** One part of a crane's reach in plan, with where its length came from. */
interface ReachPart {
  words: string;
  lengthM: number;
}

function sumReach(parts: readonly ReachPart[]): { reachM: number; words: string } {
  return {
    reachM: parts.reduce((s, p) => s + p.lengthM, 0),
    words: parts.map((p) => `${p.words} ${plain(p.lengthM)} m`).join(' + '),
  };
}

/** What is in the main crane's reach: the boom foot, the boom and the auxiliary sheave, from the data or a stated allowance. */
function boomParts(config: Configuration, inputs: PlannerInputs, figures: Figure[]): { boom: ReachPart[]; footAheadM: number; tipExtensionM: number } {
  const foot = inputs.arrangement.machine.boomFoot;
  let footAheadM: number;
  const boom: ReachPart[] = [];
  if (foot) {
    // A foot behind the slewing centre shortens the reach; nothing is taken off (safe side).
    footAheadM = Math.max(0, foot.aheadOfSlewCentreM);
    boom.push({ words: 'boom foot ahead of the slewing centre (crane data)', lengthM: footAheadM });
  } else {
    footAheadM = BOOM_FOOT_ALLOWANCE_M;
    boom.push({ words: 'boom-foot allowance (not in the crane data)', lengthM: footAheadM });
    figures.push(
      figure('site.notIncluded.boomFoot', 'site', 'Not included: boom-foot position', `Not in the crane data: ${plain(BOOM_FOOT_ALLOWANCE_M)} m allowance taken`, 'info', false, 'a missing dimension is never taken as zero; the allowance is common practice, no source', 'Add the boom foot’s position to the crane data from the manufacturer’s manual; the fall zone and the power-line distances use the allowance until then.'),
    );
  }
  boom.push({ words: 'boom', lengthM: config.boomLengthM });
  let tipExtensionM = 0;
  if (config.auxiliary.enabled) {
    const aux = inputs.arrangement.auxSheave;
    if (aux) {
      tipExtensionM = aux.reachBeyondTipM;
      boom.push({ words: 'auxiliary sheave beyond the tip (crane data)', lengthM: tipExtensionM });
    } else {
      tipExtensionM = AUX_SHEAVE_ALLOWANCE_M;
      boom.push({ words: 'auxiliary-sheave allowance (not in the crane data)', lengthM: tipExtensionM });
      figures.push(
        figure('site.notIncluded.auxSheave', 'site', 'Not included: auxiliary sheave reach', `Not in the crane data: ${plain(AUX_SHEAVE_ALLOWANCE_M)} m allowance taken`, 'info', false, 'a missing dimension is never taken as zero; the allowance is common practice, no source', 'Add the auxiliary sheave’s reach beyond the tip to the crane data from the manufacturer’s manual.'),
      );
    }
  }
  return { boom, footAheadM, tipExtensionM };
}

/** The hook, load, tag-line and sway allowances the planner set. */
function loadParts(config: Configuration): ReachPart[] {
  return [
    { words: 'hook, load and tag lines (setting)', lengthM: config.siteHazards.loadAndTagLineAllowanceM },
    { words: 'sway (setting)', lengthM: config.siteHazards.swayAllowanceM },
  ];
}

/** The assist crane's boom length from its chosen chart, when an assist crane is planned. */
function assistBoom(config: Configuration, inputs: PlannerInputs): { planned: boolean; boomLengthM: number | null; words: string } {
  const planned = config.assist.lifts.length > 0 || config.assist.assistCraneId !== null;
  if (!planned) return { planned, boomLengthM: null, words: '' };
  const chart = inputs.assistCrane?.charts.find((c) => c.id === config.assist.chartId) ?? null;
  if (!inputs.assistCrane || !chart) return { planned, boomLengthM: null, words: 'the assist crane or its chart is not known' };
  return { planned, boomLengthM: chart.boomLengthM, words: `${inputs.assistCrane.model}, ${chart.description}` };
}

/** The fall zone, the reach, and one figure per power line (and one more per line for the assist crane). */
export function computeSite(config: Configuration, inputs: PlannerInputs, figures: Figure[], q: Quantities = METRIC): { fallZoneRadiusM: number; reachM: number; powerLines: PowerLineResult[] } {
  const { boom, footAheadM, tipExtensionM } = boomParts(config, inputs, figures);
  const fallZone = guarded(figures, 'site.fallZone', 'site', 'Fall zone radius', 0, () => {
    const r = fallZoneRadiusM({ boomFootAheadM: footAheadM, boomLengthM: config.boomLengthM, tipExtensionM, marginM: config.fallZoneMarginM });
    const words = sumReach([...boom, { words: 'margin (setting)', lengthM: config.fallZoneMarginM }]).words;
    const radius = q.system === 'metric' ? `${fmt(Math.ceil(r.radiusM * 10 - 1e-9) / 10)} m` : q.length(r.radiusM, 'up', 1);
    figures.push(figure('site.fallZone', 'site', 'Fall zone radius', radius, 'info', false, r.rule, `${words}, measured from the slewing centre`));
    return r.radiusM;
  });

  const reach = sumReach([...boom, ...loadParts(config)]);
  if (config.siteHazards.powerLines.length > 0) {
    figures.push(figure('site.reach', 'site', 'Reach toward power lines', `${q.length(reach.reachM, 'up')} from the slewing centre`, 'info', false, GEOMETRY_RULE, reach.words));
  }
  const assist = assistBoom(config, inputs);
  const assistReach =
    assist.boomLengthM === null
      ? null
      : sumReach([{ words: 'assist boom (its chart)', lengthM: assist.boomLengthM }, { words: 'its boom foot and head (allowance, not in its data)', lengthM: ASSIST_FOOT_AND_HEAD_ALLOWANCE_M }, ...loadParts(config)]);

  const powerLines = config.siteHazards.powerLines.map((line, i): PowerLineResult => {
    const key = `powerLine.${i}`;
    const label = `Power line: ${line.label}`;
    const failed: PowerLineResult = {
      label: line.label,
      voltageKv: line.voltageKv,
      distanceM: line.distanceM,
      requiredClearanceM: null,
      availableClearanceM: 0,
      reachM: reach.reachM,
      basis: 'owner',
      basisWords: 'cannot compute',
      pass: false,
      assist: null,
    };
    return guarded(figures, key, 'site', label, failed, () => {
      const min = powerLineMinimumDistance(line);
      const check = powerLineClearanceCheck({ distanceM: line.distanceM, reachM: reach.reachM, requiredM: min.clearanceM ?? Number.MAX_VALUE });
      const rule = `${min.rule}; ${GEOMETRY_RULE}`;
      const result: PowerLineResult = {
        label: line.label,
        voltageKv: line.voltageKv,
        distanceM: line.distanceM,
        requiredClearanceM: min.clearanceM,
        availableClearanceM: check.availableM,
        reachM: reach.reachM,
        basis: min.basis,
        basisWords: min.basisShort,
        pass: min.clearanceM !== null && check.pass,
        assist: null,
      };
      const volts = line.voltageKv === null ? 'voltage unknown' : `${plain(line.voltageKv)} kV`;
      const reachWords = `Reach ${fmt(reach.reachM)} m = ${reach.words}.`;
      if (min.clearanceM === null) {
        figures.push(figure(key, 'site', label, 'Get the line owner’s distance', 'fail', false, rule, `${min.why} ${reachWords} ${LOCAL_RULES_CAUTION}`));
      } else {
        const advice = result.pass
          ? ''
          : ` Line ${plain(line.distanceM)} m from the slewing centre: move the crane, shorten the boom, or have the line de-energised and grounded by its owner.`;
        figures.push(
          figure(
            key,
            'site',
            label,
            `${roomIn(q, check.availableM)} available, ${requiredIn(q, min.clearanceM)} required (${min.basisShort}; ${volts})`,
            result.pass ? 'pass' : 'fail',
            false,
            rule,
            `${min.why} ${reachWords}${advice} ${LOCAL_RULES_CAUTION}`,
          ),
        );
      }
      if (assist.planned) result.assist = assistFigure(line, i, min.clearanceM, min.basisShort, assist.words, assistReach, figures, q);
      return result;
    });
  });
  return { fallZoneRadiusM: fallZone, reachM: reach.reachM, powerLines };
}

/** The assist crane against one power line: its own distance to the line and its own reach. */
function assistFigure(
  line: PowerLine,
  i: number,
  requiredM: number | null,
  basisShort: string,
  craneWords: string,
  reach: { reachM: number; words: string } | null,
  figures: Figure[],
  q: Quantities,
): PowerLineResult['assist'] {
  const key = `powerLine.${i}.assist`;
  const label = `Assist crane to power line: ${line.label}`;
  const rule = `the same minimum distance as the main crane; ${GEOMETRY_RULE}`;
  if (reach === null) {
    figures.push(figure(key, 'site', label, 'Cannot check: assist crane not known', 'unverified', false, rule, `${craneWords}: choose the assist crane and its chart so its boom length is known.`));
    return { distanceM: line.assistDistanceM, reachM: null, availableClearanceM: null, pass: false };
  }
  if (line.assistDistanceM === null) {
    figures.push(figure(key, 'site', label, 'Cannot check: distance not entered', 'unverified', false, rule, `Measure the distance from where the assist crane will stand (its slewing centre) to this line and enter it. Its reach is ${fmt(reach.reachM)} m = ${reach.words}.`));
    return { distanceM: null, reachM: reach.reachM, availableClearanceM: null, pass: false };
  }
  if (requiredM === null) {
    figures.push(figure(key, 'site', label, 'Get the line owner’s distance', 'fail', false, rule, LOCAL_RULES_CAUTION));
    return { distanceM: line.assistDistanceM, reachM: reach.reachM, availableClearanceM: null, pass: false };
  }
  const check = powerLineClearanceCheck({ distanceM: line.assistDistanceM, reachM: reach.reachM, requiredM });
  const advice = check.pass ? '' : ' Set the assist crane up farther from the line or have the line de-energised and grounded by its owner.';
  figures.push(
    figure(
      key,
      'site',
      label,
      `${roomIn(q, check.availableM)} available, ${requiredIn(q, requiredM)} required (${basisShort})`,
      check.pass ? 'pass' : 'fail',
      false,
      rule,
      `${craneWords}, ${plain(line.assistDistanceM)} m from the line. Reach ${fmt(reach.reachM)} m = ${reach.words}.${advice} ${LOCAL_RULES_CAUTION}`,
    ),
  );
  return { distanceM: line.assistDistanceM, reachM: reach.reachM, availableClearanceM: check.availableM, pass: check.pass };
}
