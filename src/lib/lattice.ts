/**
 * Geometry of a network for drawing (physics.md section 2), in units of the link length l.
 *
 * Triangular: a1 = (1, 0), a2 = (-1/2, sqrt3/2), a3 = (-1/2, -sqrt3/2). Nodes sit in rows
 * stacked along y; odd rows are shifted by a1/2 so the sample is a rectangle of `columns` x
 * `rows` nodes. Valley K: the link of direction j runs from R to R + a_j; valley K' reverses it.
 * Leads sit on the faces perpendicular to a1 (left and right): links that leave through a face
 * are drawn as stubs into the lead. With a periodic transverse boundary, links that leave through
 * the top or bottom come back on the other side (drawn as stubs with a marker).
 *
 * Square: nodes on a square grid; horizontal links run right on even rows and left on odd rows,
 * vertical links run up on even columns and down on odd ones, so every node has two links in and
 * two out (the network of the quantum Hall transition). Valley K' reverses every link.
 *
 * Output is flat typed arrays so a 200 x 200 network (120,000 links) draws in one pass.
 */
export interface NetworkShape {
  lattice: "triangular" | "square";
  columns: number;
  rows: number;
  transverse: "periodic" | "open";
  valley: "K" | "K'";
}

export interface NetworkGeometry {
  nodeCount: number;
  /** x, y per node, in units of l; y grows upward. */
  nodes: Float32Array;
  linkCount: number;
  /** x0, y0, x1, y1 per link (tail to head, in the chosen valley). */
  links: Float32Array;
  /** Per link: 0 inner, 1 into/out of a lead, 2 wrapped across the periodic boundary. */
  linkKind: Uint8Array;
  /** Bounding box of the sample (nodes), in l. */
  bounds: { xMin: number; xMax: number; yMin: number; yMax: number };
  /** Lead faces: x positions of the left and right lead, in l. */
  leads: { leftX: number; rightX: number };
  /** False for a closed sample (no leads drawn). */
  hasLeads?: boolean;
  /**
   * The lead channels that run the other way from the lead links (kind 1) of `links`: in valley K
   * the channels entering the sample from a lead (the kind-1 links leave into it), in valley K'
   * the reverse. x0, y0, x1, y1 per stub, tail to head in the chosen valley; with the kind-1 links
   * they show the current at every lead in both directions. Not counted in linkCount.
   */
  leadStubs?: Float32Array;
  /** The valley the links are drawn in (lattice samples). */
  valley?: NetworkShape["valley"];
}

const S3 = Math.sqrt(3) / 2;

export function linkCountOf(shape: Pick<NetworkShape, "lattice" | "columns" | "rows">): number {
  return shape.lattice === "triangular" ? 3 * shape.columns * shape.rows : 2 * shape.columns * shape.rows;
}

export function networkGeometry(shape: NetworkShape): NetworkGeometry {
  return shape.lattice === "triangular" ? triangular(shape) : square(shape);
}

function triangular({ columns: C, rows: Rn, transverse, valley }: NetworkShape): NetworkGeometry {
  const xOf = (i: number, m: number) => i + (m & 1) * 0.5;
  const yOf = (m: number) => m * S3;
  const nodes = gridNodes(C, Rn, xOf, yOf);
  const out = linkWriter(3 * C * Rn, valley);
  const dirs: [number, number][] = [
    [1, 0],
    [-0.5, S3],
    [-0.5, -S3],
  ];
  const xMax = C - 1 + (Rn > 1 ? 0.5 : 0);
  for (let m = 0; m < Rn; m++)
    for (let i = 0; i < C; i++) {
      const x0 = xOf(i, m);
      const y0 = yOf(m);
      for (let j = 0; j < 3; j++) {
        const [dx, dy] = dirs[j];
        let x1 = x0 + dx;
        let y1 = y0 + dy;
        let kind = 0;
        const mt = m + (j === 1 ? 1 : j === 2 ? -1 : 0);
        if (x1 < -1e-6 || x1 > xMax + 1e-6)
          kind = 1; // leaves through a lead face
        else if (mt < 0 || mt >= Rn) {
          kind = 2;
          if (transverse === "open") {
            // Open edge: the link is kept as a short stub pointing out (the edge rule reflects it back).
            x1 = x0 + dx * 0.45;
            y1 = y0 + dy * 0.45;
          } else {
            x1 = x0 + dx * 0.5;
            y1 = y0 + dy * 0.5;
          }
        }
        if (kind === 1) {
          x1 = x0 + dx * 0.5;
          y1 = y0 + dy * 0.5;
        }
        out.put(x0, y0, x1, y1, kind);
      }
    }
  // Channels from the leads: the link of direction j arriving at node R comes from R - a_j; when
  // that lies beyond a lead face it is a channel of the lead (across an open edge it is the edge rule's).
  const stubs = stubWriter(valley);
  for (let m = 0; m < Rn; m++)
    for (let i = 0; i < C; i++) {
      const x0 = xOf(i, m);
      const y0 = yOf(m);
      for (let j = 0; j < 3; j++) {
        const [dx, dy] = dirs[j];
        const ms = m - (j === 1 ? 1 : j === 2 ? -1 : 0);
        if (transverse === "open" && (ms < 0 || ms >= Rn)) continue;
        const xs = x0 - dx;
        // Along a1 the stub starts at the lead bar (x = -0.6 + its half width), else half a link out.
        if (xs < -1e-6 || xs > xMax + 1e-6) stubs.put(j === 0 ? -0.48 : x0 - dx * 0.5, y0 - dy * 0.5 * (j === 0 ? 0 : 1), x0, y0);
      }
    }
  return { ...geometry(nodes, out, xMax, (Rn - 1) * S3), leadStubs: stubs.done(), valley };
}

function square({ columns: C, rows: Rn, valley }: NetworkShape): NetworkGeometry {
  const nodes = gridNodes(
    C,
    Rn,
    (i) => i,
    (m) => m,
  );
  const out = linkWriter(2 * C * Rn, valley);
  const put = out.put;
  for (let m = 0; m < Rn; m++)
    for (let i = 0; i < C; i++) {
      // Horizontal link leaving node (i, m).
      const hx = m % 2 === 0 ? 1 : -1;
      const xt = i + hx;
      if (xt < 0 || xt >= C) put(i, m, i + hx * 0.5, m, 1);
      else put(i, m, xt, m, 0);
      // Vertical link leaving node (i, m).
      const vy = i % 2 === 0 ? 1 : -1;
      const yt = m + vy;
      if (yt < 0 || yt >= Rn) put(i, m, i, m + vy * 0.45, 2);
      else put(i, m, i, yt, 0);
    }
  // Channels from the leads: the horizontal link arriving at (i, m) comes from i - hx.
  const stubs = stubWriter(valley);
  for (let m = 0; m < Rn; m++)
    for (let i = 0; i < C; i++) {
      const hx = m % 2 === 0 ? 1 : -1;
      if (i - hx < 0 || i - hx >= C) stubs.put(i - hx * 0.5, m, i, m);
    }
  return { ...geometry(nodes, out, C - 1, Rn - 1), leadStubs: stubs.done(), valley };
}

/** Lead stubs written tail to head in valley K (reversed in K'). */
function stubWriter(valley: NetworkShape["valley"]) {
  const v: number[] = [];
  return {
    put: (x0: number, y0: number, x1: number, y1: number) => (valley === "K'" ? v.push(x1, y1, x0, y0) : v.push(x0, y0, x1, y1)),
    done: () => Float32Array.from(v),
  };
}

/** x, y of the nodes of a columns x rows grid, row by row. */
function gridNodes(C: number, Rn: number, xOf: (i: number, m: number) => number, yOf: (m: number) => number): Float32Array {
  const nodes = new Float32Array(2 * C * Rn);
  for (let m = 0; m < Rn; m++)
    for (let i = 0; i < C; i++) {
      const k = m * C + i;
      nodes[2 * k] = xOf(i, m);
      nodes[2 * k + 1] = yOf(m);
    }
  return nodes;
}

/** Links written one after the other, tail to head in the chosen valley (K' reverses every link). */
function linkWriter(capacity: number, valley: NetworkShape["valley"]) {
  const links = new Float32Array(4 * capacity);
  const linkKind = new Uint8Array(capacity);
  const rev = valley === "K'";
  let n = 0;
  const put = (x0: number, y0: number, x1: number, y1: number, kind: number) => {
    const o = 4 * n;
    if (rev) [x0, y0, x1, y1] = [x1, y1, x0, y0];
    links[o] = x0;
    links[o + 1] = y0;
    links[o + 2] = x1;
    links[o + 3] = y1;
    linkKind[n] = kind;
    n++;
  };
  return { links, linkKind, put, count: () => n };
}

/** The geometry of a lattice sample whose nodes span [0, xMax] x [0, yMax], leads just outside. */
function geometry(nodes: Float32Array, out: ReturnType<typeof linkWriter>, xMax: number, yMax: number): NetworkGeometry {
  return {
    nodeCount: nodes.length / 2,
    nodes,
    linkCount: out.count(),
    links: out.links,
    linkKind: out.linkKind,
    bounds: { xMin: 0, xMax, yMin: 0, yMax },
    leads: { leftX: -0.6, rightX: xMax + 0.6 },
  };
}

/**
 * Geometry from explicit link segments (x0, y0, x1, y1 in any length unit), e.g. the links of a
 * local-density-of-states result; `edge[i]` = 1 marks links to the sample's edge.
 */
export function geometryFromSegments(seg: { fromX: number[]; fromY: number[]; toX: number[]; toY: number[]; edge?: number[] }, unit = 1): NetworkGeometry {
  const n = seg.fromX.length;
  const links = new Float32Array(4 * n);
  const linkKind = new Uint8Array(n);
  let xMin = Infinity,
    xMax = -Infinity,
    yMin = Infinity,
    yMax = -Infinity;
  for (let i = 0; i < n; i++) {
    const v = [seg.fromX[i] / unit, seg.fromY[i] / unit, seg.toX[i] / unit, seg.toY[i] / unit];
    links.set(v, 4 * i);
    linkKind[i] = seg.edge?.[i] ? 2 : 0;
    xMin = Math.min(xMin, v[0], v[2]);
    xMax = Math.max(xMax, v[0], v[2]);
    yMin = Math.min(yMin, v[1], v[3]);
    yMax = Math.max(yMax, v[1], v[3]);
  }
  if (n === 0) [xMin, xMax, yMin, yMax] = [0, 1, 0, 1];
  return {
    nodeCount: 0,
    nodes: new Float32Array(0),
    linkCount: n,
    links,
    linkKind,
    bounds: { xMin, xMax, yMin, yMax },
    leads: { leftX: xMin - 0.3, rightX: xMax + 0.3 },
    hasLeads: false,
  };
}
