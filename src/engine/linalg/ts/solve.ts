/** Linear solve A X = B (TypeScript kernels): LU with partial pivoting, then forward and back substitution. */
import { SingularMatrixError } from "../../errors";
import { check } from "./check";

/** LU with partial pivoting in place on a packed n x n copy; returns the pivot rows. */
function luInPlace(lu: Float64Array, n: number, what: string): Int32Array {
  const piv = new Int32Array(n);
  for (let k = 0; k < n; k++) {
    let best = -1,
      bestAbs = -1;
    for (let i = k; i < n; i++) {
      const re = lu[2 * (i * n + k)],
        im = lu[2 * (i * n + k) + 1];
      const ab = re * re + im * im;
      if (ab > bestAbs) {
        bestAbs = ab;
        best = i;
      }
    }
    if (!(bestAbs > 1e-600) || !Number.isFinite(bestAbs)) throw new SingularMatrixError(what);
    piv[k] = best;
    if (best !== k) {
      for (let j = 0; j < 2 * n; j++) {
        const t = lu[2 * k * n + j];
        lu[2 * k * n + j] = lu[2 * best * n + j];
        lu[2 * best * n + j] = t;
      }
    }
    const pr = lu[2 * (k * n + k)],
      pi = lu[2 * (k * n + k) + 1];
    const d = pr * pr + pi * pi;
    const ir = pr / d,
      ii = -pi / d;
    for (let i = k + 1; i < n; i++) {
      const o = 2 * (i * n + k);
      const xr = lu[o],
        xi = lu[o + 1];
      const fr = xr * ir - xi * ii,
        fi = xr * ii + xi * ir;
      lu[o] = fr;
      lu[o + 1] = fi;
      if (fr === 0 && fi === 0) continue;
      const rowI = 2 * i * n,
        rowK = 2 * k * n;
      for (let j = 2 * (k + 1); j < 2 * n; j += 2) {
        const yr = lu[rowK + j],
          yi = lu[rowK + j + 1];
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
    if (p !== k)
      for (let j = 0; j < w; j++) {
        const t = x[k * w + j];
        x[k * w + j] = x[p * w + j];
        x[p * w + j] = t;
      }
  }
  // forward (unit lower)
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < i; k++) {
      const lr = lu[2 * (i * n + k)],
        li = lu[2 * (i * n + k) + 1];
      if (lr === 0 && li === 0) continue;
      for (let j = 0; j < w; j += 2) {
        const yr = x[k * w + j],
          yi = x[k * w + j + 1];
        x[i * w + j] -= lr * yr - li * yi;
        x[i * w + j + 1] -= lr * yi + li * yr;
      }
    }
  }
  // backward
  for (let i = n - 1; i >= 0; i--) {
    for (let k = i + 1; k < n; k++) {
      const ur = lu[2 * (i * n + k)],
        ui = lu[2 * (i * n + k) + 1];
      if (ur === 0 && ui === 0) continue;
      for (let j = 0; j < w; j += 2) {
        const yr = x[k * w + j],
          yi = x[k * w + j + 1];
        x[i * w + j] -= ur * yr - ui * yi;
        x[i * w + j + 1] -= ur * yi + ui * yr;
      }
    }
    const pr = lu[2 * (i * n + i)],
      pi = lu[2 * (i * n + i) + 1];
    const d = pr * pr + pi * pi;
    const ir = pr / d,
      ii = -pi / d;
    for (let j = 0; j < w; j += 2) {
      const yr = x[i * w + j],
        yi = x[i * w + j + 1];
      x[i * w + j] = yr * ir - yi * ii;
      x[i * w + j + 1] = yr * ii + yi * ir;
    }
  }
}

export function solve(a: Float64Array, b: Float64Array, n: number, nrhs: number): Float64Array {
  check("solve a", a, n * n);
  check("solve b", b, n * nrhs);
  const lu = a.slice(0, 2 * n * n);
  const piv = luInPlace(lu, n, "solve");
  const x = b.slice(0, 2 * n * nrhs);
  luSolveInPlace(lu, piv, n, x, nrhs);
  return x;
}
