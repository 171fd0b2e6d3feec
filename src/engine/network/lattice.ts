/**
 * Finite samples and periodic cells of the triangular and square networks.
 *
 * Triangular lattice (valley K): a1 = l(1, 0), a2 = l(-1/2, sqrt3/2), a3 = l(-1/2, -sqrt3/2); the
 * link of direction j runs from node R to R + a_j and arrives in slot j. Finite samples use a
 * rectangular layout: node (i, r) (column i = 0..columns-1, row r = 0..rows-1) sits at
 * x = (i + (r mod 2)/2) l, y = r (sqrt3/2) l. We use the doubled abscissa X = 2x/l (an integer).
 *
 * Square (Chalker-Coddington) network: nodes at (c, y) with c + y even, in units of l/sqrt2
 * (links run along the diagonals and have length l). Column c = 0..columns-1 holds rows nodes
 * at y = c mod 2, c mod 2 + 2, ... Sublattice A (c even): in slots [NW, SE], out slots [NE, SW];
 * sublattice B (c odd): in [NE, SW], out [SE, NW]. Every plaquette is circulated: clockwise
 * around the plaquettes centred at (odd, even), anticlockwise around (even, odd); a right turn
 * follows a clockwise plaquette.
 *
 * Leads: the faces perpendicular to x. A link whose other end lies left (right) of the sample is
 * a channel of the left (right) lead. Open transverse edges: a link that leaves through the top
 * or bottom edge ends at a virtual node just outside, which sends it back into the sample along
 * the next lattice link (a perfect turn, no scattering); both pieces are ordinary links (same
 * length l, Peierls phase of their segment), so every elementary plaquette keeps its flux.
 * Side contacts (Hall bars, open edges only): inside a contact's window of columns on the top or
 * bottom edge there is no virtual node: the link that would end at it leaves the sample into the
 * contact, and the link the virtual node would feed comes from the contact (an ideal reservoir,
 * physics.md section 6). The window holds the edge sites whose column index lies in [from, to].
 * Periodic transverse: rows wrap (a cylinder; triangular needs an even row count).
 * Closed samples ("ring"): columns wrap as well; with periodic rows this is a torus.
 */
import type { Network, TriangularProbabilityNode, MatrixNode, SquareNode } from "../schema";
import { CH_CONTACT_IN, CH_CONTACT_OUT, CH_LEFT_IN, CH_LEFT_OUT, CH_LINK, CH_RIGHT_IN, CH_RIGHT_OUT, type NetworkGraph } from "./graph";
import { squareNodeMatrix, triangularNodeFromSpec, triangularNodeMatrix } from "./node-matrices";
import { randomStream, sampleSeed, mix32 } from "../rng";
import { buildSchedule } from "./schedule";

export type SampleMode = "leads" | "ring";

/** Linear gauge: A / B = (mxx x + mxy y, myx x + myy y) (lengths in units of l). */
export interface LinearGauge {
  mxx: number;
  mxy: number;
  myx: number;
  myy: number;
  cx?: number;
  cy?: number;
}
export const GAUGE_LANDAU_Y: LinearGauge = { mxx: 0, mxy: 0, myx: 1, myy: 0 }; // A = B (0, x)
export const GAUGE_LANDAU_X: LinearGauge = { mxx: 0, mxy: -1, myx: 0, myy: 0 }; // A = B (-y, 0)

/** Integral of (A/B).dl along the straight segment (exact for a linear gauge: midpoint rule). */
export function gaugeIntegral(gauge: LinearGauge, x1: number, y1: number, x2: number, y2: number): number {
  const xm = (x1 + x2) / 2,
    ym = (y1 + y2) / 2;
  return (gauge.mxx * xm + gauge.mxy * ym + (gauge.cx ?? 0)) * (x2 - x1) + (gauge.myx * xm + gauge.myy * ym + (gauge.cy ?? 0)) * (y2 - y1);
}

/** Area of the elementary plaquette in units of l^2: sqrt3/4 (triangle) or 1 (square). */
export function plaquetteArea(lattice: Network["lattice"]): number {
  return lattice === "triangular" ? Math.sqrt(3) / 4 : 1;
}

interface LatticeRules {
  slots: number;
  /** Lattice coordinates of real node (column i, row index r). */
  position(i: number, r: number): [number, number];
  /** Column index and row index of lattice coordinates, or null if no node can sit there. */
  index(X: number, Y: number): [number, number] | null;
  /** Out slots of the node at (X, Y): displacement and the in slot of the target. */
  outs(X: number, Y: number): { dX: number; dY: number; slot: number }[];
  /** Physical position (units of l) of lattice coordinates. */
  physical(X: number, Y: number): [number, number];
  /** Row index range check / wrap: row count in lattice-Y units. */
  rowOf(Y: number): number;
  periodY: number;
  /** Open transverse edges: real nodes have 0 <= Y < openYMaxExcl (lattice-Y units). */
  openYMaxExcl: number;
  periodX: number;
  /** Virtual node at an out-of-range position: source offset of its input, its output. */
  virtual(X: number, Y: number, top: boolean): { inFrom: [number, number]; outTo: [number, number]; outSlot: number };
  nodeMatrix(i: number, r: number, rand: (() => number) | null): Float64Array;
  /** Column key used to order absorption (doubled x). */
  key(X: number, Y: number): number;
}

const mod = (a: number, n: number) => ((a % n) + n) % n;

function triangularRules(net: Network, columns: number, rows: number, rand: (() => number) | null): LatticeRules {
  const node = net.node;
  const isMatrix = "matrix" in node;
  const nch = isMatrix && (node as MatrixNode).matrix.length === 6 ? 2 : 1;
  const fixedMatrix = isMatrix ? triangularNodeFromSpec(node as MatrixNode) : null;
  const p = node as TriangularProbabilityNode;
  const base = isMatrix ? null : triangularNodeFromSpec(p);
  const dirs = [
    [2, 0],
    [-1, 1],
    [-1, -1],
  ];
  return {
    slots: 3 * nch,
    position: (i, r) => [2 * i + mod(r, 2), r],
    index: (X, Y) => {
      const par = mod(Y, 2);
      if (mod(X - par, 2) !== 0) return null;
      return [(X - par) / 2, Y];
    },
    outs: () => dirs.map(([dX, dY], j) => ({ dX, dY, slot: j })),
    physical: (X, Y) => [X / 2, (Y * Math.sqrt(3)) / 2],
    rowOf: (Y) => Y,
    periodY: rows,
    openYMaxExcl: rows,
    periodX: 2 * columns,
    virtual: (_X, _Y, top) =>
      top
        ? { inFrom: [1, -1], outTo: [-1, -1], outSlot: 2 } // arrives along a2, leaves along a3
        : { inFrom: [1, 1], outTo: [-1, 1], outSlot: 1 }, // arrives along a3, leaves along a2
    nodeMatrix: () => {
      if (fixedMatrix) return fixedMatrix;
      if (rand && net.disorder.forwardSpread > 0) {
        const f = p.forward + (rand() - 0.5) * net.disorder.forwardSpread;
        const turn = p.left + p.right;
        const t = turn > 0 ? p.left / turn : 0.5;
        return triangularNodeMatrix(f, (1 - f) * t, (1 - f) * (1 - t), p.branch, p.phaseRad);
      }
      return base as Float64Array;
    },
    key: (X) => X,
  };
}

function squareRules(net: Network, columns: number, rows: number, rand: (() => number) | null): LatticeRules {
  const turning = (net.node as SquareNode).turning;
  const base = squareNodeMatrix(turning);
  return {
    slots: 2,
    position: (i, r) => [i, 2 * r + mod(i, 2)],
    index: (X, Y) => {
      if (mod(X + Y, 2) !== 0) return null;
      return [X, (Y - mod(X, 2)) / 2];
    },
    outs: (X) =>
      mod(X, 2) === 0
        ? [
            { dX: 1, dY: 1, slot: 1 },
            { dX: -1, dY: -1, slot: 0 },
          ] // A: NE -> B.SW, SW -> B.NE
        : [
            { dX: 1, dY: -1, slot: 0 },
            { dX: -1, dY: 1, slot: 1 },
          ], // B: SE -> A.NW, NW -> A.SE
    physical: (X, Y) => [X / Math.SQRT2, Y / Math.SQRT2],
    rowOf: (Y) => Math.floor(Y / 2),
    periodY: 2 * rows,
    // open strip (Chalker & Coddington 1988 termination): the top B site of every odd column is
    // no node but a pass-through, so every cut carries rows channels each way
    openYMaxExcl: 2 * rows - 1,
    periodX: columns,
    virtual: (_X, _Y, top) =>
      top
        ? { inFrom: [-1, -1], outTo: [1, -1], outSlot: 0 } // top B site: in SW (from A.NE), out SE -> A.NW
        : { inFrom: [1, 1], outTo: [-1, 1], outSlot: 1 }, // virtual B below: in NE, out NW -> A.SE
    nodeMatrix: () => {
      if (rand && net.disorder.forwardSpread > 0) {
        const q = Math.min(1, Math.max(0, turning + (rand() - 0.5) * net.disorder.forwardSpread));
        return squareNodeMatrix(q);
      }
      return base;
    },
    key: (X) => X,
  };
}

export interface SampleOptions {
  mode: SampleMode;
  /** Flux per elementary plaquette in units of h/e. */
  fluxPerPlaquette: number;
  /** Ensemble sample index (0 = the network's own seed). */
  sample: number;
  columns?: number;
  rows?: number;
  /** Side contacts on the open edges (leads mode only); channel kinds CH_CONTACT_IN/OUT, g.chContact the window's index. */
  contacts?: ContactWindow[];
}

/** A side contact: the edge sites of columns fromColumn..toColumn on the top or bottom edge. */
export interface ContactWindow {
  edge: "top" | "bottom";
  fromColumn: number;
  toColumn: number;
}

/** Build the valley-K graph of a finite sample. */
export function buildSample(net: Network, opts: SampleOptions): NetworkGraph {
  const columns = opts.columns ?? net.size.columns;
  const rows = opts.rows ?? net.size.rows;
  const seed = sampleSeed(net.disorder.seed, opts.sample);
  const nodeRand = net.disorder.forwardSpread > 0 ? randomStream(mix32(seed, 2)) : null;
  const rules = net.lattice === "triangular" ? triangularRules(net, columns, rows, nodeRand) : squareRules(net, columns, rows, nodeRand);
  const periodicY = net.transverse === "periodic";
  const ring = opts.mode === "ring";
  const slotsPerNode = rules.slots;
  const nch = net.lattice === "triangular" ? slotsPerNode / 3 : 1;
  const latticeSlots = slotsPerNode / nch;

  // nodes: key -> id
  const ids = new Map<string, number>();
  const nodeXs: number[] = [],
    nodeYs: number[] = [],
    real: number[] = [],
    virtualTop: number[] = [];
  const matrices: Float64Array[] = [];
  const keyOf = (X: number, Y: number) => `${X},${Y}`;
  const yMin = 0,
    yMaxExcl = periodicY ? rules.periodY : rules.openYMaxExcl;
  for (let i = 0; i < columns; i++)
    for (let r = 0; r < rows; r++) {
      const [X, Y] = rules.position(i, r);
      if (!periodicY && Y >= yMaxExcl) continue; // an edge site of the open square strip (a pass-through)
      ids.set(keyOf(X, Y), nodeXs.length);
      nodeXs.push(X);
      nodeYs.push(Y);
      real.push(1);
      virtualTop.push(0);
      matrices.push(rules.nodeMatrix(i, r, nodeRand));
    }
  type Where =
    | { kind: "node"; id: number; X: number; Y: number }
    | { kind: "lead"; side: "left" | "right" }
    | { kind: "virtual"; X: number; Y: number }
    | { kind: "contact"; contact: number };
  const contacts = !periodicY && !ring ? (opts.contacts ?? []) : [];
  /** The contact whose window holds the edge site (X, Y), or -1. */
  const contactAt = (X: number, Y: number): number => {
    if (contacts.length === 0) return -1;
    const idx = rules.index(X, Y);
    if (!idx) return -1;
    const edge = Y >= yMaxExcl ? "top" : "bottom";
    return contacts.findIndex((w) => w.edge === edge && idx[0] >= w.fromColumn && idx[0] <= w.toColumn);
  };
  const resolve = (X: number, Y: number): Where => {
    let y = Y,
      x = X;
    if (periodicY) y = mod(y, rules.periodY);
    else if (y < yMin || y >= yMaxExcl) {
      const k = contactAt(x, y);
      if (k >= 0) return { kind: "contact", contact: k };
      return { kind: "virtual", X: ring ? mod(x, rules.periodX) : x, Y: y };
    }
    if (ring) x = mod(x, rules.periodX);
    const idx = rules.index(x, y);
    if (!idx) throw new Error(`internal: no node site at (${x}, ${y})`);
    if (idx[0] < 0) return { kind: "lead", side: "left" };
    if (idx[0] >= columns) return { kind: "lead", side: "right" };
    return { kind: "node", id: ids.get(keyOf(x, y)) as number, X: x, Y: y };
  };
  const getVirtual = (X: number, Y: number): number => {
    const k = keyOf(X, Y);
    let id = ids.get(k);
    if (id === undefined) {
      id = nodeXs.length;
      ids.set(k, id);
      nodeXs.push(X);
      nodeYs.push(Y);
      real.push(0);
      virtualTop.push(Y >= yMaxExcl ? 1 : 0);
      const m = new Float64Array(2 * nch * nch);
      for (let c = 0; c < nch; c++) m[2 * (c * nch + c)] = 1;
      matrices.push(m);
    }
    return id;
  };
  // create virtual nodes referenced by real nodes (as targets of outs and sources of ins)
  const realCount = nodeXs.length;
  if (!periodicY) {
    for (let n = 0; n < realCount; n++) {
      for (const o of rules.outs(nodeXs[n], nodeYs[n])) {
        const w = resolve(nodeXs[n] + o.dX, nodeYs[n] + o.dY);
        if (w.kind === "virtual") getVirtual(w.X, w.Y);
      }
    }
    // virtual nodes whose input comes from outside the sample but whose output enters it
    for (let n = 0; n < realCount; n++) {
      const X = nodeXs[n],
        Y = nodeYs[n];
      for (const top of [true, false]) {
        // a virtual node V feeds (X, Y) if V + outTo = (X, Y)
        const probe = rules.virtual(0, 0, top);
        const vX = X - probe.outTo[0],
          vY = Y - probe.outTo[1];
        if ((top && vY >= yMaxExcl) || (!top && vY < yMin)) {
          const vx = ring ? mod(vX, rules.periodX) : vX;
          if (rules.index(vx, vY) && contactAt(vx, vY) < 0) getVirtual(vx, vY);
        }
      }
    }
  }
  const nodeCount = nodeXs.length;
  const slotCount = new Int32Array(nodeCount),
    slotOffset = new Int32Array(nodeCount + 1),
    matrixOffset = new Int32Array(nodeCount);
  let so = 0,
    mo = 0;
  for (let n = 0; n < nodeCount; n++) {
    const k = real[n] ? slotsPerNode : nch;
    slotCount[n] = k;
    slotOffset[n] = so;
    matrixOffset[n] = mo;
    so += k;
    mo += k * k;
  }
  slotOffset[nodeCount] = so;
  const mats = new Float64Array(2 * mo);
  for (let n = 0; n < nodeCount; n++) mats.set(matrices[n], 2 * matrixOffset[n]);
  const inChannel = new Int32Array(so).fill(-1),
    outChannel = new Int32Array(so).fill(-1);
  const from: number[] = [],
    fromSlot: number[] = [],
    to: number[] = [],
    toSlot: number[] = [],
    kind: number[] = [],
    contactOf: number[] = [],
    seg: number[] = [];
  const addChannel = (fn: number, fs: number, tn: number, ts: number, k: number, x1: number, y1: number, x2: number, y2: number, contact = -1) => {
    const c = from.length;
    contactOf.push(contact);
    from.push(fn);
    fromSlot.push(fs);
    to.push(tn);
    toSlot.push(ts);
    kind.push(k);
    const [px1, py1] = rules.physical(x1, y1),
      [px2, py2] = rules.physical(x2, y2);
    seg.push(px1, py1, px2, py2);
    if (fn >= 0) outChannel[slotOffset[fn] + fs] = c;
    if (tn >= 0) inChannel[slotOffset[tn] + ts] = c;
    return c;
  };
  // outputs of every node
  for (let n = 0; n < nodeCount; n++) {
    const X = nodeXs[n],
      Y = nodeYs[n];
    const outs = real[n]
      ? rules.outs(X, Y)
      : (() => {
          const v = rules.virtual(X, Y, virtualTop[n] === 1);
          return [{ dX: v.outTo[0], dY: v.outTo[1], slot: v.outSlot }];
        })();
    outs.forEach((o, m) => {
      const tX = X + o.dX,
        tY = Y + o.dY;
      const w = resolve(tX, tY);
      for (let c = 0; c < nch; c++) {
        const fs = real[n] ? c * latticeSlots + m : c;
        if (w.kind === "node") addChannel(n, fs, w.id, real[w.id] ? c * latticeSlots + o.slot : c, CH_LINK, X, Y, tX, tY);
        else if (w.kind === "virtual") addChannel(n, fs, getVirtualExisting(w.X, w.Y), c, CH_LINK, X, Y, tX, tY);
        else if (w.kind === "contact") addChannel(n, fs, -1, -1, CH_CONTACT_OUT, X, Y, tX, tY, w.contact);
        else addChannel(n, fs, -1, -1, w.side === "left" ? CH_LEFT_OUT : CH_RIGHT_OUT, X, Y, tX, tY);
      }
    });
  }
  function getVirtualExisting(X: number, Y: number): number {
    const id = ids.get(keyOf(X, Y));
    if (id === undefined) throw new Error(`internal: missing virtual node (${X}, ${Y})`);
    return id;
  }
  // remaining inputs come from the leads
  for (let n = 0; n < nodeCount; n++) {
    for (let s = 0; s < slotCount[n]; s++) {
      if (inChannel[slotOffset[n] + s] >= 0) continue;
      const X = nodeXs[n],
        Y = nodeYs[n];
      let sX: number, sY: number;
      if (real[n]) {
        const ls = s % latticeSlots;
        // the source of slot ls: a node whose out of that kind lands here; for both lattices the
        // out slot with target slot ls, seen from a node of the other sublattice
        const cand = findSource(rules, X, Y, ls);
        sX = cand[0];
        sY = cand[1];
      } else {
        const v = rules.virtual(X, Y, virtualTop[n] === 1);
        sX = X + v.inFrom[0];
        sY = Y + v.inFrom[1];
      }
      const w = resolve(sX, sY);
      if (w.kind === "contact") {
        addChannel(-1, -1, n, s, CH_CONTACT_IN, sX, sY, X, Y, w.contact);
        continue;
      }
      if (w.kind !== "lead") throw new Error(`internal: unconnected slot ${s} of node ${n} at (${X}, ${Y})`);
      addChannel(-1, -1, n, s, w.side === "left" ? CH_LEFT_IN : CH_RIGHT_IN, sX, sY, X, Y);
    }
  }
  const channelCount = from.length;
  const g: NetworkGraph = {
    nodeCount,
    slotCount,
    slotOffset,
    matrixOffset,
    matrices: mats,
    inChannel,
    outChannel,
    channelCount,
    chFromNode: Int32Array.from(from),
    chFromSlot: Int32Array.from(fromSlot),
    chToNode: Int32Array.from(to),
    chToSlot: Int32Array.from(toSlot),
    chKind: Uint8Array.from(kind),
    chThetaB: new Float64Array(channelCount),
    chThetaDis: new Float64Array(channelCount),
    chSegment: Float64Array.from(seg),
    nodeReal: Uint8Array.from(real),
    nodeX: Float64Array.from(nodeXs.map((X, n) => rules.physical(X, nodeYs[n])[0])),
    nodeY: Float64Array.from(nodeYs.map((Y, n) => rules.physical(nodeXs[n], Y)[1])),
    schedule: [],
    cutAfter: new Int32Array(0),
    cutX: new Float64Array(0),
    copies: net.lattice === "triangular" && !("matrix" in net.node) ? net.channelsPerLink : 1,
  };
  if (contacts.length > 0) g.chContact = Int32Array.from(contactOf);
  for (let s = 0; s < so; s++) if (outChannel[s] < 0 || inChannel[s] < 0) throw new Error("internal: unconnected node slot");
  // Peierls phases
  const phi = opts.fluxPerPlaquette;
  if (phi !== 0) {
    const area = plaquetteArea(net.lattice);
    const [lx] = rules.physical(rules.periodX, 0);
    const gauge = ring && !periodicY ? GAUGE_LANDAU_X : GAUGE_LANDAU_Y;
    for (let c = 0; c < channelCount; c++) {
      if (g.chKind[c] !== CH_LINK) continue;
      const x1 = g.chSegment[4 * c],
        y1 = g.chSegment[4 * c + 1],
        x2 = g.chSegment[4 * c + 2],
        y2 = g.chSegment[4 * c + 3];
      let integral = gaugeIntegral(gauge, x1, y1, x2, y2);
      if (ring && periodicY) {
        // torus: A = B (0, x) on the fundamental domain; a link that crosses the x seam enters the
        // node's own gauge through the transition Lambda = B dX y (dX = wrapped - unwrapped x)
        const tn = g.chToNode[c];
        const dX = g.nodeX[tn] - x2;
        if (Math.abs(dX) > 1e-9) integral += dX * y2;
        void lx;
      }
      g.chThetaB[c] = (2 * Math.PI * phi * integral) / area;
    }
  }
  // disorder phases (shared by both valleys: a scalar potential is even under time reversal)
  const w = net.disorder.linkPhaseWidthRad;
  if (w > 0) {
    const rand = randomStream(mix32(seed, 1));
    for (let c = 0; c < channelCount; c++) {
      if (g.chKind[c] !== CH_LINK) continue;
      // channels of one physical link share the phase: they are consecutive (c = 0..nch-1)
      g.chThetaDis[c] = g.chFromSlot[c] >= 0 && channelCopyIndex(g, c, latticeSlots) > 0 ? g.chThetaDis[c - 1] : (rand() - 0.5) * w;
    }
  }
  buildSchedule(g);
  return g;
}

function channelCopyIndex(g: NetworkGraph, c: number, latticeSlots: number): number {
  const n = g.chFromNode[c];
  if (n < 0) return 0;
  return g.nodeReal[n] ? Math.floor(g.chFromSlot[c] / latticeSlots) : g.chFromSlot[c];
}

function findSource(rules: LatticeRules, X: number, Y: number, slot: number): [number, number] {
  // try all neighbours at the displacements the lattice uses
  for (const dX of [-2, -1, 1, 2])
    for (const dY of [-1, 0, 1]) {
      const sx = X - dX,
        sy = Y - dY;
      if (!rules.index(sx, sy)) continue;
      for (const o of rules.outs(sx, sy)) if (o.dX === dX && o.dY === dY && o.slot === slot) return [sx, sy];
    }
  throw new Error(`internal: no source for slot ${slot} at (${X}, ${Y})`);
}

/** Sample geometry in nm: length along x and width across (for per-area and Lambda = xi / W). */
export function sampleGeometryNm(net: Network, periodNm: number): { lengthNm: number; widthNm: number; cellAreaNm2: number } {
  if (net.lattice === "triangular") {
    return {
      lengthNm: net.size.columns * periodNm,
      widthNm: (net.size.rows * Math.sqrt(3) * periodNm) / 2,
      cellAreaNm2: (Math.sqrt(3) / 2) * periodNm * periodNm,
    };
  }
  // square: node columns are l/sqrt2 apart; a column of `rows` nodes spans 2 rows * l/sqrt2
  return { lengthNm: (net.size.columns * periodNm) / Math.SQRT2, widthNm: net.size.rows * Math.SQRT2 * periodNm, cellAreaNm2: periodNm * periodNm };
}
