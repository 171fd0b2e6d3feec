import { describe, expect, it } from "vitest";
import { axesSchema, gridIndices, gridShape, gridSize, pointCoordinates, resolveAxis, scalarQuantities } from "@/shared/sweep-axes";
import { deriveSweepStatus } from "@/server/runs/sweep-progress";

describe("sweep axes", () => {
  it("spaces `from, to, points` evenly and ends exactly at `to`", () => {
    const a = resolveAxis({ parameter: "fieldTesla", from: 0, to: 0.3, points: 4 });
    expect(a.values).toHaveLength(4);
    expect(a.values[0]).toBe(0);
    expect(a.values[3]).toBe(0.3);
    expect(a.values[1]).toBeCloseTo(0.1, 15);
    expect(resolveAxis({ parameter: "energyMeV", from: 2, to: 5, points: 1 }).values).toEqual([2]);
    expect(resolveAxis({ parameter: "energyMeV", values: [3, 1] }).values).toEqual([3, 1]);
  });

  it("numbers a two-axis grid row-major, the first axis slowest", () => {
    const axes = [resolveAxis({ parameter: "fieldTesla", values: [0, 1, 2] }), resolveAxis({ parameter: "energyMeV", values: [10, 20] })];
    expect(gridSize(axes)).toBe(6);
    expect(gridShape(axes)).toEqual([3, 2]);
    expect(gridIndices(axes, 3)).toEqual([1, 1]);
    expect(pointCoordinates(axes, 5)).toEqual({ fieldTesla: 2, energyMeV: 20 });
    expect(pointCoordinates(axes, 0)).toEqual({ fieldTesla: 0, energyMeV: 10 });
  });

  it("refuses malformed axes with the field named", () => {
    const three = axesSchema.safeParse([
      { parameter: "a", values: [1] },
      { parameter: "b", values: [1] },
      { parameter: "c", values: [1] },
    ]);
    expect(three.success).toBe(false);
    expect(axesSchema.safeParse([]).success).toBe(false);
    expect(axesSchema.safeParse([{ parameter: "node.forward", from: 0.2, to: 0.9, points: 0 }]).success).toBe(false);
    expect(axesSchema.safeParse([{ parameter: "bad name!", values: [1] }]).success).toBe(false);
    expect(axesSchema.safeParse([{ parameter: "node.forward", from: 0.2, to: 0.9, points: 5 }]).success).toBe(true);
  });

  it("flattens a result's numeric leaves, leaving arrays out", () => {
    const q = scalarQuantities({ kind: "conductance", total: { e2h: 3.5, siemens: 1e-4 }, transmissionEigenvalues: [0.1, 0.9], fano: 0.2 });
    expect(q).toEqual({ "total.e2h": 3.5, "total.siemens": 1e-4, fano: 0.2 });
  });
});

describe("sweep status from its points", () => {
  const c = (q: number, r: number, s: number, f: number, x: number) => ({ queued: q, running: r, succeeded: s, failed: f, cancelled: x });
  it("is queued until a point starts, running while any is unfinished", () => {
    expect(deriveSweepStatus(c(5, 0, 0, 0, 0), false)).toBe("queued");
    expect(deriveSweepStatus(c(4, 1, 0, 0, 0), false)).toBe("running");
    expect(deriveSweepStatus(c(4, 0, 1, 0, 0), false)).toBe("running");
  });
  it("ends succeeded, failed or cancelled", () => {
    expect(deriveSweepStatus(c(0, 0, 5, 0, 0), false)).toBe("succeeded");
    expect(deriveSweepStatus(c(0, 0, 4, 1, 0), false)).toBe("failed");
    expect(deriveSweepStatus(c(0, 0, 2, 0, 3), true)).toBe("cancelled");
    expect(deriveSweepStatus(c(0, 1, 2, 0, 3), true)).toBe("running");
  });
});
