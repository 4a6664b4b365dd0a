// Property tests (fast-check, fixed seed and run count so a failure reproduces).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as calc from '../../shared/calc';
import { CalcInputError } from '../../shared/calc';
import { allNumbers, demoAssistCrane } from './helpers';

const FC = { numRuns: 200, seed: 424242 };
const chart = demoAssistCrane().charts[1];
const limits = { gustMs: 12, meanMs: 9 };

describe('physical properties', () => {
  it('more parts of line never raise the lead-line pull', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e5, noNaN: true }),
        fc.integer({ min: 1, max: 39 }),
        fc.double({ min: 0.5, max: 1, noNaN: true }),
        fc.integer({ min: 0, max: 5 }),
        (loadKn, parts, sheaveEfficiency, extraLeadSheaves) => {
          const fewer = calc.leadLinePull({ loadKn, parts, sheaveEfficiency, extraLeadSheaves }).leadLinePullKn;
          const more = calc.leadLinePull({ loadKn, parts: parts + 1, sheaveEfficiency, extraLeadSheaves }).leadLinePullKn;
          return more <= fewer;
        },
      ),
      FC,
    );
  });

  it('a steeper sling never raises the leg tension (equal legs and centre-of-gravity shares)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e5, noNaN: true }),
        fc.integer({ min: 1, max: 4 }),
        fc.double({ min: 30, max: 90, noNaN: true }),
        fc.double({ min: 30, max: 90, noNaN: true }),
        fc.double({ min: 0.01, max: 20, noNaN: true }),
        fc.double({ min: 0.01, max: 20, noNaN: true }),
        (loadKn, legs, a, b, d1, d2) => {
          const [flat, steep] = a <= b ? [a, b] : [b, a];
          const tFlat = calc.slingLegTensionKn({ loadKn, legs, angleFromHorizontalDeg: flat }).legTensionKn;
          const tSteep = calc.slingLegTensionKn({ loadKn, legs, angleFromHorizontalDeg: steep }).legTensionKn;
          const cFlat = calc.slingLegTensionsFromCog({ loadKn, distancesToCogM: [d1, d2], angleFromHorizontalDeg: flat }).legs;
          const cSteep = calc.slingLegTensionsFromCog({ loadKn, distancesToCogM: [d1, d2], angleFromHorizontalDeg: steep }).legs;
          return tSteep <= tFlat && cSteep[0].tensionKn <= cFlat[0].tensionKn && cSteep[1].tensionKn <= cFlat[1].tensionKn;
        },
      ),
      FC,
    );
  });

  it('a mat never raises the pressure the load puts on the ground', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e4, noNaN: true }),
        fc.double({ min: 0.1, max: 10, noNaN: true }),
        fc.double({ min: 0.1, max: 3, noNaN: true }),
        fc.double({ min: 0, max: 5, noNaN: true }),
        fc.double({ min: 0, max: 3, noNaN: true }),
        fc.double({ min: 0.01, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 60, noNaN: true }),
        (loadKn, cl, cw, extraL, extraW, t, angle) => {
          const r = calc.matPressure({
            loadKn,
            contactLengthM: cl,
            contactWidthM: cw,
            matLengthM: cl + extraL,
            matWidthM: cw + extraW,
            matThicknessM: t,
            spreadAngleDeg: angle,
          });
          return r.pressureKpa <= r.pressureWithoutMatKpa * (1 + 1e-12) && r.pressureKpa >= 0;
        },
      ),
      FC,
    );
  });

  it('track pressure is never negative, max ≥ min, and the block always carries the load', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1e5, noNaN: true }),
        fc.double({ min: -0.999, max: 0.999, noNaN: true }),
        fc.double({ min: 1, max: 15, noNaN: true }),
        fc.double({ min: 0.3, max: 2, noNaN: true }),
        fc.integer({ min: 1, max: 4 }),
        (v, eFraction, l, b, tracks) => {
          const r = calc.trackPressure({ verticalLoadKn: v, eccentricityM: (eFraction * l) / 2, trackLengthM: l, trackWidthM: b, tracks });
          const carried = ((r.maxPressureKpa + r.minPressureKpa) / 2) * r.contactLengthM * b;
          return (
            r.minPressureKpa >= 0 &&
            r.maxPressureKpa >= r.minPressureKpa &&
            Math.abs(carried - v / tracks) <= 1e-6 * Math.max(1, v)
          );
        },
      ),
      FC,
    );
  });
});

type Kind = 'positive' | 'nonNegative' | 'finite' | 'count' | 'countOrZero' | 'efficiency' | 'slingAngle';

interface Entry {
  name: string;
  base: Record<string, number>;
  fields: Record<string, Kind>;
  call: (input: Record<string, number>) => unknown;
}

// Every numeric input of every exported calculation, with a valid base case.
const entries: Entry[] = [
  {
    name: 'leadLinePull',
    base: { loadKn: 100, parts: 4, sheaveEfficiency: 0.96, extraLeadSheaves: 1 },
    fields: { loadKn: 'nonNegative', parts: 'count', sheaveEfficiency: 'efficiency', extraLeadSheaves: 'countOrZero' },
    call: (i) => calc.leadLinePull({ loadKn: i.loadKn, parts: i.parts, sheaveEfficiency: i.sheaveEfficiency, extraLeadSheaves: i.extraLeadSheaves }),
  },
  {
    name: 'requiredParts',
    base: { loadKn: 500, permissibleLinePullKn: 120, sheaveEfficiency: 0.96, extraLeadSheaves: 1 },
    fields: { loadKn: 'nonNegative', permissibleLinePullKn: 'positive', sheaveEfficiency: 'efficiency', extraLeadSheaves: 'countOrZero' },
    call: (i) =>
      calc.requiredParts({
        loadKn: i.loadKn,
        permissibleLinePullKn: i.permissibleLinePullKn,
        sheaveEfficiency: i.sheaveEfficiency,
        extraLeadSheaves: i.extraLeadSheaves,
      }),
  },
  {
    name: 'minimumBreakingForceKn',
    base: { diameterMm: 28, gradeNpmm2: 1960, factorK: 0.356 },
    fields: { diameterMm: 'positive', gradeNpmm2: 'positive', factorK: 'efficiency' },
    call: (i) => calc.minimumBreakingForceKn({ diameterMm: i.diameterMm, gradeNpmm2: i.gradeNpmm2, factorK: i.factorK }),
  },
  {
    name: 'designFactor',
    base: { minimumBreakingForceKn: 700, linePullKn: 130 },
    fields: { minimumBreakingForceKn: 'positive', linePullKn: 'positive' },
    call: (i) => calc.designFactor({ minimumBreakingForceKn: i.minimumBreakingForceKn, linePullKn: i.linePullKn }),
  },
  {
    name: 'dOverDCheck',
    base: { pitchDiameterMm: 560, ropeDiameterMm: 28 },
    fields: { pitchDiameterMm: 'positive', ropeDiameterMm: 'positive' },
    call: (i) => calc.dOverDCheck({ pitchDiameterMm: i.pitchDiameterMm, ropeDiameterMm: i.ropeDiameterMm, element: 'loadSheave' }),
  },
  {
    name: 'fleetAngleDeg',
    base: { offsetM: 0.5, distanceM: 15 },
    fields: { offsetM: 'nonNegative', distanceM: 'positive' },
    call: (i) => calc.fleetAngleDeg({ offsetM: i.offsetM, distanceM: i.distanceM }),
  },
  {
    name: 'ropeLengthRequiredM',
    base: { parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64, wrapsLeftOnDrum: 2 },
    fields: { parts: 'count', reeveHeightM: 'nonNegative', leadLengthM: 'nonNegative', drumDiameterM: 'positive', wrapsLeftOnDrum: 'nonNegative' },
    call: (i) =>
      calc.ropeLengthRequiredM({
        parts: i.parts,
        reeveHeightM: i.reeveHeightM,
        leadLengthM: i.leadLengthM,
        drumDiameterM: i.drumDiameterM,
        wrapsLeftOnDrum: i.wrapsLeftOnDrum,
      }),
  },
  {
    name: 'wrapsLeftOnDrum',
    base: { parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64, ropeLengthM: 300 },
    fields: { parts: 'count', reeveHeightM: 'nonNegative', leadLengthM: 'nonNegative', drumDiameterM: 'positive', ropeLengthM: 'positive' },
    call: (i) =>
      calc.wrapsLeftOnDrum({
        parts: i.parts,
        reeveHeightM: i.reeveHeightM,
        leadLengthM: i.leadLengthM,
        drumDiameterM: i.drumDiameterM,
        ropeLengthM: i.ropeLengthM,
      }),
  },
  {
    name: 'slingLegTensionKn',
    base: { loadKn: 80, legs: 2, angleFromHorizontalDeg: 60 },
    fields: { loadKn: 'nonNegative', legs: 'count', angleFromHorizontalDeg: 'slingAngle' },
    call: (i) => calc.slingLegTensionKn({ loadKn: i.loadKn, legs: i.legs, angleFromHorizontalDeg: i.angleFromHorizontalDeg }),
  },
  {
    name: 'slingLegTensionsFromCog',
    base: { loadKn: 80, 'distancesToCogM.0': 2, 'distancesToCogM.1': 3, angleFromHorizontalDeg: 60 },
    fields: { loadKn: 'nonNegative', 'distancesToCogM.0': 'nonNegative', 'distancesToCogM.1': 'nonNegative', angleFromHorizontalDeg: 'slingAngle' },
    call: (i) =>
      calc.slingLegTensionsFromCog({
        loadKn: i.loadKn,
        distancesToCogM: [i['distancesToCogM.0'], i['distancesToCogM.1']],
        angleFromHorizontalDeg: i.angleFromHorizontalDeg,
      }),
  },
  {
    name: 'chartCapacityKn',
    base: { radiusM: 7 },
    fields: { radiusM: 'positive' },
    call: (i) => calc.chartCapacityKn(chart, i.radiusM),
  },
  {
    name: 'assistLiftCheck',
    base: { liftKn: 40, riggingKn: 3, radiusM: 7 },
    fields: { liftKn: 'nonNegative', riggingKn: 'nonNegative', radiusM: 'positive' },
    call: (i) => calc.assistLiftCheck({ liftKn: i.liftKn, riggingKn: i.riggingKn, chart, radiusM: i.radiusM }),
  },
  {
    name: 'trackPressure',
    base: { verticalLoadKn: 2600, eccentricityM: 0.8, trackLengthM: 9.2, trackWidthM: 1.2, tracks: 2 },
    fields: { verticalLoadKn: 'nonNegative', eccentricityM: 'finite', trackLengthM: 'positive', trackWidthM: 'positive', tracks: 'count' },
    call: (i) =>
      calc.trackPressure({
        verticalLoadKn: i.verticalLoadKn,
        eccentricityM: i.eccentricityM,
        trackLengthM: i.trackLengthM,
        trackWidthM: i.trackWidthM,
        tracks: i.tracks,
      }),
  },
  {
    name: 'matPressure',
    base: { loadKn: 500, contactLengthM: 1.2, contactWidthM: 1, matLengthM: 5, matWidthM: 2, matThicknessM: 0.3, matWeightKn: 10 },
    fields: {
      loadKn: 'nonNegative',
      contactLengthM: 'positive',
      contactWidthM: 'positive',
      matLengthM: 'positive',
      matWidthM: 'positive',
      matThicknessM: 'positive',
      matWeightKn: 'nonNegative',
    },
    call: (i) =>
      calc.matPressure({
        loadKn: i.loadKn,
        contactLengthM: i.contactLengthM,
        contactWidthM: i.contactWidthM,
        matLengthM: i.matLengthM,
        matWidthM: i.matWidthM,
        matThicknessM: i.matThicknessM,
        matWeightKn: i.matWeightKn,
      }),
  },
  {
    name: 'matAreaRequiredM2',
    base: { loadKn: 500, allowablePressureKpa: 150 },
    fields: { loadKn: 'nonNegative', allowablePressureKpa: 'positive' },
    call: (i) => calc.matAreaRequiredM2({ loadKn: i.loadKn, allowablePressureKpa: i.allowablePressureKpa }),
  },
  { name: 'beaufortForce', base: { speedMs: 8 }, fields: { speedMs: 'nonNegative' }, call: (i) => calc.beaufortForce(i.speedMs) },
  { name: 'windPressureNpm2', base: { speedMs: 8 }, fields: { speedMs: 'nonNegative' }, call: (i) => calc.windPressureNpm2(i.speedMs) },
  {
    name: 'windCheck',
    base: { gustMs: 9, meanMs: 6 },
    fields: { gustMs: 'nonNegative', meanMs: 'nonNegative' },
    call: (i) => calc.windCheck({ gustMs: i.gustMs, meanMs: i.meanMs, limits }),
  },
  { name: 'powerLineClearanceM', base: { kv: 33 }, fields: { kv: 'positive' }, call: (i) => calc.powerLineClearanceM(i.kv) },
  {
    name: 'powerLineMinimumDistance',
    base: { voltageKv: 33 },
    fields: { voltageKv: 'positive' },
    call: (i) => calc.powerLineMinimumDistance({ voltageKv: i.voltageKv, voltageConfirmedByOwner: true, encroachmentPreventionInPlace: true }),
  },
  {
    name: 'powerLineClearanceCheck',
    base: { distanceM: 80, reachM: 66, requiredM: 6 },
    fields: { distanceM: 'positive', reachM: 'nonNegative', requiredM: 'positive' },
    call: (i) => calc.powerLineClearanceCheck({ distanceM: i.distanceM, reachM: i.reachM, requiredM: i.requiredM }),
  },
  {
    name: 'fallZoneRadiusM',
    base: { boomFootAheadM: 1.4, boomLengthM: 60, tipExtensionM: 1, marginM: 5 },
    fields: { boomFootAheadM: 'nonNegative', boomLengthM: 'positive', tipExtensionM: 'nonNegative', marginM: 'nonNegative' },
    call: (i) => calc.fallZoneRadiusM({ boomFootAheadM: i.boomFootAheadM, boomLengthM: i.boomLengthM, tipExtensionM: i.tipExtensionM, marginM: i.marginM }),
  },
  {
    name: 'platesRequired',
    base: { boomLengthM: 60, thresholdM: 66 },
    fields: { boomLengthM: 'positive', thresholdM: 'positive' },
    call: (i) => calc.platesRequired(i.boomLengthM, i.thresholdM),
  },
  ...(
    [
      ['tonnesForceToKn', 'tonnesForce', calc.tonnesForceToKn],
      ['knToTonnesForce', 'kn', calc.knToTonnesForce],
      ['lbfToKn', 'lbf', calc.lbfToKn],
      ['knToLbf', 'kn', calc.knToLbf],
      ['ftToM', 'ft', calc.ftToM],
      ['mToFt', 'm', calc.mToFt],
      ['mphToMs', 'mph', calc.mphToMs],
      ['msToMph', 'ms', calc.msToMph],
      ['kmhToMs', 'kmh', calc.kmhToMs],
      ['msToKmh', 'ms', calc.msToKmh],
      ['knotsToMs', 'knots', calc.knotsToMs],
      ['kpaToTonnesPerM2', 'kpa', calc.kpaToTonnesPerM2],
      ['tonnesPerM2ToKpa', 'tonnesPerM2', calc.tonnesPerM2ToKpa],
    ] as const
  ).map(([name, field, fn]): Entry => ({ name, base: { [field]: 10 }, fields: { [field]: 'nonNegative' }, call: (i) => fn(i[field]) })),
];

const nonFinite = fc.constantFrom(Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY);
const negative = fc.double({ max: -1e-9, noNaN: true, noDefaultInfinity: true });

function invalidFor(kind: Kind): fc.Arbitrary<number> {
  switch (kind) {
    case 'finite':
      return nonFinite;
    case 'nonNegative':
      return fc.oneof(nonFinite, negative);
    case 'positive':
      return fc.oneof(nonFinite, negative, fc.constant(0));
    case 'count':
      return fc.oneof(nonFinite, fc.integer({ min: -100, max: 0 }), fc.double({ min: 1.01, max: 9.99, noNaN: true }).filter((x) => !Number.isInteger(x)));
    case 'countOrZero':
      return fc.oneof(nonFinite, fc.integer({ min: -100, max: -1 }), fc.double({ min: 0.01, max: 0.99, noNaN: true }));
    case 'efficiency':
      return fc.oneof(nonFinite, fc.constant(0), negative, fc.double({ min: 1.0001, max: 1e6, noNaN: true }));
    case 'slingAngle':
      return fc.oneof(nonFinite, fc.double({ min: -90, max: 29.999, noNaN: true }), fc.double({ min: 90.001, max: 1e6, noNaN: true }));
  }
}

describe('invalid input', () => {
  for (const entry of entries) {
    for (const [field, kind] of Object.entries(entry.fields)) {
      it(`${entry.name}: invalid ${field} throws CalcInputError naming ${field}`, () => {
        expect(() => entry.call(entry.base)).not.toThrow();
        fc.assert(
          fc.property(invalidFor(kind), (bad) => {
            try {
              entry.call({ ...entry.base, [field]: bad });
            } catch (e) {
              return e instanceof CalcInputError && e.field === field;
            }
            return false;
          }),
          FC,
        );
      });
    }
  }

  for (const entry of entries) {
    it(`${entry.name}: any numbers in, either CalcInputError or a result with only finite numbers (never NaN)`, () => {
      const anyNumber = fc.oneof(fc.double(), fc.integer({ min: -3, max: 40 }), fc.double({ min: 0, max: 100, noNaN: true }));
      const record = fc.record(Object.fromEntries(Object.keys(entry.fields).map((k) => [k, anyNumber])));
      fc.assert(
        fc.property(record, (input) => {
          let result: unknown;
          try {
            result = entry.call(input);
          } catch (e) {
            return e instanceof CalcInputError;
          }
          return allNumbers(result).every((n) => Number.isFinite(n));
        }),
        FC,
      );
    });
  }
});
