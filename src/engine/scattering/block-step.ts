/**
 * Block path of the slice composition: absorb a whole block of nodes (about a column, see
 * `network/blocks.ts`) into the dense frontier matrix S of an `Absorber` in one step.
 *
 * The block's members may be linked to each other, every link running from an earlier member to
 * a later one, so the block's own scattering matrix (external inputs -> external outputs, the
 * internal links' phases included) is a forward substitution with a few nonzeros per output: it
 * is kept sparse. With P the inputs fed by rows of S (rows rho), X the new inputs, Q the outputs
 * that feed columns of S and Y the new outputs, M = T[Q, P], K = 1 - M S[rho, Q] (q x q) and
 * Z = S[:, Q] K^-1 (one solve of BLAS size, on the transposed system):
 *
 *   S[:, old]  += Z (M S[rho, :])      (rank q: one product of BLAS size)
 *   S[:, X]     = Z T[Q, X]            (sparse)
 *   S[Y, :]     = T[Y, P] S[rho, :] + T[Y, X]   (sparse, with the updated rows rho)
 *
 * then the rows rho and the columns Q become internal and are dropped. This is the Redheffer star
 * product of S with the block, restricted to the channels that change; the general path
 * (`Absorber.step`) is the same formula for groups of unlinked nodes.
 */
import type { Absorber } from "./absorber";
import { smallDet } from "./small-det";
import { getKernels, tsKernels } from "../linalg/kernels";
import { SingularMatrixError } from "../errors";

/** Reused work arrays (one thread runs one step at a time): zeroed views of the asked length. */
const pool: Float64Array[] = [];
function scratch(slot: number, length: number, zero = true): Float64Array {
  let b = pool[slot];
  if (!b || b.length < length) pool[slot] = b = new Float64Array(Math.ceil(length * 1.25));
  const v = b.subarray(0, length);
  if (zero) v.fill(0);
  return v;
}

/** Below these sizes the TypeScript kernels beat a call into the backend. */
const BACKEND_MIN_SOLVE = 16 * 16 * 32;
const BACKEND_MIN_UPDATE = 4096 * 8;

/** Sparse complex vectors over the block's external inputs (P first, then X), built node by node: row r is idx/re/im[start[r] .. start[r + 1]). */
interface SparseRows {
  start: number[];
  idx: number[];
  re: number[];
  im: number[];
}

/** Steps 1 and 2: the block's channels and its sparse matrix (every output slot over the external inputs). */
function blockMatrix(a: Absorber, block: Int32Array) {
  const g = a.g,
    z = a.z;
  const pos = a.blockScratch();
  for (let t = 0; t < block.length; t++) pos[block[t]] = t;
  // 1. classify the input slots: P (from the absorbed part), internal (from an earlier member), X (new)
  let slots = 0;
  for (const n of block) slots += g.slotCount[n];
  const inExt = new Int32Array(slots); // external input index of each in slot (P: i, X: p + x), -1 internal
  const Prow: number[] = [],
    Pch: number[] = [],
    Xch: number[] = [];
  const xOfSlot = new Int32Array(slots).fill(-1);
  {
    let gs = 0;
    for (let t = 0; t < block.length; t++) {
      const n = block[t],
        so = g.slotOffset[n];
      for (let s = 0; s < g.slotCount[n]; s++, gs++) {
        const ch = g.inChannel[so + s];
        const from = g.chFromNode[ch];
        if (from >= 0 && a.absorbed[from]) {
          inExt[gs] = Prow.length;
          Prow.push(a.chRow[ch]);
          Pch.push(ch);
        } else if (from >= 0 && pos[from] >= 0 && pos[from] < t) inExt[gs] = -1;
        else {
          xOfSlot[gs] = Xch.length;
          Xch.push(ch);
        }
      }
    }
  }
  const p = Prow.length,
    nx = Xch.length;
  for (let gs = 0; gs < slots; gs++) if (xOfSlot[gs] >= 0) inExt[gs] = p + xOfSlot[gs];
  // 2. forward substitution: every output slot as a sparse combination of the external inputs
  //    (arrival amplitudes: the link phase z of the input channel included)
  const outRows: SparseRows = { start: [0], idx: [], re: [], im: [] };
  // the output row of group slot gs is row gs (rows are pushed node by node, slot by slot)
  const nodeBase = new Int32Array(block.length);
  for (let t = 1; t < block.length; t++) nodeBase[t] = nodeBase[t - 1] + g.slotCount[block[t - 1]];
  const acc = new Float64Array(2 * (p + nx));
  const touched: number[] = [];
  const Qcol: number[] = [],
    Qrow: number[] = [],
    Ych: number[] = [],
    Yrow: number[] = [];
  {
    let gs0 = 0;
    for (let t = 0; t < block.length; t++) {
      const n = block[t],
        so = g.slotOffset[n],
        k = g.slotCount[n],
        mo = 2 * g.matrixOffset[n];
      for (let o = 0; o < k; o++) {
        touched.length = 0;
        for (let s = 0; s < k; s++) {
          const tr = g.matrices[mo + 2 * (o * k + s)],
            ti = g.matrices[mo + 2 * (o * k + s) + 1];
          if (tr === 0 && ti === 0) continue;
          const ch = g.inChannel[so + s];
          const zr = z[2 * ch],
            zi = z[2 * ch + 1];
          const cr = tr * zr - ti * zi,
            ci = tr * zi + ti * zr;
          const e = inExt[gs0 + s];
          if (e >= 0) {
            if (acc[2 * e] === 0 && acc[2 * e + 1] === 0) touched.push(e);
            acc[2 * e] += cr;
            acc[2 * e + 1] += ci;
          } else {
            // internal link from an earlier member: its output row, times T z
            const r = nodeBase[pos[g.chFromNode[ch]]] + g.chFromSlot[ch];
            for (let j = outRows.start[r]; j < outRows.start[r + 1]; j++) {
              const e2 = outRows.idx[j],
                vr = outRows.re[j],
                vi = outRows.im[j];
              if (acc[2 * e2] === 0 && acc[2 * e2 + 1] === 0) touched.push(e2);
              acc[2 * e2] += cr * vr - ci * vi;
              acc[2 * e2 + 1] += cr * vi + ci * vr;
            }
          }
        }
        const r = outRows.start.length - 1;
        for (const e of touched) {
          if (acc[2 * e] !== 0 || acc[2 * e + 1] !== 0) {
            outRows.idx.push(e);
            outRows.re.push(acc[2 * e]);
            outRows.im.push(acc[2 * e + 1]);
          }
          acc[2 * e] = 0;
          acc[2 * e + 1] = 0;
        }
        outRows.start.push(outRows.idx.length);
        const ch = g.outChannel[so + o];
        const to = g.chToNode[ch];
        if (to >= 0 && a.absorbed[to]) {
          Qcol.push(a.chCol[ch]);
          Qrow.push(r);
        } else if (to >= 0 && to !== n && pos[to] > t) {
          // internal: read by the later member
        } else if (to >= 0 && to !== n && pos[to] >= 0) {
          throw new Error("block schedule: a link from a later to an earlier member of a block");
        } else if (g.chKind[ch] !== a.skipKind) {
          Ych.push(ch);
          Yrow.push(r);
        }
      }
      gs0 += k;
    }
  }
  for (const n of block) pos[n] = -1;
  return { Prow, Pch, Xch, Qcol, Qrow, Ych, Yrow, outRows, p, nx };
}

export function absorbBlock(a: Absorber, block: Int32Array): void {
  const { Prow, Pch, Xch, Qcol, Qrow, Ych, Yrow, outRows, p, nx } = blockMatrix(a, block);
  const q = Qcol.length,
    ny = Ych.length;
  const nr = a.nr,
    nc = a.nc;
  a.ensure(nr + ny, nc + nx);
  // The columns Q become internal: moved to the end first, so that the update and the new rows
  // touch only the columns that survive (keep = nc - q of them, a third of the products' work on
  // a strip) and the new columns X take the places of Q (no columns to move afterwards).
  const keep = nc - q;
  const Q = moveColumnsLast(a, Qcol);
  const S = a.S,
    C2 = 2 * a.capC;
  const small = tsKernels,
    big = getKernels();
  const QR = Int32Array.from(Qrow),
    PR = Int32Array.from(Prow);
  const rows = {
    start: Int32Array.from(outRows.start),
    idx: Int32Array.from(outRows.idx),
    re: Float64Array.from(outRows.re),
    im: Float64Array.from(outRows.im),
  };
  if (q > 0) {
    // 3. K^T (q x q) = 1 - (M S[rho, Q])^T
    const KT = loopMatrixT(S, C2, rows, QR, Q, PR, p);
    if (a.stepDet) {
      const d = smallDet(KT, q);
      a.stepDet[2 * a.nextGroup] = d[0];
      a.stepDet[2 * a.nextGroup + 1] = d[1];
    }
    if (nr > 0) {
      // 4. Z^T = K^-T S[:, Q]^T, Z = S[:, Q] K^-1 (nr x q)
      let ZT: Float64Array;
      try {
        ZT = (q * q * nr >= BACKEND_MIN_SOLVE ? big : small).solve(KT, gatherColumnsT(S, C2, nr, Q), q, nr);
      } catch (e) {
        if (e instanceof SingularMatrixError) throw new SingularMatrixError("a closed loop of the network (exact resonance without damping)");
        throw e;
      }
      const Z = transpose(ZT, q, nr, scratch(3, 2 * q * nr, false));
      // 5. the rank-q update of the surviving columns S[:, :keep] += Z (M S[rho, :keep])
      if (p > 0 && keep > 0) {
        const W = sparseTimesRows(S, C2, rows, QR, PR, p, keep);
        (nr * keep * q >= BACKEND_MIN_UPDATE ? big : small).gemmAccumulate(nr, keep, q, Z, 0, q, W, 0, keep, S, 0, a.capC);
      }
      // 6. new columns S[:, keep + x] = Z T[Q, X] (sparse), over the columns Q
      newColumns(S, C2, nr, keep, nx, Z, rows, QR, p);
    }
  } else {
    if (a.stepDet) {
      a.stepDet[2 * a.nextGroup] = 1;
      a.stepDet[2 * a.nextGroup + 1] = 0;
    }
    for (let r = 0; r < nr; r++) S.fill(0, r * C2 + 2 * keep, r * C2 + 2 * (keep + nx));
  }
  // 7. the columns Q are internal now; X in their places and after them
  for (let o = 0; o < q; o++) a.chCol[a.colCh[keep + o]] = -1;
  for (let x = 0; x < nx; x++) {
    a.colCh[keep + x] = Xch[x];
    a.chCol[Xch[x]] = keep + x;
  }
  a.nc = keep + nx;
  // 8. new rows S[Y, :] = T[Y, P] S[rho, :] + T[Y, X] (rows rho already updated, new columns included)
  newRows(S, C2, nr, keep, nx, rows, Int32Array.from(Yrow), PR, p);
  for (let y = 0; y < ny; y++) {
    a.rowCh[nr + y] = Ych[y];
    a.chRow[Ych[y]] = nr + y;
  }
  a.nr = nr + ny;
  // 9. the rows rho are internal now
  for (const ch of Pch) a.removeRow(a.chRow[ch]);
  for (const n of block) a.absorbed[n] = 1;
  a.nextGroup++;
}

/**
 * Moves the columns `cols` of the frontier to its last q places, in the given order (column
 * cols[o] to nc - q + o), swapping the surviving columns found there into the places they leave;
 * returns the new indices (nc - q, ..., nc - 1).
 */
function moveColumnsLast(a: Absorber, cols: number[]): Int32Array {
  const nc = a.nc,
    q = cols.length,
    start = nc - q;
  const at = Int32Array.from({ length: q }, (_, o) => start + o);
  if (q === 0) return at;
  const isMoving = new Uint8Array(nc);
  for (const c of cols) isMoving[c] = 1;
  // (to, from) pairs: each moving column to its target, each surviving column of the tail to a freed place
  const to: number[] = [],
    from: number[] = [];
  const holes: number[] = [];
  for (let o = 0; o < q; o++) {
    if (cols[o] !== start + o) {
      to.push(start + o);
      from.push(cols[o]);
    }
    if (cols[o] < start) holes.push(cols[o]);
  }
  let h = 0;
  for (let c = start; c < nc; c++)
    if (!isMoving[c]) {
      to.push(holes[h]);
      from.push(c);
      h++;
    }
  const m = to.length;
  if (m === 0) return at;
  const chOf = Int32Array.from(from, (c) => a.colCh[c]);
  for (let j = 0; j < m; j++) {
    a.colCh[to[j]] = chOf[j];
    a.chCol[chOf[j]] = to[j];
  }
  const S = a.S,
    C2 = 2 * a.capC;
  const tmp = scratch(5, 2 * m, false);
  for (let r = 0; r < a.nr; r++) {
    const ro = r * C2;
    for (let j = 0; j < m; j++) {
      tmp[2 * j] = S[ro + 2 * from[j]];
      tmp[2 * j + 1] = S[ro + 2 * from[j] + 1];
    }
    for (let j = 0; j < m; j++) {
      S[ro + 2 * to[j]] = tmp[2 * j];
      S[ro + 2 * to[j] + 1] = tmp[2 * j + 1];
    }
  }
  return at;
}

interface Rows {
  start: Int32Array;
  idx: Int32Array;
  re: Float64Array;
  im: Float64Array;
}

/** K^T with K = 1 - M S[rho, Q]: M is the P part of the Q rows (a few nonzeros each). */
function loopMatrixT(S: Float64Array, C2: number, rows: Rows, QR: Int32Array, Q: Int32Array, PR: Int32Array, p: number): Float64Array {
  const q = Q.length;
  const K = scratch(0, 2 * q * q); // K (row o) first, transposed at the end
  for (let o = 0; o < q; o++) {
    const r = QR[o],
      d = 2 * o * q;
    for (let j = rows.start[r]; j < rows.start[r + 1]; j++) {
      const i = rows.idx[j];
      if (i >= p) continue;
      const cr = rows.re[j],
        ci = rows.im[j],
        src = PR[i] * C2;
      for (let b = 0; b < q; b++) {
        const c = src + 2 * Q[b];
        const sr = S[c],
          si = S[c + 1];
        K[d + 2 * b] -= cr * sr - ci * si;
        K[d + 2 * b + 1] -= cr * si + ci * sr;
      }
    }
    K[d + 2 * o] += 1;
  }
  return transpose(K, q, q, scratch(1, 2 * q * q, false));
}

/** S[:, Q]^T (q x nr). */
function gatherColumnsT(S: Float64Array, C2: number, nr: number, Q: Int32Array): Float64Array {
  const q = Q.length;
  const out = scratch(2, 2 * q * nr, false);
  for (let r = 0; r < nr; r++) {
    const ro = r * C2;
    for (let o = 0; o < q; o++) {
      const c = ro + 2 * Q[o],
        d = 2 * (o * nr + r);
      out[d] = S[c];
      out[d + 1] = S[c + 1];
    }
  }
  return out;
}

/** Transpose (not conjugate) of a packed m x n matrix, in 16 x 16 tiles. */
function transpose(a: Float64Array, m: number, n: number, out: Float64Array): Float64Array {
  for (let i0 = 0; i0 < m; i0 += 16)
    for (let j0 = 0; j0 < n; j0 += 16) {
      const i1 = Math.min(m, i0 + 16),
        j1 = Math.min(n, j0 + 16);
      for (let i = i0; i < i1; i++)
        for (let j = j0; j < j1; j++) {
          out[2 * (j * m + i)] = a[2 * (i * n + j)];
          out[2 * (j * m + i) + 1] = a[2 * (i * n + j) + 1];
        }
    }
  return out;
}

/** M S[rho, :nc] (q x nc) for the sparse P part M of the Q rows. */
function sparseTimesRows(S: Float64Array, C2: number, rows: Rows, QR: Int32Array, PR: Int32Array, p: number, nc: number): Float64Array {
  const q = QR.length;
  const W = scratch(4, 2 * q * nc);
  for (let o = 0; o < q; o++) {
    const r = QR[o],
      d = 2 * o * nc;
    for (let j = rows.start[r]; j < rows.start[r + 1]; j++) {
      const i = rows.idx[j];
      if (i >= p) continue;
      axpyRow(W, d, S, PR[i] * C2, rows.re[j], rows.im[j], 2 * nc);
    }
  }
  return W;
}

/** y[yo .. yo + len) += (cr + i ci) x[xo .. xo + len) (interleaved complex). */
function axpyRow(y: Float64Array, yo: number, x: Float64Array, xo: number, cr: number, ci: number, len: number): void {
  for (let c = 0; c < len; c += 2) {
    const sr = x[xo + c],
      si = x[xo + c + 1];
    y[yo + c] += cr * sr - ci * si;
    y[yo + c + 1] += cr * si + ci * sr;
  }
}

/** S[:nr, nc + x] = Z T[Q, X] for the sparse X part of the Q rows (row by row: Z and S read in order). */
function newColumns(S: Float64Array, C2: number, nr: number, nc: number, nx: number, Z: Float64Array, rows: Rows, QR: Int32Array, p: number): void {
  const q = QR.length;
  // the nonzeros of T[Q, X] as (o, x, coefficient)
  const to: number[] = [],
    tx: number[] = [],
    tr: number[] = [],
    ti: number[] = [];
  for (let o = 0; o < q; o++) {
    const row = QR[o];
    for (let j = rows.start[row]; j < rows.start[row + 1]; j++) {
      const e = rows.idx[j];
      if (e < p) continue;
      to.push(2 * o);
      tx.push(2 * (nc + e - p));
      tr.push(rows.re[j]);
      ti.push(rows.im[j]);
    }
  }
  const nnz = to.length;
  for (let r = 0; r < nr; r++) {
    const ro = r * C2,
      zo = 2 * r * q;
    S.fill(0, ro + 2 * nc, ro + 2 * (nc + nx));
    for (let j = 0; j < nnz; j++) {
      const zr = Z[zo + to[j]],
        zi = Z[zo + to[j] + 1],
        cr = tr[j],
        ci = ti[j],
        c = ro + tx[j];
      S[c] += zr * cr - zi * ci;
      S[c + 1] += zr * ci + zi * cr;
    }
  }
}

/** Rows nr + y: T[Y, P] S[rho, :nc + nx] + T[Y, X]. */
function newRows(S: Float64Array, C2: number, nr: number, nc: number, nx: number, rows: Rows, YR: Int32Array, PR: Int32Array, p: number): void {
  const width = 2 * (nc + nx);
  for (let y = 0; y < YR.length; y++) {
    const ro = (nr + y) * C2,
      r = YR[y];
    S.fill(0, ro, ro + width);
    for (let j = rows.start[r]; j < rows.start[r + 1]; j++) {
      const e = rows.idx[j];
      if (e >= p) {
        S[ro + 2 * (nc + e - p)] += rows.re[j];
        S[ro + 2 * (nc + e - p) + 1] += rows.im[j];
      } else axpyRow(S, ro, S, PR[e] * C2, rows.re[j], rows.im[j], width);
    }
  }
}
