/** Ground pressure under the tracks for each load case, with and without mats. */
import { CalcInputError, finiteResult } from '../calc/errors.js';
import { matPressure, trackPressure, type MatPressureResult, type TrackPressureResult } from '../calc/ground.js';
import { tonnesForceToKn } from '../calc/units.js';
import type { HookBlock } from '../schemas/arrangement.js';
import type { Configuration, Figure, FigureStatus } from '../schemas/configuration.js';
import type { BoomOutcome } from './boom.js';
import { figure, fmt, guarded, kgToKn, plain } from './figures.js';
import type { LoadCaseResult, PlannerInputs } from './types.js';

interface Weight {
  weightKn: number;
  /** Horizontal distance from the slewing centre, positive towards the boom. */
  armM: number;
}

const WEIGHTS_RULE =
  'vertical load = machine base + raising counterweight + boom sections + hook block(s) (+ load and rigging); moment about the slewing centre = Σ weight × horizontal distance (counterweight behind = negative), the boom foot taken at the slewing centre (simplification); guy lines and ropes neglected: the data gives no weights for them';

function totals(weights: readonly Weight[]): { verticalLoadKn: number; momentKnm: number } {
  const verticalLoadKn = finiteResult('heaviestLoad.loadT', weights.reduce((sum, w) => sum + w.weightKn, 0));
  const momentKnm = finiteResult('heaviestLoad.radiusM', weights.reduce((sum, w) => sum + w.weightKn * w.armM, 0));
  return { verticalLoadKn, momentKnm };
}

/** The load on one mat-width strip at the heavy end of the pressure block, for the mat check. */
function heavyEndStrip(track: TrackPressureResult, stripLengthM: number, shoeWidthM: number): number {
  const contact = track.contactLengthM;
  const w = Math.min(stripLengthM, contact);
  const qEnd = track.minPressureKpa; // at the far end of the contact length (0 for a triangle)
  const qAtW = track.maxPressureKpa + ((qEnd - track.maxPressureKpa) * w) / contact;
  return shoeWidthM * w * ((track.maxPressureKpa + qAtW) / 2);
}

/** Ground pressure figures for every load case; the results feed the drawing. */
export function computeGround(
  config: Configuration,
  inputs: PlannerInputs,
  boom: BoomOutcome,
  hookBlock: HookBlock | null,
  figures: Figure[],
): LoadCaseResult[] {
  const { arrangement } = inputs;
  const allowable = config.ground.allowablePressureKpa;
  const unverified = config.ground.source.kind === 'none';
  const caseLabels: Record<LoadCaseResult['key'], string> = {
    raising: 'Raising (boom horizontal, no load)',
    overEnd: 'Heaviest lift over the end',
    overSide: 'Heaviest lift over the side',
    unloaded: 'Unloaded, boom at the lifting angle',
  };
  const keys: LoadCaseResult['key'][] = ['raising', 'overEnd', 'overSide', 'unloaded'];
  const cannot = (reason: string) => {
    for (const k of keys) figures.push(figure(`ground.${k}`, 'ground', `Ground pressure: ${caseLabels[k]}`, 'Cannot compute', 'fail', false, WEIGHTS_RULE, reason));
    return [];
  };
  if (!boom.listed) return cannot('no arrangement data for this boom length: counterweight and track gauge unknown');
  if (boom.boomCogFromFootM === null) return cannot('the boom has no sections to weigh');
  const listed = boom.listed;
  const boomCog = boom.boomCogFromFootM;
  const tracks = arrangement.tracks;
  const machine = arrangement.machine;
  const lengthM = config.boomLengthM;

  const base: Weight[] = [
    { weightKn: kgToKn(machine.baseWeightKg), armM: machine.cogFromSlewCentreM },
    { weightKn: kgToKn(listed.raising.counterweightKg), armM: machine.counterweight.cogFromSlewCentreM },
  ];
  // Hook blocks hang at the tip; the auxiliary hook too when it is fitted.
  let hookWeightKg = hookBlock?.weightKg ?? 0;
  if (config.auxiliary.enabled && config.auxiliary.hookBlockId) {
    hookWeightKg += arrangement.hookBlocks.find((b) => b.id === config.auxiliary.hookBlockId)?.weightKg ?? 0;
  }
  const hookKn = kgToKn(hookWeightKg);
  const liftKn = tonnesForceToKn(config.heaviestLoad.loadT + config.heaviestLoad.riggingT);
  const results: LoadCaseResult[] = [];

  const statusOf = (pressureKpa: number): FigureStatus => (pressureKpa > allowable ? 'fail' : unverified ? 'unverified' : 'pass');
  const pressureValue = (pressureKpa: number) => `${fmt(pressureKpa)} kPa max (allowable ${plain(allowable)} kPa)`;
  const sourceNote = unverified ? 'allowable pressure has no ground source yet: unverified' : `allowable pressure from ${config.ground.source.reference}`;

  const evaluate = (key: LoadCaseResult['key'], weights: readonly Weight[], side: boolean, geometryNote: string) => {
    const label = `Ground pressure: ${caseLabels[key]}`;
    const suffix = config.mats.used ? ' without mats' : '';
    const figKey = `ground.${key}`;
    guarded(figures, figKey, 'ground', label + suffix, undefined, () => {
      const { verticalLoadKn, momentKnm } = totals(weights);
      let track: TrackPressureResult;
      let detail: string;
      let rule: string;
      if (!side) {
        const e = momentKnm / verticalLoadKn;
        try {
          track = trackPressure({ verticalLoadKn, eccentricityM: e, trackLengthM: tracks.lengthM, trackWidthM: tracks.shoeWidthM, tracks: tracks.count });
        } catch (error) {
          if (error instanceof CalcInputError && error.field === 'eccentricityM') {
            figures.push(
              figure(figKey, 'ground', label + suffix, 'Overturns', 'fail', false, `e = M ÷ V along the tracks must stay inside the track length; ${WEIGHTS_RULE}`, `the resultant falls outside the tracks: e = ${fmt(e, 2)} m, half the track length ${plain(tracks.lengthM / 2)} m`),
            );
            return;
          }
          throw error;
        }
        rule = `${track.rule}; e = M ÷ V along the tracks, ${tracks.count} tracks sharing V; ${WEIGHTS_RULE}; ${geometryNote}`;
        detail = `vertical load ${fmt(verticalLoadKn)} kN, moment ${fmt(momentKnm)} kN·m, eccentricity ${fmt(e, 2)} m (${track.distribution}), ${fmt(track.loadPerTrackKn)} kN per track; ${sourceNote}`;
      } else {
        const gauge = listed.raising.trackGaugeM;
        const perSide = Math.max(1, Math.floor(tracks.count / 2));
        const heavyKn = finiteResult('heaviestLoad.loadT', verticalLoadKn / 2 + Math.abs(momentKnm) / gauge);
        const lightKn = verticalLoadKn / 2 - Math.abs(momentKnm) / gauge;
        if (lightKn < 0) {
          figures.push(
            figure(figKey, 'ground', label + suffix, 'Overturns', 'fail', false, `heavier track = V/2 + M/gauge, the lighter = V/2 − M/gauge must stay ≥ 0; ${WEIGHTS_RULE}`, `the resultant falls outside the tracks: M ÷ V = ${fmt(Math.abs(momentKnm) / verticalLoadKn, 2)} m, beyond half the ${plain(gauge)} m gauge`),
          );
          return;
        }
        // The heavier side's load, taken uniform along the track: no eccentricity along it.
        track = trackPressure({ verticalLoadKn: heavyKn, eccentricityM: 0, trackLengthM: tracks.lengthM, trackWidthM: tracks.shoeWidthM, tracks: perSide });
        rule = `heavier track = V/2 + M/gauge (gauge ${plain(gauge)} m, the raising gauge), uniform along the track; ${track.rule}; ${WEIGHTS_RULE}; ${geometryNote}`;
        detail = `vertical load ${fmt(verticalLoadKn)} kN, moment ${fmt(momentKnm)} kN·m, heavier side ${fmt(heavyKn)} kN, lighter side ${fmt(lightKn)} kN; ${sourceNote}`;
      }
      const status = statusOf(track.maxPressureKpa);
      figures.push(figure(figKey, 'ground', label + suffix, pressureValue(track.maxPressureKpa), status, true, rule, detail));

      let mats: LoadCaseResult['mats'] = null;
      if (config.mats.used) {
        const matKey = `${figKey}.mats`;
        mats = guarded(figures, matKey, 'ground', `${label} with mats`, null as LoadCaseResult['mats'], () => {
          // One mat under the heavy end of the heavier track, laid across it: its length spans the
          // track width, its width runs along the track and carries that much of the pressure block.
          const stripKn = heavyEndStrip(track, config.mats.widthM, tracks.shoeWidthM);
          const stripM = Math.min(config.mats.widthM, track.contactLengthM);
          let m: MatPressureResult;
          try {
            m = matPressure({
              loadKn: stripKn,
              contactLengthM: stripM,
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
          const matRule = `the most loaded mat: under the heavy end of the heavier track, carrying the pressure block over its width (${plain(config.mats.widthM)} m along the track); ${m.rule}`;
          figures.push(
            figure(
              matKey,
              'ground',
              `${label} with mats`,
              pressureValue(m.totalPressureKpa),
              statusOf(m.totalPressureKpa),
              true,
              matRule,
              `${fmt(stripKn)} kN on ${fmt(m.bearingLengthM, 2)} m × ${fmt(m.bearingWidthM, 2)} m, mat weight ${fmt(m.matSelfWeightPressureKpa)} kPa; ${sourceNote}`,
            ),
          );
          return { pressureKpa: m.totalPressureKpa, rule: matRule };
        });
      }
      results.push({ key, label: caseLabels[key], verticalLoadKn, momentKnm, track, mats, allowablePressureKpa: allowable });
    });
  };

  const hookWeights = (armM: number): Weight[] => (hookKn > 0 ? [{ weightKn: hookKn, armM }] : []);
  // Raising: the boom lies horizontal, its weight at its centre of gravity along the boom, the hook block at the tip.
  evaluate(
    'raising',
    [...base, { weightKn: boom.boomWeightKn, armM: boomCog }, ...hookWeights(lengthM)],
    false,
    `boom horizontal: its centre of gravity ${fmt(boomCog, 2)} m out, hook block at the tip ${plain(lengthM)} m out; taken over the end of the tracks`,
  );
  const cos = boom.cosBoomAngle;
  if (cos === null) {
    for (const k of ['overEnd', 'overSide', 'unloaded'] as const) {
      figures.push(figure(`ground.${k}`, 'ground', `Ground pressure: ${caseLabels[k]}`, 'Cannot compute', 'fail', false, WEIGHTS_RULE, 'the planned radius is beyond the boom length'));
    }
    return results;
  }
  const radiusM = config.heaviestLoad.radiusM;
  const boomArm = boomCog * cos;
  const angleNote = `boom at the angle that puts the tip over ${plain(radiusM)} m: its centre of gravity ${fmt(boomArm, 2)} m out`;
  const lifting = [...base, { weightKn: boom.boomWeightKn, armM: boomArm }, ...hookWeights(radiusM), { weightKn: liftKn, armM: radiusM }];
  evaluate('overEnd', lifting, false, `${angleNote}; load, rigging and hook block at ${plain(radiusM)} m`);
  evaluate('overSide', lifting, true, `${angleNote}; load, rigging and hook block at ${plain(radiusM)} m`);
  evaluate('unloaded', [...base, { weightKn: boom.boomWeightKn, armM: boomArm }, ...hookWeights(radiusM)], false, `${angleNote}; no load, hook block at the tip; taken over the end of the tracks`);
  return results;
}
