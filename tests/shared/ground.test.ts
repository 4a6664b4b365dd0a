import { describe, expect, it } from 'vitest';
import {
  TYPICAL_ALLOWABLE_PRESSURES,
  TYPICAL_ALLOWABLE_PRESSURES_LABEL,
  matAreaRequiredM2,
  matPressure,
  trackPressure,
} from '../../shared/calc';
import { expectCalcError, relErr } from './helpers';

describe('trackPressure: eccentric footing theory (e.g. Das, Principles of Foundation Engineering)', () => {
  it('reinforced-concrete course worked example: B = 2.0 m, e = 0.125 m (< B/6 = 0.333) → q = 412.5 / 187.5 kPa', () => {
    // The example is a 1 m strip carrying 600 kN (average 300 kPa).
    const r = trackPressure({ verticalLoadKn: 600, eccentricityM: 0.125, trackLengthM: 2, trackWidthM: 1, tracks: 1 });
    expect(r.distribution).toBe('trapezoidal');
    expect(r.maxPressureKpa).toBeCloseTo(412.5, 9);
    expect(r.minPressureKpa).toBeCloseTo(187.5, 9);
    expect(r.contactLengthM).toBe(2);
  });

  it('published tower-crane base worked example: 7 m × 7 m, N = 2687.5 kN, e = 4200/2687.5 = 1.563 m > L/6 → L\' = 5.811 m, q_max ≈ 132.2 kPa', () => {
    const r = trackPressure({ verticalLoadKn: 2687.5, eccentricityM: 4200 / 2687.5, trackLengthM: 7, trackWidthM: 7, tracks: 1 });
    expect(r.distribution).toBe('triangular');
    expect(r.partialContact).toBe(true);
    // The example rounds e to 1.563 m before computing L', hence two decimals.
    expect(r.contactLengthM).toBeCloseTo(5.811, 2);
    expect(relErr(r.maxPressureKpa, 132.2)).toBeLessThan(0.002);
    expect(r.minPressureKpa).toBe(0);
  });

  it('no eccentricity: uniform P/(BL) per track, the tracks sharing the load equally', () => {
    const r = trackPressure({ verticalLoadKn: 2600, eccentricityM: 0, trackLengthM: 9.2, trackWidthM: 1.2, tracks: 2 });
    expect(r.distribution).toBe('uniform');
    expect(r.loadPerTrackKn).toBe(1300);
    expect(r.maxPressureKpa).toBeCloseTo(1300 / (9.2 * 1.2), 9);
    expect(r.minPressureKpa).toBeCloseTo(r.maxPressureKpa, 9);
  });

  it('at e = L/6 the block is a full-length triangle, q_max = 2P/(BL), and both formulas agree there', () => {
    const at = trackPressure({ verticalLoadKn: 1000, eccentricityM: 9.2 / 6, trackLengthM: 9.2, trackWidthM: 1.2, tracks: 1 });
    expect(at.distribution).toBe('triangular');
    expect(at.maxPressureKpa).toBeCloseTo(2000 / (9.2 * 1.2), 9);
    expect(at.contactLengthM).toBeCloseTo(9.2, 9);
    const justBeyond = trackPressure({ verticalLoadKn: 1000, eccentricityM: 9.2 / 6 + 1e-9, trackLengthM: 9.2, trackWidthM: 1.2, tracks: 1 });
    expect(justBeyond.maxPressureKpa).toBeCloseTo(at.maxPressureKpa, 5);
  });

  it('statics check (not a published example): the pressure block carries P and its centroid sits at e', () => {
    const p = 1000;
    const l = 9.2;
    const b = 1.2;
    for (const e of [0.3, 1.2, 2.5, 4.0]) {
      const r = trackPressure({ verticalLoadKn: p, eccentricityM: e, trackLengthM: l, trackWidthM: b, tracks: 1 });
      const c = r.contactLengthM;
      // Linear block from q_max at the heavy end to q_min at distance c.
      const force = ((r.maxPressureKpa + r.minPressureKpa) / 2) * c * b;
      const momentAboutHeavyEnd = b * ((r.minPressureKpa * c * c) / 2 + ((r.maxPressureKpa - r.minPressureKpa) * c * c) / 6);
      expect(force).toBeCloseTo(p, 6);
      expect(l / 2 - momentAboutHeavyEnd / force).toBeCloseTo(e, 6);
    }
  });

  it('e ≥ L/2 overturns and is refused, naming the eccentricity', () => {
    expectCalcError(() => trackPressure({ verticalLoadKn: 1000, eccentricityM: 4.6, trackLengthM: 9.2, trackWidthM: 1.2, tracks: 2 }), 'eccentricityM');
    expectCalcError(() => trackPressure({ verticalLoadKn: 1000, eccentricityM: -5, trackLengthM: 9.2, trackWidthM: 1.2, tracks: 2 }), 'eccentricityM');
  });
});

describe('mats', () => {
  it('mat area: A = (P + W) / q_allowable (Duerr 2010, Eq. 1): 1,500 kN + 50 kN on 150 kPa → 10.33 m²', () => {
    const r = matAreaRequiredM2({ loadKn: 1500, allowablePressureKpa: 150, matWeightKn: 50 });
    expect(r.areaM2).toBeCloseTo(1550 / 150, 9);
    expect(r.rule).toMatch(/Duerr/);
  });

  it('45° spread through the thickness (common practice, no source): 1.2 × 1.0 m pad on a 0.3 m mat bears on 1.8 × 1.6 m', () => {
    const r = matPressure({ loadKn: 576, contactLengthM: 1.2, contactWidthM: 1.0, matLengthM: 5, matWidthM: 2, matThicknessM: 0.3 });
    expect(r.bearingLengthM).toBeCloseTo(1.8, 9);
    expect(r.bearingWidthM).toBeCloseTo(1.6, 9);
    expect(r.pressureKpa).toBeCloseTo(200, 9);
    expect(r.pressureWithoutMatKpa).toBeCloseTo(480, 9);
    expect(r.rule).toMatch(/common practice, no source/);
  });

  it('the spread never goes past the mat edge', () => {
    const r = matPressure({ loadKn: 100, contactLengthM: 1.2, contactWidthM: 1.0, matLengthM: 1.4, matWidthM: 1.1, matThicknessM: 0.3 });
    expect(r.bearingLengthM).toBe(1.4);
    expect(r.bearingWidthM).toBe(1.1);
  });

  it('refuses a mat smaller than the contact it carries', () => {
    expectCalcError(() => matPressure({ loadKn: 100, contactLengthM: 2, contactWidthM: 1, matLengthM: 1.5, matWidthM: 2, matThicknessM: 0.3 }), 'matLengthM');
  });

  it('typical allowable pressures are labelled guidance only and from memory', () => {
    expect(TYPICAL_ALLOWABLE_PRESSURES.length).toBeGreaterThan(5);
    expect(TYPICAL_ALLOWABLE_PRESSURES_LABEL).toMatch(/Guidance only/);
    expect(TYPICAL_ALLOWABLE_PRESSURES_LABEL).toMatch(/from memory/);
    for (const row of TYPICAL_ALLOWABLE_PRESSURES) {
      if (row.maxKpa !== null) expect(row.maxKpa).toBeGreaterThan(row.minKpa);
    }
  });
});
