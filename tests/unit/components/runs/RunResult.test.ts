// The run page reads results through the engine's result types. The ensemble histogram's x values
// are the bins' middles computed from the engine's binEdges (an earlier version read fields the
// engine never wrote and drew the distribution with no points). Network synthetic.
import { describe, expect, it } from "vitest";
import { binCenters } from "../../../../src/components/runs/RunResult";
import { compute, parseComputeInput } from "../../../../src/engine";

describe("RunResult and the engine's ensemble histogram", () => {
  it("gives one x per count, each the middle of its bin, for a real engine ensemble", () => {
    const input = parseComputeInput({
      network: {
        lattice: "triangular",
        size: { columns: 6, rows: 6 },
        transverse: "periodic",
        twistDegrees: 0.11,
        modeVelocityMps: 1e6,
        channelsPerLink: 1,
        node: { forward: 0.6, left: 0.2, right: 0.2 },
        disorder: { linkPhaseWidthRad: 3, seed: 11 },
      },
      computation: { kind: "conductance", energyMeV: 0.5, ensemble: { samples: 12 } },
    });
    const r = compute(input);
    if (r.kind !== "conductance" || !r.ensemble) throw new Error("expected a conductance ensemble");
    const h = r.ensemble.histogram;
    expect(h.binEdges.length).toBe(h.counts.length + 1);
    const x = binCenters(h);
    expect(x.length).toBe(h.counts.length);
    x.forEach((c, i) => {
      expect(c).toBeGreaterThan(h.binEdges[i]);
      expect(c).toBeLessThan(h.binEdges[i + 1]);
    });
    expect(h.counts.reduce((a, b) => a + b, 0)).toBe(12);
  });
});
