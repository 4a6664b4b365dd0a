/**
 * Ground bearing: track pressure under an eccentric load, mats, and mat area.
 */
import { CalcInputError, finiteResult, requireFinite, requireInRange, requireInteger, requireNonNegative, requirePositive } from './errors';

/** Shape of the pressure block under one track. */
export type PressureDistribution = 'uniform' | 'trapezoidal' | 'triangular';

/** Pressure under one track. */
export interface TrackPressureResult {
  /** Load carried by each track (the tracks share the vertical load equally). */
  loadPerTrackKn: number;
  maxPressureKpa: number;
  minPressureKpa: number;
  distribution: PressureDistribution;
  /** Length of track in contact with the ground; shorter than the track when its end lifts. */
  contactLengthM: number;
  /** True when e > L/6 and part of the track carries no pressure. */
  partialContact: boolean;
  rule: string;
}

const ECCENTRIC_RULE =
  'rigid footing, linear pressure: e ≤ L/6: q = P/(BL)(1 ± 6e/L); e > L/6: q_max = 2P/(3B(L/2 − e)) over 3(L/2 − e) (eccentric footing theory, e.g. Das, Principles of Foundation Engineering)';

/**
 * Pressure under each track with the load's eccentricity along the track. e ≥ L/2 puts the
 * resultant at or past the track end: the crane overturns, which is refused as an input error.
 */
export function trackPressure(input: {
  verticalLoadKn: number;
  eccentricityM: number;
  trackLengthM: number;
  trackWidthM: number;
  tracks: number;
}): TrackPressureResult {
  const v = requireNonNegative('verticalLoadKn', input.verticalLoadKn);
  requireFinite('eccentricityM', input.eccentricityM);
  const l = requirePositive('trackLengthM', input.trackLengthM);
  const b = requirePositive('trackWidthM', input.trackWidthM);
  const tracks = requireInteger('tracks', input.tracks, 1, 8);
  // The sign only says which end is heavier; the pressures are symmetric in it.
  const e = Math.abs(input.eccentricityM);
  if (e >= l / 2) {
    throw new CalcInputError(
      'eccentricityM',
      `eccentricity ${e} m reaches or passes the track end (L/2 = ${l / 2} m): the load overturns the crane`,
    );
  }
  const p = v / tracks;
  const kern = l / 6;
  const atKern = Math.abs(e - kern) <= 1e-12 * l;
  let max: number;
  let min: number;
  let contact: number;
  let distribution: PressureDistribution;
  if (e === 0) {
    max = p / (b * l);
    min = max;
    contact = l;
    distribution = 'uniform';
  } else if (e < kern && !atKern) {
    max = (p / (b * l)) * (1 + (6 * e) / l);
    min = (p / (b * l)) * (1 - (6 * e) / l);
    contact = l;
    distribution = 'trapezoidal';
  } else if (atKern) {
    max = (2 * p) / (b * l);
    min = 0;
    contact = l;
    distribution = 'triangular';
  } else {
    contact = 3 * (l / 2 - e);
    max = (2 * p) / (3 * b * (l / 2 - e));
    min = 0;
    distribution = 'triangular';
  }
  return {
    loadPerTrackKn: finiteResult('verticalLoadKn', p),
    maxPressureKpa: finiteResult('verticalLoadKn', max),
    // Rounding in 1 − 6e/L can leave a hair below zero; soil carries no tension anyway.
    minPressureKpa: finiteResult('verticalLoadKn', Math.max(0, min)),
    distribution,
    contactLengthM: contact,
    partialContact: contact < l,
    rule: ECCENTRIC_RULE,
  };
}

/** Default load-spread angle through a mat, from the vertical. */
export const DEFAULT_MAT_SPREAD_ANGLE_DEG = 45;

/** Pressure under a mat. */
export interface MatPressureResult {
  bearingLengthM: number;
  bearingWidthM: number;
  bearingAreaM2: number;
  /** Pressure from the applied load only, spread through the mat. */
  pressureKpa: number;
  /** Pressure the bare contact area would put on the ground. */
  pressureWithoutMatKpa: number;
  /** The mat's own weight spread over the whole mat. */
  matSelfWeightPressureKpa: number;
  /** pressureKpa + matSelfWeightPressureKpa. */
  totalPressureKpa: number;
  rule: string;
}

/**
 * Uniform pressure under a mat: the load spreads outward at a fixed angle through the mat's
 * thickness (45° by default), limited to the mat's plan size. This spread rule is a common
 * simplification with no published source checked here: a real mat bends, and an engineered mat
 * design (e.g. the effective-bearing-length method) governs.
 */
export function matPressure(input: {
  loadKn: number;
  contactLengthM: number;
  contactWidthM: number;
  matLengthM: number;
  matWidthM: number;
  matThicknessM: number;
  spreadAngleDeg?: number;
  matWeightKn?: number;
}): MatPressureResult {
  const load = requireNonNegative('loadKn', input.loadKn);
  const cl = requirePositive('contactLengthM', input.contactLengthM);
  const cw = requirePositive('contactWidthM', input.contactWidthM);
  const ml = requirePositive('matLengthM', input.matLengthM);
  const mw = requirePositive('matWidthM', input.matWidthM);
  const t = requirePositive('matThicknessM', input.matThicknessM);
  const angle = requireInRange('spreadAngleDeg', input.spreadAngleDeg ?? DEFAULT_MAT_SPREAD_ANGLE_DEG, 0, 60);
  const matWeight = requireNonNegative('matWeightKn', input.matWeightKn ?? 0);
  // A mat smaller than what stands on it spreads nothing and hides an overhang: refuse it.
  if (ml < cl) throw new CalcInputError('matLengthM', 'the mat is shorter than the contact it carries');
  if (mw < cw) throw new CalcInputError('matWidthM', 'the mat is narrower than the contact it carries');
  const spread = angle === 0 ? 0 : t * Math.tan((angle * Math.PI) / 180);
  const bl = Math.min(ml, cl + 2 * spread);
  const bw = Math.min(mw, cw + 2 * spread);
  const area = finiteResult('matThicknessM', bl * bw);
  const pressure = finiteResult('loadKn', load / area);
  const selfWeight = finiteResult('matWeightKn', matWeight / (ml * mw));
  return {
    bearingLengthM: bl,
    bearingWidthM: bw,
    bearingAreaM2: area,
    pressureKpa: pressure,
    pressureWithoutMatKpa: finiteResult('loadKn', load / (cl * cw)),
    matSelfWeightPressureKpa: selfWeight,
    totalPressureKpa: finiteResult('loadKn', pressure + selfWeight),
    rule: `load spread at ${angle}° from vertical through the mat thickness, limited to the mat size (common practice, no source); mat weight over the whole mat`,
  };
}

/** Bearing area needed: A = (P + W) ÷ q_allowable. */
export function matAreaRequiredM2(input: { loadKn: number; allowablePressureKpa: number; matWeightKn?: number }): {
  areaM2: number;
  rule: string;
} {
  const load = requireNonNegative('loadKn', input.loadKn);
  const q = requirePositive('allowablePressureKpa', input.allowablePressureKpa);
  const w = requireNonNegative('matWeightKn', input.matWeightKn ?? 0);
  return {
    areaM2: finiteResult('loadKn', (load + w) / q),
    rule: 'A_required = (P + W) ÷ q_allowable (D. Duerr, "Effective Bearing Length of Crane Mats", 2010, Eq. 1)',
  };
}

/** One row of the guidance table of allowable ground pressures. */
export interface TypicalAllowablePressure {
  groundType: string;
  minKpa: number;
  /** null: no upper bound given. */
  maxKpa: number | null;
}

/**
 * Typical allowable bearing pressures by ground type. GUIDANCE ONLY: from memory of the presumed
 * allowable bearing values in BS 8004:1986 Table 1, not checked against the text. The allowable
 * pressure for a crane comes from a ground investigation or a temporary-works design.
 */
export const TYPICAL_ALLOWABLE_PRESSURES: readonly TypicalAllowablePressure[] = [
  { groundType: 'dense gravel, or dense sand and gravel', minKpa: 600, maxKpa: null },
  { groundType: 'medium dense gravel, or medium dense sand and gravel', minKpa: 200, maxKpa: 600 },
  { groundType: 'loose gravel, or loose sand and gravel', minKpa: 0, maxKpa: 200 },
  { groundType: 'compact sand', minKpa: 300, maxKpa: null },
  { groundType: 'medium dense sand', minKpa: 100, maxKpa: 300 },
  { groundType: 'loose sand', minKpa: 0, maxKpa: 100 },
  { groundType: 'very stiff boulder clay and hard clay', minKpa: 300, maxKpa: 600 },
  { groundType: 'stiff clay', minKpa: 150, maxKpa: 300 },
  { groundType: 'firm clay', minKpa: 75, maxKpa: 150 },
  { groundType: 'soft clay and silt', minKpa: 0, maxKpa: 75 },
];

/** Label to show beside the typical-pressure table wherever it appears. */
export const TYPICAL_ALLOWABLE_PRESSURES_LABEL =
  'Guidance only (from memory of BS 8004:1986 Table 1): use the allowable pressure from a ground investigation or temporary-works design.';

// ---------------------------------------------------------------------------------------------
// Both tracks together, over the full slew range.
// Coordinates on the ground: x along the tracks (positive towards the end the boom points at when
// the slew angle is 0°), y across them (positive towards the side the boom points at at 90°), the
// origin at the slewing centre, taken at the middle of the track footprint.
// ---------------------------------------------------------------------------------------------

/** The tracks as they stand on the ground. */
export interface TrackFootprint {
  /** Bearing length of each track. */
  trackLengthM: number;
  shoeWidthM: number;
  /** Centre-to-centre distance between the left and right tracks. */
  gaugeM: number;
  /** Tracks in all, half on each side. */
  tracks: number;
}

/** The no-tension pressure plane under both tracks. */
export interface RigidPlaneResult {
  /** Highest pressure: at a corner of the footprint, the outer edge of the heavier track at its heavy end. */
  maxPressureKpa: number;
  /** The corner where the highest pressure acts. */
  maxAt: { xM: number; yM: number };
  /** Area still pressing on the ground, and the whole footprint. */
  contactAreaM2: number;
  footprintAreaM2: number;
  /** True when part of the footprint would be in tension and carries nothing. */
  partialContact: boolean;
  /** q(x, y) = a + b·x + c·y where it is positive, zero elsewhere. */
  plane: { aKpa: number; bKpaPerM: number; cKpaPerM: number };
  iterations: number;
  rule: string;
}

const RIGID_PLANE_RULE =
  'rigid pressure plane over both tracks: q(x, y) = V/A + M_along·x/I_y + M_across·y/I_x over the track footprint; where that would pull on the ground, the contact area is reduced and the plane solved again until the pressure under the remaining area alone carries V and both moments (no tension; rigid footing, linear pressure, e.g. Bowles, Foundation Analysis and Design, on footings with two-way eccentricity)';

type Pt = readonly [number, number];
type Vec3 = [number, number, number];

/** Area moments of a polygon (Green's theorem): ∫1, ∫x, ∫y, ∫x², ∫xy, ∫y² dA. */
function polygonMoments(poly: readonly Pt[]): [number, number, number, number, number, number] {
  let a = 0;
  let sx = 0;
  let sy = 0;
  let ixx = 0;
  let ixy = 0;
  let iyy = 0;
  for (let i = 0; i < poly.length; i += 1) {
    const [x0, y0] = poly[i];
    const [x1, y1] = poly[(i + 1) % poly.length];
    const cross = x0 * y1 - x1 * y0;
    a += cross;
    sx += (x0 + x1) * cross;
    sy += (y0 + y1) * cross;
    ixx += (x0 * x0 + x0 * x1 + x1 * x1) * cross;
    iyy += (y0 * y0 + y0 * y1 + y1 * y1) * cross;
    ixy += (x0 * y1 + 2 * x0 * y0 + 2 * x1 * y1 + x1 * y0) * cross;
  }
  return [a / 2, sx / 6, sy / 6, ixx / 12, ixy / 24, iyy / 12];
}

/** The part of a convex polygon where a + b·x + c·y ≥ 0 (one Sutherland–Hodgman pass). */
function clipPositive(poly: readonly Pt[], p: Vec3): Pt[] {
  const q = (v: Pt) => p[0] + p[1] * v[0] + p[2] * v[1];
  const out: Pt[] = [];
  for (let i = 0; i < poly.length; i += 1) {
    const cur = poly[i];
    const next = poly[(i + 1) % poly.length];
    const qc = q(cur);
    const qn = q(next);
    if (qc >= 0) out.push(cur);
    if ((qc >= 0) !== (qn >= 0)) {
      const t = qc / (qc - qn);
      out.push([cur[0] + t * (next[0] - cur[0]), cur[1] + t * (next[1] - cur[1])]);
    }
  }
  return out;
}

/** The 3 × 3 moment matrix of the region of the rectangles where the plane is positive. */
function contactMatrix(rects: readonly Pt[][], p: Vec3 | null): { m: number[][]; area: number } {
  const m = [
    [0, 0, 0],
    [0, 0, 0],
    [0, 0, 0],
  ];
  let area = 0;
  for (const r of rects) {
    const poly = p === null ? r : clipPositive(r, p);
    if (poly.length < 3) continue;
    const [a, sx, sy, ixx, ixy, iyy] = polygonMoments(poly);
    area += a;
    m[0][0] += a;
    m[0][1] += sx;
    m[0][2] += sy;
    m[1][1] += ixx;
    m[1][2] += ixy;
    m[2][2] += iyy;
  }
  m[1][0] = m[0][1];
  m[2][0] = m[0][2];
  m[2][1] = m[1][2];
  return { m, area };
}

function solve3(m: number[][], t: Vec3): Vec3 | null {
  const det = (a: number[][]) =>
    a[0][0] * (a[1][1] * a[2][2] - a[1][2] * a[2][1]) - a[0][1] * (a[1][0] * a[2][2] - a[1][2] * a[2][0]) + a[0][2] * (a[1][0] * a[2][1] - a[1][1] * a[2][0]);
  const d = det(m);
  if (!Number.isFinite(d) || Math.abs(d) < 1e-14 * Math.abs(m[0][0] * m[1][1] * m[2][2] || 1)) return null;
  const col = (k: number) => m.map((row, i) => row.map((v, j) => (j === k ? t[i] : v)));
  return [det(col(0)) / d, det(col(1)) / d, det(col(2)) / d];
}


function footprintRects(f: TrackFootprint): Pt[][] {
  const hl = f.trackLengthM / 2;
  const hb = f.shoeWidthM / 2;
  return [-f.gaugeM / 2, f.gaugeM / 2].map((yc) => [
    [-hl, yc - hb],
    [hl, yc - hb],
    [hl, yc + hb],
    [-hl, yc + hb],
  ]);
}

/** The footprint's rectangles, corners and full-contact moment matrix; kept for the few footprints in use (the sweep asks 37 times). */
const geometryCache = new Map<string, { rects: Pt[][]; corners: Pt[]; full: { m: number[][]; area: number } }>();
function footprintGeometry(f: TrackFootprint): { rects: Pt[][]; corners: Pt[]; full: { m: number[][]; area: number } } {
  const key = `${f.trackLengthM}|${f.shoeWidthM}|${f.gaugeM}`;
  let g = geometryCache.get(key);
  if (!g) {
    const rects = footprintRects(f);
    g = { rects, corners: rects.flat(), full: contactMatrix(rects, null) };
    if (geometryCache.size > 32) geometryCache.clear();
    geometryCache.set(key, g);
  }
  return g;
}

function checkFootprint(f: TrackFootprint): void {
  requirePositive('trackLengthM', f.trackLengthM);
  requirePositive('shoeWidthM', f.shoeWidthM);
  requirePositive('gaugeM', f.gaugeM);
  requireInteger('tracks', f.tracks, 2, 8);
  if (f.gaugeM < f.shoeWidthM) throw new CalcInputError('gaugeM', `the gauge ${f.gaugeM} m is less than the shoe width ${f.shoeWidthM} m: the tracks would overlap`);
}

// Scratch space for the solver's clipped polygons and moments: pure, synchronous, never shared across calls.
const clipX = new Float64Array(8);
const clipY = new Float64Array(8);
const acc = new Float64Array(6);

/** Adds ∫1, ∫x, ∫y, ∫x², ∫xy, ∫y² over the part of an axis-aligned rectangle where a + b·x + c·y ≥ 0 to `acc`. */
function addClippedRect(x0: number, x1: number, y0: number, y1: number, a: number, b: number, c: number): void {
  let n = 0;
  for (let i = 0; i < 4; i += 1) {
    const cx = i === 0 || i === 3 ? x0 : x1;
    const cy = i < 2 ? y0 : y1;
    const j = (i + 1) & 3;
    const nx = j === 0 || j === 3 ? x0 : x1;
    const ny = j < 2 ? y0 : y1;
    const qc = a + b * cx + c * cy;
    const qn = a + b * nx + c * ny;
    if (qc >= 0) {
      clipX[n] = cx;
      clipY[n] = cy;
      n += 1;
    }
    if (qc >= 0 !== qn >= 0) {
      const t = qc / (qc - qn);
      clipX[n] = cx + t * (nx - cx);
      clipY[n] = cy + t * (ny - cy);
      n += 1;
    }
  }
  if (n < 3) return;
  for (let i = 0; i < n; i += 1) {
    const px0 = clipX[i];
    const py0 = clipY[i];
    const px1 = clipX[(i + 1) % n];
    const py1 = clipY[(i + 1) % n];
    const cross = px0 * py1 - px1 * py0;
    acc[0] += cross / 2;
    acc[1] += ((px0 + px1) * cross) / 6;
    acc[2] += ((py0 + py1) * cross) / 6;
    acc[3] += ((px0 * px0 + px0 * px1 + px1 * px1) * cross) / 12;
    acc[4] += ((px0 * py1 + 2 * px0 * py0 + 2 * px1 * py1 + px1 * py0) * cross) / 24;
    acc[5] += ((py0 * py0 + py0 * py1 + py1 * py1) * cross) / 12;
  }
}

/** The moment matrix of the contact area of a plane over the rectangles, into `acc` [A, Sx, Sy, Ixx, Ixy, Iyy]. */
function contactMoments(rects: readonly Pt[][], a: number, b: number, c: number): void {
  acc.fill(0);
  for (const r of rects) addClippedRect(r[0][0], r[1][0], r[0][1], r[2][1], a, b, c);
}

/**
 * The no-tension plane: Newton steps on Ψ(p) = ½∫(q⁺)² dA − p·t (convex; its gradient is zero
 * exactly when the positive part of the plane carries V and both moments). Each step solves the
 * full-contact equations on the current contact area; a step-halving line search keeps Ψ falling.
 */
function solveNoTensionPlane(
  rects: readonly Pt[][],
  fullMatrix: number[][],
  v: number,
  mx: number,
  my: number,
  hl: number,
  hw: number,
): { a: number; b: number; c: number; iterations: number } {
  const first = solve3(fullMatrix, [v, mx, my]);
  if (!first) throw new CalcInputError('gaugeM', 'the track footprint has no area to bear on');
  let [a, b, c] = first;
  let inTension = false;
  for (const r of rects) for (const [x, y] of r) if (a + b * x + c * y < 0) inTension = true;
  if (!inTension) return { a, b, c, iterations: 0 };
  contactMoments(rects, a, b, c);
  let m00 = acc[0], m01 = acc[1], m02 = acc[2], m11 = acc[3], m12 = acc[4], m22 = acc[5];
  let iterations = 0;
  for (; iterations < 200; iterations += 1) {
    const r0 = m00 * a + m01 * b + m02 * c - v;
    const r1 = m01 * a + m11 * b + m12 * c - mx;
    const r2 = m02 * a + m12 * b + m22 * c - my;
    if (Math.max(Math.abs(r0) / v, Math.abs(r1) / (v * hl), Math.abs(r2) / (v * hw)) < 1e-12) break;
    // Newton target: the full-contact solution on the current contact area (Cramer's rule, symmetric matrix).
    const c00 = m11 * m22 - m12 * m12;
    const c01 = m02 * m12 - m01 * m22;
    const c02 = m01 * m12 - m02 * m11;
    const det = m00 * c00 + m01 * c01 + m02 * c02;
    if (!Number.isFinite(det) || Math.abs(det) < 1e-14 * Math.abs(m00 * m11 * m22 || 1)) {
      throw new CalcInputError('eccentricityM', 'the contact area shrank to nothing: the load overturns the crane');
    }
    const c11 = m00 * m22 - m02 * m02;
    const c12 = m01 * m02 - m00 * m12;
    const c22 = m00 * m11 - m01 * m01;
    const ta = (c00 * v + c01 * mx + c02 * my) / det;
    const tb = (c01 * v + c11 * mx + c12 * my) / det;
    const tc = (c02 * v + c12 * mx + c22 * my) / det;
    const da = ta - a;
    const db = tb - b;
    const dc = tc - c;
    const slope = r0 * da + r1 * db + r2 * dc;
    const psi0 = 0.5 * (a * (m00 * a + m01 * b + m02 * c) + b * (m01 * a + m11 * b + m12 * c) + c * (m02 * a + m12 * b + m22 * c)) - (a * v + b * mx + c * my);
    let s = 1;
    for (;;) {
      const na = a + s * da;
      const nb = b + s * db;
      const nc = c + s * dc;
      contactMoments(rects, na, nb, nc);
      const [n00, n01, n02, n11, n12, n22] = acc;
      const psi = 0.5 * (na * (n00 * na + n01 * nb + n02 * nc) + nb * (n01 * na + n11 * nb + n12 * nc) + nc * (n02 * na + n12 * nb + n22 * nc)) - (na * v + nb * mx + nc * my);
      if (psi <= psi0 + 1e-4 * s * slope + 1e-12 * Math.abs(psi0) || s <= 1e-6) {
        a = na;
        b = nb;
        c = nc;
        m00 = n00;
        m01 = n01;
        m02 = n02;
        m11 = n11;
        m12 = n12;
        m22 = n22;
        break;
      }
      s /= 2;
    }
  }
  return { a, b, c, iterations };
}

/**
 * Pressure under two tracks taken as one rigid footing: the plane q = a + b·x + c·y with no
 * tension, found by minimising the convex function ½∫(q⁺)² dA − (a·V + b·V·ex + c·V·ey) whose
 * gradient is zero exactly when the positive part of the plane carries V at (ex, ey). Each Newton
 * step solves the full-contact equations on the current contact area (the classic "iterate the
 * effective area" method), with a step-halving line search so it always converges. Needs one track
 * on each side (2 tracks); a resultant outside the footprint's outline overturns and is refused.
 */
export function rigidPlanePressure(input: TrackFootprint & { verticalLoadKn: number; momentAlongKnm: number; momentAcrossKnm: number }): RigidPlaneResult {
  checkFootprint(input);
  if (input.tracks !== 2) throw new CalcInputError('tracks', 'the rigid-plane method here is for one track on each side');
  const v = requirePositive('verticalLoadKn', input.verticalLoadKn);
  const mx = requireFinite('momentAlongKnm', input.momentAlongKnm);
  const my = requireFinite('momentAcrossKnm', input.momentAcrossKnm);
  const ex = mx / v;
  const ey = my / v;
  const hl = input.trackLengthM / 2;
  const hw = input.gaugeM / 2 + input.shoeWidthM / 2;
  // The outline (convex hull) of two parallel tracks is the rectangle around both.
  if (Math.abs(ex) >= hl * (1 - 1e-9)) {
    throw new CalcInputError('eccentricityM', `the resultant is ${Math.abs(ex).toFixed(2)} m along the tracks, at or past their end (${hl} m): the load overturns the crane`);
  }
  if (Math.abs(ey) >= hw * (1 - 1e-9)) {
    throw new CalcInputError('eccentricityM', `the resultant is ${Math.abs(ey).toFixed(2)} m across the tracks, at or past their outer edge (${hw} m): the load overturns the crane`);
  }
  const { rects, corners, full } = footprintGeometry(input);
  const { a, b, c, iterations } = solveNoTensionPlane(rects, full.m, v, mx, my, hl, hw);
  const p: Vec3 = [a, b, c];
  const qAt = (pp: Vec3, cc: Pt) => pp[0] + pp[1] * cc[0] + pp[2] * cc[1];
  contactMoments(rects, a, b, c);
  const area = acc[0];
  let maxQ = qAt(p, corners[0]);
  let maxAt: Pt = corners[0];
  for (const corner of corners.slice(1)) {
    const q = qAt(p, corner);
    if (q > maxQ + 1e-9 * Math.abs(maxQ)) {
      maxQ = q;
      maxAt = corner;
    }
  }
  const footprintArea = full.area;
  return {
    maxPressureKpa: finiteResult('verticalLoadKn', maxQ),
    maxAt: { xM: maxAt[0], yM: maxAt[1] },
    contactAreaM2: area,
    footprintAreaM2: footprintArea,
    partialContact: area < footprintArea * (1 - 1e-9),
    plane: { aKpa: p[0], bKpaPerM: p[1], cKpaPerM: p[2] },
    iterations,
    rule: RIGID_PLANE_RULE,
  };
}

/** Load the rigid pressure plane puts on one rectangle of ground (e.g. a mat's strip of track), and the part of it in contact. */
export function rigidPlaneLoadOn(plane: RigidPlaneResult['plane'], rect: { x0M: number; x1M: number; y0M: number; y1M: number }): { loadKn: number; contactAreaM2: number } {
  const p: Vec3 = [plane.aKpa, plane.bKpaPerM, plane.cKpaPerM];
  const poly: Pt[] = [
    [Math.min(rect.x0M, rect.x1M), Math.min(rect.y0M, rect.y1M)],
    [Math.max(rect.x0M, rect.x1M), Math.min(rect.y0M, rect.y1M)],
    [Math.max(rect.x0M, rect.x1M), Math.max(rect.y0M, rect.y1M)],
    [Math.min(rect.x0M, rect.x1M), Math.max(rect.y0M, rect.y1M)],
  ];
  const clipped = clipPositive(poly, p);
  if (clipped.length < 3) return { loadKn: 0, contactAreaM2: 0 };
  const [a, sx, sy] = polygonMoments(clipped);
  return { loadKn: p[0] * a + p[1] * sx + p[2] * sy, contactAreaM2: a };
}

/** Pressure under the heavier track with the moment split between the tracks. */
export interface PerTrackSlewResult {
  /** Load on the heavier side: V/2 + |M_across| ÷ gauge. */
  heavySideKn: number;
  lightSideKn: number;
  /** The heavier side's pressure block along its track. */
  track: TrackPressureResult;
  /** True when the lighter track could not carry its half of the moment along the tracks, so the heavier one takes it all. */
  heavyTakesAllAlong: boolean;
  rule: string;
}

/**
 * The per-track method: the heavier side carries V/2 + |M_across| ÷ gauge; the moment along the
 * tracks is shared equally between the two sides, and each side's block along its track follows
 * eccentric footing theory (e ≤ L/6 trapezoid, beyond a triangle). When the lighter side cannot take
 * its half (its eccentricity would reach its track end) the heavier side takes the whole moment
 * along the tracks (safe side). A lighter side below zero overturns the crane sideways (refused).
 */
export function perTrackPressure(input: TrackFootprint & { verticalLoadKn: number; momentAlongKnm: number; momentAcrossKnm: number }): PerTrackSlewResult {
  checkFootprint(input);
  const v = requirePositive('verticalLoadKn', input.verticalLoadKn);
  const along = Math.abs(requireFinite('momentAlongKnm', input.momentAlongKnm));
  const across = Math.abs(requireFinite('momentAcrossKnm', input.momentAcrossKnm));
  const perSide = Math.max(1, Math.floor(input.tracks / 2));
  const heavy = v / 2 + across / input.gaugeM;
  const light = v / 2 - across / input.gaugeM;
  if (light < 0) {
    throw new CalcInputError('eccentricityM', `the resultant is ${(across / v).toFixed(2)} m across the tracks, beyond half the ${input.gaugeM} m gauge: the load overturns the crane sideways`);
  }
  const halfL = input.trackLengthM / 2;
  const lightCarries = light > 0 && along / 2 / light < halfL * (1 - 1e-9);
  const heavyAlong = lightCarries || along === 0 ? along / 2 : along;
  const track = trackPressure({ verticalLoadKn: heavy, eccentricityM: heavyAlong / heavy, trackLengthM: input.trackLengthM, trackWidthM: input.shoeWidthM, tracks: perSide });
  return {
    heavySideKn: heavy,
    lightSideKn: light,
    track,
    heavyTakesAllAlong: !lightCarries && along !== 0,
    rule: `per-track method: heavier side = V/2 + |M_across| ÷ gauge, the moment along the tracks shared equally by the two sides (all of it on the heavier side when the lighter cannot carry its half); ${ECCENTRIC_RULE}`,
  };
}

/** The pressure at one slew angle by both methods. */
export interface SlewPoint {
  /** Boom direction: 0° along the tracks over one end, 90° over the side, 180° over the other end. */
  angleDeg: number;
  perTrackKpa: number;
  /** Null when the rigid-plane method does not apply (not one track on each side). */
  rigidPlaneKpa: number | null;
  /** The larger of the two: the figure checked against the allowable. */
  pressureKpa: number;
  method: 'rigid plane' | 'per track';
  /**
   * The strip of the stated length at the heavy end of the heavier track (a mat's width): the larger
   * load of both methods and the shorter length of it in contact; null when no strip was asked for.
   */
  heavyEndStrip: { loadKn: number; contactLengthM: number } | null;
}

/** Ground pressure over the whole slew range for one load case. */
export interface SlewSweepResult {
  points: SlewPoint[];
  /** The angle with the highest pressure (the first one, if several tie by symmetry). */
  worst: SlewPoint;
  overEnd: SlewPoint;
  overSide: SlewPoint;
  /** The per-track block under the heavier track at the worst angle, for the drawing and the mats. */
  worstTrack: TrackPressureResult;
  stepDeg: number;
  rule: string;
}

/** Load on the first `stripM` of a linear block from its heavy end. */
function blockStripKn(track: TrackPressureResult, stripM: number, shoeWidthM: number): number {
  const contact = track.contactLengthM;
  const w = Math.min(stripM, contact);
  const qAtW = track.maxPressureKpa + ((track.minPressureKpa - track.maxPressureKpa) * w) / contact;
  return shoeWidthM * w * ((track.maxPressureKpa + qAtW) / 2);
}

/**
 * Pressure at every slew angle from 0° to 360° in steps of at most 5° (0°, 90°, 180° and 270°
 * always included), the upper works' whole moment M about the slewing centre turning with the boom:
 * M_along = M·cos θ, M_across = M·sin θ. Each angle takes the larger of the per-track method and the
 * rigid plane over both tracks (when there is one track on each side). A resultant outside the
 * tracks at any angle is refused as overturning (CalcInputError on eccentricityM).
 */
export function slewPressureSweep(
  input: TrackFootprint & { verticalLoadKn: number; momentKnm: number; stepDeg?: number; stripLengthM?: number },
): SlewSweepResult {
  checkFootprint(input);
  const v = requirePositive('verticalLoadKn', input.verticalLoadKn);
  const m = requireFinite('momentKnm', input.momentKnm);
  const step = requireInRange('stepDeg', input.stepDeg ?? 5, 0.5, 5);
  // A step that divides 90° puts the end and the side (0°, 90°, 180°, 270°) exactly on the grid.
  if (Math.abs(90 / step - Math.round(90 / step)) > 1e-9) throw new CalcInputError('stepDeg', `must divide 90° exactly, got ${step}°`);
  const strip = input.stripLengthM === undefined ? null : requirePositive('stripLengthM', input.stripLengthM);
  const pointAt = (angleDeg: number): { point: SlewPoint; block: TrackPressureResult } => {
    const rad = (angleDeg * Math.PI) / 180;
    // Exact zeros at the quarter turns, so "over the end" has no stray sideways moment.
    const cos = angleDeg % 180 === 90 ? 0 : Math.cos(rad);
    const sin = angleDeg % 180 === 0 ? 0 : Math.sin(rad);
    const load = { ...input, verticalLoadKn: v, momentAlongKnm: m * cos, momentAcrossKnm: m * sin };
    const pt = perTrackPressure(load);
    const rp = input.tracks === 2 ? rigidPlanePressure(load) : null;
    const perTrackKpa = pt.track.maxPressureKpa;
    const rigidPlaneKpa = rp ? rp.maxPressureKpa : null;
    const useRigid = rigidPlaneKpa !== null && rigidPlaneKpa > perTrackKpa;
    let heavyEndStrip: SlewPoint['heavyEndStrip'] = null;
    if (strip !== null) {
      const w = Math.min(strip, input.trackLengthM);
      heavyEndStrip = { loadKn: blockStripKn(pt.track, w, input.shoeWidthM), contactLengthM: Math.min(w, pt.track.contactLengthM) };
      if (rp) {
        const hl = input.trackLengthM / 2;
        const end = rp.maxAt.xM;
        const yc = rp.maxAt.yM > 0 ? input.gaugeM / 2 : -input.gaugeM / 2;
        const x1 = end > 0 ? hl - w : -hl + w;
        const onStrip = rigidPlaneLoadOn(rp.plane, { x0M: end, x1M: x1, y0M: yc - input.shoeWidthM / 2, y1M: yc + input.shoeWidthM / 2 });
        heavyEndStrip = {
          loadKn: Math.max(heavyEndStrip.loadKn, onStrip.loadKn),
          contactLengthM: Math.min(heavyEndStrip.contactLengthM, onStrip.contactAreaM2 / input.shoeWidthM),
        };
      }
    }
    return {
      point: { angleDeg, perTrackKpa, rigidPlaneKpa, pressureKpa: useRigid ? rigidPlaneKpa : perTrackKpa, method: useRigid ? 'rigid plane' : 'per track', heavyEndStrip },
      block: pt.track,
    };
  };
  const count = Math.round(360 / step);
  const points: SlewPoint[] = new Array<SlewPoint>(count);
  const blocks: TrackPressureResult[] = new Array<TrackPressureResult>(count);
  for (let k = 0; k < count; k += 1) {
    const angleDeg = Math.round(k * step * 1e6) / 1e6;
    // The two tracks are a mirror image of each other about the track axis, so the pressure at
    // 360° − θ is the pressure at θ with the sides swapped: computed once. Front and rear (θ and
    // 180° − θ) are both computed, so a machine that is not symmetric front to back is still covered.
    if (2 * k > count) {
      points[k] = { ...points[count - k], angleDeg };
      blocks[k] = blocks[count - k];
      continue;
    }
    const at = pointAt(angleDeg);
    points[k] = at.point;
    blocks[k] = at.block;
  }
  let worstIndex = 0;
  for (let k = 1; k < count; k += 1) if (points[k].pressureKpa > points[worstIndex].pressureKpa * (1 + 1e-9)) worstIndex = k;
  // The true peak can fall between grid angles (a 5° grid read 257.71 kPa where the peak is
  // 257.79 kPa at 26.75°): search either side of the worst grid angle in 0.25° steps, so the
  // figure is never below the peak by more than that finer grid allows.
  let worst = points[worstIndex];
  let worstTrack = blocks[worstIndex];
  const fine = 0.25;
  for (let d = -step + fine; d < step - 1e-9; d += fine) {
    if (Math.abs(d) < 1e-9) continue;
    const angleDeg = Math.round((((worst.angleDeg + d) % 360) + 360) % 360 * 1e6) / 1e6;
    const at = pointAt(angleDeg);
    if (at.point.pressureKpa > worst.pressureKpa * (1 + 1e-9)) {
      worst = at.point;
      worstTrack = at.block;
    }
  }
  return {
    points,
    worst,
    overEnd: points[0],
    overSide: points[Math.round(count / 4)],
    worstTrack,
    stepDeg: step,
    rule: `every ${step}° of slew from 0° to 360° (over the end and over the side exactly), then every ${fine}° either side of the worst angle, M_along = M·cos θ, M_across = M·sin θ, the larger of the per-track method and the rigid pressure plane at each angle`,
  };
}
