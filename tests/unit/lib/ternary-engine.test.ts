// The ternary diagram and the server agree on which node triples are reachable: the UI's check
// (src/lib/ternary.ts) against the engine's (src/engine/network/node-matrices.ts), on random
// triples and on the boundary of the region.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { checkTriangularNode } from "@/engine/network/node-matrices";
import { checkTriple, isReachable, reachableBoundary } from "@/lib/ternary";

describe("UI and engine agree on reachable node triples", () => {
  it("on random triples away from the boundary", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), (a, b) => {
        const forward = a;
        const left = (1 - a) * b;
        const right = 1 - forward - left;
        const t = { forward, left, right };
        const sides = [Math.sqrt(forward * right), Math.sqrt(left * forward), Math.sqrt(right * left)];
        const margin = Math.min(...sides.map((s) => sides.reduce((x, y) => x + y, 0) - 2 * s));
        fc.pre(Math.abs(margin) > 1e-6);
        expect(isReachable(t)).toBe(checkTriangularNode(forward, left, right) === null);
      }),
      { numRuns: 2000 },
    );
  });

  it("accepts the points of the drawn boundary nudged inwards", () => {
    const centre = { forward: 1 / 3, left: 1 / 3, right: 1 / 3 };
    for (const b of reachableBoundary(40)) {
      const t = { forward: b.forward * 0.999 + centre.forward * 0.001, left: b.left * 0.999 + centre.left * 0.001, right: 0 };
      t.right = 1 - t.forward - t.left;
      expect(checkTriangularNode(t.forward, t.left, t.right)).toBeNull();
    }
  });

  it("suggests triples the engine accepts", () => {
    for (const [f, l, r] of [
      [0.05, 0.475, 0.475],
      [0.02, 0.7, 0.28],
      [0.9, 0.09, 0.01],
    ]) {
      const v = checkTriple({ forward: f, left: l, right: r });
      expect(checkTriangularNode(f, l, r)).not.toBeNull();
      expect(v.ok).toBe(false);
      if (!v.ok && v.suggestion) expect(checkTriangularNode(v.suggestion.forward, v.suggestion.left, v.suggestion.right)).toBeNull();
    }
  });
});
