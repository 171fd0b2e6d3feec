/** Pure TypeScript implementation of ComplexKernels (see kernels.ts for the exact semantics). */
import { SingularMatrixError } from "../errors";
import type { ComplexKernels } from "./kernels";

function check(name: string, arr: Float64Array, needComplex: number): void {
  if (arr.length < 2 * needComplex) {
    throw new RangeError(`${name}: array holds ${arr.length / 2} complex numbers, needs ${needComplex}`);
  }
}

function matmul(a: Float64Array, b: Float64Array, m: number, k: number, n: number): Float64Array {
  check("matmul a", a, m * k);
  check("matmul b", b, k * n);
  const c = new Float64Array(2 * m * n);
  gemmAccumulate(m, n, k, a, 0, k, b, 0, n, c, 0, n);
  return c;
}

function gemmAccumulate(
  m: number, n: number, k: number,
  a: Float64Array, aOff: number, lda: number,
  b: Float64Array, bOff: number, ldb: number,
  c: Float64Array, cOff: number, ldc: number,
): void {
  if (m === 0 || n === 0 || k === 0) return;
  if (lda < k || ldb < n || ldc < n) throw new RangeError("gemmAccumulate: leading dimension too small");
  if (aOff + 2 * ((m - 1) * lda + k) > a.length || bOff + 2 * ((k - 1) * ldb + n) > b.length || cOff + 2 * ((m - 1) * ldc + n) > c.length) {
    throw new RangeError("gemmAccumulate: matrix exceeds its array");
  }
  const n2 = 2 * n;
  for (let i = 0; i < m; i++) {
    const ci = cOff + 2 * i * ldc;
    const ai = aOff + 2 * i * lda;
    let p = 0;
    for (; p + 7 < k; p += 8) {
      const o = ai + 2 * p;
      const a0r = a[o], a0i = a[o + 1], a1r = a[o + 2], a1i = a[o + 3], a2r = a[o + 4], a2i = a[o + 5], a3r = a[o + 6], a3i = a[o + 7];
      const a4r = a[o + 8], a4i = a[o + 9], a5r = a[o + 10], a5i = a[o + 11], a6r = a[o + 12], a6i = a[o + 13], a7r = a[o + 14], a7i = a[o + 15];
      const l2 = 2 * ldb;
      const b0 = bOff + 2 * p * ldb, b1 = b0 + l2, b2 = b1 + l2, b3 = b2 + l2, b4 = b3 + l2, b5 = b4 + l2, b6 = b5 + l2, b7 = b6 + l2;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j], x0i = b[b0 + j + 1], x1r = b[b1 + j], x1i = b[b1 + j + 1];
        const x2r = b[b2 + j], x2i = b[b2 + j + 1], x3r = b[b3 + j], x3i = b[b3 + j + 1];
        const x4r = b[b4 + j], x4i = b[b4 + j + 1], x5r = b[b5 + j], x5i = b[b5 + j + 1];
        const x6r = b[b6 + j], x6i = b[b6 + j + 1], x7r = b[b7 + j], x7i = b[b7 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i + a1r * x1r - a1i * x1i + a2r * x2r - a2i * x2i + a3r * x3r - a3i * x3i
          + a4r * x4r - a4i * x4i + a5r * x5r - a5i * x5i + a6r * x6r - a6i * x6i + a7r * x7r - a7i * x7i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r + a1r * x1i + a1i * x1r + a2r * x2i + a2i * x2r + a3r * x3i + a3i * x3r
          + a4r * x4i + a4i * x4r + a5r * x5i + a5i * x5r + a6r * x6i + a6i * x6r + a7r * x7i + a7i * x7r;
      }
    }
    for (; p + 3 < k; p += 4) {
      const a0r = a[ai + 2 * p], a0i = a[ai + 2 * p + 1];
      const a1r = a[ai + 2 * p + 2], a1i = a[ai + 2 * p + 3];
      const a2r = a[ai + 2 * p + 4], a2i = a[ai + 2 * p + 5];
      const a3r = a[ai + 2 * p + 6], a3i = a[ai + 2 * p + 7];
      const b0 = bOff + 2 * p * ldb, b1 = b0 + 2 * ldb, b2 = b1 + 2 * ldb, b3 = b2 + 2 * ldb;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j], x0i = b[b0 + j + 1];
        const x1r = b[b1 + j], x1i = b[b1 + j + 1];
        const x2r = b[b2 + j], x2i = b[b2 + j + 1];
        const x3r = b[b3 + j], x3i = b[b3 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i + a1r * x1r - a1i * x1i + a2r * x2r - a2i * x2i + a3r * x3r - a3i * x3i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r + a1r * x1i + a1i * x1r + a2r * x2i + a2i * x2r + a3r * x3i + a3i * x3r;
      }
    }
    for (; p + 1 < k; p += 2) {
      const a0r = a[ai + 2 * p], a0i = a[ai + 2 * p + 1];
      const a1r = a[ai + 2 * p + 2], a1i = a[ai + 2 * p + 3];
      const b0 = bOff + 2 * p * ldb, b1 = b0 + 2 * ldb;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j], x0i = b[b0 + j + 1];
        const x1r = b[b1 + j], x1i = b[b1 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i + a1r * x1r - a1i * x1i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r + a1r * x1i + a1i * x1r;
      }
    }
    for (; p < k; p++) {
      const a0r = a[ai + 2 * p], a0i = a[ai + 2 * p + 1];
      if (a0r === 0 && a0i === 0) continue;
      const b0 = bOff + 2 * p * ldb;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j], x0i = b[b0 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r;
      }
    }
  }
}

/** LU with partial pivoting in place on a packed n x n copy; returns the pivot rows. */
function luInPlace(lu: Float64Array, n: number, what: string): Int32Array {
  const piv = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    let best = -1, bestAbs = -1;
    for (let i = k; i < n; i++) {
      const re = lu[2 * (i * n + k)], im = lu[2 * (i * n + k) + 1];
      const ab = re * re + im * im;
      if (ab > bestAbs) { bestAbs = ab; best = i; }
    }
    if (!(bestAbs > 1e-600) || !Number.isFinite(bestAbs)) throw new SingularMatrixError(what);
    piv[k] = best;
    if (best !== k) {
      for (let j = 0; j < 2 * n; j++) {
        const t = lu[2 * k * n + j]; lu[2 * k * n + j] = lu[2 * best * n + j]; lu[2 * best * n + j] = t;
      }
    }
    const pr = lu[2 * (k * n + k)], pi = lu[2 * (k * n + k) + 1];
    const d = pr * pr + pi * pi;
    const ir = pr / d, ii = -pi / d;
    for (let i = k + 1; i < n; i++) {
      const o = 2 * (i * n + k);
      const xr = lu[o], xi = lu[o + 1];
      const fr = xr * ir - xi * ii, fi = xr * ii + xi * ir;
      lu[o] = fr; lu[o + 1] = fi;
      if (fr === 0 && fi === 0) continue;
      const rowI = 2 * i * n, rowK = 2 * k * n;
      for (let j = 2 * (k + 1); j < 2 * n; j += 2) {
        const yr = lu[rowK + j], yi = lu[rowK + j + 1];
        lu[rowI + j] -= fr * yr - fi * yi;
        lu[rowI + j + 1] -= fr * yi + fi * yr;
      }
    }
  }
  return piv;
}

function luSolveInPlace(lu: Float64Array, piv: Int32Array, n: number, x: Float64Array, nrhs: number): void {
  const w = 2 * nrhs;
  for (let k = 0; k < n; k++) {
    const p = piv[k];
    if (p !== k) for (let j = 0; j < w; j++) { const t = x[k * w + j]; x[k * w + j] = x[p * w + j]; x[p * w + j] = t; }
  }
  // forward (unit lower)
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < i; k++) {
      const lr = lu[2 * (i * n + k)], li = lu[2 * (i * n + k) + 1];
      if (lr === 0 && li === 0) continue;
      for (let j = 0; j < w; j += 2) {
        const yr = x[k * w + j], yi = x[k * w + j + 1];
        x[i * w + j] -= lr * yr - li * yi;
        x[i * w + j + 1] -= lr * yi + li * yr;
      }
    }
  }
  // backward
  for (let i = n - 1; i >= 0; i--) {
    for (let k = i + 1; k < n; k++) {
      const ur = lu[2 * (i * n + k)], ui = lu[2 * (i * n + k) + 1];
      if (ur === 0 && ui === 0) continue;
      for (let j = 0; j < w; j += 2) {
        const yr = x[k * w + j], yi = x[k * w + j + 1];
        x[i * w + j] -= ur * yr - ui * yi;
        x[i * w + j + 1] -= ur * yi + ui * yr;
      }
    }
    const pr = lu[2 * (i * n + i)], pi = lu[2 * (i * n + i) + 1];
    const d = pr * pr + pi * pi;
    const ir = pr / d, ii = -pi / d;
    for (let j = 0; j < w; j += 2) {
      const yr = x[i * w + j], yi = x[i * w + j + 1];
      x[i * w + j] = yr * ir - yi * ii;
      x[i * w + j + 1] = yr * ii + yi * ir;
    }
  }
}

function solve(a: Float64Array, b: Float64Array, n: number, nrhs: number): Float64Array {
  check("solve a", a, n * n);
  check("solve b", b, n * nrhs);
  const lu = a.slice(0, 2 * n * n);
  const piv = luInPlace(lu, n, "solve");
  const x = b.slice(0, 2 * n * nrhs);
  luSolveInPlace(lu, piv, n, x, nrhs);
  return x;
}

function inverse(a: Float64Array, n: number): Float64Array {
  const id = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) id[2 * (i * n + i)] = 1;
  return solve(a, id, n, n);
}

/**
 * Hermitian eigenproblem: Householder reduction to a real symmetric tridiagonal matrix (complex
 * reflectors, then a diagonal phase to make the off-diagonal real), then implicit QL with
 * Wilkinson shifts (the classic tql2 scheme).
 */
function eigHermitian(aIn: Float64Array, n: number, wantVectors: boolean): { values: Float64Array; vectors: Float64Array | null } {
  check("eigHermitian a", aIn, n * n);
  const a = aIn.slice(0, 2 * n * n);
  // Q accumulates the reflectors (if vectors are wanted): A = Q T Q^H.
  const q = wantVectors ? new Float64Array(2 * n * n) : null;
  if (q) for (let i = 0; i < n; i++) q[2 * (i * n + i)] = 1;
  const d = new Float64Array(n);
  const eRe = new Float64Array(n), eIm = new Float64Array(n); // sub-diagonal e[k] = T[k+1][k]
  const v = new Float64Array(2 * n), p = new Float64Array(2 * n);
  for (let k = 0; k < n - 2; k++) {
    // x = A[k+1.., k]
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) { const re = a[2 * (i * n + k)], im = a[2 * (i * n + k) + 1]; norm2 += re * re + im * im; }
    const x0r = a[2 * ((k + 1) * n + k)], x0i = a[2 * ((k + 1) * n + k) + 1];
    const x0abs = Math.hypot(x0r, x0i);
    const norm = Math.sqrt(norm2);
    if (norm2 - x0abs * x0abs <= 1e-300 * (1 + norm2)) {
      eRe[k] = x0r; eIm[k] = x0i; continue; // already tridiagonal in this column
    }
    const phr = x0abs > 0 ? x0r / x0abs : 1, phi = x0abs > 0 ? x0i / x0abs : 0;
    const alphaR = -phr * norm, alphaI = -phi * norm; // alpha = -e^{i arg x0} |x|
    // v = x - alpha e1 (indices k+1..n-1)
    let vnorm2 = 0;
    for (let i = k + 1; i < n; i++) {
      let re = a[2 * (i * n + k)], im = a[2 * (i * n + k) + 1];
      if (i === k + 1) { re -= alphaR; im -= alphaI; }
      v[2 * i] = re; v[2 * i + 1] = im; vnorm2 += re * re + im * im;
    }
    const tau = 2 / vnorm2;
    // p = tau * A22 v  (A22 = A[k+1.., k+1..])
    let vp = 0; // v^H p (real)
    for (let i = k + 1; i < n; i++) {
      let sr = 0, si = 0;
      for (let j = k + 1; j < n; j++) {
        const ar = a[2 * (i * n + j)], ai = a[2 * (i * n + j) + 1];
        const vr = v[2 * j], vi = v[2 * j + 1];
        sr += ar * vr - ai * vi; si += ar * vi + ai * vr;
      }
      p[2 * i] = tau * sr; p[2 * i + 1] = tau * si;
      vp += v[2 * i] * p[2 * i] + v[2 * i + 1] * p[2 * i + 1];
    }
    const K = (tau / 2) * vp;
    // w = p - K v (stored in p)
    for (let i = k + 1; i < n; i++) { p[2 * i] -= K * v[2 * i]; p[2 * i + 1] -= K * v[2 * i + 1]; }
    // A22 -= v w^H + w v^H
    for (let i = k + 1; i < n; i++) {
      const vr = v[2 * i], vi = v[2 * i + 1], wr = p[2 * i], wi = p[2 * i + 1];
      for (let j = k + 1; j < n; j++) {
        const vjr = v[2 * j], vji = v[2 * j + 1], wjr = p[2 * j], wji = p[2 * j + 1];
        // v_i conj(w_j) + w_i conj(v_j)
        a[2 * (i * n + j)] -= vr * wjr + vi * wji + wr * vjr + wi * vji;
        a[2 * (i * n + j) + 1] -= vi * wjr - vr * wji + wi * vjr - wr * vji;
      }
    }
    eRe[k] = alphaR; eIm[k] = alphaI;
    for (let i = k + 1; i < n; i++) { a[2 * (i * n + k)] = 0; a[2 * (i * n + k) + 1] = 0; }
    if (q) {
      // Q <- Q H, H = I - tau v v^H: Q[r, :] -= tau (Q[r,:] v) v^H
      for (let r = 0; r < n; r++) {
        let sr = 0, si = 0;
        for (let j = k + 1; j < n; j++) {
          const qr = q[2 * (r * n + j)], qi = q[2 * (r * n + j) + 1];
          sr += qr * v[2 * j] - qi * v[2 * j + 1]; si += qr * v[2 * j + 1] + qi * v[2 * j];
        }
        sr *= tau; si *= tau;
        for (let j = k + 1; j < n; j++) {
          // -= s * conj(v_j)
          q[2 * (r * n + j)] -= sr * v[2 * j] + si * v[2 * j + 1];
          q[2 * (r * n + j) + 1] -= si * v[2 * j] - sr * v[2 * j + 1];
        }
      }
    }
  }
  for (let i = 0; i < n; i++) d[i] = a[2 * (i * n + i)];
  if (n >= 2) { eRe[n - 2] = a[2 * ((n - 1) * n + n - 2)]; eIm[n - 2] = a[2 * ((n - 1) * n + n - 2) + 1]; }
  // Phase: T = D Tr D^H with real |e|; D_0 = 1, D_{k+1} = D_k * e_k/|e_k|.
  const e = new Float64Array(n);
  const dRe = new Float64Array(n), dIm = new Float64Array(n);
  dRe[0] = 1;
  for (let k = 0; k < n - 1; k++) {
    const ab = Math.hypot(eRe[k], eIm[k]);
    e[k] = ab;
    const ur = ab > 0 ? eRe[k] / ab : 1, ui = ab > 0 ? eIm[k] / ab : 0;
    dRe[k + 1] = dRe[k] * ur - dIm[k] * ui; dIm[k + 1] = dRe[k] * ui + dIm[k] * ur;
  }
  // Real orthogonal Z from QL on (d, e): Tr = Z diag Z^T.
  const z = wantVectors ? new Float64Array(n * n) : null;
  if (z) for (let i = 0; i < n; i++) z[i * n + i] = 1;
  tql2(d, e, n, z);
  const order = Array.from({ length: n }, (_, i) => i).sort((x, y) => d[x] - d[y]);
  const values = new Float64Array(n);
  for (let i = 0; i < n; i++) values[i] = d[order[i]];
  let vectors: Float64Array | null = null;
  if (q && z) {
    // eigenvectors = Q D Z
    vectors = new Float64Array(2 * n * n);
    const qd = new Float64Array(2 * n * n);
    for (let r = 0; r < n; r++) for (let j = 0; j < n; j++) {
      const qr = q[2 * (r * n + j)], qi = q[2 * (r * n + j) + 1];
      qd[2 * (r * n + j)] = qr * dRe[j] - qi * dIm[j]; qd[2 * (r * n + j) + 1] = qr * dIm[j] + qi * dRe[j];
    }
    for (let r = 0; r < n; r++) for (let c = 0; c < n; c++) {
      const col = order[c];
      let sr = 0, si = 0;
      for (let j = 0; j < n; j++) { const zz = z[j * n + col]; sr += qd[2 * (r * n + j)] * zz; si += qd[2 * (r * n + j) + 1] * zz; }
      vectors[2 * (r * n + c)] = sr; vectors[2 * (r * n + c) + 1] = si;
    }
  }
  return { values, vectors };
}

/** Symmetric tridiagonal QL with implicit shifts (diagonal d, sub-diagonal e[0..n-2]); z (n x n, row-major) accumulates. */
function tql2(d: Float64Array, eIn: Float64Array, n: number, z: Float64Array | null): void {
  const e = new Float64Array(n);
  for (let i = 0; i < n - 1; i++) e[i] = eIn[i];
  for (let l = 0; l < n; l++) {
    let iter = 0;
    for (;;) {
      let m = l;
      for (; m < n - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= 2.220446049250313e-16 * dd || Math.abs(e[m]) < 1e-300) break;
      }
      if (m === l) break;
      if (++iter > 200) throw new Error("eigHermitian: no convergence");
      let g = (d[l + 1] - d[l]) / (2 * e[l]);
      let r = Math.hypot(g, 1);
      g = d[m] - d[l] + e[l] / (g + (g >= 0 ? Math.abs(r) : -Math.abs(r)));
      let s = 1, c = 1, pp = 0;
      let i = m - 1;
      for (; i >= l; i--) {
        let f = s * e[i];
        const b = c * e[i];
        r = Math.hypot(f, g);
        e[i + 1] = r;
        if (r === 0) { d[i + 1] -= pp; e[m] = 0; break; }
        s = f / r; c = g / r;
        g = d[i + 1] - pp;
        r = (d[i] - g) * s + 2 * c * b;
        pp = s * r;
        d[i + 1] = g + pp;
        g = c * r - b;
        if (z) for (let k = 0; k < n; k++) {
          f = z[k * n + i + 1];
          z[k * n + i + 1] = s * z[k * n + i] + c * f;
          z[k * n + i] = c * z[k * n + i] - s * f;
        }
      }
      if (r === 0 && i >= l) continue;
      d[l] -= pp; e[l] = g; e[m] = 0;
    }
  }
}

/** General complex eigenvalues: Householder reduction to Hessenberg form, then single-shift QR
 * (Givens rotations, Wilkinson shift, exceptional shifts every 10 stalled sweeps) with deflation. */
function eigGeneral(aIn: Float64Array, n: number): Float64Array {
  check("eigGeneral a", aIn, n * n);
  const h = aIn.slice(0, 2 * n * n);
  const v = new Float64Array(2 * n);
  for (let k = 0; k < n - 2; k++) {
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) { const re = h[2 * (i * n + k)], im = h[2 * (i * n + k) + 1]; norm2 += re * re + im * im; }
    const x0r = h[2 * ((k + 1) * n + k)], x0i = h[2 * ((k + 1) * n + k) + 1];
    const x0abs = Math.hypot(x0r, x0i);
    if (norm2 - x0abs * x0abs <= 1e-300 * (1 + norm2)) continue;
    const norm = Math.sqrt(norm2);
    const phr = x0abs > 0 ? x0r / x0abs : 1, phi = x0abs > 0 ? x0i / x0abs : 0;
    const alphaR = -phr * norm, alphaI = -phi * norm;
    let vn2 = 0;
    for (let i = k + 1; i < n; i++) {
      let re = h[2 * (i * n + k)], im = h[2 * (i * n + k) + 1];
      if (i === k + 1) { re -= alphaR; im -= alphaI; }
      v[2 * i] = re; v[2 * i + 1] = im; vn2 += re * re + im * im;
    }
    const tau = 2 / vn2;
    // left: H[k+1.., :] -= tau v (v^H H)
    for (let j = k; j < n; j++) {
      let sr = 0, si = 0;
      for (let i = k + 1; i < n; i++) {
        const hr = h[2 * (i * n + j)], hi = h[2 * (i * n + j) + 1];
        sr += v[2 * i] * hr + v[2 * i + 1] * hi; si += v[2 * i] * hi - v[2 * i + 1] * hr;
      }
      sr *= tau; si *= tau;
      for (let i = k + 1; i < n; i++) {
        h[2 * (i * n + j)] -= v[2 * i] * sr - v[2 * i + 1] * si;
        h[2 * (i * n + j) + 1] -= v[2 * i] * si + v[2 * i + 1] * sr;
      }
    }
    // right: H[:, k+1..] -= tau (H v) v^H
    for (let i = 0; i < n; i++) {
      let sr = 0, si = 0;
      for (let j = k + 1; j < n; j++) {
        const hr = h[2 * (i * n + j)], hi = h[2 * (i * n + j) + 1];
        sr += hr * v[2 * j] - hi * v[2 * j + 1]; si += hr * v[2 * j + 1] + hi * v[2 * j];
      }
      sr *= tau; si *= tau;
      for (let j = k + 1; j < n; j++) {
        h[2 * (i * n + j)] -= sr * v[2 * j] + si * v[2 * j + 1];
        h[2 * (i * n + j) + 1] -= si * v[2 * j] - sr * v[2 * j + 1];
      }
    }
    for (let i = k + 2; i < n; i++) { h[2 * (i * n + k)] = 0; h[2 * (i * n + k) + 1] = 0; }
  }
  const out = new Float64Array(2 * n);
  const cs = new Float64Array(n), snr = new Float64Array(n), sni = new Float64Array(n);
  let hi = n - 1;
  let iter = 0, total = 0;
  const H = (i: number, j: number) => 2 * (i * n + j);
  while (hi >= 0) {
    if (hi === 0) { out[0] = h[0]; out[1] = h[1]; break; }
    let l = hi;
    for (; l > 0; l--) {
      const s = Math.abs(h[H(l - 1, l - 1)]) + Math.abs(h[H(l - 1, l - 1) + 1]) + Math.abs(h[H(l, l)]) + Math.abs(h[H(l, l) + 1]);
      const sub = Math.abs(h[H(l, l - 1)]) + Math.abs(h[H(l, l - 1) + 1]);
      if (sub <= 2.2e-16 * (s === 0 ? 1 : s)) { h[H(l, l - 1)] = 0; h[H(l, l - 1) + 1] = 0; break; }
    }
    if (l === hi) { out[2 * hi] = h[H(hi, hi)]; out[2 * hi + 1] = h[H(hi, hi) + 1]; hi--; iter = 0; continue; }
    iter++; total++;
    if (total > 60 * n + 100) throw new Error("eigGeneral: no convergence");
    // Wilkinson shift: eigenvalue of the trailing 2x2 closest to H[hi][hi]
    let mur: number, mui: number;
    const ar = h[H(hi - 1, hi - 1)], ai = h[H(hi - 1, hi - 1) + 1];
    const br = h[H(hi - 1, hi)], bi = h[H(hi - 1, hi) + 1];
    const cr = h[H(hi, hi - 1)], ci = h[H(hi, hi - 1) + 1];
    const dr = h[H(hi, hi)], di = h[H(hi, hi) + 1];
    if (iter % 11 === 10) {
      mur = dr + Math.abs(cr) + Math.abs(ci); mui = di + 0.5 * (Math.abs(cr) + Math.abs(ci));
    } else {
      // eigenvalues of [[a,b],[c,d]]: (a+d)/2 +- sqrt(((a-d)/2)^2 + bc)
      const hr = (ar - dr) / 2, hii = (ai - di) / 2;
      const disr = hr * hr - hii * hii + (br * cr - bi * ci);
      const disi = 2 * hr * hii + (br * ci + bi * cr);
      const mod = Math.hypot(disr, disi);
      let sr = Math.sqrt(Math.max(0, (mod + disr) / 2));
      let si = Math.sqrt(Math.max(0, (mod - disr) / 2));
      if (disi < 0) si = -si;
      const mr = (ar + dr) / 2, mi = (ai + di) / 2;
      const e1r = mr + sr, e1i = mi + si, e2r = mr - sr, e2i = mi - si;
      const d1 = Math.hypot(e1r - dr, e1i - di), d2 = Math.hypot(e2r - dr, e2i - di);
      if (d1 <= d2) { mur = e1r; mui = e1i; } else { mur = e2r; mui = e2i; }
      if (!Number.isFinite(mur) || !Number.isFinite(mui)) { mur = dr; mui = di; sr = 0; si = 0; }
    }
    for (let i = l; i <= hi; i++) { h[H(i, i)] -= mur; h[H(i, i) + 1] -= mui; }
    for (let k = l; k < hi; k++) {
      const xr = h[H(k, k)], xi = h[H(k, k) + 1];
      const yr = h[H(k + 1, k)], yi = h[H(k + 1, k) + 1];
      const xa = Math.hypot(xr, xi), r = Math.hypot(xa, Math.hypot(yr, yi));
      let c: number, sRe: number, sIm: number;
      if (r === 0) { c = 1; sRe = 0; sIm = 0; }
      else if (xa === 0) { c = 0; sRe = 1; sIm = 0; }
      else {
        c = xa / r;
        // s = (x/|x|) conj(y) / r
        const ur = xr / xa, ui = xi / xa;
        sRe = (ur * yr + ui * yi) / r; sIm = (ui * yr - ur * yi) / r;
      }
      cs[k] = c; snr[k] = sRe; sni[k] = sIm;
      for (let j = k; j <= hi; j++) {
        const pr = h[H(k, j)], pi = h[H(k, j) + 1], qr = h[H(k + 1, j)], qi = h[H(k + 1, j) + 1];
        h[H(k, j)] = c * pr + sRe * qr - sIm * qi; h[H(k, j) + 1] = c * pi + sRe * qi + sIm * qr;
        // -conj(s) p + c q
        h[H(k + 1, j)] = -(sRe * pr + sIm * pi) + c * qr; h[H(k + 1, j) + 1] = -(sRe * pi - sIm * pr) + c * qi;
      }
    }
    for (let k = l; k < hi; k++) {
      const c = cs[k], sRe = snr[k], sIm = sni[k];
      const top = Math.min(k + 2, hi);
      for (let i = l; i <= top; i++) {
        const pr = h[H(i, k)], pi = h[H(i, k) + 1], qr = h[H(i, k + 1)], qi = h[H(i, k + 1) + 1];
        // col k = c p + conj(s) q ; col k+1 = -s p + c q
        h[H(i, k)] = c * pr + sRe * qr + sIm * qi; h[H(i, k) + 1] = c * pi + sRe * qi - sIm * qr;
        h[H(i, k + 1)] = -(sRe * pr - sIm * pi) + c * qr; h[H(i, k + 1) + 1] = -(sRe * pi + sIm * pr) + c * qi;
      }
    }
    for (let i = l; i <= hi; i++) { h[H(i, i)] += mur; h[H(i, i) + 1] += mui; }
  }
  return out;
}

export const tsKernels: ComplexKernels = {
  name: "ts",
  matmul,
  gemmAccumulate,
  solve,
  inverse,
  eigHermitian,
  eigGeneral,
};
