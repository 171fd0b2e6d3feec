import { describe, expect, it } from "vitest";
import fc from "fast-check";
import {
  checkTriangularNode,
  circulantAmplitudes,
  reachableForwardRange,
  triangularNodeMatrix,
  unitarityError,
  squareNodeMatrix,
  checkExplicitNodeMatrix,
} from "@/engine/network/node-matrices";
import { getKernels } from "@/engine/linalg/kernels";

const prob = (m: Float64Array, i: number, j: number) => m[2 * (i * 3 + j)] ** 2 + m[2 * (i * 3 + j) + 1] ** 2;

/** A reachable triple: forward in the allowed range at a random left:right ratio. */
const reachableTriple = fc.tuple(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true })).map(([t, u]) => {
  const range = reachableForwardRange(t, 1 - t, 1);
  const f = range.min + (range.max - range.min) * u;
  return { f, l: (1 - f) * t, r: (1 - f) * (1 - t) };
});

describe("check 2: unitarity of every node matrix", () => {
  // Source: column orthogonality of a 3x3 circulant unitary, physics.md section 2 (exact law).
  it("circulant nodes from reachable triples are unitary to 1e-12 with |S_mj|^2 = the probabilities (fast-check)", () => {
    fc.assert(
      fc.property(reachableTriple, fc.constantFrom(1 as const, -1 as const), fc.double({ min: -7, max: 7, noNaN: true }), ({ f, l, r }, branch, phase) => {
        const m = triangularNodeMatrix(f, l, r, branch, phase);
        expect(unitarityError(m, 3)).toBeLessThan(1e-12);
        for (let j = 0; j < 3; j++) {
          expect(Math.abs(prob(m, j, j) - f)).toBeLessThan(1e-12); // forward m = j
          expect(Math.abs(prob(m, (j + 1) % 3, j) - l)).toBeLessThan(1e-12); // left m = j + 1
          expect(Math.abs(prob(m, (j + 2) % 3, j) - r)).toBeLessThan(1e-12); // right m = j - 1
        }
      }),
      { numRuns: 300 },
    );
  });
  it("branch +1 has Im(s_l s_r conj(s_f)^2) >= 0, branch -1 the conjugate relative phases, chi = arg(s_f)", () => {
    fc.assert(
      fc.property(reachableTriple, fc.double({ min: -3, max: 3, noNaN: true }), ({ f, l, r }, chi) => {
        const p = circulantAmplitudes(f, l, r, 1, chi),
          m = circulantAmplitudes(f, l, r, -1, chi);
        const inv = (a: { sf: number[]; sl: number[]; sr: number[] }) => {
          // s_l s_r conj(s_f)^2
          const slr = [a.sl[0] * a.sr[0] - a.sl[1] * a.sr[1], a.sl[0] * a.sr[1] + a.sl[1] * a.sr[0]];
          const cf2 = [a.sf[0] ** 2 - a.sf[1] ** 2, -2 * a.sf[0] * a.sf[1]];
          return slr[0] * cf2[1] + slr[1] * cf2[0];
        };
        expect(inv(p)).toBeGreaterThanOrEqual(-1e-12);
        expect(inv(m)).toBeLessThanOrEqual(1e-12);
        if (f > 1e-9) {
          expect(Math.abs(Math.atan2(Math.sin(Math.atan2(p.sf[1], p.sf[0]) - chi), Math.cos(Math.atan2(p.sf[1], p.sf[0]) - chi)))).toBeLessThan(1e-9);
          expect(Math.abs(Math.atan2(Math.sin(Math.atan2(m.sf[1], m.sf[0]) - chi), Math.cos(Math.atan2(m.sf[1], m.sf[0]) - chi)))).toBeLessThan(1e-9);
        }
      }),
      { numRuns: 200 },
    );
  });
  it("eigenvalues of S are on the unit circle and the two branches are not gauge copies of each other", () => {
    const a = getKernels().eigGeneral(triangularNodeMatrix(0.5, 0.3, 0.2, 1, 0), 3);
    const b = getKernels().eigGeneral(triangularNodeMatrix(0.5, 0.3, 0.2, -1, 0), 3);
    const phases = (e: Float64Array) => [0, 1, 2].map((i) => Math.atan2(e[2 * i + 1], e[2 * i])).sort((x, y) => x - y);
    for (let i = 0; i < 3; i++) expect(Math.hypot(a[2 * i], a[2 * i + 1])).toBeCloseTo(1, 12);
    const pa = phases(a),
      pb = phases(b);
    expect(Math.max(...pa.map((x, i) => Math.abs(x - pb[i])))).toBeGreaterThan(1e-3);
  });
  // Source: triangle inequality on sqrt(f r), sqrt(l f), sqrt(r l) (physics.md section 2, derived):
  // with left = right the bound is forward >= 1/9.
  it("unreachable triples are rejected with the failed inequality and the allowed range", () => {
    expect(checkTriangularNode(1 / 9 + 1e-9, (1 - 1 / 9 - 1e-9) / 2, (1 - 1 / 9 - 1e-9) / 2)).toBeNull();
    const msg = checkTriangularNode(0.1, 0.45, 0.45) as string;
    expect(msg).toMatch(/sqrt\(right\*left\) <= sqrt\(forward\*right\) \+ sqrt\(left\*forward\) fails/);
    expect(msg).toMatch(/forward must lie in \[0\.111111/);
    expect(checkTriangularNode(0.5, 0.5, 0)).toMatch(/fails/);
    const range = reachableForwardRange(0.5, 0.5, 0.5);
    expect(range.min).toBeCloseTo(1 / 9, 9);
    expect(range.max).toBe(1);
  });
  it("pure turns and forward-only nodes are permutations", () => {
    expect(unitarityError(triangularNodeMatrix(1, 0, 0, 1, 0.3), 3)).toBeLessThan(1e-15);
    const left = triangularNodeMatrix(0, 1, 0, 1, 0);
    expect(prob(left, 1, 0)).toBe(1);
    expect(prob(left, 0, 2)).toBe(1);
  });
  it("square nodes are unitary; explicit matrices are checked to 1e-9", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), (p) => {
        expect(unitarityError(squareNodeMatrix(p), 2)).toBeLessThan(1e-14);
      }),
    );
    expect(
      checkExplicitNodeMatrix(
        [
          [
            [1, 0],
            [0, 0],
            [0, 0],
          ],
          [
            [0, 0],
            [1, 0],
            [0, 0],
          ],
          [
            [0, 0],
            [0, 0],
            [1 + 1e-8, 0],
          ],
        ],
        3,
      ),
    ).toMatch(/not unitary/);
    expect(
      checkExplicitNodeMatrix(
        [
          [
            [1, 0],
            [0, 0],
            [0, 0],
          ],
          [
            [0, 0],
            [1, 0],
            [0, 0],
          ],
          [
            [0, 0],
            [0, 0],
            [1 + 1e-10, 0],
          ],
        ],
        3,
      ),
    ).toBeNull();
    expect(
      checkExplicitNodeMatrix(
        [
          [
            [1, 0],
            [0, 0],
          ],
          [
            [0, 0],
            [1, 0],
          ],
        ],
        3,
      ),
    ).toMatch(/3 x 3/);
  });
});

describe("reachable forward range near forward = 1", () => {
  // Exact bound, derived by hand from the triangle inequality of the circulant amplitudes
  // (physics.md section 2): |sqrt(f r) - sqrt(f l)| <= sqrt(r l) with l = (1-f) t, r = (1-f)(1-t)
  // gives f / (1 - f) <= t (1-t) / (sqrt(1-t) - sqrt t)^2, so for t != 1/2 the range ends at
  // f_max = 1 / (1 + (sqrt(1-t) - sqrt t)^2 / (t (1-t))); forward = 1 itself is an isolated point.
  const fMax = (t: number) => 1 / (1 + (Math.sqrt(1 - t) - Math.sqrt(t)) ** 2 / (t * (1 - t)));
  it("matches the exact bound when the gap below 1 is narrower than the search grid", () => {
    for (const t of [0.4944, 0.4955, 0.4962, 0.4975, 0.499, 0.45, 0.3]) {
      const range = reachableForwardRange(t, 1 - t, 0.9);
      expect(range.max).toBeCloseTo(fMax(t), 9);
      expect(range.max).toBeLessThan(1);
      const f = range.max - 1e-9;
      expect(checkTriangularNode(f, (1 - f) * t, (1 - f) * (1 - t))).toBeNull();
    }
  });
  it("reaches 1 for left = right", () => {
    expect(reachableForwardRange(0.5, 0.5, 0.9).max).toBe(1);
  });
});
