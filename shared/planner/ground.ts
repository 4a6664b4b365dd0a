/**
 * Ground pressure under the tracks for each load case over the whole slew range, with and without
 * mats. Every weight the data gives goes into the vertical load and the moment about the slewing
 * centre; a weight the data does not give is named as "not included" and keeps the figures from
 * reading as a pass.
 */
import { CalcInputError, finiteResult } from '../calc/errors.js';
import { matPressure, slewPressureSweep, type MatPressureResult, type SlewPoint, type SlewSweepResult, type TrackFootprint } from '../calc/ground.js';
import { tonnesForceToKn } from '../calc/units.js';
import type { HookBlock } from '../schemas/arrangement.js';
import type { Configuration, Figure, FigureStatus } from '../schemas/configuration.js';
import type { BoomOutcome } from './boom.js';
import { figure, guarded, kgToKn, ratingOf } from './figures.js';
import { METRIC, type Quantities } from '../units/quantity.js';
import { fmt, fmtUp, plain } from '../format.js';
import type { LoadCaseResult, PlannerInputs } from './types.js';

/** One weight in the moments: its name, its weight and its horizontal arm from the slewing centre (positive towards the boom). */
interface GroundWeight {
  label: string;
  weightKn: number;
  armM: number;
}

const WEIGHTS_RULE =
  'vertical load V = every weight below; moment M about the slewing centre = Σ weight × horizontal arm (positive towards the boom, counterweight behind negative); boom, guy lines, auxiliary sheave and rope on the boom measured from the slewing centre = boom-foot offset + horizontal projection along the boom; hook blocks, hanging rope, load and rigging at the radius; the machine, mast and counterweight turn with the upper works (the carbody and crawlers taken at the slewing centre, the middle of the tracks)';

const SLEW_NOTE = '0° = boom along the tracks over one end, 90° = over the side';

type CaseKey = LoadCaseResult['key'];

const caseLabels: Record<CaseKey, string> = {
  raising: 'Raising (boom horizontal, no load)',
  lift: 'Heaviest lift',
  unloaded: 'Unloaded, boom at the lifting angle',
};

/** Turns a heavy-end corner into words for the crew. */
function whereWords(point: SlewPoint): string {
  return point.method === 'rigid plane' ? 'outer edge of the heavier track at its heavy end' : 'heavy end of the heavier track, across the shoe';
}

/** Ground pressure figures for every load case; the results feed the drawing. */
export function computeGround(
  config: Configuration,
  inputs: PlannerInputs,
  boom: BoomOutcome,
  hookBlock: HookBlock | null,
  figures: Figure[],
  q: Quantities = METRIC,
): LoadCaseResult[] {
  const { arrangement } = inputs;
  const allowable = config.ground.allowablePressureKpa;
  const source = config.ground.source;
  const unverified = source.kind === 'none';
  const keys: CaseKey[] = ['raising', 'lift', 'unloaded'];
  const cannot = (reason: string, only: readonly CaseKey[] = keys) => {
    for (const k of only) figures.push(figure(`ground.${k}`, 'ground', `Ground pressure: ${caseLabels[k]}`, 'Cannot compute', 'fail', false, WEIGHTS_RULE, reason));
  };
  if (!boom.listed) {
    cannot('no arrangement data for this boom length: counterweight and track gauge unknown');
    return [];
  }
  if (boom.boomCogFromFootM === null) {
    cannot('the boom has no sections to weigh');
    return [];
  }
  const listed = boom.listed;
  const boomCog = boom.boomCogFromFootM;
  const tracks = arrangement.tracks;
  const machine = arrangement.machine;
  const lengthM = config.boomLengthM;
  const footprint: TrackFootprint = { trackLengthM: tracks.lengthM, shoeWidthM: tracks.shoeWidthM, gaugeM: listed.raising.trackGaugeM, tracks: tracks.count };

  // What the data leaves out: named on every ground figure, never taken as zero in silence.
  const notIncluded: string[] = [];
  const footAhead = machine.boomFoot?.aheadOfSlewCentreM ?? 0;
  const footHeight = machine.boomFoot?.heightM ?? 0;
  if (!machine.boomFoot) notIncluded.push('the boom foot’s position (the foot is taken at the slewing centre and at ground level)');

  const fixed: GroundWeight[] = [
    { label: 'machine base', weightKn: kgToKn(machine.baseWeightKg), armM: machine.cogFromSlewCentreM },
    { label: 'counterweight for raising', weightKn: kgToKn(listed.raising.counterweightKg), armM: machine.counterweight.cogFromSlewCentreM },
  ];
  if (machine.mast) fixed.push({ label: 'mast', weightKn: kgToKn(machine.mast.weightKg), armM: machine.mast.cogFromSlewCentreM });
  else notIncluded.push('the mast or gantry (no weight in the data)');

  // The boom-hoist rope runs between the mast head and the upper works: all of it, at the mast.
  const ropeById = new Map(arrangement.ropes.map((r) => [r.id, r]));
  const boomDrum = arrangement.drums.find((d) => d.role === 'boomHoist');
  const boomRope = boomDrum ? ropeById.get(boomDrum.ropeId) : undefined;
  if (boomDrum && boomRope?.massKgPerM != null) {
    fixed.push({ label: `boom-hoist rope, all ${plain(boomDrum.ropeLengthM)} m`, weightKn: kgToKn(boomRope.massKgPerM * boomDrum.ropeLengthM), armM: machine.mast?.cogFromSlewCentreM ?? 0 });
  } else if (boomDrum) {
    notIncluded.push('the boom-hoist rope (no mass per metre in the data)');
  }

  // Guy lines lie along the top of the boom and end at the tip: their centre at the middle of their run.
  const guyKnown = listed.guyLines.filter((g) => g.weightKg !== null);
  const guyMissing = listed.guyLines.filter((g) => g.weightKg === null);
  if (guyMissing.length) notIncluded.push(`guy lines ${guyMissing.map((g) => g.mark).join(', ')} (no weight in the data)`);
  const guyKg = guyKnown.reduce((sum, g) => sum + (g.weightKg ?? 0) * g.quantity, 0);
  const guyRunM = Math.min(lengthM, listed.guyLines.reduce((sum, g) => sum + g.lengthM * g.quantity, 0) / 2);
  const guyCogFromFootM = Math.max(0, lengthM - guyRunM / 2);

  const auxOn = config.auxiliary.enabled;
  const auxSheave = arrangement.auxSheave;
  if (auxOn && !auxSheave) notIncluded.push('the auxiliary sheave (no weight or reach in the data)');
  const auxReach = auxSheave?.reachBeyondTipM ?? 0;
  const auxHook = auxOn && config.auxiliary.hookBlockId ? arrangement.hookBlocks.find((b) => b.id === config.auxiliary.hookBlockId) ?? null : null;

  const mainDrum = arrangement.drums.find((d) => d.role === 'mainHoist');
  const mainRope = mainDrum ? ropeById.get(mainDrum.ropeId) : undefined;
  const auxDrum = arrangement.drums.find((d) => d.role === 'auxiliaryHoist');
  const auxRope = auxDrum ? ropeById.get(auxDrum.ropeId) : undefined;
  if (mainRope && mainRope.massKgPerM === null) notIncluded.push('the main hoist rope (no mass per metre in the data)');
  else if (mainDrum && mainDrum.leadToBoomFootM === null) notIncluded.push('the main hoist rope from the drum to the boom foot (no length in the data)');
  if (auxOn && auxRope && auxRope.massKgPerM === null) notIncluded.push('the auxiliary hoist rope (no mass per metre in the data)');
  else if (auxOn && auxDrum && auxDrum.leadToBoomFootM === null) notIncluded.push('the auxiliary hoist rope from the drum to the boom foot (no length in the data)');
  const parts = config.mainHook.parts;

  /**
   * Everything on the boom with the boom at cos/sin of its angle; the hanging rope from the tip
   * sheaves to the hook is `hangM` long (0 = hook block up at the tip).
   */
  const boomWeights = (cos: number, hookRadiusM: number, hangM: number): GroundWeight[] => {
    const along = (fromFootM: number) => footAhead + fromFootM * cos;
    const w: GroundWeight[] = [{ label: 'boom sections', weightKn: boom.boomWeightKn, armM: along(boomCog) }];
    if (guyKg > 0) w.push({ label: 'guy lines', weightKn: kgToKn(guyKg), armM: along(guyCogFromFootM) });
    const auxRadius = auxOn && auxSheave ? along(lengthM + auxReach) : hookRadiusM;
    if (auxOn && auxSheave) w.push({ label: 'auxiliary sheave', weightKn: kgToKn(auxSheave.weightKg), armM: auxRadius });
    if (hookBlock) w.push({ label: `main hook block ${hookBlock.id}`, weightKn: kgToKn(hookBlock.weightKg), armM: hookRadiusM });
    if (auxHook) w.push({ label: `auxiliary hook ${auxHook.id}`, weightKn: kgToKn(auxHook.weightKg), armM: auxRadius });
    if (mainDrum && mainRope?.massKgPerM != null) {
      const kgPerM = mainRope.massKgPerM;
      if (mainDrum.leadToBoomFootM !== null) w.push({ label: 'main hoist rope, drum to boom foot', weightKn: kgToKn(kgPerM * mainDrum.leadToBoomFootM), armM: footAhead });
      w.push({ label: 'main hoist rope along the boom', weightKn: kgToKn(kgPerM * lengthM), armM: along(lengthM / 2) });
      if (hangM > 0) w.push({ label: `main hoist rope, ${parts} falls of ${fmt(hangM)} m`, weightKn: kgToKn(kgPerM * parts * hangM), armM: hookRadiusM });
    }
    if (auxOn && auxDrum && auxRope?.massKgPerM != null) {
      const kgPerM = auxRope.massKgPerM;
      if (auxDrum.leadToBoomFootM !== null) w.push({ label: 'auxiliary hoist rope, drum to boom foot', weightKn: kgToKn(kgPerM * auxDrum.leadToBoomFootM), armM: footAhead });
      w.push({ label: 'auxiliary hoist rope along the boom', weightKn: kgToKn(kgPerM * (lengthM + auxReach)), armM: along((lengthM + auxReach) / 2) });
      if (hangM > 0) w.push({ label: `auxiliary hoist rope, one fall of ${fmt(hangM)} m`, weightKn: kgToKn(kgPerM * hangM), armM: auxRadius });
    }
    return w;
  };

  const missing = notIncluded.length > 0;
  const statusOf = (pressureKpa: number): FigureStatus => (pressureKpa > allowable ? 'fail' : missing ? 'caution' : unverified ? 'unverified' : 'pass');
  const sourceNote = unverified
    ? 'allowable pressure has no ground source yet: unverified'
    : source.kind === 'temporary_works_design'
      ? `allowable pressure from temporary-works design ${source.reference} by ${source.designer}`
      : `allowable pressure from ${source.reference}`;
  const missingNote = missing ? `; NOT INCLUDED: ${notIncluded.join('; ')}` : '';
  const stripM = config.mats.used ? Math.min(config.mats.widthM, tracks.lengthM) : undefined;
  const results: LoadCaseResult[] = [];
  const weightLines: string[] = [];

  /** Sweeps the slew for each weight set (the hanging rope's extremes) and keeps the worse at every angle. */
  const evaluate = (key: CaseKey, weightSets: readonly GroundWeight[][], geometryNote: string) => {
    const label = `Ground pressure: ${caseLabels[key]}`;
    const suffix = config.mats.used ? ' without mats' : '';
    const figKey = `ground.${key}`;
    guarded(figures, figKey, 'ground', label + suffix, undefined, () => {
      let sweeps: { sweep: SlewSweepResult; verticalLoadKn: number; momentKnm: number }[];
      try {
        sweeps = weightSets.map((weights) => {
          const verticalLoadKn = finiteResult('heaviestLoad.loadT', weights.reduce((sum, w) => sum + w.weightKn, 0));
          const momentKnm = finiteResult('heaviestLoad.radiusM', weights.reduce((sum, w) => sum + w.weightKn * w.armM, 0));
          return { sweep: slewPressureSweep({ ...footprint, verticalLoadKn, momentKnm, stripLengthM: stripM }), verticalLoadKn, momentKnm };
        });
      } catch (error) {
        if (error instanceof CalcInputError && error.field === 'eccentricityM') {
          figures.push(figure(figKey, 'ground', label + suffix, 'Overturns', 'fail', false, `the resultant must stay inside the tracks at every slew angle; ${WEIGHTS_RULE}`, `${error.message}; ${geometryNote}`));
          return;
        }
        throw error;
      }
      // The worse weight set at every angle.
      const governing = sweeps.reduce((a, b) => (b.sweep.worst.pressureKpa > a.sweep.worst.pressureKpa ? b : a));
      const points = governing.sweep.points.map((p, i) => sweeps.reduce((best, s) => (s.sweep.points[i].pressureKpa > best.pressureKpa ? s.sweep.points[i] : best), p));
      const worst = points.reduce((a, b) => (b.pressureKpa > a.pressureKpa * (1 + 1e-9) ? b : a));
      const overEnd = points.find((p) => p.angleDeg === 0)!;
      const overSide = points.find((p) => p.angleDeg === 90)!;
      const rule = `${governing.sweep.rule}; ${governing.sweep.points.some((p) => p.rigidPlaneKpa !== null) ? 'rigid plane: ' : ''}${tracks.count === 2 ? 'q(x, y) = V/A + M_along·x/I_y + M_across·y/I_x with no tension (contact area iterated to equilibrium); ' : 'rigid plane not applied: the data does not give one track on each side; '}per track: heavier side V/2 + |M_across| ÷ gauge (gauge ${plain(footprint.gaugeM)} m, the raising gauge), the moment along the tracks shared equally, eccentric footing theory along the track (Das, Principles of Foundation Engineering); V and M from the weights listed under “Weights in the ground pressure”; ${SLEW_NOTE}${sweeps.length > 1 ? '; hanging hoist rope taken both at its longest (hook at the ground) and its shortest (hook block at the tip), the worse kept at each angle' : ''}`;
      const value = `${q.pressure(worst.pressureKpa, 'up')} at ${plain(worst.angleDeg)}° slew, ${worst.method} (allowable ${ratingOf(q, 'pressure', allowable)})${missing ? ', weights not included' : ''}`;
      const detail = `${geometryNote}; V ${fmt(governing.verticalLoadKn)} kN, M ${fmt(governing.momentKnm)} kN·m; worst at ${plain(worst.angleDeg)}° at the ${whereWords(worst)}: per track ${fmtUp(worst.perTrackKpa)} kPa, rigid plane ${worst.rigidPlaneKpa === null ? 'not applied' : `${fmtUp(worst.rigidPlaneKpa)} kPa`}; over the end ${fmtUp(overEnd.pressureKpa)} kPa, over the side ${fmtUp(overSide.pressureKpa)} kPa; ${sourceNote}${missingNote}`;
      figures.push(figure(figKey, 'ground', label + suffix, value, statusOf(worst.pressureKpa), false, rule, detail));

      let mats: LoadCaseResult['mats'] = null;
      if (config.mats.used && stripM !== undefined) {
        const matKey = `${figKey}.mats`;
        mats = guarded(figures, matKey, 'ground', `${label} with mats`, null as LoadCaseResult['mats'], () => {
          // One mat under the heavy end of the heavier track, laid across it: its length spans the
          // track width, its width runs along the track and carries that much of the pressure block.
          // Checked at every slew angle; the most loaded one counts.
          let best: { m: MatPressureResult; point: SlewPoint } | null = null;
          for (const point of points) {
            // The far half of the turn mirrors the near half (the tracks are mirror images about their axis).
            if (point.angleDeg > 180) continue;
            const strip = point.heavyEndStrip;
            if (!strip || strip.contactLengthM <= 0) continue;
            let m: MatPressureResult;
            try {
              m = matPressure({
                loadKn: strip.loadKn,
                contactLengthM: strip.contactLengthM,
                contactWidthM: tracks.shoeWidthM,
                matLengthM: config.mats.widthM,
                matWidthM: config.mats.lengthM,
                matThicknessM: config.mats.thicknessM,
                matWeightKn: kgToKn(config.mats.weightKg),
              });
            } catch (error) {
              if (error instanceof CalcInputError && error.field === 'matWidthM') {
                throw new CalcInputError('mats.lengthM', `the mat (${plain(config.mats.lengthM)} m) is shorter than the track shoe is wide (${plain(tracks.shoeWidthM)} m)`);
              }
              throw error;
            }
            if (!best || m.totalPressureKpa > best.m.totalPressureKpa * (1 + 1e-9)) best = { m, point };
          }
          if (!best) throw new CalcInputError('mats.widthM', 'no part of the track end under the mat is in contact at any slew angle');
          const { m, point } = best;
          const matRule = `the most loaded mat over the whole slew range: under the heavy end of the heavier track, carrying the pressure block over its width (${plain(config.mats.widthM)} m along the track, the larger load of the per-track and rigid-plane blocks); ${m.rule}`;
          figures.push(
            figure(
              matKey,
              'ground',
              `${label} with mats`,
              `${q.pressure(m.totalPressureKpa, 'up')} at ${plain(point.angleDeg)}° slew (allowable ${ratingOf(q, 'pressure', allowable)})${missing ? ', weights not included' : ''}`,
              statusOf(m.totalPressureKpa),
              false,
              matRule,
              `${fmt(point.heavyEndStrip!.loadKn)} kN on ${fmt(m.bearingLengthM, 2)} m × ${fmt(m.bearingWidthM, 2)} m, mat weight ${fmt(m.matSelfWeightPressureKpa)} kPa; ${sourceNote}${missingNote}`,
            ),
          );
          return { pressureKpa: m.totalPressureKpa, angleDeg: point.angleDeg, rule: matRule };
        });
      }
      results.push({
        key,
        label: caseLabels[key],
        verticalLoadKn: governing.verticalLoadKn,
        momentKnm: governing.momentKnm,
        slew: points.filter((p) => p.angleDeg <= 180).map((p) => ({ angleDeg: p.angleDeg, pressureKpa: p.pressureKpa })),
        worst,
        overEnd,
        overSide,
        track: governing.sweep.worstTrack,
        mats,
        allowablePressureKpa: allowable,
      });
    });
  };

  const describe = (name: string, weights: readonly GroundWeight[]) =>
    weightLines.push(`${name}: ${weights.map((w) => `${w.label} ${fmt(w.weightKn)} kN at ${fmt(w.armM, 2)} m`).join(', ')}`);

  // Raising: the boom lies horizontal, the hook block at the tip, no rope hanging.
  const raising = [...fixed, ...boomWeights(1, footAhead + lengthM, 0)];
  describe('raising', raising);
  evaluate('raising', [raising], `boom horizontal: its centre of gravity ${fmt(footAhead + boomCog, 2)} m out, hook block at the tip ${fmt(footAhead + lengthM, 2)} m out`);

  const radiusM = config.heaviestLoad.radiusM;
  const projected = radiusM - footAhead;
  if (boom.cosBoomAngle === null || projected > lengthM) {
    cannot('the planned radius is beyond the boom’s reach', ['lift', 'unloaded']);
  } else if (projected <= 0) {
    cannot(`the planned radius ${plain(radiusM)} m is inside the boom foot (${plain(footAhead)} m ahead of the slewing centre)`, ['lift', 'unloaded']);
  } else {
    const cos = projected / lengthM;
    const sin = Math.sqrt(Math.max(0, 1 - cos * cos));
    const tipHeightM = footHeight + lengthM * sin;
    const liftKn = tonnesForceToKn(config.heaviestLoad.loadT + config.heaviestLoad.riggingT);
    const load: GroundWeight = { label: 'load and rigging', weightKn: liftKn, armM: radiusM };
    const angleNote = `boom at ${fmt((Math.acos(cos) * 180) / Math.PI)}° to put the hook at ${plain(radiusM)} m from the slewing centre (foot ${plain(footAhead)} m ahead): its centre of gravity ${fmt(footAhead + boomCog * cos, 2)} m out, tip ${fmt(tipHeightM)} m up`;
    // The longest hang reaches the lowest hook position the planner gave (below ground adds rope).
    const longestHangM = tipHeightM - Math.min(0, config.mainHook.lowestHookPositionM);
    const hangs = mainRope?.massKgPerM != null || (auxOn && auxRope?.massKgPerM != null) ? [longestHangM, 0] : [0];
    const lifting = hangs.map((h) => [...fixed, ...boomWeights(cos, radiusM, h), load]);
    describe('heaviest lift (hook at the ground)', lifting[0]);
    evaluate('lift', lifting, `${angleNote}; load, rigging and hook block at ${plain(radiusM)} m`);
    const unloaded = hangs.map((h) => [...fixed, ...boomWeights(cos, radiusM, h)]);
    evaluate('unloaded', unloaded, `${angleNote}; no load, hook block at the radius`);
  }

  figures.push(
    figure(
      'ground.weights',
      'ground',
      'Weights in the ground pressure',
      missing ? `Not included: ${notIncluded.join('; ')}. Complete the crane model’s data (Fleet) to include them.` : 'Every weight in the crane data is included',
      missing ? 'caution' : 'info',
      false,
      `${WEIGHTS_RULE}; a weight the crane data does not give is listed here and keeps every ground figure from passing until the data is completed (fleet: the crane model’s arrangement data)`,
      weightLines.join(' | '),
    ),
  );
  return results;
}
