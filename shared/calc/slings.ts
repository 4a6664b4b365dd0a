/**
 * Sling leg tensions. The angle is measured from the horizontal, as the rigging tables print it.
 */
import { CalcInputError, finiteResult, requireInRange, requireInteger, requireNonNegative } from './errors';

/** Smallest sling angle from the horizontal that may be used. */
export const MINIMUM_SLING_ANGLE_DEG = 30;

/** Where the minimum sling angle is published. */
export const MINIMUM_SLING_ANGLE_SOURCE =
  'ASME B30.9: no sling angle under 30° from horizontal (from memory)';

function checkAngle(field: string, angleDeg: number): number {
  // Below 30° the tension factor climbs steeply (2.0 at 30°), so the standard refuses it outright.
  return requireInRange(field, angleDeg, MINIMUM_SLING_ANGLE_DEG, 90);
}

function sinDeg(angleDeg: number): number {
  // Exact at 90° so a vertical leg carries exactly its share.
  return angleDeg === 90 ? 1 : Math.sin((angleDeg * Math.PI) / 180);
}

/** Tension in each of `legs` equal legs: T = W / (n · sin θ). */
export function slingLegTensionKn(input: { loadKn: number; legs: number; angleFromHorizontalDeg: number }): {
  legTensionKn: number;
  tensionFactor: number;
  rule: string;
} {
  const load = requireNonNegative('loadKn', input.loadKn);
  const legs = requireInteger('legs', input.legs, 1, 8);
  const angle = checkAngle('angleFromHorizontalDeg', input.angleFromHorizontalDeg);
  const factor = 1 / sinDeg(angle);
  return {
    legTensionKn: finiteResult('loadKn', (load / legs) * factor),
    tensionFactor: factor,
    rule: `T = W ÷ (n · sin θ), θ ≥ ${MINIMUM_SLING_ANGLE_DEG}° from horizontal (${MINIMUM_SLING_ANGLE_SOURCE})`,
  };
}

/** One leg of a two-leg lift with the centre of gravity off centre. */
export interface CogLegResult {
  /** The vertical share of the load this leg carries. */
  verticalShareKn: number;
  tensionKn: number;
  angleFromHorizontalDeg: number;
}

/**
 * Two legs, unequal shares: leg i carries W · d_other ÷ (d1 + d2) vertically, divided by sin θi.
 * Distances are horizontal, from each pick point to the centre of gravity.
 */
export function slingLegTensionsFromCog(input: {
  loadKn: number;
  distancesToCogM: readonly [number, number];
  angleFromHorizontalDeg: number | readonly [number, number];
}): { legs: [CogLegResult, CogLegResult]; rule: string } {
  const load = requireNonNegative('loadKn', input.loadKn);
  if (!Array.isArray(input.distancesToCogM) || input.distancesToCogM.length !== 2) {
    throw new CalcInputError('distancesToCogM', 'must give exactly two distances');
  }
  const d1 = requireNonNegative('distancesToCogM.0', input.distancesToCogM[0]);
  const d2 = requireNonNegative('distancesToCogM.1', input.distancesToCogM[1]);
  if (d1 + d2 <= 0) throw new CalcInputError('distancesToCogM', 'the two pick points cannot both sit on the centre of gravity');
  const angles: [number, number] =
    typeof input.angleFromHorizontalDeg === 'number'
      ? [
          checkAngle('angleFromHorizontalDeg', input.angleFromHorizontalDeg),
          checkAngle('angleFromHorizontalDeg', input.angleFromHorizontalDeg),
        ]
      : [
          checkAngle('angleFromHorizontalDeg.0', input.angleFromHorizontalDeg[0]),
          checkAngle('angleFromHorizontalDeg.1', input.angleFromHorizontalDeg[1]),
        ];
  const share1 = finiteResult('loadKn', (load * d2) / (d1 + d2));
  const share2 = finiteResult('loadKn', (load * d1) / (d1 + d2));
  const leg = (share: number, angle: number): CogLegResult => ({
    verticalShareKn: share,
    tensionKn: finiteResult('loadKn', share / sinDeg(angle)),
    angleFromHorizontalDeg: angle,
  });
  return {
    legs: [leg(share1, angles[0]), leg(share2, angles[1])],
    rule: `V1 = W·d2/(d1+d2), V2 = W·d1/(d1+d2), T = V ÷ sin θ, θ ≥ ${MINIMUM_SLING_ANGLE_DEG}° (rigging handbooks; ${MINIMUM_SLING_ANGLE_SOURCE})`,
  };
}

/**
 * Two legs from one hook above the centre of gravity (the load hangs level only then): each leg's
 * angle follows from the hook height above the pick points and its pick point's horizontal
 * distance to the centre of gravity, tan θi = H ÷ di, and the shares follow from the distances.
 * Equivalent to T1 = W·d2·S1 ÷ (H·(d1 + d2)) with S1 = √(H² + d1²), the form rigging guides print.
 */
export function slingLegTensionsFromHookHeight(input: { loadKn: number; distancesToCogM: readonly [number, number]; hookHeightM: number }): {
  legs: [CogLegResult & { legLengthM: number }, CogLegResult & { legLengthM: number }];
  rule: string;
} {
  const height = requireInRange('hookHeightM', input.hookHeightM, 0, 200, { minExclusive: true });
  if (!Array.isArray(input.distancesToCogM) || input.distancesToCogM.length !== 2) {
    throw new CalcInputError('distancesToCogM', 'must give exactly two distances');
  }
  const d1 = requireNonNegative('distancesToCogM.0', input.distancesToCogM[0]);
  const d2 = requireNonNegative('distancesToCogM.1', input.distancesToCogM[1]);
  const angleOf = (d: number) => (d === 0 ? 90 : (Math.atan2(height, d) * 180) / Math.PI);
  const r = slingLegTensionsFromCog({ loadKn: input.loadKn, distancesToCogM: [d1, d2], angleFromHorizontalDeg: [angleOf(d1), angleOf(d2)] });
  return {
    legs: [
      { ...r.legs[0], legLengthM: Math.hypot(height, d1) },
      { ...r.legs[1], legLengthM: Math.hypot(height, d2) },
    ],
    rule: `hook over the centre of gravity, H above the pick points: θi = atan(H ÷ di); ${r.rule}`,
  };
}
