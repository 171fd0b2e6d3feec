// Reachable node probabilities (physics.md section 2: the triangle condition on
// sqrt(fr), sqrt(lf), sqrt(rl); with equal turning this is forward >= 1/9).
import { describe, expect, it } from "vitest";
import { checkTriple, forwardRangeForShare, isReachable, reachableBoundary, triangleExcess } from "@/lib/ternary";

describe("node triple reachability", () => {
  it("accepts the symmetric node and the pure permutations", () => {
    expect(isReachable({ forward: 1 / 3, left: 1 / 3, right: 1 / 3 })).toBe(true);
    expect(isReachable({ forward: 1, left: 0, right: 0 })).toBe(true);
    expect(isReachable({ forward: 0, left: 1, right: 0 })).toBe(true);
  });

  it("puts the equal-turning threshold at forward = 1/9", () => {
    const at = (f: number) => ({ forward: f, left: (1 - f) / 2, right: (1 - f) / 2 });
    expect(isReachable(at(1 / 9 + 1e-6))).toBe(true);
    expect(isReachable(at(1 / 9 - 1e-4))).toBe(false);
    const range = forwardRangeForShare(0.5)!;
    expect(range[0]).toBeCloseTo(1 / 9, 6);
    expect(range[1]).toBe(1);
  });

  it("refuses (0.5, 0.5, 0), which has no unitary node", () => {
    expect(isReachable({ forward: 0.5, left: 0.5, right: 0 })).toBe(false);
    const v = checkTriple({ forward: 0.5, left: 0.5, right: 0 });
    expect(v.ok).toBe(false);
    if (!v.ok) expect(v.message).toMatch(/cannot close a triangle/);
  });

  it("explains a refused triple with the failing inequality, the allowed range and a reachable fix", () => {
    const v = checkTriple({ forward: 0.05, left: 0.475, right: 0.475 });
    expect(v.ok).toBe(false);
    if (v.ok) return;
    expect(v.reason).toBe("triangle");
    expect(v.message).toContain("√(right·left)");
    expect(v.message).toContain("between 0.111 and 1.000");
    expect(v.message).toContain("at least 1/9");
    expect(v.suggestion).not.toBeNull();
    expect(isReachable(v.suggestion!)).toBe(true);
    expect(v.suggestion!.left).toBeCloseTo(v.suggestion!.right, 12);
  });

  it("names the sum when probabilities do not add to one", () => {
    const v = checkTriple({ forward: 0.5, left: 0.3, right: 0.3 });
    expect(v.ok).toBe(false);
    if (!v.ok) {
      expect(v.reason).toBe("sum");
      expect(v.message).toContain("1.100");
    }
  });

  it("draws a boundary that lies on the edge of the region", () => {
    const b = reachableBoundary(60);
    expect(b.length).toBeGreaterThan(150);
    for (const t of b) {
      expect(t.forward + t.left + t.right).toBeCloseTo(1, 9);
      expect(Math.abs(triangleExcess(t).excess)).toBeLessThan(1e-9);
    }
    expect(b.some((t) => Math.abs(t.forward - 1 / 9) < 1e-9 && Math.abs(t.left - 4 / 9) < 1e-9)).toBe(true);
  });
});
