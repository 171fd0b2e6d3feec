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

function reachable(f: number, l: number, r: number, tolerance = TRIANGLE_TOLERANCE): boolean {
  const [s1, s2, s3] = sides(f, l, r);
  return s1 <= s2 + s3 + tolerance && s2 <= s1 + s3 + tolerance && s3 <= s1 + s2 + tolerance;
}

/**
 * Whether a unitary three-fold node has the probabilities (forward, left, right): the exact rule
 * checkTriangularNode refuses by (the triangle of sqrt(f r), sqrt(l f), sqrt(r l) closes).
 */
export function isReachableNode(f: number, l: number, r: number): boolean {
  return reachable(f, l, r);
}

/**
 * The reachable values of x along a one-parameter family of nodes x -> (forward, left, right) on
 * [lo, hi], as disjoint intervals in increasing order (none when no value is reachable). Found on
 * a grid of 4000 steps and refined by bisection, with no tolerance: every x inside a reported
 * interval closes its triangle exactly. An isolated reachable point at hi (forward = 1 with
 * left != right) is left out.
 */
export function reachableIntervals(family: (x: number) => [number, number, number], lo: number, hi: number): { min: number; max: number }[] {
  const ok = (x: number) => {
    const [f, l, r] = family(x);
    return reachable(f, l, r, 0);
  };
  const N = 4000;
  // An end of the family can be an isolated reachable point (forward = 1 with left != right: just
  // below it the node is unreachable, since |sqrt r - sqrt l| <= sqrt(r l) needs
  // 1 - f >= (sqrt(1-t) - sqrt t)^2 / (t (1-t))). The last grid point is therefore taken a hair
  // below hi, so that point cannot join the interval below it across a gap narrower than a step.
  const TOP = hi - 1e-12 * Math.max(1, hi - lo);
  const at = (i: number) => (i === N ? TOP : lo + ((hi - lo) * i) / N);
  const grid: boolean[] = [];
  for (let i = 0; i <= N; i++) grid.push(ok(at(i)));
  const refine = (a: number, b: number): number => {
    // ok(a) !== ok(b); return the boundary
    const okA = ok(a);
    for (let it = 0; it < 60; it++) {
      const mid = (a + b) / 2;
      if (ok(mid) === okA) a = mid;
      else b = mid;
    }
    return okA ? a : b;
  };
  // intervals of reachable grid points, their ends refined
  const out: { min: number; max: number }[] = [];
  for (let i = 0; i <= N; i++) {
    if (!grid[i]) continue;
    let j = i;
    while (j + 1 <= N && grid[j + 1]) j++;
    out.push({ min: i === 0 ? lo : refine(at(i - 1), at(i)), max: j === N ? hi : refine(at(j), at(j + 1)) });
    i = j;
  }
  return out;
}

/** Of reachableIntervals, the one that contains `near` (within a grid step), else the first; null when none. */
export function reachableInterval(family: (x: number) => [number, number, number], lo: number, hi: number, near: number): { min: number; max: number } | null {
  const all = reachableIntervals(family, lo, hi);
  const step = (hi - lo) / 4000;
  let best = all[0] ?? null;
  for (const iv of all) if (near >= iv.min - step && near <= iv.max + step) best = iv;
  return best;
}

/**
 * The reachable forward probabilities at a fixed left:right ratio (left / (left + right)), as the
 * interval that contains `near` (or the widest one). For left = right this is [1/9, 1].
 */
export function reachableForwardRange(left: number, right: number, near: number): { min: number; max: number } {
  const turn = left + right;
  if (turn <= 0) return { min: 1, max: 1 };
  const t = left / turn;
  return reachableInterval((f) => [f, (1 - f) * t, (1 - f) * (1 - t)], 0, 1, near) ?? { min: 1, max: 1 };
}

/** null if (forward, left, right) is reachable; otherwise a one-line explanation with the allowed range. */
export function checkTriangularNode(f: number, l: number, r: number): string | null {
  if (reachable(f, l, r)) return null;
  const [s1, s2, s3] = sides(f, l, r);
  const names = ["sqrt(forward*right)", "sqrt(left*forward)", "sqrt(right*left)"];
  const vals = [s1, s2, s3];
  let worst = 0;
  for (let i = 0; i < 3; i++) if (vals[i] - (vals[(i + 1) % 3] + vals[(i + 2) % 3]) > vals[worst] - (vals[(worst + 1) % 3] + vals[(worst + 2) % 3])) worst = i;
  const a = (worst + 1) % 3,
    b = (worst + 2) % 3;
  const range = reachableForwardRange(l, r, f);
  const turn = l + r;
  const ratio = turn > 0 ? `left:right = ${(l / turn).toFixed(4)}:${(r / turn).toFixed(4)}` : "no turning";
  const rangeText = range.min === range.max ? `forward must be ${range.min}` : `forward must lie in [${range.min.toFixed(6)}, ${range.max.toFixed(6)}]`;
  return (
    `unreachable node probabilities (forward ${f}, left ${l}, right ${r}): ` +
    `no unitary node has them, because the triangle inequality ${names[worst]} <= ${names[a]} + ${names[b]} ` +
    `fails (${vals[worst].toPrecision(6)} > ${(vals[a] + vals[b]).toPrecision(6)}); ` +
    `at ${ratio} ${rangeText} (for left = right: forward >= 1/9)`
  );
}

/**
 * The circulant three-fold node S = s_f 1 + s_l P + s_r P^2 with P[j+1][j] = 1, |s_f|^2 = f etc.
 * Construction (physics.md section 2): the relative phases close the triangle of sides
 * sqrt(f r), sqrt(l f), sqrt(r l); branch +1 is the solution with Im(s_l s_r conj(s_f)^2) >= 0,
 * branch -1 its mirror (relative phases conjugated); the overall phase chi = phaseRad is
 * arg(s_f) (or, for a pure turn, the phase of the turning amplitude).
 */
export function circulantAmplitudes(
  f: number,
  l: number,
  r: number,
  branch: 1 | -1,
  phaseRad: number,
): { sf: [number, number]; sl: [number, number]; sr: [number, number] } {
  const problem = checkTriangularNode(f, l, r);
  if (problem) throw new Error(problem);
  const a = Math.sqrt(f),
    b = Math.sqrt(l),
    c = Math.sqrt(r);
  let sf: [number, number], sl: [number, number], sr: [number, number];
  const L1 = a * c,
    L2 = a * b,
    L3 = b * c;
  if (L1 === 0 || L2 === 0) {
    // a permutation (or the identity): one probability is 1
    sf = [a, 0];
    sl = [b, 0];
    sr = [c, 0];
  } else {
    // u1 = L1, u2 = L2 e^{i th2}, u3 = -(u1 + u2); branch +1 needs sin(x - y) = sin(-th2) >= 0
    let cos2 = (L3 * L3 - L1 * L1 - L2 * L2) / (2 * L1 * L2);
    cos2 = Math.max(-1, Math.min(1, cos2));
    const th2 = -Math.acos(cos2);
    const u3r = -(L1 + L2 * Math.cos(th2)),
      u3i = -L2 * Math.sin(th2);
    const th3 = Math.atan2(u3i, u3r);
    const psi = -(th2 + th3) / 3;
    const x = psi,
      y = th2 + psi;
    // alpha = 0: s_f = a, s_l = b e^{-i y}, s_r = c e^{i x}
    sf = [a, 0];
    sl = [b * Math.cos(-y), b * Math.sin(-y)];
    sr = [c * Math.cos(x), c * Math.sin(x)];
  }
  if (branch === -1) {
    sf = [sf[0], -sf[1]];
    sl = [sl[0], -sl[1]];
    sr = [sr[0], -sr[1]];
  }
  // overall phase chi: reference is arg(s_f) when f > 0, else the non-zero turning amplitude
  const rot = (z: [number, number]): [number, number] => [
    z[0] * Math.cos(phaseRad) - z[1] * Math.sin(phaseRad),
    z[0] * Math.sin(phaseRad) + z[1] * Math.cos(phaseRad),
  ];
  sf = rot(sf);
  sl = rot(sl);
  sr = rot(sr);
  // the mirror-symmetric gauge (physics.md section 6): s_l -> w^k s_l, s_r -> w^2k s_r with
  // w = exp(2 pi i / 3) and k chosen so that arg(s_l conj(s_r)) lies in (-pi/3, pi/3]
  const k = mirrorGaugeStep(sf, sl, sr);
  if (k !== 0) {
    sl = cmulPhase(sl, (2 * Math.PI * k) / 3);
    sr = cmulPhase(sr, (4 * Math.PI * k) / 3);
  }
  // left = right: the mirror y -> -y maps the node onto itself exactly (s_l = s_r)
  if (l === r) sr = [sl[0], sl[1]];
  return { sf, sl, sr };
}

type C = [number, number];
const ZERO_AMPLITUDE = 1e-12;
const cabs = (z: C) => Math.hypot(z[0], z[1]);
const cmulPhase = (z: C, phase: number): C => [z[0] * Math.cos(phase) - z[1] * Math.sin(phase), z[0] * Math.sin(phase) + z[1] * Math.cos(phase)];
const argMulConj = (a: C, b: C) => Math.atan2(a[1] * b[0] - a[0] * b[1], a[0] * b[0] + a[1] * b[1]);
/** Reduce an angle into (-pi, pi]. */
function wrapPi(x: number): number {
  let y = x % (2 * Math.PI);
  if (y <= -Math.PI) y += 2 * Math.PI;
  if (y > Math.PI) y -= 2 * Math.PI;
  return y;
}
/** The k in {0, 1, 2} that brings an angle d, which the relabelling moves by -2 pi k / 3, into (-pi/3, pi/3]. */
function thirdStep(d: number, sign: 1 | -1): 0 | 1 | 2 {
  for (const k of [0, 1, 2] as const) {
    const x = wrapPi(d - (sign * 2 * Math.PI * k) / 3);
    if (x > -Math.PI / 3 - 1e-12 && x <= Math.PI / 3 + 1e-12) return k;
  }
  return 0;
}

/**
 * The relabelling step k (s_l -> w^k s_l, s_r -> w^2k s_r) that puts a circulant node into the
 * mirror-symmetric gauge: arg(s_l conj(s_r)) in (-pi/3, pi/3] when both turns are present; with
 * one turning amplitude, arg(s_turn conj(s_f)) in (-pi/3, pi/3]; for a pure turn (s_f = 0) the
 * phase of the turning amplitude itself (a pure turn e^{i chi} P equals e^{i (chi + 2 pi/3)} P
 * up to the relabelling, so only chi mod 2 pi/3 is physical in the bulk).
 */
function mirrorGaugeStep(sf: C, sl: C, sr: C): 0 | 1 | 2 {
  const hasL = cabs(sl) > ZERO_AMPLITUDE,
    hasR = cabs(sr) > ZERO_AMPLITUDE,
    hasF = cabs(sf) > ZERO_AMPLITUDE;
  // under step k: arg(s_l conj s_r) moves by -2 pi k/3; arg(s_l conj s_f) by +2 pi k/3;
  // arg(s_r conj s_f) by +4 pi k/3 = -2 pi k/3 (mod 2 pi); arg(s_l) by +2 pi k/3; arg(s_r) by -2 pi k/3
  if (hasL && hasR) return thirdStep(argMulConj(sl, sr), 1);
  if (hasL) return thirdStep(hasF ? argMulConj(sl, sf) : Math.atan2(sl[1], sl[0]), -1);
  if (hasR) return thirdStep(hasF ? argMulConj(sr, sf) : Math.atan2(sr[1], sr[0]), 1);
  return 0;
}

/**
 * An explicit node matrix in the same gauge as the probability nodes (physics.md section 6), so
 * that every way of writing one node gives the same open-edge results. A diagonal relabelling
 * D S D^-1 (D = diag of phases per direction and channel) is invisible in the bulk but changes the
 * phase of every edge bounce; the canonical representative is chosen per channel c from that
 * channel's own 3 x 3 block B[m][j] = S[3c + m][3c + j]:
 *  1. if the three left-turn amplitudes B[j+1][j] are non-zero, D gives them one common phase
 *     theta with 3 theta = arg of their product (invariant); else the same with the three right
 *     turns B[j-1][j]; else the non-zero turning amplitudes are made real and positive along a
 *     spanning tree of the three directions (fixed order: left turns, then right turns);
 *  2. in cases 1 the residual relabelling w^k (w = exp(2 pi i/3)) is fixed as for a probability
 *     node, with the sums over j of the left turns, right turns and forward amplitudes in place of
 *     s_l, s_r and s_f (see mirrorGaugeStep).
 * For a circulant matrix this is exactly the probability node's gauge. A block without turning
 * amplitudes is left as written (a diagonal block is gauge invariant).
 */
export function canonicalNodeGauge(m: Float64Array, nch: number): Float64Array {
  const n = 3 * nch;
  const alpha = new Float64Array(n);
  const get = (i: number, j: number): C => [m[2 * (i * n + j)], m[2 * (i * n + j) + 1]];
  for (let c = 0; c < nch; c++) {
    const o = 3 * c;
    const B = (i: number, j: number) => get(o + i, o + j);
    const left = [0, 1, 2].map((j) => B((j + 1) % 3, j));
    const right = [0, 1, 2].map((j) => B((j + 2) % 3, j));
    const fwd = [0, 1, 2].map((j) => B(j, j));
    const a = [0, 0, 0];
    const equalise = (amps: C[], step: 1 | 2): boolean => {
      if (!amps.every((z) => cabs(z) > ZERO_AMPLITUDE)) return false;
      // amplitude j goes from direction j to j + step; after D its phase is arg + a[j+step] - a[j]
      const args = amps.map((z) => Math.atan2(z[1], z[0]));
      const theta = (args[0] + args[1] + args[2]) / 3;
      let j = 0;
      a[0] = 0;
      for (let t = 0; t < 2; t++) {
        const next = (j + step) % 3;
        a[next] = a[j] + theta - args[j];
        j = next;
      }
      return true;
    };
    let cyclic = equalise(left, 1);
    if (!cyclic) cyclic = equalise(right, 2);
    if (cyclic) {
      const sf = fwd[0];
      // sums over the three directions (equal entries for a circulant) for the residual step
      const sum = (zs: C[], d: number[]): C =>
        zs.reduce<C>(
          (acc, z, j) => {
            const w = cmulPhase(z, a[(j + d[0]) % 3] - a[j]);
            return [acc[0] + w[0], acc[1] + w[1]];
          },
          [0, 0],
        );
      const L = sum(left, [1]),
        R = sum(right, [2]);
      const F: C = fwd.reduce<C>((acc, z) => [acc[0] + z[0], acc[1] + z[1]], [0, 0]);
      const k = mirrorGaugeStep(cabs(F) > ZERO_AMPLITUDE ? F : sf, L, R);
      // residual relabelling: a[j] += 2 pi k j / 3 multiplies left turns by w^k, right turns by w^2k
      for (let j = 0; j < 3; j++) a[j] += (2 * Math.PI * k * j) / 3;
    } else {
      // spanning tree over the non-zero turning amplitudes: make each tree entry real positive
      const cand: [number, number][] = [
        [1, 0],
        [2, 1],
        [0, 2],
        [2, 0],
        [0, 1],
        [1, 2],
      ]; // [to, from]
      const fixed = [true, false, false];
      let changed = true;
      while (changed) {
        changed = false;
        for (const [to, from] of cand) {
          const z = B(to, from);
          if (cabs(z) <= ZERO_AMPLITUDE || fixed[to] === fixed[from]) continue;
          // entry phase after D: arg z + a[to] - a[from] = 0
          const ph = Math.atan2(z[1], z[0]);
          if (fixed[from]) a[to] = a[from] - ph;
          else a[from] = a[to] + ph;
          fixed[to] = fixed[from] = true;
          changed = true;
        }
      }
    }
    for (let j = 0; j < 3; j++) alpha[o + j] = a[j];
  }
  const out = new Float64Array(m.length);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      const z = cmulPhase(get(i, j), alpha[i] - alpha[j]);
      out[2 * (i * n + j)] = z[0];
      out[2 * (i * n + j) + 1] = z[1];
    }
  return out;
}

/** The valley-K matrix of a triangular node as the engine uses it (canonical gauge), packed. */
export function triangularNodeFromSpec(
  node: { forward: number; left: number; right: number; branch: 1 | -1; phaseRad: number } | { matrix: [number, number][][] },
): Float64Array {
  if ("matrix" in node) return canonicalNodeGauge(packMatrix(node.matrix), node.matrix.length === 6 ? 2 : 1);
  return triangularNodeMatrix(node.forward, node.left, node.right, node.branch, node.phaseRad);
}

/** Packed 3x3 circulant node matrix. */
export function triangularNodeMatrix(f: number, l: number, r: number, branch: 1 | -1, phaseRad: number): Float64Array {
  const { sf, sl, sr } = circulantAmplitudes(f, l, r, branch, phaseRad);
  const m = new Float64Array(18);
  for (let j = 0; j < 3; j++) {
    const set = (row: number, z: [number, number]) => {
      m[2 * (row * 3 + j)] = z[0];
      m[2 * (row * 3 + j) + 1] = z[1];
    };
    set(j, sf);
    set((j + 1) % 3, sl);
    set((j + 2) % 3, sr);
  }
  return m;
}

/** Max-norm of S^H S - 1 for a packed n x n matrix. */
export function unitarityError(m: Float64Array, n: number): number {
  let worst = 0;
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      let re = 0,
        im = 0;
      for (let k = 0; k < n; k++) {
        const ar = m[2 * (k * n + i)],
          ai = -m[2 * (k * n + i) + 1];
        const br = m[2 * (k * n + j)],
          bi = m[2 * (k * n + j) + 1];
        re += ar * br - ai * bi;
        im += ar * bi + ai * br;
      }
      if (i === j) re -= 1;
      worst = Math.max(worst, Math.hypot(re, im));
    }
  return worst;
}

/** Validate an explicit node matrix given as [[[re, im], ...], ...]; null if fine. */
export function checkExplicitNodeMatrix(matrix: [number, number][][], dim: number): string | null {
  if (matrix.length !== dim || matrix.some((row) => row.length !== dim)) {
    return (
      `the node matrix must be ${dim} x ${dim} (3 x 3 per channel; 6 x 6 with channelsPerLink 2), ` +
      `got ${matrix.length} rows of lengths ${matrix.map((r) => r.length).join(", ")}`
    );
  }
  const err = unitarityError(packMatrix(matrix), dim);
  if (!(err <= UNITARITY_TOLERANCE)) return `the node matrix is not unitary: max |S^H S - 1| = ${err.toExponential(3)}, allowed <= ${UNITARITY_TOLERANCE}`;
  return null;
}

export function packMatrix(matrix: [number, number][][]): Float64Array {
  const n = matrix.length;
  const m = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++)
    for (let j = 0; j < n; j++) {
      m[2 * (i * n + j)] = matrix[i][j][0];
      m[2 * (i * n + j) + 1] = matrix[i][j][1];
    }
  return m;
}

/**
 * Square-network node (two in, two out). Rows are the out slots, columns the in slots, arranged so
 * that the diagonal holds the left turns: S = [[sqrt(1-p), -sqrt(p)], [sqrt(p), sqrt(1-p)]], p the
 * probability to turn right (see network/square.ts for the slot labels).
 */
export function squareNodeMatrix(p: number): Float64Array {
  const a = Math.sqrt(1 - p),
    b = Math.sqrt(p);
  return new Float64Array([a, 0, -b, 0, b, 0, a, 0]);
}
