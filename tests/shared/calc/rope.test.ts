import { describe, expect, it } from 'vitest';
import { evaluate } from 'mathjs';
import fc from 'fast-check';
import {
  BREAKING_FORCE_FACTOR_K,
  FLEET_ANGLE_LIMITS,
  dOverDCheck,
  designFactor,
  designFactorCheck,
  drumFleetAngleCheck,
  fleetAngleCheck,
  fleetAngleDeg,
  hoistRunAtLowestHook,
  minimumBreakingForceKn,
  ropeLengthRequiredM,
  wrapsLeftOnDrum,
} from '../../../shared/calc';
import { expectCalcError, relErr } from '../helpers';

describe('minimumBreakingForceKn: F = K·d²·R/1000 (ISO 2408 / EN 12385-2)', () => {
  // API Spec 9A Table C.1, class 6x7 fibre core, minimum breaking force (kN); K = 0.332 for 6x7 FC.
  const apiTableC1: Array<[number, number, number]> = [
    [20, 1770, 235],
    [26, 1770, 397],
    [26, 1960, 440],
    [28, 1770, 461],
    [40, 1770, 940],
    [40, 1960, 1040],
  ];
  for (const [d, grade, tableKn] of apiTableC1) {
    it(`API Spec 9A Table C.1, 6x7 FC, ${d} mm grade ${grade}: ${tableKn} kN`, () => {
      const r = minimumBreakingForceKn({ diameterMm: d, gradeNpmm2: grade, factorK: BREAKING_FORCE_FACTOR_K['6x7-FC'] });
      // The table prints three significant figures.
      expect(relErr(r.minimumBreakingForceKn, tableKn)).toBeLessThan(0.002);
      expect(r.rule).toMatch(/ISO 2408/);
    });
  }

  it('units: d in mm, R in N/mm², result in kN (checked with mathjs)', () => {
    const r = minimumBreakingForceKn({ diameterMm: 22, gradeNpmm2: 1960, factorK: 0.356 });
    const viaMathjs = evaluate('0.356 * (22 mm)^2 * 1960 N/mm^2').toNumber('kN');
    expect(relErr(r.minimumBreakingForceKn, viaMathjs)).toBeLessThan(1e-12);
  });

  it('refuses a zero diameter and a K above 1', () => {
    expectCalcError(() => minimumBreakingForceKn({ diameterMm: 0, gradeNpmm2: 1770, factorK: 0.33 }), 'diameterMm');
    expectCalcError(() => minimumBreakingForceKn({ diameterMm: 20, gradeNpmm2: 1770, factorK: 1.5 }), 'factorK');
  });
});

describe('design factor (ASME B30.5 §5-1.7.1; same wording ASME B30.22-2000 §22-1.5.1; 29 CFR 1926.1414(e)(2)(iii)–(iv))', () => {
  it('the rotation-resistant citation is (e)(2)(iii)–(iv), where the regulation text sets 5; (e)(3) only allows less under conditions Holdline does not apply', () => {
    expect(designFactorCheck({ minimumBreakingForceKn: 760, linePullKn: 150, duty: 'rotationResistant' }).rule).toMatch(/1926\.1414\(e\)\(2\)\(iii\)–\(iv\)/);
  });

  it('MBF ÷ line pull', () => {
    expect(designFactor({ minimumBreakingForceKn: 760, linePullKn: 150 }).designFactor).toBeCloseTo(5.0667, 4);
  });

  // ASME B30.22-2000 §22-1.5.1 (wording seen in a published copy): running ropes not less than 3.5, standing 3.0,
  // rotation-resistant 5; the same figures in ASME B30.5 §5-1.7.1 (from memory).
  it('passes at the published minimums and fails just below them', () => {
    expect(designFactorCheck({ minimumBreakingForceKn: 350, linePullKn: 100, duty: 'running' }).pass).toBe(true);
    expect(designFactorCheck({ minimumBreakingForceKn: 350, linePullKn: 100.1, duty: 'running' }).pass).toBe(false);
    expect(designFactorCheck({ minimumBreakingForceKn: 300, linePullKn: 100, duty: 'standing' }).pass).toBe(true);
    expect(designFactorCheck({ minimumBreakingForceKn: 499, linePullKn: 100, duty: 'rotationResistant' }).pass).toBe(false);
  });

  it('refuses a zero line pull', () => {
    expectCalcError(() => designFactor({ minimumBreakingForceKn: 300, linePullKn: 0 }), 'linePullKn');
  });
});

describe('D/d minimums (ASME B30.5 §5-1.7.4 (a) boom hoisting sheaves 15d, (b) load hoisting sheaves 18d, (c) lower load block sheaves 16d; §5-1.3.1(a)(3) load hoist drum 18d)', () => {
  // Wording of the sheave paragraphs as seen in published copies and a translation; paragraph numbers and the
  // boom-hoist drum's 15d (§5-1.3.2) from memory.
  const cases: [Parameters<typeof dOverDCheck>[0]['element'], number, number][] = [
    ['loadSheave', 28, 18],
    ['drum', 28, 18],
    ['lowerBlockSheave', 28, 16],
    ['boomHoistSheave', 22, 15],
    ['boomHoistDrum', 22, 15],
  ];
  for (const [element, d, ratio] of cases) {
    it(`${element}: ${d} mm rope needs ${ratio} × ${d} = ${ratio * d} mm; 1 mm less fails`, () => {
      expect(dOverDCheck({ pitchDiameterMm: ratio * d, ropeDiameterMm: d, element }).pass).toBe(true);
      expect(dOverDCheck({ pitchDiameterMm: ratio * d - 1, ropeDiameterMm: d, element }).pass).toBe(false);
      expect(dOverDCheck({ pitchDiameterMm: 1000, ropeDiameterMm: d, element }).minimumPitchDiameterMm).toBe(ratio * d);
    });
  }
});

describe('fleet angle (Wire Rope Users Manual; limits as a setting)', () => {
  it('the limits name their source', () => {
    expect(FLEET_ANGLE_LIMITS.source).toMatch(/Wire Rope Users Manual/);
  });

  it('at both flanges: a 1 m grooved drum with its sheave 15 m away and centred → 1.91° each side, passes; offset 0.1 m → atan(0.6/15) = 2.29° fails', () => {
    // Hand-worked: atan(0.5/15) = 1.909°, atan(0.6/15) = 2.291°, atan(0.4/15) = 1.528°
    const centred = drumFleetAngleCheck({ drumWidthM: 1, distanceM: 15, offsetFromDrumCentreM: 0, drumSurface: 'grooved' });
    expect(centred.largestDeg).toBeCloseTo(1.909, 3);
    expect(centred.pass).toBe(true);
    const off = drumFleetAngleCheck({ drumWidthM: 1, distanceM: 15, offsetFromDrumCentreM: 0.1, drumSurface: 'grooved' });
    expect(off.largestDeg).toBeCloseTo(2.291, 3);
    expect(off.smallestDeg).toBeCloseTo(1.528, 3);
    expect(off.pass).toBe(false);
    // the same centred geometry on a smooth drum is above 1½°
    expect(drumFleetAngleCheck({ drumWidthM: 1, distanceM: 15, offsetFromDrumCentreM: 0, drumSurface: 'smooth' }).pass).toBe(false);
  });

  it('rope maker\'s published rule of thumb: sheave 30 × a from a grooved drum ≈ 2°, 40 × a from a plain drum ≈ 1½° (a = half drum width)', () => {
    // Worked example published with it: a 1 m wide grooved drum needs the sheave 15 m away.
    expect(fleetAngleDeg({ offsetM: 0.5, distanceM: 15 }).fleetAngleDeg).toBeCloseTo(1.91, 2);
    expect(fleetAngleDeg({ offsetM: 0.5, distanceM: 20 }).fleetAngleDeg).toBeCloseTo(1.43, 2);
  });

  it('same source: 7 m from the sheave allows a grooved drum about 47 cm wide, which a smooth drum would not', () => {
    const grooved = fleetAngleCheck({ offsetM: 0.235, distanceM: 7, drumSurface: 'grooved' });
    const smooth = fleetAngleCheck({ offsetM: 0.235, distanceM: 7, drumSurface: 'smooth' });
    expect(grooved.pass).toBe(true);
    expect(smooth.pass).toBe(false);
  });

  it('flags a fleet angle under ½° (rope piles up; Wire Rope Users Manual)', () => {
    expect(fleetAngleCheck({ offsetM: 0.05, distanceM: 10, drumSurface: 'grooved' }).pass).toBe(false);
  });

  it('refuses a zero distance', () => {
    expectCalcError(() => fleetAngleDeg({ offsetM: 0.5, distanceM: 0 }), 'distanceM');
  });
});

describe('rope on the drum (no less than two full wraps with the hook in its extreme low position: ASME B30.5-2018 §5-1.3.1(a)(2)(-a))', () => {
  it('exactly two wraps left passes, a centimetre less fails', () => {
    // 4 × 30 + 60 = 180 m paid out; two wraps of π × 0.64 = 4.0212 m → 184.0212 m of rope is exactly enough
    const run = { parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64 };
    expect(wrapsLeftOnDrum({ ...run, ropeLengthM: 180 + 2 * Math.PI * 0.64 }).pass).toBe(true);
    expect(wrapsLeftOnDrum({ ...run, ropeLengthM: 180 + 2 * Math.PI * 0.64 - 0.01 }).pass).toBe(false);
  });

  // Geometry only (circumference πD), worked by hand: 4 × 30 + 60 + 2 × π × 0.64 = 184.021 m.
  it('length = parts × reeve height + lead length + wraps × πD', () => {
    const r = ropeLengthRequiredM({ parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64, wrapsLeftOnDrum: 2 });
    expect(r.ropeLengthRequiredM).toBeCloseTo(184.021, 3);
  });

  it('wrapsLeftOnDrum inverts ropeLengthRequiredM and fails when short', () => {
    const ok = wrapsLeftOnDrum({ parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64, ropeLengthM: 184.021 });
    expect(ok.wrapsLeft).toBeCloseTo(2, 3);
    const short = wrapsLeftOnDrum({ parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64, ropeLengthM: 182 });
    expect(short.pass).toBe(false);
    expect(short.ropeShortM).toBeCloseTo(2.021, 3);
    const none = wrapsLeftOnDrum({ parts: 4, reeveHeightM: 30, leadLengthM: 60, drumDiameterM: 0.64, ropeLengthM: 100 });
    expect(none.wrapsLeft).toBe(0);
    expect(none.pass).toBe(false);
  });
});

describe('hoistRunAtLowestHook: the rope paid out with the hook at its lowest', () => {
  it('60 m boom, foot pin 2.6 m, hook 20 m down a shaft, 6.5 m from drum to foot: reeve height 82.6 m, lead 66.5 m (hand-worked)', () => {
    const r = hoistRunAtLowestHook({ boomLengthM: 60, footPinHeightM: 2.6, beyondTipM: 0, lowestHookPositionM: -20, leadToBoomFootM: 6.5 });
    expect(r.reeveHeightM).toBeCloseTo(82.6, 12);
    expect(r.leadLengthM).toBeCloseTo(66.5, 12);
    expect(r.tipHeightM).toBeCloseTo(62.6, 12);
  });

  it('the auxiliary sheave 1.5 m beyond the tip adds 1.5 m to both', () => {
    const r = hoistRunAtLowestHook({ boomLengthM: 36, footPinHeightM: 2.6, beyondTipM: 1.5, lowestHookPositionM: 0, leadToBoomFootM: 7.5 });
    expect(r.reeveHeightM).toBeCloseTo(40.1, 12);
    expect(r.leadLengthM).toBeCloseTo(45, 12);
  });

  it('the boom vertical is the most rope any boom angle pays out: the tip height L·sin θ never exceeds L (geometry)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 88, noNaN: true }), fc.double({ min: 10, max: 120, noNaN: true }), (angleDeg, boomLengthM) => {
        const r = hoistRunAtLowestHook({ boomLengthM, footPinHeightM: 2.6, beyondTipM: 0, lowestHookPositionM: 0, leadToBoomFootM: 6.5 });
        expect(2.6 + boomLengthM * Math.sin((angleDeg * Math.PI) / 180)).toBeLessThanOrEqual(r.reeveHeightM + 1e-9);
      }),
      { numRuns: 200, seed: 4 },
    );
  });

  it('refuses a hook position at or above the tip', () => {
    expectCalcError(() => hoistRunAtLowestHook({ boomLengthM: 18, footPinHeightM: 2.6, beyondTipM: 0, lowestHookPositionM: 20.6, leadToBoomFootM: 6.5 }), 'lowestHookPositionM');
  });
});
