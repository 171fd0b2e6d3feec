/**
 * Periodic (magnetic) unit cells and the Bloch operator U(k) of the periodic network.
 * The amplitude on link j leaving the node of cell R is c_j exp(i k.R), so
 *   U(k)[(b, m)][(a, s)] = S_b[m][j] exp(i theta_link) exp(-i k.Delta)
 * for the link from node a (out slot s) to node b (in slot j) whose target cell is Delta away;
 * for the triangular primitive cell this is U(k) = S diag(exp(-i k.a_j)) (physics.md section 3).
 * Flux p/q per plaquette: the cell is q primitive cells long along the first lattice vector, in
 * a gauge that is periodic along the second one (oblique gauge A = B (sqrt3/2) s1 a2 for the
 * triangular lattice, with s1 the a1-coordinate; A = B (0, x) for the square lattice).
 */
import type { Network, MatrixNode, TriangularProbabilityNode, SquareNode } from "../schema";
import { squareNodeMatrix, triangularNodeFromSpec } from "../network/node-matrices";
import { gaugeIntegral, GAUGE_LANDAU_Y, plaquetteArea, type LinearGauge } from "../network/lattice";

export function magneticCellSize(_lattice: "triangular" | "square", denominator: number): number {
  return Math.max(1, Math.round(denominator));
}

export interface PeriodicLink {
  fromNode: number;
  fromSlot: number;
  toNode: number;
  toSlot: number;
  shift: [number, number];
  thetaB: number;
  segment: [number, number, number, number];
}

export interface PeriodicCell {
  nodeCount: number;
  slots: number; // slots per node (all equal)
  matrices: Float64Array[]; // per node, packed slots x slots
  links: PeriodicLink[]; // one per (node, out slot), index = node * slots + slot
  /** Supercell lattice vectors (units of l). */
  A1: [number, number];
  A2: [number, number];
  /** Primitive cells in the supercell. */
  primitiveCells: number;
  /** Primitive lattice vectors (units of l) for the Brillouin-zone path. */
  a1: [number, number];
  a2: [number, number];
  copies: number;
}

const OBLIQUE: LinearGauge = (() => {
  // A/B = (sqrt3/2) (x + y/sqrt3) (-1/2, sqrt3/2) + (sqrt3/8, 1/8); the constant (a pure gauge, a
  // relabelling of k) makes every link phase a whole multiple of 2 pi phi, so the spectrum at a
  // fixed k is periodic in the flux per triangle with period 1.
  const s = Math.sqrt(3) / 2;
  return { mxx: -s / 2, mxy: -s / (2 * Math.sqrt(3)), myx: (s * Math.sqrt(3)) / 2, myy: s / 2, cx: Math.sqrt(3) / 8, cy: 1 / 8 };
})();

export function gcd(a: number, b: number): number {
  a = Math.abs(a);
  b = Math.abs(b);
  while (b) {
    [a, b] = [b, a % b];
  }
  return a;
}

/** Valley-K periodic cell at flux numerator/denominator per plaquette. */
export function periodicCell(net: Network, numerator: number, denominator: number): PeriodicCell {
  const d = gcd(numerator, denominator) || 1;
  const p = numerator / d,
    q = denominator / d;
  const n = p === 0 ? 1 : q;
  const phi = p / q;
  const area = plaquetteArea(net.lattice);
  const links: PeriodicLink[] = [];
  const matrices: Float64Array[] = [];
  if (net.lattice === "triangular") {
    const node = net.node;
    const isMatrix = "matrix" in node;
    const m = triangularNodeFromSpec(node as MatrixNode | TriangularProbabilityNode);
    const nch = isMatrix && (node as MatrixNode).matrix.length === 6 ? 2 : 1;
    const slots = 3 * nch;
    const a: [number, number][] = [
      [1, 0],
      [-0.5, Math.sqrt(3) / 2],
      [-0.5, -Math.sqrt(3) / 2],
    ];
    const ds1 = [1, 0, -1],
      ds2 = [0, 1, -1];
    for (let t = 0; t < n; t++) {
      matrices.push(m);
      for (let c = 0; c < nch; c++)
        for (let j = 0; j < 3; j++) {
          const tt = t + ds1[j];
          const m1 = Math.floor(tt / n),
            target = ((tt % n) + n) % n;
          const x1 = t,
            y1 = 0,
            x2 = t + a[j][0],
            y2 = a[j][1];
          const th = phi === 0 ? 0 : (2 * Math.PI * phi * gaugeIntegral(OBLIQUE, x1, y1, x2, y2)) / area;
          links[t * slots + c * 3 + j] = {
            fromNode: t,
            fromSlot: c * 3 + j,
            toNode: target,
            toSlot: c * 3 + j,
            shift: [m1, ds2[j]],
            thetaB: th,
            segment: [x1, y1, x2, y2],
          };
        }
    }
    return {
      nodeCount: n,
      slots,
      matrices,
      links,
      A1: [n, 0],
      A2: [-0.5, Math.sqrt(3) / 2],
      primitiveCells: n,
      a1: [1, 0],
      a2: [-0.5, Math.sqrt(3) / 2],
      copies: isMatrix ? 1 : net.channelsPerLink,
    };
  }
  // square: primitive cell A (0,0), B (1,1) in units l/sqrt2; vectors (2,0), (0,2)
  const S = squareNodeMatrix((net.node as SquareNode).turning);
  const r2 = Math.SQRT2;
  const pos = (X: number, Y: number): [number, number] => [X / r2, Y / r2];
  for (let t = 0; t < n; t++) {
    matrices.push(S);
    matrices.push(S);
    const A = 2 * t,
      B = 2 * t + 1;
    const add = (from: number, slot: number, X: number, Y: number, dX: number, dY: number, toIdx: number, toSlot: number, shift: [number, number]) => {
      const [x1, y1] = pos(X, Y),
        [x2, y2] = pos(X + dX, Y + dY);
      const th = phi === 0 ? 0 : (2 * Math.PI * phi * gaugeIntegral(GAUGE_LANDAU_Y, x1, y1, x2, y2)) / area;
      links[from * 2 + slot] = { fromNode: from, fromSlot: slot, toNode: toIdx, toSlot, shift, thetaB: th, segment: [x1, y1, x2, y2] };
    };
    const wrap = (tt: number): [number, number] => [((tt % n) + n) % n, Math.floor(tt / n)];
    // A (2t, 0): NE -> B_t (slot 1), SW -> B_{t-1} shifted by -(0,2) (slot 0)
    add(A, 0, 2 * t, 0, 1, 1, B, 1, [0, 0]);
    {
      const [tt, m1] = wrap(t - 1);
      add(A, 1, 2 * t, 0, -1, -1, 2 * tt + 1, 0, [m1, -1]);
    }
    // B (2t+1, 1): SE -> A_{t+1} (slot 0), NW -> A_t shifted by +(0,2) (slot 1)
    {
      const [tt, m1] = wrap(t + 1);
      add(B, 0, 2 * t + 1, 1, 1, -1, 2 * tt, 0, [m1, 0]);
    }
    add(B, 1, 2 * t + 1, 1, -1, 1, A, 1, [0, 1]);
  }
  return { nodeCount: 2 * n, slots: 2, matrices, links, A1: [n * r2, 0], A2: [0, r2], primitiveCells: n, a1: [r2, 0], a2: [0, r2], copies: 1 };
}

/** The valley-K' cell: links reversed, node matrices transposed, Peierls phases negated. */
export function reverseCell(cell: PeriodicCell): PeriodicCell {
  const k = cell.slots;
  const matrices = cell.matrices.map((m) => {
    const t = new Float64Array(m.length);
    for (let i = 0; i < k; i++)
      for (let j = 0; j < k; j++) {
        t[2 * (i * k + j)] = m[2 * (j * k + i)];
        t[2 * (i * k + j) + 1] = m[2 * (j * k + i) + 1];
      }
    return t;
  });
  const links: PeriodicLink[] = [];
  for (const l of cell.links) {
    links[l.toNode * k + l.toSlot] = {
      fromNode: l.toNode,
      fromSlot: l.toSlot,
      toNode: l.fromNode,
      toSlot: l.fromSlot,
      shift: [-l.shift[0], -l.shift[1]],
      thetaB: -l.thetaB,
      segment: [l.segment[2], l.segment[3], l.segment[0], l.segment[1]],
    };
  }
  return { ...cell, matrices, links };
}

/** U(k), packed L x L with L = nodes x slots; k in units of 1/l (k.r with r in units of l). */
export function blochMatrix(cell: PeriodicCell, kx: number, ky: number): Float64Array {
  const k = cell.slots,
    L = cell.nodeCount * k;
  const U = new Float64Array(2 * L * L);
  for (const l of cell.links) {
    const dx = l.shift[0] * cell.A1[0] + l.shift[1] * cell.A2[0],
      dy = l.shift[0] * cell.A1[1] + l.shift[1] * cell.A2[1];
    const ph = l.thetaB - (kx * dx + ky * dy);
    const zr = Math.cos(ph),
      zi = Math.sin(ph);
    const col = l.fromNode * k + l.fromSlot;
    const m = cell.matrices[l.toNode];
    for (let o = 0; o < k; o++) {
      const sr = m[2 * (o * k + l.toSlot)],
        si = m[2 * (o * k + l.toSlot) + 1];
      if (sr === 0 && si === 0) continue;
      const row = l.toNode * k + o;
      U[2 * (row * L + col)] += sr * zr - si * zi;
      U[2 * (row * L + col) + 1] += sr * zi + si * zr;
    }
  }
  return U;
}

/**
 * The link-to-link operator U0 of the finite periodic (torus) network of N1 x N2 supercells, at
 * zero energy phase; its eigenphases are the Bloch eigenphases at the k points allowed by the
 * torus (physics.md check 8). Channel index: ((i * N2 + j) * nodes + node) * slots + slot.
 */
export function torusOperator(cell: PeriodicCell, N1: number, N2: number): { U: Float64Array; L: number } {
  const k = cell.slots,
    per = cell.nodeCount * k,
    L = N1 * N2 * per;
  const U = new Float64Array(2 * L * L);
  for (let i = 0; i < N1; i++)
    for (let j = 0; j < N2; j++) {
      for (const l of cell.links) {
        const ti = (((i + l.shift[0]) % N1) + N1) % N1,
          tj = (((j + l.shift[1]) % N2) + N2) % N2;
        const col = (i * N2 + j) * per + l.fromNode * k + l.fromSlot;
        const m = cell.matrices[l.toNode];
        const zr = Math.cos(l.thetaB),
          zi = Math.sin(l.thetaB);
        for (let o = 0; o < k; o++) {
          const sr = m[2 * (o * k + l.toSlot)],
            si = m[2 * (o * k + l.toSlot) + 1];
          const row = (ti * N2 + tj) * per + l.toNode * k + o;
          U[2 * (row * L + col)] += sr * zr - si * zi;
          U[2 * (row * L + col) + 1] += sr * zi + si * zr;
        }
      }
    }
  return { U, L };
}

/** Reciprocal vectors of the supercell (units 1/l). */
export function reciprocal(cell: PeriodicCell): { B1: [number, number]; B2: [number, number] } {
  const [a, b] = cell.A1,
    [c, d] = cell.A2;
  const det = a * d - b * c;
  return { B1: [(2 * Math.PI * d) / det, (-2 * Math.PI * c) / det], B2: [(-2 * Math.PI * b) / det, (2 * Math.PI * a) / det] };
}
