/**
 * Node scattering matrices (physics.md section 2). Convention: S[m][j] is the amplitude to leave
 * along a_m after arriving along a_j; forward m = j, left turn m = j + 1 (mod 3), right turn
 * m = j - 1 (mod 3). Matrices are packed interleaved complex, row-major (see linalg/kernels.ts).
 */

export const UNITARITY_TOLERANCE = 1e-9;
const TRIANGLE_TOLERANCE = 1e-12;

/** The three triangle sides sqrt(f r), sqrt(l f), sqrt(r l) whose closure is column orthogonality. */
function sides(f: number, l: number, r: number): [number, number, number] {
  return [Math.sqrt(f * r), Math.sqrt(l * f), Math.sqrt(r * l)];
}

function reachable(f: number, l: number, r: number): boolean {
  const [s1, s2, s3] = sides(f, l, r);
  return s1 <= s2 + s3 + TRIANGLE_TOLERANCE && s2 <= s1 + s3 + TRIANGLE_TOLERANCE && s3 <= s1 + s2 + TRIANGLE_TOLERANCE;
}

/**
 * The reachable forward probabilities at a fixed left:right ratio (left / (left + right)), as the
 * interval that contains `near` (or the widest one). For left = right this is [1/9, 1].
 */
export function reachableForwardRange(left: number, right: number, near: number): { min: number; max: number } {
  const turn = left + right;
  if (turn <= 0) return { min: 1, max: 1 };
  const t = left / turn;
  const ok = (f: number) => reachable(f, (1 - f) * t, (1 - f) * (1 - t));
  const N = 4000;
  const grid: boolean[] = [];
  for (let i = 0; i <= N; i++) grid.push(ok(i / N));
  // intervals of reachable grid points
  const intervals: [number, number][] = [];
  for (let i = 0; i <= N; i++) {
    if (!grid[i]) continue;
    let j = i;
    while (j + 1 <= N && grid[j + 1]) j++;
    intervals.push([i, j]);
    i = j;
  }
  if (intervals.length === 0) return { min: 1, max: 1 };
  const refine = (lo: number, hi: number): number => {
    // ok(lo) !== ok(hi); return the boundary
    const okLo = ok(lo);
    for (let it = 0; it < 60; it++) { const mid = (lo + hi) / 2; if (ok(mid) === okLo) lo = mid; else hi = mid; }
    return okLo ? lo : hi;
  };
  let best = intervals[0];
  for (const iv of intervals) if (near >= iv[0] / N - 1 / N && near <= iv[1] / N + 1 / N) best = iv;
  const min = best[0] === 0 ? 0 : refine((best[0] - 1) / N, best[0] / N);
  const max = best[1] === N ? 1 : refine(best[1] / N, (best[1] + 1) / N);
  return { min, max };
}

/** null if (forward, left, right) is reachable; otherwise a one-line explanation with the allowed range. */
export function checkTriangularNode(f: number, l: number, r: number): string | null {
  if (reachable(f, l, r)) return null;
  const [s1, s2, s3] = sides(f, l, r);
  const names = ["sqrt(forward*right)", "sqrt(left*forward)", "sqrt(right*left)"];
  const vals = [s1, s2, s3];
  let worst = 0;
  for (let i = 0; i < 3; i++) if (vals[i] - (vals[(i + 1) % 3] + vals[(i + 2) % 3]) > vals[worst] - (vals[(worst + 1) % 3] + vals[(worst + 2) % 3])) worst = i;
  const a = (worst + 1) % 3, b = (worst + 2) % 3;
  const range = reachableForwardRange(l, r, f);
  const turn = l + r;
  const ratio = turn > 0 ? `left:right = ${(l / turn).toFixed(4)}:${(r / turn).toFixed(4)}` : "no turning";
  const rangeText = range.min === range.max ? `forward must be ${range.min}` : `forward must lie in [${range.min.toFixed(6)}, ${range.max.toFixed(6)}]`;
  return `unreachable node probabilities (forward ${f}, left ${l}, right ${r}): no unitary node has them, because the triangle inequality ${names[worst]} <= ${names[a]} + ${names[b]} fails (${vals[worst].toPrecision(6)} > ${(vals[a] + vals[b]).toPrecision(6)}); at ${ratio} ${rangeText} (for left = right: forward >= 1/9)`;
}

/**
 * The circulant three-fold node S = s_f 1 + s_l P + s_r P^2 with P[j+1][j] = 1, |s_f|^2 = f etc.
 * Construction (physics.md section 2): the relative phases close the triangle of sides
 * sqrt(f r), sqrt(l f), sqrt(r l); branch +1 is the solution with Im(s_l s_r conj(s_f)^2) >= 0,
 * branch -1 its mirror (relative phases conjugated); the overall phase chi = phaseRad is
 * arg(s_f) (or, for a pure turn, the phase of the turning amplitude).
 */
export function circulantAmplitudes(f: number, l: number, r: number, branch: 1 | -1, phaseRad: number): { sf: [number, number]; sl: [number, number]; sr: [number, number] } {
  const problem = checkTriangularNode(f, l, r);
  if (problem) throw new Error(problem);
  const a = Math.sqrt(f), b = Math.sqrt(l), c = Math.sqrt(r);
  let sf: [number, number], sl: [number, number], sr: [number, number];
  const L1 = a * c, L2 = a * b, L3 = b * c;
  if (L1 === 0 || L2 === 0) {
    // a permutation (or the identity): one probability is 1
    sf = [a, 0]; sl = [b, 0]; sr = [c, 0];
  } else {
    // u1 = L1, u2 = L2 e^{i th2}, u3 = -(u1 + u2); branch +1 needs sin(x - y) = sin(-th2) >= 0
    let cos2 = (L3 * L3 - L1 * L1 - L2 * L2) / (2 * L1 * L2);
    cos2 = Math.max(-1, Math.min(1, cos2));
    const th2 = -Math.acos(cos2);
    const u3r = -(L1 + L2 * Math.cos(th2)), u3i = -L2 * Math.sin(th2);
    const th3 = Math.atan2(u3i, u3r);
    const psi = -(th2 + th3) / 3;
    const x = psi, y = th2 + psi;
    // alpha = 0: s_f = a, s_l = b e^{-i y}, s_r = c e^{i x}
    sf = [a, 0];
    sl = [b * Math.cos(-y), b * Math.sin(-y)];
    sr = [c * Math.cos(x), c * Math.sin(x)];
  }
  if (branch === -1) { sf = [sf[0], -sf[1]]; sl = [sl[0], -sl[1]]; sr = [sr[0], -sr[1]]; }
  // overall phase chi: reference is arg(s_f) when f > 0, else the non-zero turning amplitude
  const rot = (z: [number, number]): [number, number] => [z[0] * Math.cos(phaseRad) - z[1] * Math.sin(phaseRad), z[0] * Math.sin(phaseRad) + z[1] * Math.cos(phaseRad)];
  return { sf: rot(sf), sl: rot(sl), sr: rot(sr) };
}

/** Packed 3x3 circulant node matrix. */
export function triangularNodeMatrix(f: number, l: number, r: number, branch: 1 | -1, phaseRad: number): Float64Array {
  const { sf, sl, sr } = circulantAmplitudes(f, l, r, branch, phaseRad);
  const m = new Float64Array(18);
  for (let j = 0; j < 3; j++) {
    const set = (row: number, z: [number, number]) => { m[2 * (row * 3 + j)] = z[0]; m[2 * (row * 3 + j) + 1] = z[1]; };
    set(j, sf);
    set((j + 1) % 3, sl);
    set((j + 2) % 3, sr);
  }
  return m;
}

/** Max-norm of S^H S - 1 for a packed n x n matrix. */
export function unitarityError(m: Float64Array, n: number): number {
  let worst = 0;
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) {
    let re = 0, im = 0;
    for (let k = 0; k < n; k++) {
      const ar = m[2 * (k * n + i)], ai = -m[2 * (k * n + i) + 1];
      const br = m[2 * (k * n + j)], bi = m[2 * (k * n + j) + 1];
      re += ar * br - ai * bi; im += ar * bi + ai * br;
    }
    if (i === j) re -= 1;
    worst = Math.max(worst, Math.hypot(re, im));
  }
  return worst;
}

/** Validate an explicit node matrix given as [[[re, im], ...], ...]; null if fine. */
export function checkExplicitNodeMatrix(matrix: [number, number][][], dim: number): string | null {
  if (matrix.length !== dim || matrix.some((row) => row.length !== dim)) {
    return `the node matrix must be ${dim} x ${dim} (3 x 3 per channel; 6 x 6 with channelsPerLink 2), got ${matrix.length} rows of lengths ${matrix.map((r) => r.length).join(", ")}`;
  }
  const err = unitarityError(packMatrix(matrix), dim);
  if (!(err <= UNITARITY_TOLERANCE)) return `the node matrix is not unitary: max |S^H S - 1| = ${err.toExponential(3)}, allowed <= ${UNITARITY_TOLERANCE}`;
  return null;
}

export function packMatrix(matrix: [number, number][][]): Float64Array {
  const n = matrix.length;
  const m = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) { m[2 * (i * n + j)] = matrix[i][j][0]; m[2 * (i * n + j) + 1] = matrix[i][j][1]; }
  return m;
}

/**
 * Square-network node (two in, two out). Rows are the out slots, columns the in slots, arranged so
 * that the diagonal holds the left turns: S = [[sqrt(1-p), -sqrt(p)], [sqrt(p), sqrt(1-p)]], p the
 * probability to turn right (see network/square.ts for the slot labels).
 */
export function squareNodeMatrix(p: number): Float64Array {
  const a = Math.sqrt(1 - p), b = Math.sqrt(p);
  return new Float64Array([a, 0, -b, 0, b, 0, a, 0]);
}
