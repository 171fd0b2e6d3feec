// Hall-bar datasets: R_xx or R_xy kept as resistances (ohms, R_xy may be negative) and fitted with
// the hallBar kind. The synthetic data are the engine's own R_xy of a disordered open-edged bar.
import { describe, expect, it } from "vitest";
import { parseComputeInput } from "@/engine";
import { engine } from "@/server/fits/engine";
import { engineCurve, modelValueOf, runFit } from "@/server/fits/model";
import { DatasetCsvError, parseDatasetCsv } from "@/shared/csv";
import { seededGaussian } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

describe("Hall-bar datasets", () => {
  it("a resistance that measures R_xy stays a resistance in ohms (negative values allowed); a conductance unit is refused", () => {
    const csv = "B (T),Rxy (kohm),dR (kohm)\n-0.2,-1.5,0.01\n-0.1,-0.7,0.01\n0,0.02,0.01\n0.1,0.8,0.01\n0.2,1.4,0.01\n";
    const d = parseDatasetCsv(csv, { xColumn: "B (T)", xUnit: "T", yColumn: "Rxy (kohm)", yUnit: "kohm", sigmaColumn: "dR (kohm)", yMeasures: "hall" });
    expect(d.y).toEqual([-1500, -700, 20, 800, 1400]);
    expect(d.sigma).toEqual([10, 10, 10, 10, 10]);
    // the same file read as a two-terminal resistance is refused at the negative rows
    expect(() => parseDatasetCsv(csv, { xColumn: "B (T)", xUnit: "T", yColumn: "Rxy (kohm)", yUnit: "kohm" })).toThrow(DatasetCsvError);
    const g = "B (T),G (S)\n0,1\n0.1,2\n0.2,3\n0.3,4\n";
    expect(() => parseDatasetCsv(g, { xColumn: "B (T)", xUnit: "T", yColumn: "G (S)", yUnit: "S", yMeasures: "longitudinal" })).toThrow(
      /a resistance: give it in ohm or kohm/,
    );
    expect(() => parseDatasetCsv(g, { xColumn: "B (T)", xUnit: "T", yColumn: "G (S)", yUnit: "S", yMeasures: "sideways" as never })).toThrow(
      /yMeasures "sideways" is not allowed/,
    );
  });

  it("the model value is the Hall bar's R_xx or R_xy (ensemble mean with an ensemble); undetermined is an error", () => {
    const r = { resistances: { longitudinalOhms: 12, hallOhms: -3, twoTerminalOhms: 40 } };
    expect(modelValueOf(r, "longitudinal")).toBe(12);
    expect(modelValueOf(r, "hall")).toBe(-3);
    expect(modelValueOf({ ...r, ensemble: { mean: { longitudinalOhms: 11, hallOhms: -2 } } }, "hall")).toBe(-2);
    expect(() => modelValueOf({ resistances: { longitudinalOhms: null, hallOhms: null } }, "hall")).toThrow(/R_xy is undetermined/);
  });

  it("node forward recovered from synthetic R_xy(B) of a disordered bar, from a far start", () => {
    const input = parseComputeInput({
      network: triangularNetwork(
        { columns: 9, rows: 6 },
        { forward: 0.55, left: 0.25, right: 0.2 },
        { transverse: "open", disorder: { linkPhaseWidthRad: 2 * Math.PI, seed: 5 } },
      ),
      computation: { kind: "hallBar", energyMeV: 1.1, fieldTesla: 0 },
    });
    const x = Array.from({ length: 21 }, (_, i) => -0.3 + (0.6 * i) / 20);
    const clean = engineCurve(engine, input, "fieldTesla", x, { "node.forward": 0.62 }, undefined, "hall");
    expect(Math.max(...clean) - Math.min(...clean)).toBeGreaterThan(100); // ohms: the curve has structure
    const s = 5; // ohm
    const g = seededGaussian(4);
    const y = clean.map((v) => v + s * g());
    const r = runFit(engine, {
      input,
      sweepParameter: "fieldTesla",
      x,
      y,
      sigma: x.map(() => s),
      fit: [{ parameter: "node.forward", initial: 0.4, min: 0.2, max: 0.9 }],
      measured: "hall",
    });
    const p = r.parameters[0];
    expect(Math.abs(p.value - 0.62)).toBeLessThan(3 * p.stderr!);
    expect(Math.abs(r.chi2PerDof - 1)).toBeLessThan(4 * Math.sqrt(2 / r.dof));
    expect(r.quality).toBe("good");
  }, 180_000);
});
