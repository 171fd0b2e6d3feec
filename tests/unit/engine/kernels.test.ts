import { describe, expect, it } from "vitest";
import { tsKernels, getKernels, setKernels } from "@/engine/linalg/kernels";
import { SingularMatrixError } from "@/engine/errors";
import { numpy, randomComplex, split } from "./helpers/reference";
import { seededUniform } from "../../support/random";

const maxDiff = (a: Float64Array | number[], re: number[], im: number[]) => {
  let w = 0;
  for (let i = 0; i < re.length; i++) w = Math.max(w, Math.hypot(a[2 * i] - re[i], a[2 * i + 1] - im[i]));
  return w;
};

describe("TypeScript complex kernels against numpy (Debian python3-numpy)", () => {
  // Source: numpy.linalg / numpy matmul as the independent reference implementation.
  const rand = seededUniform(99);
  it("matmul and gemmAccumulate with leading dimensions", () => {
    const a = randomComplex(7 * 5, rand),
      b = randomComplex(5 * 9, rand);
    const ref = numpy({ op: "matmul", m: 7, k: 5, n: 9, are: split(a).re, aim: split(a).im, bre: split(b).re, bim: split(b).im });
    expect(maxDiff(tsKernels.matmul(a, b, 7, 5, 9), ref.re, ref.im)).toBeLessThan(1e-13);
    // C (7 x 9, inside a 10 x 12 buffer at row 2, col 1) += A B
    const big = new Float64Array(2 * 10 * 12);
    tsKernels.gemmAccumulate(7, 9, 5, a, 0, 5, b, 0, 9, big, 2 * (2 * 12 + 1), 12);
    const sub = new Float64Array(2 * 7 * 9);
    for (let i = 0; i < 7; i++)
      for (let j = 0; j < 9; j++) {
        sub[2 * (i * 9 + j)] = big[2 * ((i + 2) * 12 + j + 1)];
        sub[2 * (i * 9 + j) + 1] = big[2 * ((i + 2) * 12 + j + 1) + 1];
      }
    expect(maxDiff(sub, ref.re, ref.im)).toBeLessThan(1e-13);
    expect(() => tsKernels.gemmAccumulate(7, 9, 5, a, 0, 4, b, 0, 9, big, 0, 12)).toThrow(RangeError);
  });
  it("solve and inverse; singular matrices throw", () => {
    const n = 12,
      a = randomComplex(n * n, rand),
      b = randomComplex(n * 3, rand);
    const ref = numpy({ op: "solve", n, nrhs: 3, are: split(a).re, aim: split(a).im, bre: split(b).re, bim: split(b).im });
    expect(maxDiff(tsKernels.solve(a, b, n, 3), ref.re, ref.im)).toBeLessThan(1e-11);
    const inv = tsKernels.inverse(a, n);
    const id = tsKernels.matmul(a, inv, n, n, n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) expect(Math.hypot(id[2 * (i * n + j)] - (i === j ? 1 : 0), id[2 * (i * n + j) + 1])).toBeLessThan(1e-11);
    expect(() => tsKernels.solve(new Float64Array(8), new Float64Array(4), 2, 1)).toThrow(SingularMatrixError);
  });
  it("Hermitian eigenvalues and orthonormal eigenvectors", () => {
    const n = 20,
      x = randomComplex(n * n, rand);
    const h = new Float64Array(2 * n * n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) {
        h[2 * (i * n + j)] = x[2 * (i * n + j)] + x[2 * (j * n + i)];
        h[2 * (i * n + j) + 1] = x[2 * (i * n + j) + 1] - x[2 * (j * n + i) + 1];
      }
    const ref = numpy({ op: "eigvalsh", n, ...split(h) });
    const { values, vectors } = tsKernels.eigHermitian(h, n, true);
    values.forEach((v, i) => expect(v).toBeCloseTo(ref.re[i], 11));
    const V = vectors as Float64Array;
    const HV = tsKernels.matmul(h, V, n, n, n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) {
        expect(Math.abs(HV[2 * (i * n + j)] - values[j] * V[2 * (i * n + j)])).toBeLessThan(1e-10);
        expect(Math.abs(HV[2 * (i * n + j) + 1] - values[j] * V[2 * (i * n + j) + 1])).toBeLessThan(1e-10);
      }
  });
  it("general complex eigenvalues (random and unitary matrices)", () => {
    for (const n of [1, 2, 5, 17, 40]) {
      const a = randomComplex(n * n, rand);
      const ref = numpy({ op: "eigvals", n, ...split(a) });
      const ev = tsKernels.eigGeneral(a, n);
      // match each reference eigenvalue to the nearest computed one
      for (let i = 0; i < n; i++) {
        let best = Infinity;
        for (let j = 0; j < n; j++) best = Math.min(best, Math.hypot(ev[2 * j] - ref.re[i], ev[2 * j + 1] - ref.im[i]));
        expect(best).toBeLessThan(1e-9);
      }
    }
  });
  it("backend selection", () => {
    const fake = { ...tsKernels, name: "fake" };
    const prev = setKernels(fake);
    expect(getKernels().name).toBe("fake");
    expect(setKernels(prev).name).toBe("fake");
    expect(getKernels()).toBe(prev);
  });
});
