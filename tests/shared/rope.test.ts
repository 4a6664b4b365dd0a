import { describe, expect, it } from 'vitest';
import { evaluate } from 'mathjs';
import {
  BREAKING_FORCE_FACTOR_K,
  DESIGN_FACTOR_MINIMUMS,
  D_OVER_D_MINIMUMS,
  FLEET_ANGLE_LIMITS,
  MINIMUM_WRAPS_ON_DRUM,
  dOverDCheck,
  designFactor,
  designFactorCheck,
  fleetAngleCheck,
  fleetAngleDeg,
  minimumBreakingForceKn,
  ropeLengthRequiredM,
  wrapsLeftOnDrum,
} from '../../shared/calc';
import { expectCalcError, relErr } from './helpers';

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

  it('K factors as tabulated for EN 12385-4 rope classes (rope maker\'s published calculation-variables table)', () => {
    expect(BREAKING_FORCE_FACTOR_K['6x19-FC']).toBe(0.33);
    expect(BREAKING_FORCE_FACTOR_K['6x19-IWRC']).toBe(0.356);
    expect(BREAKING_FORCE_FACTOR_K['6x36-IWRC']).toBe(0.356);
    expect(BREAKING_FORCE_FACTOR_K['8x36-FC']).toBe(0.293);
  });

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

describe('design factor (ASME B30.5 §5-1.7.1; same wording ASME B30.22 §22-1.5.1; 29 CFR 1926.1414(e)(2))', () => {
  it('minimums: running 3.5, standing 3.0, rotation-resistant 5', () => {
    expect(DESIGN_FACTOR_MINIMUMS).toEqual({ running: 3.5, standing: 3.0, rotationResistant: 5 });
  });

  it('MBF ÷ line pull', () => {
    expect(designFactor({ minimumBreakingForceKn: 760, linePullKn: 150 }).designFactor).toBeCloseTo(5.0667, 4);
  });

  it('passes at the minimum and fails just below it', () => {
    expect(designFactorCheck({ minimumBreakingForceKn: 350, linePullKn: 100, duty: 'running' }).pass).toBe(true);
    expect(designFactorCheck({ minimumBreakingForceKn: 350, linePullKn: 100.1, duty: 'running' }).pass).toBe(false);
    expect(designFactorCheck({ minimumBreakingForceKn: 300, linePullKn: 100, duty: 'standing' }).pass).toBe(true);
    expect(designFactorCheck({ minimumBreakingForceKn: 499, linePullKn: 100, duty: 'rotationResistant' }).pass).toBe(false);
  });

  it('refuses a zero line pull', () => {
    expectCalcError(() => designFactor({ minimumBreakingForceKn: 300, linePullKn: 0 }), 'linePullKn');
  });
});

describe('D/d minimums (ASME B30.5 §5-1.7.4; drum 18d ASME B30.5 and Cal/OSHA §4929)', () => {
  it('load sheaves 18, boom-hoist sheaves 15, lower block 16, drum 18', () => {
    expect(D_OVER_D_MINIMUMS).toEqual({ drum: 18, loadSheave: 18, boomHoistSheave: 15, lowerBlockSheave: 16 });
  });

  it('28 mm rope: load sheave at least 504 mm, block 448 mm; 22 mm boom-hoist rope: 330 mm', () => {
    expect(dOverDCheck({ pitchDiameterMm: 504, ropeDiameterMm: 28, element: 'loadSheave' }).pass).toBe(true);
    expect(dOverDCheck({ pitchDiameterMm: 503, ropeDiameterMm: 28, element: 'loadSheave' }).pass).toBe(false);
    expect(dOverDCheck({ pitchDiameterMm: 500, ropeDiameterMm: 28, element: 'lowerBlockSheave' }).minimumPitchDiameterMm).toBe(448);
    expect(dOverDCheck({ pitchDiameterMm: 330, ropeDiameterMm: 22, element: 'boomHoistSheave' }).pass).toBe(true);
  });
});

describe('fleet angle (Wire Rope Users Manual; limits as a setting)', () => {
  it('limits are 1½° smooth, 2° grooved, ½° minimum, with their source named', () => {
    expect(FLEET_ANGLE_LIMITS.smoothDrumMaxDeg).toBe(1.5);
    expect(FLEET_ANGLE_LIMITS.groovedDrumMaxDeg).toBe(2);
    expect(FLEET_ANGLE_LIMITS.minDeg).toBe(0.5);
    expect(FLEET_ANGLE_LIMITS.source).toMatch(/Wire Rope Users Manual/);
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

describe('rope on the drum (two full wraps minimum: ASME B30.5; Cal/OSHA Title 8 §4929; ASME B30.19 §19-1.3.2(b))', () => {
  it('minimum wraps is 2', () => {
    expect(MINIMUM_WRAPS_ON_DRUM).toBe(2);
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
