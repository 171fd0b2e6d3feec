/**
 * The OpenBLAS/LAPACK kernels, method by method, against the TypeScript kernels (agreement to
 * 1e-10 relative to the size of the result, the contract of src/engine/linalg/kernels.ts), against
 * numpy (Debian python3-numpy, an independent library) on a few cases, and their errors.
 */
import { describe, expect, it } from "vitest";
import { SingularMatrixError } from "@/engine/errors";
import { tsKernels } from "@/engine/linalg/kernels";
import {
  eigenvectorResidual,
  identity,
  nativeKernels,
  numpyEval,
  randomComplex,
  randomHermitian,
  randomSquare,
  realToComplex,
  relativeDifference,
  unorderedDifference,
} from "./helpers";
import { seededUniform } from "../../support/random";

const TOL = 1e-10;
const nat = nativeKernels();

describe("native kernels: identity", () => {
  it("are named openblas", () => {
    expect(nat.name).toBe("openblas");
  });
});

describe("matmul (cblas_zgemm) agrees with the TypeScript kernels", () => {
  const shapes: [number, number, number][] = [
    [1, 1, 1],
    [2, 3, 1],
    [1, 5, 4],
    [7, 13, 5],
    [8, 12, 8],
    [16, 8, 16],
    [64, 64, 64],
    [100, 3, 90],
    [33, 70, 17],
  ];
  for (const [m, k, n] of shapes) {
    it(`${m}x${k} times ${k}x${n}`, () => {
      const rand = seededUniform(m * 1000 + k * 10 + n);
      const a = randomComplex(rand, m * k),
        b = randomComplex(rand, k * n);
      const a0 = a.slice(),
        b0 = b.slice();
      const c = nat.matmul(a, b, m, k, n);
      expect(c.length).toBe(2 * m * n);
      expect(relativeDifference(c, tsKernels.matmul(a, b, m, k, n))).toBeLessThan(TOL);
      expect(a).toEqual(a0); // inputs untouched
      expect(b).toEqual(b0);
    });
  }

  it("accepts arrays longer than needed and views into a larger buffer (subarray)", () => {
    const rand = seededUniform(5);
    const big = randomComplex(rand, 200);
    const a = big.subarray(6, 6 + 2 * 12),
      b = big.subarray(40, 40 + 2 * 12 + 10);
    expect(relativeDifference(nat.matmul(a, b, 3, 4, 3), tsKernels.matmul(a, b, 3, 4, 3))).toBeLessThan(TOL);
  });

  it("gives zeros for an empty inner dimension and an empty array for an empty result", () => {
    expect(Array.from(nat.matmul(new Float64Array(0), new Float64Array(0), 2, 0, 3))).toEqual(new Array(12).fill(0));
    expect(nat.matmul(new Float64Array(8), new Float64Array(0), 0, 4, 0).length).toBe(0);
  });
});

describe("gemmAccumulate (C += A B in place, offsets and leading dimensions)", () => {
  const cases = [
    { m: 5, n: 6, k: 3, lda: 4, ldb: 8, ldc: 9, aOff: 4, bOff: 6, cOff: 2 },
    { m: 1, n: 1, k: 1, lda: 1, ldb: 1, ldc: 1, aOff: 0, bOff: 0, cOff: 0 },
    { m: 40, n: 33, k: 8, lda: 8, ldb: 40, ldc: 48, aOff: 0, bOff: 10, cOff: 96 },
    { m: 17, n: 64, k: 70, lda: 71, ldb: 64, ldc: 64, aOff: 2, bOff: 0, cOff: 0 },
  ];
  for (const cs of cases) {
    it(`m=${cs.m} n=${cs.n} k=${cs.k} lda=${cs.lda} ldb=${cs.ldb} ldc=${cs.ldc}`, () => {
      const rand = seededUniform(cs.m + 7 * cs.n + 13 * cs.k);
      const a = randomComplex(rand, cs.aOff / 2 + cs.m * cs.lda + 1);
      const b = randomComplex(rand, cs.bOff / 2 + cs.k * cs.ldb + 1);
      const c0 = randomComplex(rand, cs.cOff / 2 + cs.m * cs.ldc + 3);
      const c1 = c0.slice(),
        c2 = c0.slice();
      nat.gemmAccumulate(cs.m, cs.n, cs.k, a, cs.aOff, cs.lda, b, cs.bOff, cs.ldb, c1, cs.cOff, cs.ldc);
      tsKernels.gemmAccumulate(cs.m, cs.n, cs.k, a, cs.aOff, cs.lda, b, cs.bOff, cs.ldb, c2, cs.cOff, cs.ldc);
      expect(relativeDifference(c1, c2)).toBeLessThan(TOL);
      // Outside the m x n block (before the offset, in the gaps of ldc, after the end) nothing moved.
      for (let i = 0; i < c0.length; i += 2) {
        const rel = (i - cs.cOff) / 2;
        const inside = rel >= 0 && Math.floor(rel / cs.ldc) < cs.m && rel % cs.ldc < cs.n;
        if (!inside) {
          expect(c1[i]).toBe(c0[i]);
          expect(c1[i + 1]).toBe(c0[i + 1]);
        }
      }
    });
  }

  it("does nothing when m, n or k is zero", () => {
    const c = new Float64Array([1, 2, 3, 4]);
    nat.gemmAccumulate(1, 2, 0, new Float64Array(0), 0, 0, new Float64Array(0), 0, 2, c, 0, 2);
    nat.gemmAccumulate(0, 2, 3, new Float64Array(0), 0, 3, new Float64Array(12), 0, 2, c, 0, 2);
    expect(Array.from(c)).toEqual([1, 2, 3, 4]);
  });

  it("accumulates twice into the same block (a true +=)", () => {
    const rand = seededUniform(99);
    const a = randomComplex(rand, 9),
      b = randomComplex(rand, 9);
    const c = new Float64Array(18);
    nat.gemmAccumulate(3, 3, 3, a, 0, 3, b, 0, 3, c, 0, 3);
    nat.gemmAccumulate(3, 3, 3, a, 0, 3, b, 0, 3, c, 0, 3);
    const twice = tsKernels.matmul(a, b, 3, 3, 3).map((x) => 2 * x);
    expect(relativeDifference(c, twice)).toBeLessThan(TOL);
  });
});

describe("solve (zgetrf + triangular solves) with several right-hand sides", () => {
  for (const [n, nrhs] of [
    [1, 1],
    [3, 4],
    [17, 1],
    [17, 25],
    [40, 7],
    [64, 64],
  ]) {
    it(`n=${n}, nrhs=${nrhs}`, () => {
      const rand = seededUniform(31 * n + nrhs);
      const a = randomSquare(rand, n, 1.5),
        b = randomComplex(rand, n * nrhs);
      const a0 = a.slice(),
        b0 = b.slice();
      const x = nat.solve(a, b, n, nrhs);
      expect(x.length).toBe(2 * n * nrhs);
      expect(relativeDifference(x, tsKernels.solve(a, b, n, nrhs))).toBeLessThan(TOL);
      expect(relativeDifference(tsKernels.matmul(a, x, n, n, nrhs), b)).toBeLessThan(TOL); // A X = B
      expect(a).toEqual(a0);
      expect(b).toEqual(b0);
    });
  }

  it("needs pivoting (zero in the top-left corner) and still agrees", () => {
    const a = new Float64Array([0, 0, 1, 1, 2, 0, 3, -1, 0, 1, 0, 0, 1, 0, 1, 0, 4, 2]); // 3x3
    const b = new Float64Array([1, 0, 0, 1, 2, 2, 1, 0, 0, 0, 5, 1]); // 3x2
    expect(relativeDifference(nat.solve(a, b, 3, 2), tsKernels.solve(a, b, 3, 2))).toBeLessThan(TOL);
  });

  it("returns an empty solution for zero right-hand sides", () => {
    expect(nat.solve(identity(3), new Float64Array(0), 3, 0).length).toBe(0);
  });
});

describe("inverse (zgetrf + zgetri)", () => {
  for (const n of [1, 2, 9, 32]) {
    it(`n=${n}`, () => {
      const rand = seededUniform(500 + n);
      const a = randomSquare(rand, n, 1);
      const inv = nat.inverse(a, n);
      expect(relativeDifference(inv, tsKernels.inverse(a, n))).toBeLessThan(TOL);
      expect(relativeDifference(tsKernels.matmul(a, inv, n, n, n), identity(n))).toBeLessThan(TOL);
    });
  }
});

describe("eigHermitian (zheevd)", () => {
  for (const n of [1, 2, 5, 16, 48]) {
    it(`n=${n}: ascending eigenvalues, orthonormal eigenvectors`, () => {
      const rand = seededUniform(700 + n);
      const a = randomHermitian(rand, n);
      const mine = nat.eigHermitian(a, n, true);
      const ref = tsKernels.eigHermitian(a, n, true);
      expect(relativeDifference(realToComplex(mine.values), realToComplex(ref.values))).toBeLessThan(TOL);
      for (let i = 1; i < n; i++) expect(mine.values[i]).toBeGreaterThanOrEqual(mine.values[i - 1]);
      expect(mine.vectors).not.toBeNull();
      expect(eigenvectorResidual(a, n, mine.values, mine.vectors!)).toBeLessThan(TOL);
      // Same eigenvectors up to a phase (random spectra are not degenerate): |<v_ts, v_native>| = 1.
      for (let c = 0; c < n; c++) {
        let re = 0,
          im = 0;
        for (let r = 0; r < n; r++) {
          const xr = ref.vectors![2 * (r * n + c)],
            xi = ref.vectors![2 * (r * n + c) + 1];
          const yr = mine.vectors![2 * (r * n + c)],
            yi = mine.vectors![2 * (r * n + c) + 1];
          re += xr * yr + xi * yi;
          im += xr * yi - xi * yr;
        }
        expect(Math.abs(Math.hypot(re, im) - 1)).toBeLessThan(1e-9);
      }
    });
  }

  it("returns no vectors when none are asked for, and the same eigenvalues", () => {
    const a = randomHermitian(seededUniform(3), 7);
    const r = nat.eigHermitian(a, 7, false);
    expect(r.vectors).toBeNull();
    expect(relativeDifference(realToComplex(r.values), realToComplex(nat.eigHermitian(a, 7, true).values))).toBeLessThan(TOL);
  });

  it("reads only the lower triangle (garbage above the diagonal changes nothing)", () => {
    const n = 6;
    const a = randomHermitian(seededUniform(8), n);
    const dirty = a.slice();
    for (let i = 0; i < n; i++)
      for (let j = i + 1; j < n; j++) {
        dirty[2 * (i * n + j)] = 100 + i;
        dirty[2 * (i * n + j) + 1] = -50 * j;
      }
    expect(relativeDifference(realToComplex(nat.eigHermitian(dirty, n, false).values), realToComplex(nat.eigHermitian(a, n, false).values))).toBeLessThan(TOL);
  });

  it("handles a degenerate spectrum (identity and a projector)", () => {
    const id = identity(4);
    const r = nat.eigHermitian(id, 4, true);
    expect(Array.from(r.values)).toEqual([1, 1, 1, 1]);
    expect(eigenvectorResidual(id, 4, r.values, r.vectors!)).toBeLessThan(TOL);
  });
});

describe("eigGeneral (zgeev)", () => {
  for (const n of [1, 2, 6, 20, 50]) {
    it(`n=${n}: same eigenvalues as the TypeScript QR iteration`, () => {
      const rand = seededUniform(900 + n);
      const a = randomComplex(rand, n * n);
      const a0 = a.slice();
      const ev = nat.eigGeneral(a, n);
      expect(ev.length).toBe(2 * n);
      expect(unorderedDifference(ev, tsKernels.eigGeneral(a, n))).toBeLessThan(TOL);
      expect(a).toEqual(a0);
    });
  }

  it("a unitary matrix has eigenvalues on the unit circle; a triangular one its diagonal", () => {
    const n = 5;
    const tri = new Float64Array(2 * n * n);
    for (let i = 0; i < n; i++)
      for (let j = i; j < n; j++) {
        tri[2 * (i * n + j)] = i === j ? i + 1 : 0.3;
        tri[2 * (i * n + j) + 1] = i === j ? -i : 0.1;
      }
    const diag = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) {
      diag[2 * i] = i + 1;
      diag[2 * i + 1] = -i;
    }
    expect(unorderedDifference(nat.eigGeneral(tri, n), diag)).toBeLessThan(TOL);
    // Householder reflector I - 2 v v^H / |v|^2: unitary.
    const v = randomComplex(seededUniform(4), n);
    const vn = v.reduce((s, x) => s + x * x, 0);
    const u = identity(n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) {
        u[2 * (i * n + j)] -= (2 / vn) * (v[2 * i] * v[2 * j] + v[2 * i + 1] * v[2 * j + 1]);
        u[2 * (i * n + j) + 1] -= (2 / vn) * (v[2 * i + 1] * v[2 * j] - v[2 * i] * v[2 * j + 1]);
      }
    const ev = nat.eigGeneral(u, n);
    for (let i = 0; i < n; i++) expect(Math.abs(Math.hypot(ev[2 * i], ev[2 * i + 1]) - 1)).toBeLessThan(1e-12);
  });
});

describe("agreement with numpy (Debian python3-numpy, independent of both backends)", () => {
  const n = 12,
    rand = seededUniform(2024);
  const a = randomSquare(rand, n, 1),
    b = randomComplex(rand, n * 3),
    h = randomHermitian(rand, n);
  it("matmul, solve, inverse", () => {
    const sq = { data: a, shape: [n, n] };
    expect(relativeDifference(nat.matmul(a, a, n, n, n), numpyEval({ a: sq }, "out = a @ a"))).toBeLessThan(TOL);
    expect(relativeDifference(nat.solve(a, b, n, 3), numpyEval({ a: sq, b: { data: b, shape: [n, 3] } }, "out = np.linalg.solve(a, b)"))).toBeLessThan(TOL);
    expect(relativeDifference(nat.inverse(a, n), numpyEval({ a: sq }, "out = np.linalg.inv(a)"))).toBeLessThan(TOL);
  });
  it("Hermitian and general eigenvalues", () => {
    const herm = numpyEval({ h: { data: h, shape: [n, n] } }, "out = np.linalg.eigvalsh(h, UPLO='L')");
    expect(relativeDifference(realToComplex(nat.eigHermitian(h, n, false).values), herm)).toBeLessThan(TOL);
    const gen = numpyEval({ a: { data: a, shape: [n, n] } }, "out = np.linalg.eigvals(a)");
    expect(unorderedDifference(nat.eigGeneral(a, n), gen)).toBeLessThan(TOL);
  });
});

describe("errors are JavaScript errors with a message", () => {
  it("short arrays: RangeError naming the argument, for every method", () => {
    const s = new Float64Array(6);
    expect(() => nat.matmul(s, new Float64Array(8), 2, 2, 2)).toThrow(RangeError);
    expect(() => nat.matmul(s, new Float64Array(8), 2, 2, 2)).toThrow(/matmul a: array holds 3 complex numbers, needs 4/);
    expect(() => nat.matmul(new Float64Array(8), s, 2, 2, 2)).toThrow(/matmul b/);
    expect(() => nat.solve(s, new Float64Array(4), 2, 1)).toThrow(RangeError);
    expect(() => nat.solve(identity(2), new Float64Array(2), 2, 1)).toThrow(/solve b/);
    expect(() => nat.inverse(s, 2)).toThrow(RangeError);
    expect(() => nat.eigHermitian(s, 2, false)).toThrow(RangeError);
    expect(() => nat.eigGeneral(s, 2)).toThrow(RangeError);
  });

  it("gemmAccumulate: leading dimension too small or block outside its array", () => {
    const a = new Float64Array(18),
      b = new Float64Array(18),
      c = new Float64Array(18);
    expect(() => nat.gemmAccumulate(3, 3, 3, a, 0, 2, b, 0, 3, c, 0, 3)).toThrow(/leading dimension too small/);
    expect(() => nat.gemmAccumulate(3, 3, 3, a, 2, 3, b, 0, 3, c, 0, 3)).toThrow(/exceeds its array/);
    expect(() => nat.gemmAccumulate(3, 3, 3, a, 0, 3, b, 0, 3, c, 0, 4)).toThrow(RangeError);
    expect(() => tsKernels.gemmAccumulate(3, 3, 3, a, 0, 2, b, 0, 3, c, 0, 3)).toThrow(/leading dimension too small/); // same contract
  });

  it("wrong argument kinds: TypeError or RangeError, never a crash", () => {
    const f = nat.matmul as unknown as (...args: unknown[]) => Float64Array;
    expect(() => f([1, 2], new Float64Array(2), 1, 1, 1)).toThrow(TypeError);
    expect(() => f(new Float32Array(2), new Float64Array(2), 1, 1, 1)).toThrow(/Float64Array/);
    expect(() => f(new Float64Array(2), new Float64Array(2), -1, 1, 1)).toThrow(RangeError);
    expect(() => f(new Float64Array(2), new Float64Array(2), 1.5, 1, 1)).toThrow(/non-negative integer/);
    expect(() => f(new Float64Array(2), new Float64Array(2), "1", 1, 1)).toThrow(TypeError);
  });

  const singular: [string, number, Float64Array][] = [
    ["rank one 2x2", 2, new Float64Array([1, 0, 2, 0, 2, 0, 4, 0])],
    ["zero 3x3", 3, new Float64Array(18)],
    ["rank two 3x3 (complex)", 3, new Float64Array([1, 1, 2, 0, 0, 1, 0, 0, 1, 0, 2, 2, 2, 2, 4, 0, 0, 2])],
    ["NaN pivot", 2, new Float64Array([NaN, 0, 0, 0, 0, 0, 1, 0])],
  ];
  for (const [label, n, m] of singular) {
    it(`singular matrix (${label}): SingularMatrixError from solve and inverse, as the TypeScript kernels`, () => {
      expect(() => nat.solve(m, identity(n), n, n)).toThrow(SingularMatrixError);
      expect(() => nat.solve(m, identity(n), n, n)).toThrow(/singular matrix in solve/);
      expect(() => nat.inverse(m, n)).toThrow(SingularMatrixError);
      expect(() => nat.inverse(m, n)).toThrow(/singular matrix in inverse/);
      expect(() => tsKernels.solve(m, identity(n), n, n)).toThrow(SingularMatrixError);
    });
  }
});
