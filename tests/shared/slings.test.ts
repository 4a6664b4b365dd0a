import { describe, expect, it } from 'vitest';
import { MINIMUM_SLING_ANGLE_DEG, slingLegTensionKn, slingLegTensionsFromCog } from '../../shared/calc';
import { expectCalcError } from './helpers';

describe('slingLegTensionKn: T = W / (n · sin θ) (ASME B30.9)', () => {
  // Tension factors printed in a sling maker's published angle chart: 90° 1.000, 60° 1.155, 45° 1.414, 30° 2.000.
  const chart: Array<[number, number]> = [
    [90, 1],
    [60, 1.155],
    [45, 1.414],
    [30, 2],
  ];
  for (const [angle, factor] of chart) {
    it(`sling maker's angle chart: ${angle}° from horizontal → tension factor ${factor}`, () => {
      expect(slingLegTensionKn({ loadKn: 10, legs: 1, angleFromHorizontalDeg: angle }).tensionFactor).toBeCloseTo(factor, 3);
    });
  }

  it('sling maker\'s worked example: 1,000 lb on two legs at 60° → 577 lb per leg; at 45° → 707 lb', () => {
    expect(slingLegTensionKn({ loadKn: 1000, legs: 2, angleFromHorizontalDeg: 60 }).legTensionKn).toBeCloseTo(577.4, 1);
    expect(slingLegTensionKn({ loadKn: 1000, legs: 2, angleFromHorizontalDeg: 45 }).legTensionKn).toBeCloseTo(707.1, 1);
  });

  it('ASME B30.9: no sling angle under 30° from horizontal', () => {
    expect(MINIMUM_SLING_ANGLE_DEG).toBe(30);
    expectCalcError(() => slingLegTensionKn({ loadKn: 10, legs: 2, angleFromHorizontalDeg: 29.9 }), 'angleFromHorizontalDeg');
    expectCalcError(() => slingLegTensionKn({ loadKn: 10, legs: 2, angleFromHorizontalDeg: 91 }), 'angleFromHorizontalDeg');
    expectCalcError(() => slingLegTensionKn({ loadKn: 10, legs: 0, angleFromHorizontalDeg: 60 }), 'legs');
  });
});

describe('slingLegTensionsFromCog: leg share W·d_other/(d1+d2), ÷ sin θ (rigging handbooks)', () => {
  it('sling supplier\'s published example: 10,000 lb, pick points 8 ft and 2 ft from the CoG → 2,000 lb and 8,000 lb', () => {
    const r = slingLegTensionsFromCog({ loadKn: 10000, distancesToCogM: [8, 2], angleFromHorizontalDeg: 90 });
    expect(r.legs[0].tensionKn).toBeCloseTo(2000, 9);
    expect(r.legs[1].tensionKn).toBeCloseTo(8000, 9);
  });

  it('published training example: 4,000 lb, D1 = 2, D2 = 10, H = 3, S1 = 4 → TS1 = 4,444.44 lb', () => {
    const theta1 = (Math.asin(3 / 4) * 180) / Math.PI;
    const r = slingLegTensionsFromCog({ loadKn: 4000, distancesToCogM: [2, 10], angleFromHorizontalDeg: [theta1, theta1] });
    expect(r.legs[0].tensionKn).toBeCloseTo(4444.44, 2);
  });

  it('the same example\'s second leg (S2 = 14, H = 3 → 12.4° from horizontal) is refused under ASME B30.9', () => {
    const theta1 = (Math.asin(3 / 4) * 180) / Math.PI;
    const theta2 = (Math.asin(3 / 14) * 180) / Math.PI;
    expectCalcError(
      () => slingLegTensionsFromCog({ loadKn: 4000, distancesToCogM: [2, 10], angleFromHorizontalDeg: [theta1, theta2] }),
      'angleFromHorizontalDeg.1',
    );
  });

  it('refuses two pick points both on the centre of gravity', () => {
    expectCalcError(() => slingLegTensionsFromCog({ loadKn: 10, distancesToCogM: [0, 0], angleFromHorizontalDeg: 60 }), 'distancesToCogM');
  });
});
