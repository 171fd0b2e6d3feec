/** Eigenvalues of a general complex matrix (TypeScript kernels). */
import { check } from "./check";

/** General complex eigenvalues: Householder reduction to Hessenberg form, then single-shift QR
 * (Givens rotations, Wilkinson shift, exceptional shifts every 10 stalled sweeps) with deflation. */
export function eigGeneral(aIn: Float64Array, n: number): Float64Array {
  check("eigGeneral a", aIn, n * n);
  const h = aIn.slice(0, 2 * n * n);
  const v = new Float64Array(2 * n);
  for (let k = 0; k < n - 2; k++) {
    let norm2 = 0;
    for (let i = k + 1; i < n; i++) {
      const re = h[2 * (i * n + k)],
        im = h[2 * (i * n + k) + 1];
      norm2 += re * re + im * im;
    }
    const x0r = h[2 * ((k + 1) * n + k)],
      x0i = h[2 * ((k + 1) * n + k) + 1];
    const x0abs = Math.hypot(x0r, x0i);
    if (norm2 - x0abs * x0abs <= 1e-300 * (1 + norm2)) continue;
    const norm = Math.sqrt(norm2);
    const phr = x0abs > 0 ? x0r / x0abs : 1,
      phi = x0abs > 0 ? x0i / x0abs : 0;
    const alphaR = -phr * norm,
      alphaI = -phi * norm;
    let vn2 = 0;
    for (let i = k + 1; i < n; i++) {
      let re = h[2 * (i * n + k)],
        im = h[2 * (i * n + k) + 1];
      if (i === k + 1) {
        re -= alphaR;
        im -= alphaI;
      }
      v[2 * i] = re;
      v[2 * i + 1] = im;
      vn2 += re * re + im * im;
    }
    const tau = 2 / vn2;
    // left: H[k+1.., :] -= tau v (v^H H)
    for (let j = k; j < n; j++) {
      let sr = 0,
        si = 0;
      for (let i = k + 1; i < n; i++) {
        const hr = h[2 * (i * n + j)],
          hi = h[2 * (i * n + j) + 1];
        sr += v[2 * i] * hr + v[2 * i + 1] * hi;
        si += v[2 * i] * hi - v[2 * i + 1] * hr;
      }
      sr *= tau;
      si *= tau;
      for (let i = k + 1; i < n; i++) {
        h[2 * (i * n + j)] -= v[2 * i] * sr - v[2 * i + 1] * si;
        h[2 * (i * n + j) + 1] -= v[2 * i] * si + v[2 * i + 1] * sr;
      }
    }
    // right: H[:, k+1..] -= tau (H v) v^H
    for (let i = 0; i < n; i++) {
      let sr = 0,
        si = 0;
      for (let j = k + 1; j < n; j++) {
        const hr = h[2 * (i * n + j)],
          hi = h[2 * (i * n + j) + 1];
        sr += hr * v[2 * j] - hi * v[2 * j + 1];
        si += hr * v[2 * j + 1] + hi * v[2 * j];
      }
      sr *= tau;
      si *= tau;
      for (let j = k + 1; j < n; j++) {
        h[2 * (i * n + j)] -= sr * v[2 * j] + si * v[2 * j + 1];
        h[2 * (i * n + j) + 1] -= si * v[2 * j] - sr * v[2 * j + 1];
      }
    }
    for (let i = k + 2; i < n; i++) {
      h[2 * (i * n + k)] = 0;
      h[2 * (i * n + k) + 1] = 0;
    }
  }
  const out = new Float64Array(2 * n);
  const cs = new Float64Array(n),
    snr = new Float64Array(n),
    sni = new Float64Array(n);
  let hi = n - 1;
  let iter = 0,
    total = 0;
  const H = (i: number, j: number) => 2 * (i * n + j);
  while (hi >= 0) {
    if (hi === 0) {
      out[0] = h[0];
      out[1] = h[1];
      break;
    }
    let l = hi;
    for (; l > 0; l--) {
      const s = Math.abs(h[H(l - 1, l - 1)]) + Math.abs(h[H(l - 1, l - 1) + 1]) + Math.abs(h[H(l, l)]) + Math.abs(h[H(l, l) + 1]);
      const sub = Math.abs(h[H(l, l - 1)]) + Math.abs(h[H(l, l - 1) + 1]);
      if (sub <= 2.2e-16 * (s === 0 ? 1 : s)) {
        h[H(l, l - 1)] = 0;
        h[H(l, l - 1) + 1] = 0;
        break;
      }
    }
    if (l === hi) {
      out[2 * hi] = h[H(hi, hi)];
      out[2 * hi + 1] = h[H(hi, hi) + 1];
      hi--;
      iter = 0;
      continue;
    }
    iter++;
    total++;
    if (total > 60 * n + 100) throw new Error("eigGeneral: no convergence");
    // Wilkinson shift: eigenvalue of the trailing 2x2 closest to H[hi][hi]
    let mur: number, mui: number;
    const ar = h[H(hi - 1, hi - 1)],
      ai = h[H(hi - 1, hi - 1) + 1];
    const br = h[H(hi - 1, hi)],
      bi = h[H(hi - 1, hi) + 1];
    const cr = h[H(hi, hi - 1)],
      ci = h[H(hi, hi - 1) + 1];
    const dr = h[H(hi, hi)],
      di = h[H(hi, hi) + 1];
    if (iter % 11 === 10) {
      mur = dr + Math.abs(cr) + Math.abs(ci);
      mui = di + 0.5 * (Math.abs(cr) + Math.abs(ci));
    } else {
      // eigenvalues of [[a,b],[c,d]]: (a+d)/2 +- sqrt(((a-d)/2)^2 + bc)
      const hr = (ar - dr) / 2,
        hii = (ai - di) / 2;
      const disr = hr * hr - hii * hii + (br * cr - bi * ci);
      const disi = 2 * hr * hii + (br * ci + bi * cr);
      const mod = Math.hypot(disr, disi);
      let sr = Math.sqrt(Math.max(0, (mod + disr) / 2));
      let si = Math.sqrt(Math.max(0, (mod - disr) / 2));
      if (disi < 0) si = -si;
      const mr = (ar + dr) / 2,
        mi = (ai + di) / 2;
      const e1r = mr + sr,
        e1i = mi + si,
        e2r = mr - sr,
        e2i = mi - si;
      const d1 = Math.hypot(e1r - dr, e1i - di),
        d2 = Math.hypot(e2r - dr, e2i - di);
      if (d1 <= d2) {
        mur = e1r;
        mui = e1i;
      } else {
        mur = e2r;
        mui = e2i;
      }
      if (!Number.isFinite(mur) || !Number.isFinite(mui)) {
        mur = dr;
        mui = di;
        sr = 0;
        si = 0;
      }
    }
    for (let i = l; i <= hi; i++) {
      h[H(i, i)] -= mur;
      h[H(i, i) + 1] -= mui;
    }
    for (let k = l; k < hi; k++) {
      const xr = h[H(k, k)],
        xi = h[H(k, k) + 1];
      const yr = h[H(k + 1, k)],
        yi = h[H(k + 1, k) + 1];
      const xa = Math.hypot(xr, xi),
        r = Math.hypot(xa, Math.hypot(yr, yi));
      let c: number, sRe: number, sIm: number;
      if (r === 0) {
        c = 1;
        sRe = 0;
        sIm = 0;
      } else if (xa === 0) {
        c = 0;
        sRe = 1;
        sIm = 0;
      } else {
        c = xa / r;
        // s = (x/|x|) conj(y) / r
        const ur = xr / xa,
          ui = xi / xa;
        sRe = (ur * yr + ui * yi) / r;
        sIm = (ui * yr - ur * yi) / r;
      }
      cs[k] = c;
      snr[k] = sRe;
      sni[k] = sIm;
      for (let j = k; j <= hi; j++) {
        const pr = h[H(k, j)],
          pi = h[H(k, j) + 1],
          qr = h[H(k + 1, j)],
          qi = h[H(k + 1, j) + 1];
        h[H(k, j)] = c * pr + sRe * qr - sIm * qi;
        h[H(k, j) + 1] = c * pi + sRe * qi + sIm * qr;
        // -conj(s) p + c q
        h[H(k + 1, j)] = -(sRe * pr + sIm * pi) + c * qr;
        h[H(k + 1, j) + 1] = -(sRe * pi - sIm * pr) + c * qi;
      }
    }
    for (let k = l; k < hi; k++) {
      const c = cs[k],
        sRe = snr[k],
        sIm = sni[k];
      const top = Math.min(k + 2, hi);
      for (let i = l; i <= top; i++) {
        const pr = h[H(i, k)],
          pi = h[H(i, k) + 1],
          qr = h[H(i, k + 1)],
          qi = h[H(i, k + 1) + 1];
        // col k = c p + conj(s) q ; col k+1 = -s p + c q
        h[H(i, k)] = c * pr + sRe * qr + sIm * qi;
        h[H(i, k) + 1] = c * pi + sRe * qi - sIm * qr;
        h[H(i, k + 1)] = -(sRe * pr - sIm * pi) + c * qr;
        h[H(i, k + 1) + 1] = -(sRe * pi + sIm * pr) + c * qi;
      }
    }
    for (let i = l; i <= hi; i++) {
      h[H(i, i)] += mur;
      h[H(i, i) + 1] += mui;
    }
  }
  return out;
}
