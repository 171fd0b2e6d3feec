/** Hermitian eigenproblem (TypeScript kernels). */
import { check } from "./check";

/**
 * Hermitian eigenproblem: Householder reduction to a real symmetric tridiagonal matrix (complex
 * reflectors, then a diagonal phase to make the off-diagonal real), then implicit QL with
 * Wilkinson shifts (the classic tql2 scheme).
 */
export function eigHermitian(aIn: Float64Array, n: number, wantVectors: boolean): { values: Float64Array; vectors: Float64Array | null } {
  check("eigHermitian a", aIn, n * n);
  const a = aIn.slice(0, 2 * n * n);
  // Q accumulates the reflectors (if vectors are wanted): A = Q T Q^H.
  const q = wantVectors ? new Float64Array(2 * n * n) : null;
  if (q) for (let i = 0; i < n; i++) q[2 * (i * n + i)] = 1;
  const d = new Float64Array(n);
  const eRe = new Float64Array(n),
    eIm = new Float64Array(n); // sub-diagonal e[k] = T[k+1][k]
  const v = new Float64Array(2 * n),
    p = new Float64Array(2 * n);
  for (let k = 0; k < n - 2; k++) {
    // x = A[k+1.., k]
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) {
      const re = a[2 * (i * n + k)],
        im = a[2 * (i * n + k) + 1];
      norm2 += re * re + im * im;
    }
    const x0r = a[2 * ((k + 1) * n + k)],
      x0i = a[2 * ((k + 1) * n + k) + 1];
    const x0abs = Math.hypot(x0r, x0i);
    const norm = Math.sqrt(norm2);
    if (norm2 - x0abs * x0abs <= 1e-300 * (1 + norm2)) {
      eRe[k] = x0r;
      eIm[k] = x0i;
      continue; // already tridiagonal in this column
    }
    const phr = x0abs > 0 ? x0r / x0abs : 1,
      phi = x0abs > 0 ? x0i / x0abs : 0;
    const alphaR = -phr * norm,
      alphaI = -phi * norm; // alpha = -e^{i arg x0} |x|
    // v = x - alpha e1 (indices k+1..n-1)
    let vnorm2 = 0;
    for (let i = k + 1; i < n; i++) {
      let re = a[2 * (i * n + k)],
        im = a[2 * (i * n + k) + 1];
      if (i === k + 1) {
        re -= alphaR;
        im -= alphaI;
      }
      v[2 * i] = re;
      v[2 * i + 1] = im;
      vnorm2 += re * re + im * im;
    }
    const tau = 2 / vnorm2;
    // p = tau * A22 v  (A22 = A[k+1.., k+1..])
    let vp = 0; // v^H p (real)
    for (let i = k + 1; i < n; i++) {
      let sr = 0,
        si = 0;
      for (let j = k + 1; j < n; j++) {
        const ar = a[2 * (i * n + j)],
          ai = a[2 * (i * n + j) + 1];
        const vr = v[2 * j],
          vi = v[2 * j + 1];
        sr += ar * vr - ai * vi;
        si += ar * vi + ai * vr;
      }
      p[2 * i] = tau * sr;
      p[2 * i + 1] = tau * si;
      vp += v[2 * i] * p[2 * i] + v[2 * i + 1] * p[2 * i + 1];
    }
    const K = (tau / 2) * vp;
    // w = p - K v (stored in p)
    for (let i = k + 1; i < n; i++) {
      p[2 * i] -= K * v[2 * i];
      p[2 * i + 1] -= K * v[2 * i + 1];
    }
    // A22 -= v w^H + w v^H
    for (let i = k + 1; i < n; i++) {
      const vr = v[2 * i],
        vi = v[2 * i + 1],
        wr = p[2 * i],
        wi = p[2 * i + 1];
      for (let j = k + 1; j < n; j++) {
        const vjr = v[2 * j],
          vji = v[2 * j + 1],
          wjr = p[2 * j],
          wji = p[2 * j + 1];
        // v_i conj(w_j) + w_i conj(v_j)
        a[2 * (i * n + j)] -= vr * wjr + vi * wji + wr * vjr + wi * vji;
        a[2 * (i * n + j) + 1] -= vi * wjr - vr * wji + wi * vjr - wr * vji;
      }
    }
    eRe[k] = alphaR;
    eIm[k] = alphaI;
    for (let i = k + 1; i < n; i++) {
      a[2 * (i * n + k)] = 0;
      a[2 * (i * n + k) + 1] = 0;
    }
    if (q) {
      // Q <- Q H, H = I - tau v v^H: Q[r, :] -= tau (Q[r,:] v) v^H
      for (let r = 0; r < n; r++) {
        let sr = 0,
          si = 0;
        for (let j = k + 1; j < n; j++) {
          const qr = q[2 * (r * n + j)],
            qi = q[2 * (r * n + j) + 1];
          sr += qr * v[2 * j] - qi * v[2 * j + 1];
          si += qr * v[2 * j + 1] + qi * v[2 * j];
        }
        sr *= tau;
        si *= tau;
        for (let j = k + 1; j < n; j++) {
          // -= s * conj(v_j)
          q[2 * (r * n + j)] -= sr * v[2 * j] + si * v[2 * j + 1];
          q[2 * (r * n + j) + 1] -= si * v[2 * j] - sr * v[2 * j + 1];
        }
      }
    }
  }
  for (let i = 0; i < n; i++) d[i] = a[2 * (i * n + i)];
  if (n >= 2) {
    eRe[n - 2] = a[2 * ((n - 1) * n + n - 2)];
    eIm[n - 2] = a[2 * ((n - 1) * n + n - 2) + 1];
  }
  // Phase: T = D Tr D^H with real |e|; D_0 = 1, D_{k+1} = D_k * e_k/|e_k|.
  const e = new Float64Array(n);
  const dRe = new Float64Array(n),
    dIm = new Float64Array(n);
  dRe[0] = 1;
  for (let k = 0; k < n - 1; k++) {
    const ab = Math.hypot(eRe[k], eIm[k]);
    e[k] = ab;
    const ur = ab > 0 ? eRe[k] / ab : 1,
      ui = ab > 0 ? eIm[k] / ab : 0;
    dRe[k + 1] = dRe[k] * ur - dIm[k] * ui;
    dIm[k + 1] = dRe[k] * ui + dIm[k] * ur;
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
    for (let r = 0; r < n; r++)
      for (let j = 0; j < n; j++) {
        const qr = q[2 * (r * n + j)],
          qi = q[2 * (r * n + j) + 1];
        qd[2 * (r * n + j)] = qr * dRe[j] - qi * dIm[j];
        qd[2 * (r * n + j) + 1] = qr * dIm[j] + qi * dRe[j];
      }
    for (let r = 0; r < n; r++)
      for (let c = 0; c < n; c++) {
        const col = order[c];
        let sr = 0,
          si = 0;
        for (let j = 0; j < n; j++) {
          const zz = z[j * n + col];
          sr += qd[2 * (r * n + j)] * zz;
          si += qd[2 * (r * n + j) + 1] * zz;
        }
        vectors[2 * (r * n + c)] = sr;
        vectors[2 * (r * n + c) + 1] = si;
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
      let s = 1,
        c = 1,
        pp = 0;
      let i = m - 1;
      for (; i >= l; i--) {
        let f = s * e[i];
        const b = c * e[i];
        r = Math.hypot(f, g);
        e[i + 1] = r;
        if (r === 0) {
          d[i + 1] -= pp;
          e[m] = 0;
          break;
        }
        s = f / r;
        c = g / r;
        g = d[i + 1] - pp;
        r = (d[i] - g) * s + 2 * c * b;
        pp = s * r;
        d[i + 1] = g + pp;
        g = c * r - b;
        if (z)
          for (let k = 0; k < n; k++) {
            f = z[k * n + i + 1];
            z[k * n + i + 1] = s * z[k * n + i] + c * f;
            z[k * n + i] = c * z[k * n + i] - s * f;
          }
      }
      if (r === 0 && i >= l) continue;
      d[l] -= pp;
      e[l] = g;
      e[m] = 0;
    }
  }
}
