// Property tests (fast-check, fixed seed and run count so a failure reproduces).
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import * as calc from '../../shared/calc';
import { CalcInputError } from '../../shared/calc';
import type { z } from 'zod';
import { computeConfiguration } from '../../shared/planner/compute';
import { configurationSchema } from '../../shared/schemas/configuration';
import type { InventoryItem } from '../../shared/schemas/arrangement';
import { allNumbers, demoAssistCrane, demoCrane } from './helpers';

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

// The configuration schema's valid space, read from the schema itself: every number between the
// bounds the schema sets, every enum value, nullable fields both ways, arrays of a few entries.
// Fields that name something in the crane data are picked from the demo data. A field added to the
// schema later is covered without touching this test; a zod type it does not know fails loudly.
type AnyZod = z.ZodType;
interface ZodDefLike {
  type: string;
  shape?: Record<string, AnyZod>;
  innerType?: AnyZod;
  element?: AnyZod;
  in?: AnyZod;
  entries?: Record<string, string>;
  values?: unknown[];
  format?: string;
  checks?: { _zod: { def: { check: string; value?: number; inclusive?: boolean; minimum?: number; maximum?: number; format?: string } } }[];
}
const defOf = (s: AnyZod) => (s as unknown as { _zod: { def: ZodDefLike } })._zod.def;
const shapeOf = (s: AnyZod) => (s as unknown as { shape: Record<string, AnyZod> }).shape;

function numberBounds(s: AnyZod): { min: number; max: number; minExcluded: boolean; int: boolean } {
  let min = -Number.MAX_VALUE;
  let max = Number.MAX_VALUE;
  let minExcluded = false;
  let int = false;
  for (const c of defOf(s).checks ?? []) {
    const d = c._zod.def;
    if (d.check === 'greater_than' && d.value !== undefined) {
      min = d.value;
      minExcluded = !d.inclusive;
    }
    if (d.check === 'less_than' && d.value !== undefined) max = d.value;
    if (d.check === 'number_format' && (d.format === 'safeint' || d.format === 'int32')) int = true;
  }
  if (defOf(s).format === 'safeint') int = true;
  return { min, max, minExcluded, int };
}

const crane = demoCrane();
const assistCrane = demoAssistCrane();
const choice: Record<string, fc.Arbitrary<unknown>> = {
  craneUnitId: fc.constant('6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f'),
  boomLengthM: fc.oneof(fc.constantFrom(...crane.arrangements.map((a) => a.boomLengthM)), fc.double({ min: 1, max: 300, noNaN: true })),
  'mainHook.hookBlockId': fc.constantFrom(...crane.hookBlocks.map((h) => h.id)),
  'auxiliary.hookBlockId': fc.option(fc.constantFrom(...crane.hookBlocks.map((h) => h.id))),
  'assist.assistCraneId': fc.option(fc.constant('7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d')),
  'assist.chartId': fc.option(fc.constantFrom(...assistCrane.charts.map((c) => c.id))),
};

function arbitraryOf(s: AnyZod, path: string[]): fc.Arbitrary<unknown> {
  const key = path.filter((p) => p !== '#').join('.');
  if (choice[key]) return choice[key];
  const def = defOf(s);
  switch (def.type) {
    case 'object':
      return fc.record(Object.fromEntries(Object.entries(shapeOf(s)).map(([k, v]) => [k, arbitraryOf(v, [...path, k])])));
    case 'default':
    case 'prefault':
    case 'readonly':
      return arbitraryOf(def.innerType!, path);
    case 'optional':
      return fc.option(arbitraryOf(def.innerType!, path), { nil: undefined });
    case 'nullable':
      return fc.option(arbitraryOf(def.innerType!, path));
    case 'pipe':
      return arbitraryOf(def.in!, path);
    case 'array':
      return fc.array(arbitraryOf(def.element!, [...path, '#']), { maxLength: 3 });
    case 'boolean':
      return fc.boolean();
    case 'enum':
      return fc.constantFrom(...Object.values(def.entries!));
    case 'literal':
      return fc.constantFrom(...def.values!);
    case 'string':
      return def.format === 'uuid' ? fc.constant('0b6f3c1e-2d4a-4b5c-8d6e-7f8091a2b3c4') : fc.constant('x');
    case 'number': {
      const b = numberBounds(s);
      if (b.int) return fc.integer({ min: Math.ceil(b.min + (b.minExcluded ? 1 : 0)), max: Math.floor(Math.min(b.max, 1e6)) });
      // The ends of the range (where overflow hides) as often as the inside.
      const edges = [b.max, b.minExcluded ? Number.MIN_VALUE : b.min].filter((x) => Number.isFinite(x) && Math.abs(x) < Number.MAX_VALUE);
      const inside = fc.double({ min: b.min, max: b.max, minExcluded: b.minExcluded, noNaN: true, noDefaultInfinity: true });
      return edges.length ? fc.oneof(fc.constantFrom(...edges), inside) : inside;
    }
    default:
      throw new Error(`no arbitrary for zod type "${def.type}" at ${key}: teach properties.test.ts`);
  }
}

/** One filled-in configuration: nullable fields filled, one entry per array, numbers inside their range. */
function fullSample(s: AnyZod, path: string[]): unknown {
  const def = defOf(s);
  const key = path.filter((p) => p !== '#').join('.');
  const picked: Record<string, unknown> = {
    craneUnitId: '6f1c2d3e-4a5b-4c6d-8e7f-0a1b2c3d4e5f',
    boomLengthM: 36,
    'mainHook.hookBlockId': 'HB120',
    'auxiliary.hookBlockId': 'HB250',
    'assist.assistCraneId': '7a2b3c4d-5e6f-4a7b-8c9d-0e1f2a3b4c5d',
    'assist.chartId': assistCrane.charts[0].id,
  };
  if (key in picked) return picked[key];
  switch (def.type) {
    case 'object':
      return Object.fromEntries(Object.entries(shapeOf(s)).map(([k, v]) => [k, fullSample(v, [...path, k])]));
    case 'default':
    case 'prefault':
    case 'readonly':
    case 'optional':
    case 'nullable':
      return fullSample(def.innerType!, path);
    case 'pipe':
      return fullSample(def.in!, path);
    case 'array':
      return [fullSample(def.element!, [...path, '#'])];
    case 'boolean':
      return true;
    case 'enum':
      return Object.values(def.entries!)[0];
    case 'literal':
      return def.values![0];
    case 'string':
      return def.format === 'uuid' ? '0b6f3c1e-2d4a-4b5c-8d6e-7f8091a2b3c4' : 'x';
    case 'number': {
      const b = numberBounds(s);
      const lo = Math.max(b.min, 0) + (b.minExcluded || b.int ? 1 : 0);
      return Number.isFinite(b.max) && b.max < Number.MAX_VALUE ? Math.min(lo, b.max) : lo;
    }
    default:
      throw new Error(`no sample for zod type "${def.type}" at ${key}`);
  }
}

/** Every path to a number inside a value. */
function numberPaths(value: unknown, path: (string | number)[] = []): (string | number)[][] {
  if (typeof value === 'number') return [path];
  if (Array.isArray(value)) return value.flatMap((v, i) => numberPaths(v, [...path, i]));
  if (value !== null && typeof value === 'object') return Object.entries(value).flatMap(([k, v]) => numberPaths(v, [...path, k]));
  return [];
}

function withValue(value: unknown, path: (string | number)[], to: number): unknown {
  const copy = structuredClone(value) as Record<string | number, unknown>;
  let at = copy;
  for (const p of path.slice(0, -1)) at = at[p] as Record<string | number, unknown>;
  at[path[path.length - 1]] = to;
  return copy;
}

/** Every part the crane data names, serviceable and plenty of each, so every listed length can be built and every figure computed. */
const plentyOfParts: InventoryItem[] = [
  ...crane.sectionTypes.map((t) => ['section', t.id] as const),
  ...[...new Set(crane.arrangements.flatMap((a) => a.guyLines.map((g) => g.mark)))].map((m) => ['guy_line', m] as const),
  ...crane.hookBlocks.map((h) => ['hook_block', h.id] as const),
  ...crane.ropes.map((r) => ['rope', r.id] as const),
].flatMap(([kind, typeId]) => Array.from({ length: 40 }, (_, n) => ({ serial: `P-${typeId}-${n}`, kind, typeId, status: 'serviceable' as const })));

describe('the configuration schema: plausible ranges, and nothing it accepts prints Infinity or NaN', () => {
  const sample = fullSample(configurationSchema, []);

  it('a filled-in configuration (every nullable filled, one entry per list) is valid', () => {
    const parsed = configurationSchema.safeParse(sample);
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
  });

  const paths = numberPaths(sample);
  it('the filled-in configuration has the numbers a planner types (at least 25)', () => {
    expect(paths.length).toBeGreaterThanOrEqual(25);
  });
  for (const path of paths) {
    it(`${path.join('.')}: 1e308, Infinity and NaN are refused with a message naming the field`, () => {
      for (const bad of [1e308, Number.POSITIVE_INFINITY, Number.NaN]) {
        const r = configurationSchema.safeParse(withValue(sample, path, bad));
        expect(r.success).toBe(false);
        if (!r.success) {
          const own = r.error.issues.find((i) => i.path.join('.') === path.join('.'));
          expect(own, `no issue at ${path.join('.')} for ${bad}`).toBeDefined();
          if (bad === 1e308) expect(own?.message).toMatch(/or less|Above|up to|from \d+ to \d+/i);
        }
      }
    });
  }

  it('allowable ground pressure above 5,000 kPa and a line more than 5 km away are refused in words', () => {
    const ground = configurationSchema.safeParse(withValue(sample, ['ground', 'allowablePressureKpa'], 5001));
    expect(ground.success ? '' : ground.error.issues[0].message).toBe('Enter 5,000 kPa or less: a higher figure is almost certainly a typing error');
    const line = configurationSchema.safeParse(withValue(sample, ['siteHazards', 'powerLines', 0, 'distanceM'], 5001));
    expect(line.success ? '' : line.error.issues[0].message).toMatch(/^Enter 5,000 m or less/);
  });

  it('for any configuration the schema accepts, every figure is computed without Infinity or NaN in its value, rule or detail', () => {
    let builtLengths = 0;
    const anyValid = arbitraryOf(configurationSchema, [])
      .map((raw) => configurationSchema.safeParse(raw))
      .filter((r) => r.success)
      .map((r) => r.data!);
    fc.assert(
      fc.property(anyValid, fc.boolean(), (config, withAssistData) => {
        const r = computeConfiguration(config, { arrangement: crane, inventory: plentyOfParts, assistCrane: withAssistData ? assistCrane : null });
        for (const f of r.figures) {
          for (const text of [f.value, f.rule, f.detail ?? '']) expect(text).not.toMatch(/Infinity|NaN/);
        }
        for (const n of allNumbers(r)) expect(Number.isFinite(n)).toBe(true);
        if (crane.arrangements.some((a) => a.boomLengthM === config.boomLengthM)) builtLengths += 1;
      }),
      { numRuns: 150, seed: 20261203 },
    );
    // Most runs use a listed length, so the boom, rope, ground and chart figures are really computed.
    expect(builtLengths).toBeGreaterThan(50);
    // Each run computes the ground over the full slew: generous time on a busy machine.
  }, 180_000);
});
