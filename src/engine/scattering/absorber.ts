/**
 * Slice composition by local star products: the scattering matrix of the part of the network
 * absorbed so far (region A) is kept densely, rows = amplitudes of channels LEAVING A (at their
 * departure, before the link phase), columns = amplitudes of channels ENTERING A (at their
 * departure; the link phase is applied inside A). Adding a group of nodes connects p rows of A
 * to the group's inputs and q of the group's outputs to columns of A; eliminating the q internal
 * loop amplitudes is a q x q solve and a rank-q update of the dense matrix (the Redheffer star
 * product restricted to the channels that change). Cost per node O(q N^2), N the frontier size:
 * O(W^3) per slice for a W-wide strip. Raw transfer matrices are never formed.
 *
 * For a closed network (no leads) the product of det(1 - M S_pg) over the steps is
 * det(1 - U) of the whole network's link-to-link operator U (Schur complement formula), used by
 * the trace formula of the density of states.
 */
import type { NetworkGraph } from "../network/graph";
import { getKernels, tsKernels } from "../linalg/kernels";
import { SingularMatrixError } from "../errors";
import { smallDet } from "./small-det";
import { absorbBlock } from "./block-step";
import { blockSchedule } from "../network/blocks";

export { smallDet };

export interface AbsorberHooks {
  /** Called after each group; return true to ask for a stop (cancellation is thrown by the caller). */
  afterGroup?: (groupIndex: number) => void;
}

export class Absorber {
  readonly g: NetworkGraph;
  readonly z: Float64Array;
  S: Float64Array;
  capR: number;
  capC: number;
  nr = 0;
  nc = 0;
  rowCh: Int32Array;
  colCh: Int32Array;
  chRow: Int32Array;
  chCol: Int32Array;
  absorbed: Uint8Array;
  /** det(1 - M S_pg) of every group (interleaved complex), if tracked. */
  stepDet: Float64Array | null;
  nextGroup = 0;
  /** The groups in the order they are absorbed (default: the graph's schedule). */
  readonly order: Int32Array[];

  /** Channels of this kind (e.g. left-lead outputs) get no row: exact when nothing reads them. */
  readonly skipKind: number;

  /** "block": whole blocks per step (`block-step.ts`, default order `blockSchedule(g)`); "general": groups of unlinked nodes (`g.schedule`). */
  readonly path: "general" | "block";
  private scratch: Int32Array | null = null;

  constructor(
    g: NetworkGraph,
    z: Float64Array,
    trackDeterminant = false,
    order?: Int32Array[],
    initialCapacity = 16,
    skipKind = -1,
    path: "general" | "block" = "general",
  ) {
    this.g = g;
    this.z = z;
    this.skipKind = skipKind;
    this.path = path;
    this.order = order ?? (path === "block" ? blockSchedule(g) : g.schedule);
    this.capR = initialCapacity;
    this.capC = initialCapacity;
    this.S = new Float64Array(2 * this.capR * this.capC);
    this.rowCh = new Int32Array(this.capR);
    this.colCh = new Int32Array(this.capC);
    this.chRow = new Int32Array(g.channelCount).fill(-1);
    this.chCol = new Int32Array(g.channelCount).fill(-1);
    this.absorbed = new Uint8Array(g.nodeCount);
    this.stepDet = trackDeterminant ? new Float64Array(2 * this.order.length) : null;
  }

  clone(): Absorber {
    const a = Object.create(Absorber.prototype) as Absorber;
    Object.assign(a, this);
    // compact copy: only the live nr x nc block (the copy grows again when it absorbs more)
    a.capR = Math.max(1, this.nr);
    a.capC = Math.max(1, this.nc);
    a.S = new Float64Array(2 * a.capR * a.capC);
    for (let r = 0; r < this.nr; r++) a.S.set(this.S.subarray(2 * r * this.capC, 2 * r * this.capC + 2 * this.nc), 2 * r * a.capC);
    a.rowCh = this.rowCh.slice(0, a.capR);
    a.colCh = this.colCh.slice(0, a.capC);
    a.chRow = this.chRow.slice();
    a.chCol = this.chCol.slice();
    a.absorbed = this.absorbed.slice();
    a.stepDet = this.stepDet ? this.stepDet.slice() : null;
    return a;
  }

  /** Bytes held by the dense matrix. */
  get matrixBytes(): number {
    return this.S.byteLength;
  }

  /** @internal grow the matrix to hold rows x cols (used by the block step). */
  ensure(rows: number, cols: number): void {
    if (rows <= this.capR && cols <= this.capC) return;
    const nR = Math.max(this.capR, rows <= this.capR ? this.capR : Math.ceil(rows * 1.5));
    const nC = Math.max(this.capC, cols <= this.capC ? this.capC : Math.ceil(cols * 1.5));
    const S = new Float64Array(2 * nR * nC);
    for (let r = 0; r < this.nr; r++) S.set(this.S.subarray(2 * r * this.capC, 2 * r * this.capC + 2 * this.nc), 2 * r * nC);
    this.S = S;
    const rc = new Int32Array(nR);
    rc.set(this.rowCh.subarray(0, this.nr));
    this.rowCh = rc;
    const cc = new Int32Array(nC);
    cc.set(this.colCh.subarray(0, this.nc));
    this.colCh = cc;
    this.capR = nR;
    this.capC = nC;
  }

  /** @internal */
  removeRow(r: number): void {
    const last = this.nr - 1;
    const ch = this.rowCh[r];
    this.chRow[ch] = -1;
    if (r !== last) {
      const C2 = 2 * this.capC;
      this.S.copyWithin(r * C2, last * C2, last * C2 + 2 * this.nc);
      const moved = this.rowCh[last];
      this.rowCh[r] = moved;
      this.chRow[moved] = r;
    }
    this.nr = last;
  }

  /** @internal */
  removeCol(c: number): void {
    const last = this.nc - 1;
    const ch = this.colCh[c];
    this.chCol[ch] = -1;
    if (c !== last) {
      const S = this.S,
        C2 = 2 * this.capC;
      for (let r = 0; r < this.nr; r++) {
        S[r * C2 + 2 * c] = S[r * C2 + 2 * last];
        S[r * C2 + 2 * c + 1] = S[r * C2 + 2 * last + 1];
      }
      const moved = this.colCh[last];
      this.colCh[c] = moved;
      this.chCol[moved] = c;
    }
    this.nc = last;
  }

  /** @internal drop the columns of these channels (as removeCol one by one, the entries moved row by row). */
  removeCols(chs: number[]): void {
    const moves: number[] = [];
    for (const ch of chs) {
      const c = this.chCol[ch],
        last = this.nc - 1;
      this.chCol[ch] = -1;
      if (c !== last) {
        moves.push(c, last);
        const moved = this.colCh[last];
        this.colCh[c] = moved;
        this.chCol[moved] = c;
      }
      this.nc = last;
    }
    const S = this.S,
      C2 = 2 * this.capC;
    for (let r = 0; r < this.nr; r++) {
      const ro = r * C2;
      for (let k = 0; k < moves.length; k += 2) {
        S[ro + 2 * moves[k]] = S[ro + 2 * moves[k + 1]];
        S[ro + 2 * moves[k] + 1] = S[ro + 2 * moves[k + 1] + 1];
      }
    }
  }

  /** @internal node -> position in the block being absorbed (-1 elsewhere), reset after each block. */
  blockScratch(): Int32Array {
    if (!this.scratch) this.scratch = new Int32Array(this.g.nodeCount).fill(-1);
    return this.scratch;
  }

  /** Absorb the next group (block) of the schedule. */
  step(): void {
    if (this.path === "block") {
      absorbBlock(this, this.order[this.nextGroup]);
      return;
    }
    const g = this.g,
      z = this.z;
    const group = this.order[this.nextGroup];
    // classify slots
    const P: { slotNode: number; local: number; row: number; zr: number; zi: number; gidx: number }[] = [];
    const Xin: { ch: number; zr: number; zi: number; gidx: number }[] = [];
    const Q: { col: number; gidx: number }[] = [];
    const Yout: { ch: number; gidx: number }[] = [];
    // group slot numbering: gidx over the concatenated slots of the group
    let total = 0;
    const nodeBase: number[] = [];
    for (const n of group) {
      nodeBase.push(total);
      total += g.slotCount[n];
    }
    for (let t = 0; t < group.length; t++) {
      const n = group[t];
      const k = g.slotCount[n],
        so = g.slotOffset[n];
      for (let s = 0; s < k; s++) {
        const ch = g.inChannel[so + s];
        const from = g.chFromNode[ch];
        const zr = z[2 * ch],
          zi = z[2 * ch + 1];
        if (from >= 0 && this.absorbed[from]) P.push({ slotNode: n, local: s, row: this.chRow[ch], zr, zi, gidx: nodeBase[t] + s });
        else Xin.push({ ch, zr, zi, gidx: nodeBase[t] + s });
      }
      for (let s = 0; s < k; s++) {
        const ch = g.outChannel[so + s];
        const to = g.chToNode[ch];
        if (to >= 0 && this.absorbed[to]) Q.push({ col: this.chCol[ch], gidx: nodeBase[t] + s });
        else if (g.chKind[ch] !== this.skipKind) Yout.push({ ch, gidx: nodeBase[t] + s });
      }
    }
    // block-diagonal T of the group: T(outGidx, inGidx)
    const nodeOfG = new Int32Array(total),
      localOfG = new Int32Array(total);
    for (let t = 0; t < group.length; t++)
      for (let s = 0; s < g.slotCount[group[t]]; s++) {
        nodeOfG[nodeBase[t] + s] = group[t];
        localOfG[nodeBase[t] + s] = s;
      }
    const Tre = (o: number, i: number): [number, number] => {
      const n = nodeOfG[o];
      if (nodeOfG[i] !== n) return [0, 0];
      const k = g.slotCount[n];
      const off = 2 * (g.matrixOffset[n] + localOfG[o] * k + localOfG[i]);
      return [g.matrices[off], g.matrices[off + 1]];
    };
    const p = P.length,
      q = Q.length,
      nx = Xin.length,
      ny = Yout.length;
    const nr = this.nr,
      nc = this.nc;
    this.ensure(nr + ny, nc + nx);
    const S = this.S,
      C2 = 2 * this.capC;
    // Spg (p x q), Xc (nr x q) gathered before the update
    const Xc = new Float64Array(2 * nr * q);
    for (let r = 0; r < nr; r++)
      for (let o = 0; o < q; o++) {
        Xc[2 * (r * q + o)] = S[r * C2 + 2 * Q[o].col];
        Xc[2 * (r * q + o) + 1] = S[r * C2 + 2 * Q[o].col + 1];
      }
    const Spg = new Float64Array(2 * p * q);
    for (let i = 0; i < p; i++)
      for (let o = 0; o < q; o++) {
        Spg[2 * (i * q + o)] = S[P[i].row * C2 + 2 * Q[o].col];
        Spg[2 * (i * q + o) + 1] = S[P[i].row * C2 + 2 * Q[o].col + 1];
      }
    // M (q x p) = T[Q, P] z_P ; TQX (q x nx) = T[Q, X] z_X
    const M = new Float64Array(2 * q * p),
      TQX = new Float64Array(2 * q * nx);
    for (let o = 0; o < q; o++) {
      for (let i = 0; i < p; i++) {
        const [tr, ti] = Tre(Q[o].gidx, P[i].gidx);
        M[2 * (o * p + i)] = tr * P[i].zr - ti * P[i].zi;
        M[2 * (o * p + i) + 1] = tr * P[i].zi + ti * P[i].zr;
      }
      for (let x = 0; x < nx; x++) {
        const [tr, ti] = Tre(Q[o].gidx, Xin[x].gidx);
        TQX[2 * (o * nx + x)] = tr * Xin[x].zr - ti * Xin[x].zi;
        TQX[2 * (o * nx + x) + 1] = tr * Xin[x].zi + ti * Xin[x].zr;
      }
    }
    let H: Float64Array = new Float64Array(0);
    // tiny products (q, p <= a few dozen) stay in TypeScript; the backend does the big update
    const kern = tsKernels;
    const big = getKernels();
    if (q > 0) {
      // Kinv = 1 - M Spg ; G = K M ; H = K TQX
      const MS = p > 0 ? kern.matmul(M, Spg, q, p, q) : new Float64Array(2 * q * q);
      const Kinv = new Float64Array(2 * q * q);
      for (let a = 0; a < q; a++)
        for (let b = 0; b < q; b++) {
          Kinv[2 * (a * q + b)] = (a === b ? 1 : 0) - MS[2 * (a * q + b)];
          Kinv[2 * (a * q + b) + 1] = -MS[2 * (a * q + b) + 1];
        }
      if (this.stepDet) {
        const d = smallDet(Kinv, q);
        this.stepDet[2 * this.nextGroup] = d[0];
        this.stepDet[2 * this.nextGroup + 1] = d[1];
      }
      const rhs = new Float64Array(2 * q * (p + nx));
      for (let a = 0; a < q; a++) {
        for (let i = 0; i < p; i++) {
          rhs[2 * (a * (p + nx) + i)] = M[2 * (a * p + i)];
          rhs[2 * (a * (p + nx) + i) + 1] = M[2 * (a * p + i) + 1];
        }
        for (let x = 0; x < nx; x++) {
          rhs[2 * (a * (p + nx) + p + x)] = TQX[2 * (a * nx + x)];
          rhs[2 * (a * (p + nx) + p + x) + 1] = TQX[2 * (a * nx + x) + 1];
        }
      }
      let sol: Float64Array;
      try {
        sol = kern.solve(Kinv, rhs, q, p + nx);
      } catch (e) {
        if (e instanceof SingularMatrixError) throw new SingularMatrixError("a closed loop of the network (exact resonance without damping)");
        throw e;
      }
      const G = new Float64Array(2 * q * p);
      H = new Float64Array(2 * q * nx);
      for (let a = 0; a < q; a++) {
        for (let i = 0; i < p; i++) {
          G[2 * (a * p + i)] = sol[2 * (a * (p + nx) + i)];
          G[2 * (a * p + i) + 1] = sol[2 * (a * (p + nx) + i) + 1];
        }
        for (let x = 0; x < nx; x++) {
          H[2 * (a * nx + x)] = sol[2 * (a * (p + nx) + p + x)];
          H[2 * (a * nx + x) + 1] = sol[2 * (a * (p + nx) + p + x) + 1];
        }
      }
      // Wm (q x nc) = G S[rho, :]
      if (p > 0 && nc > 0) {
        const Srho = new Float64Array(2 * p * nc);
        for (let i = 0; i < p; i++) Srho.set(S.subarray(P[i].row * C2, P[i].row * C2 + 2 * nc), 2 * i * nc);
        const Wm = nc > 64 ? big.matmul(G, Srho, q, p, nc) : kern.matmul(G, Srho, q, p, nc);
        (nr * nc > 4096 ? big : kern).gemmAccumulate(nr, nc, q, Xc, 0, q, Wm, 0, nc, S, 0, this.capC);
      }
    } else if (this.stepDet) {
      this.stepDet[2 * this.nextGroup] = 1;
      this.stepDet[2 * this.nextGroup + 1] = 0;
    }
    // new columns (for all current rows): S[r, nc + x] = sum_o Xc[r, o] H[o, x]
    for (let x = 0; x < nx; x++) {
      const col = nc + x;
      for (let r = 0; r < nr; r++) {
        let re = 0,
          im = 0;
        for (let o = 0; o < q; o++) {
          const ar = Xc[2 * (r * q + o)],
            ai = Xc[2 * (r * q + o) + 1],
            hr = H[2 * (o * nx + x)],
            hi = H[2 * (o * nx + x) + 1];
          re += ar * hr - ai * hi;
          im += ar * hi + ai * hr;
        }
        S[r * C2 + 2 * col] = re;
        S[r * C2 + 2 * col + 1] = im;
      }
      this.colCh[col] = Xin[x].ch;
      this.chCol[Xin[x].ch] = col;
    }
    // Spg H (p x nx) for the new rows at new columns
    const SpgH = q > 0 && p > 0 && nx > 0 ? kern.matmul(Spg, H, p, q, nx) : new Float64Array(2 * p * nx);
    // new rows: y = sum_i T[Y, P_i] z_i B_rho_i (B_rho = updated rows rho), plus new columns
    for (let yI = 0; yI < ny; yI++) {
      const row = nr + yI;
      const ro = row * C2;
      S.fill(0, ro, ro + 2 * (nc + nx));
      for (let i = 0; i < p; i++) {
        const [tr, ti] = Tre(Yout[yI].gidx, P[i].gidx);
        if (tr === 0 && ti === 0) continue;
        const cr = tr * P[i].zr - ti * P[i].zi,
          ci = tr * P[i].zi + ti * P[i].zr;
        const src = P[i].row * C2;
        for (let c2 = 0; c2 < 2 * nc; c2 += 2) {
          const br = S[src + c2],
            bi = S[src + c2 + 1];
          S[ro + c2] += cr * br - ci * bi;
          S[ro + c2 + 1] += cr * bi + ci * br;
        }
        for (let x = 0; x < nx; x++) {
          const br = SpgH[2 * (i * nx + x)],
            bi = SpgH[2 * (i * nx + x) + 1];
          S[ro + 2 * (nc + x)] += cr * br - ci * bi;
          S[ro + 2 * (nc + x) + 1] += cr * bi + ci * br;
        }
      }
      for (let x = 0; x < nx; x++) {
        const [tr, ti] = Tre(Yout[yI].gidx, Xin[x].gidx);
        S[ro + 2 * (nc + x)] += tr * Xin[x].zr - ti * Xin[x].zi;
        S[ro + 2 * (nc + x) + 1] += tr * Xin[x].zi + ti * Xin[x].zr;
      }
      this.rowCh[row] = Yout[yI].ch;
      this.chRow[Yout[yI].ch] = row;
    }
    this.nr = nr + ny;
    this.nc = nc + nx;
    // drop the rows and columns that became internal (largest index first keeps indices valid)
    const rowsToDrop = P.map((x) => this.rowCh[x.row]);
    const colsToDrop = Q.map((x) => this.colCh[x.col]);
    for (const ch of rowsToDrop) this.removeRow(this.chRow[ch]);
    for (const ch of colsToDrop) this.removeCol(this.chCol[ch]);
    for (const n of group) this.absorbed[n] = 1;
    this.nextGroup++;
  }

  get done(): boolean {
    return this.nextGroup >= this.order.length;
  }

  /** Run the whole schedule (optionally calling a hook after each group). */
  run(hooks?: AbsorberHooks): void {
    while (!this.done) {
      this.step();
      hooks?.afterGroup?.(this.nextGroup - 1);
    }
  }

  /** Matrix element: amplitude leaving on channel chOut per unit amplitude entering on chIn. */
  entry(chOut: number, chIn: number): [number, number] {
    const r = this.chRow[chOut],
      c = this.chCol[chIn];
    if (r < 0 || c < 0) return [0, 0];
    const o = r * 2 * this.capC + 2 * c;
    return [this.S[o], this.S[o + 1]];
  }
}
