// Drawing geometry follows physics.md section 2: a1 = l(1,0), a2 = l(-1/2, sqrt3/2),
// a3 = l(-1/2, -sqrt3/2); valley K runs R -> R + a_j, valley K' is reversed.
import { describe, expect, it } from "vitest";
import { linkCountOf, networkGeometry } from "@/lib/lattice";
import { CONDUCTANCE_QUANTUM_S, FLUX_QUANTUM_WB, periodFromTwistNm, RESISTANCE_QUANTUM_OHM, twistFromPeriodDegrees } from "@/engine/constants";
import { elapsed, num, sigLatex, sigText } from "@/lib/units";

describe("network geometry for the drawing", () => {
  it("gives every inner triangular node three links out along a1, a2, a3 (valley K)", () => {
    const g = networkGeometry({ lattice: "triangular", columns: 6, rows: 6, transverse: "open", valley: "K" });
    expect(g.nodeCount).toBe(36);
    expect(g.linkCount).toBe(linkCountOf({ lattice: "triangular", columns: 6, rows: 6 }));
    const dirs = new Set<string>();
    for (let k = 0; k < g.linkCount; k++) {
      if (g.linkKind[k] !== 0) continue;
      const dx = g.links[4 * k + 2] - g.links[4 * k];
      const dy = g.links[4 * k + 3] - g.links[4 * k + 1];
      expect(Math.hypot(dx, dy)).toBeCloseTo(1, 5);
      dirs.add(`${dx.toFixed(2)},${dy.toFixed(2)}`);
    }
    expect([...dirs].sort()).toEqual(["-0.50,-0.87", "-0.50,0.87", "1.00,0.00"]);
  });

  it("reverses every link in valley K'", () => {
    const k = networkGeometry({ lattice: "triangular", columns: 3, rows: 3, transverse: "periodic", valley: "K" });
    const kp = networkGeometry({ lattice: "triangular", columns: 3, rows: 3, transverse: "periodic", valley: "K'" });
    expect(kp.links[0]).toBe(k.links[2]);
    expect(kp.links[2]).toBe(k.links[0]);
  });

  it("marks links into the leads on the faces perpendicular to a1", () => {
    const g = networkGeometry({ lattice: "triangular", columns: 4, rows: 2, transverse: "periodic", valley: "K" });
    let lead = 0;
    for (let k = 0; k < g.linkCount; k++) if (g.linkKind[k] === 1) lead++;
    expect(lead).toBeGreaterThan(0);
    expect(g.leads.leftX).toBeLessThan(0);
    expect(g.leads.rightX).toBeGreaterThan(g.bounds.xMax);
  });

  it("gives square nodes two links out, alternating direction by row and column", () => {
    const g = networkGeometry({ lattice: "square", columns: 4, rows: 4, transverse: "open", valley: "K" });
    expect(g.linkCount).toBe(32);
    // Row 0 runs right, row 1 runs left.
    expect(g.links[2] - g.links[0]).toBe(1);
    const row1Second = 4 * (2 * 4 + 2); // node (1, 1), its horizontal link
    expect(g.links[row1Second + 2] - g.links[row1Second]).toBe(-1);
  });

  it("builds a 200 x 200 network's arrays quickly enough to draw interactively", () => {
    const g = networkGeometry({ lattice: "triangular", columns: 200, rows: 200, transverse: "periodic", valley: "K" });
    expect(g.linkCount).toBe(120_000);
  });
});

describe("units", () => {
  it("converts twist angle and moiré period with a = 0.246 nm", () => {
    expect(periodFromTwistNm(0.1)).toBeCloseTo(140.95, 1);
    expect(twistFromPeriodDegrees(periodFromTwistNm(0.11))).toBeCloseTo(0.11, 10);
  });
  it("states the constants to ten significant figures, in text and in LaTeX", () => {
    // e^2/h = 3.8740458649e-5 S, h/e^2 = 25812.807459 ohm, h/e = 4.1356676969e-15 Wb (exact SI, rounded).
    expect(sigText(FLUX_QUANTUM_WB, 10)).toBe("4.135667697 × 10⁻¹⁵");
    expect(sigText(RESISTANCE_QUANTUM_OHM, 10)).toBe("25\u2009812.80746");
    expect(sigText(0.246, 3)).toBe("2.46 × 10⁻¹");
    expect(sigLatex(CONDUCTANCE_QUANTUM_S, 10)).toBe("3.874045865\\times10^{-5}");
    expect(sigLatex(RESISTANCE_QUANTUM_OHM, 10)).toBe("25\\,812.80746");
    expect(sigLatex(1234.5, 5)).toBe("1234.5");
  });
  it("formats numbers and elapsed time", () => {
    expect(num(3.874045865e-5)).toBe("3.874e-5");
    expect(num(128.1234)).toBe("128.1");
    expect(elapsed(65_000)).toBe("1:05");
  });
});
