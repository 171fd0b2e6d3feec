/** Complex matrix product (TypeScript kernels): C += A B on strided blocks, and the packed C = A B. */
import { check } from "./check";

export function matmul(a: Float64Array, b: Float64Array, m: number, k: number, n: number): Float64Array {
  check("matmul a", a, m * k);
  check("matmul b", b, k * n);
  const c = new Float64Array(2 * m * n);
  gemmAccumulate(m, n, k, a, 0, k, b, 0, n, c, 0, n);
  return c;
}

export function gemmAccumulate(
  m: number,
  n: number,
  k: number,
  a: Float64Array,
  aOff: number,
  lda: number,
  b: Float64Array,
  bOff: number,
  ldb: number,
  c: Float64Array,
  cOff: number,
  ldc: number,
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
      const a0r = a[o],
        a0i = a[o + 1],
        a1r = a[o + 2],
        a1i = a[o + 3],
        a2r = a[o + 4],
        a2i = a[o + 5],
        a3r = a[o + 6],
        a3i = a[o + 7];
      const a4r = a[o + 8],
        a4i = a[o + 9],
        a5r = a[o + 10],
        a5i = a[o + 11],
        a6r = a[o + 12],
        a6i = a[o + 13],
        a7r = a[o + 14],
        a7i = a[o + 15];
      const l2 = 2 * ldb;
      const b0 = bOff + 2 * p * ldb,
        b1 = b0 + l2,
        b2 = b1 + l2,
        b3 = b2 + l2,
        b4 = b3 + l2,
        b5 = b4 + l2,
        b6 = b5 + l2,
        b7 = b6 + l2;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j],
          x0i = b[b0 + j + 1],
          x1r = b[b1 + j],
          x1i = b[b1 + j + 1];
        const x2r = b[b2 + j],
          x2i = b[b2 + j + 1],
          x3r = b[b3 + j],
          x3i = b[b3 + j + 1];
        const x4r = b[b4 + j],
          x4i = b[b4 + j + 1],
          x5r = b[b5 + j],
          x5i = b[b5 + j + 1];
        const x6r = b[b6 + j],
          x6i = b[b6 + j + 1],
          x7r = b[b7 + j],
          x7i = b[b7 + j + 1];
        c[ci + j] +=
          a0r * x0r -
          a0i * x0i +
          a1r * x1r -
          a1i * x1i +
          a2r * x2r -
          a2i * x2i +
          a3r * x3r -
          a3i * x3i +
          a4r * x4r -
          a4i * x4i +
          a5r * x5r -
          a5i * x5i +
          a6r * x6r -
          a6i * x6i +
          a7r * x7r -
          a7i * x7i;
        c[ci + j + 1] +=
          a0r * x0i +
          a0i * x0r +
          a1r * x1i +
          a1i * x1r +
          a2r * x2i +
          a2i * x2r +
          a3r * x3i +
          a3i * x3r +
          a4r * x4i +
          a4i * x4r +
          a5r * x5i +
          a5i * x5r +
          a6r * x6i +
          a6i * x6r +
          a7r * x7i +
          a7i * x7r;
      }
    }
    for (; p + 3 < k; p += 4) {
      const a0r = a[ai + 2 * p],
        a0i = a[ai + 2 * p + 1];
      const a1r = a[ai + 2 * p + 2],
        a1i = a[ai + 2 * p + 3];
      const a2r = a[ai + 2 * p + 4],
        a2i = a[ai + 2 * p + 5];
      const a3r = a[ai + 2 * p + 6],
        a3i = a[ai + 2 * p + 7];
      const b0 = bOff + 2 * p * ldb,
        b1 = b0 + 2 * ldb,
        b2 = b1 + 2 * ldb,
        b3 = b2 + 2 * ldb;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j],
          x0i = b[b0 + j + 1];
        const x1r = b[b1 + j],
          x1i = b[b1 + j + 1];
        const x2r = b[b2 + j],
          x2i = b[b2 + j + 1];
        const x3r = b[b3 + j],
          x3i = b[b3 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i + a1r * x1r - a1i * x1i + a2r * x2r - a2i * x2i + a3r * x3r - a3i * x3i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r + a1r * x1i + a1i * x1r + a2r * x2i + a2i * x2r + a3r * x3i + a3i * x3r;
      }
    }
    for (; p + 1 < k; p += 2) {
      const a0r = a[ai + 2 * p],
        a0i = a[ai + 2 * p + 1];
      const a1r = a[ai + 2 * p + 2],
        a1i = a[ai + 2 * p + 3];
      const b0 = bOff + 2 * p * ldb,
        b1 = b0 + 2 * ldb;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j],
          x0i = b[b0 + j + 1];
        const x1r = b[b1 + j],
          x1i = b[b1 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i + a1r * x1r - a1i * x1i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r + a1r * x1i + a1i * x1r;
      }
    }
    for (; p < k; p++) {
      const a0r = a[ai + 2 * p],
        a0i = a[ai + 2 * p + 1];
      if (a0r === 0 && a0i === 0) continue;
      const b0 = bOff + 2 * p * ldb;
      for (let j = 0; j < n2; j += 2) {
        const x0r = b[b0 + j],
          x0i = b[b0 + j + 1];
        c[ci + j] += a0r * x0r - a0i * x0i;
        c[ci + j + 1] += a0r * x0i + a0i * x0r;
      }
    }
  }
}
