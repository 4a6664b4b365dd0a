import { describe, expect, it } from 'vitest';
import { MINIMUM_SLING_ANGLE_DEG, slingLegTensionKn, slingLegTensionsFromCog, slingLegTensionsFromHookHeight } from '../../../shared/calc';
import { expectCalcError } from '../helpers';

describe('slingLegTensionKn: T = W / (n · sin θ)', () => {
  // Load-angle factors 1/sin θ as sling tags and rigging cards print them (from memory): 90° 1.000, 60° 1.155, 45° 1.414, 30° 2.000.
  const chart: Array<[number, number]> = [
    [90, 1],
    [60, 1.155],
    [45, 1.414],
    [30, 2],
  ];
  for (const [angle, factor] of chart) {
    it(`load-angle factor (from memory): ${angle}° from horizontal → ${factor}`, () => {
      expect(slingLegTensionKn({ loadKn: 10, legs: 1, angleFromHorizontalDeg: angle }).tensionFactor).toBeCloseTo(factor, 3);
    });
  }

  it('KWRS, “Determining lifting load capacity of a sling” (kwrs.com product note): 1,000 lb on two legs at 60° → 577 lb per leg; at 45° → 707 lb', () => {
    expect(slingLegTensionKn({ loadKn: 1000, legs: 2, angleFromHorizontalDeg: 60 }).legTensionKn).toBeCloseTo(577.4, 1);
    expect(slingLegTensionKn({ loadKn: 1000, legs: 2, angleFromHorizontalDeg: 45 }).legTensionKn).toBeCloseTo(707.1, 1);
  });

  it('ASME B30.9 (from memory): no sling angle under 30° from horizontal', () => {
    expect(MINIMUM_SLING_ANGLE_DEG).toBe(30);
    expectCalcError(() => slingLegTensionKn({ loadKn: 10, legs: 2, angleFromHorizontalDeg: 29.9 }), 'angleFromHorizontalDeg');
    expectCalcError(() => slingLegTensionKn({ loadKn: 10, legs: 2, angleFromHorizontalDeg: 91 }), 'angleFromHorizontalDeg');
    expectCalcError(() => slingLegTensionKn({ loadKn: 10, legs: 0, angleFromHorizontalDeg: 60 }), 'legs');
  });
});

describe('slingLegTensionsFromCog: leg share W·d_other/(d1+d2), ÷ sin θ', () => {
  it('Certified Slings & Supply, “Center of gravity and sling loading” (certifiedslings.com): 10,000 lb, pick points 8 ft and 2 ft from the CoG → 2,000 lb and 8,000 lb', () => {
    const r = slingLegTensionsFromCog({ loadKn: 10000, distancesToCogM: [8, 2], angleFromHorizontalDeg: 90 });
    expect(r.legs[0].tensionKn).toBeCloseTo(2000, 9);
    expect(r.legs[1].tensionKn).toBeCloseTo(8000, 9);
  });

  it('“Simplifying to diagram and calculating the sling load” (covamap.vmasc.org training page): 4,000 lb, D1 = 2, D2 = 10, H = 3, S1 = 4 → TS1 = Load·D2·S1 ÷ (H(D1 + D2)) = 4,444.44 lb', () => {
    // The page's S1 = 4 with H = 3 sets sin θ1 = 3/4 (its D1 = 2 would make S1 = √13: the page's figure is not to scale).
    const theta1 = (Math.asin(3 / 4) * 180) / Math.PI;
    const r = slingLegTensionsFromCog({ loadKn: 4000, distancesToCogM: [2, 10], angleFromHorizontalDeg: [theta1, theta1] });
    expect(r.legs[0].tensionKn).toBeCloseTo(4444.44, 2);
  });

  it('the same page’s second leg (S2 = 14, H = 3 → 12.4° from horizontal) is refused under ASME B30.9 (from memory)', () => {
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

describe('slingLegTensionsFromHookHeight: the legs’ angles from the hook height over the centre of gravity', () => {
  it('Certified Slings’ 10,000 lb load (pick points 8 ft and 2 ft out) with the hook 6 ft up: TS = W·D_other·S ÷ (H(D1 + D2)) as the covamap page prints it', () => {
    // leg 1: S1 = √(6² + 8²) = 10 ft → 10,000 × 2 × 10 ÷ (6 × 10) = 3,333.33 lb at atan(6/8) = 36.87°
    // leg 2: S2 = √(6² + 2²) = 6.3246 ft → 10,000 × 8 × 6.3246 ÷ 60 = 8,432.74 lb at atan(6/2) = 71.57°
    const r = slingLegTensionsFromHookHeight({ loadKn: 10000, distancesToCogM: [8, 2], hookHeightM: 6 });
    expect(r.legs[0].tensionKn).toBeCloseTo((10000 * 2 * 10) / (6 * 10), 6);
    expect(r.legs[1].tensionKn).toBeCloseTo((10000 * 8 * Math.sqrt(40)) / (6 * 10), 6);
    expect(r.legs[0].angleFromHorizontalDeg).toBeCloseTo(36.8699, 4);
    expect(r.legs[0].legLengthM).toBeCloseTo(10, 12);
  });

  it('a pick point right under the hook hangs vertical; a hook too low for a far pick point is refused (ASME B30.9 30°, from memory)', () => {
    const r = slingLegTensionsFromHookHeight({ loadKn: 100, distancesToCogM: [0, 3], hookHeightM: 2 });
    expect(r.legs[0].angleFromHorizontalDeg).toBe(90);
    expect(r.legs[0].verticalShareKn).toBeCloseTo(100, 12);
    expectCalcError(() => slingLegTensionsFromHookHeight({ loadKn: 100, distancesToCogM: [2, 3.1], hookHeightM: 1 }), 'angleFromHorizontalDeg.0');
    expectCalcError(() => slingLegTensionsFromHookHeight({ loadKn: 100, distancesToCogM: [2, 3], hookHeightM: 0 }), 'hookHeightM');
  });
});
