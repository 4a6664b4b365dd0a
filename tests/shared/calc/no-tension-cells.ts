// An independent check for the ground-pressure tests: the no-tension pressure plane under two
// tracks found cell by cell, written differently from shared/calc/ground.ts on purpose.

/**
 * An independent no-tension solution written differently from the code: the footprint cut into
 * small square cells, each cell's pressure taken at its centre, the plane fitted by the full-contact
 * equations over the cells still in contact, cells in tension dropped, repeated until no cell
 * changes (the classic hand iteration, here by brute force). Returns the plane's value at the
 * heaviest footprint corner, and the three integrals of the positive pressure for a statics check.
 */
export function cellSolution(
  f: { trackLengthM: number; shoeWidthM: number; gaugeM: number },
  v: number,
  mAlong: number,
  mAcross: number,
  cellM = 0.05,
): { cornerKpa: number; force: number; momentAlong: number; momentAcross: number } {
  const cells: [number, number][] = [];
  const nx = Math.round(f.trackLengthM / cellM);
  const ny = Math.round(f.shoeWidthM / cellM);
  for (const yc of [-f.gaugeM / 2, f.gaugeM / 2]) {
    for (let i = 0; i < nx; i += 1) {
      for (let j = 0; j < ny; j += 1) cells.push([-f.trackLengthM / 2 + (i + 0.5) * cellM, yc - f.shoeWidthM / 2 + (j + 0.5) * cellM]);
    }
  }
  const a = cellM * cellM;
  let active = cells.map(() => true);
  let plane = [0, 0, 0];
  for (let round = 0; round < 500; round += 1) {
    // Normal equations Σ[1 x y]ᵀ[1 x y]·a over active cells = [V, M_along, M_across], by Cramer's rule.
    const s = [
      [0, 0, 0],
      [0, 0, 0],
      [0, 0, 0],
    ];
    cells.forEach(([x, y], k) => {
      if (!active[k]) return;
      const r = [1, x, y];
      for (let i = 0; i < 3; i += 1) for (let j = 0; j < 3; j += 1) s[i][j] += r[i] * r[j] * a;
    });
    const det = (m: number[][]) => m[0][0] * (m[1][1] * m[2][2] - m[1][2] * m[2][1]) - m[0][1] * (m[1][0] * m[2][2] - m[1][2] * m[2][0]) + m[0][2] * (m[1][0] * m[2][1] - m[1][1] * m[2][0]);
    const rhs = [v, mAlong, mAcross];
    const d = det(s);
    plane = [0, 1, 2].map((k) => det(s.map((row, i) => row.map((val, j) => (j === k ? rhs[i] : val)))) / d);
    const next = cells.map(([x, y]) => plane[0] + plane[1] * x + plane[2] * y >= 0);
    if (next.every((n, k) => n === active[k])) break;
    active = next;
  }
  let force = 0;
  let momentAlong = 0;
  let momentAcross = 0;
  cells.forEach(([x, y]) => {
    const q = Math.max(0, plane[0] + plane[1] * x + plane[2] * y);
    force += q * a;
    momentAlong += q * x * a;
    momentAcross += q * y * a;
  });
  const hl = f.trackLengthM / 2;
  const hw = f.gaugeM / 2 + f.shoeWidthM / 2;
  const cornerKpa = Math.max(...[-1, 1].flatMap((sx) => [-1, 1].map((sy) => plane[0] + plane[1] * sx * hl + plane[2] * sy * hw)));
  return { cornerKpa, force, momentAlong, momentAcross };
}

