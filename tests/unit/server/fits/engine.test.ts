// The fit on the real engine (src/engine): synthetic magnetoconductance made by the engine with
// known parameters plus seeded Gaussian noise is fitted back within the reported standard errors,
// for several noise seeds. Small network and few points to stay quick.
import { describe, expect, it } from "vitest";
import { parseComputeInput } from "@/engine";
import { engine } from "@/server/fits/engine";
import { engineCurve, runFit } from "@/server/fits/model";
import { seededGaussian } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

const input = parseComputeInput({
  network: triangularNetwork({ columns: 2, rows: 2 }, { forward: 0.5, left: 0.25, right: 0.25 }),
  // Thermal smearing on (1.5 K, 4 quadrature energies).
  computation: { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 1.5, temperaturePoints: 4, contactOhms: 0 },
});

describe("fit on the engine's conductance", () => {
  it("recovers node.forward and contactOhms within the reported uncertainties (3 seeds)", () => {
    const x = Array.from({ length: 40 }, (_, i) => -1.2 + (2.4 * i) / 39);
    const truth = { "node.forward": 0.62, contactOhms: 900 };
    const clean = engineCurve(engine, input, "fieldTesla", x, truth);
    // the model really depends on the field (not a flat line)
    expect(Math.max(...clean) - Math.min(...clean)).toBeGreaterThan(0.1);
    const sigma = 0.01;
    for (const seed of [11, 12, 13]) {
      const g = seededGaussian(seed);
      const y = clean.map((v) => v + sigma * g());
      const r = runFit(engine, {
        input,
        sweepParameter: "fieldTesla",
        x,
        y,
        sigma: x.map(() => sigma),
        fit: [
          { parameter: "node.forward", initial: 0.5, min: 0.2, max: 0.9 },
          { parameter: "contactOhms", initial: 400, min: 0, max: 3000 },
        ],
      });
      expect(r.converged).toBe(true);
      for (const p of r.parameters) {
        const t = truth[p.parameter as keyof typeof truth];
        expect(p.stderr).toBeGreaterThan(0);
        expect(Math.abs(p.value - t)).toBeLessThan(3 * p.stderr!);
      }
      expect(Math.abs(r.chi2PerDof - 1)).toBeLessThan(4 * Math.sqrt(2 / r.dof));
    }
  }, 120_000);
});
