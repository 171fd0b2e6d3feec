// Fits with the default settings (global stage, descents, chi2 profiles as a user gets them
// without touching the options) recover synthetic truths from far starts.
import { describe, expect, it } from "vitest";
import { parseComputeInput } from "@/engine";
import { engine } from "@/server/fits/engine";
import { fitCurve, type CurveModel } from "@/server/fits/fitter";
import { engineCurve, runFit } from "@/server/fits/model";
import { seededGaussian } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

describe("default settings", () => {
  it("two parameters on a rugged landscape: recovered from a far start for 6 noise seeds and start seeds", () => {
    const xs = Array.from({ length: 60 }, (_, i) => i / 59);
    const A = [1, 2, 3];
    const B = [2, 1, 2];
    const rugged2: CurveModel = (v) => xs.map((x) => A.reduce((s, a, m) => s + Math.cos(2 * Math.PI * (m + 1) * x + 2 * Math.PI * (a * v.p + B[m] * v.q)), 0));
    const specs = [
      { parameter: "p", initial: 0.45, min: 0.15, max: 0.95 },
      { parameter: "q", initial: 0.7, min: 0, max: 1 },
    ];
    for (const seed of [1, 2, 3, 4, 5, 6]) {
      const g = seededGaussian(seed);
      const data = { x: xs, y: rugged2({ p: 0.62, q: 0.3 }).map((v) => v + 0.05 * g()), sigma: xs.map(() => 0.05) };
      const r = fitCurve(rugged2, data, specs, { seed });
      for (const p of r.parameters) expect(Math.abs(p.value - (p.parameter === "p" ? 0.62 : 0.3)), `seed ${seed} ${p.parameter}`).toBeLessThan(3 * p.stderr!);
      expect(r.quality).toBe("good");
    }
  });

  it("a 10 x 10 disordered cylinder, 31 fields to 0.6 T, 1 % noise, no uncertainty column: node forward 0.62 found from 0.45", () => {
    // The case where a single local descent stayed at its start and said "succeeded" (synthetic data).
    const input = parseComputeInput({
      network: triangularNetwork(
        { columns: 10, rows: 10 },
        { forward: 0.62, left: 0.19, right: 0.19 },
        { disorder: { linkPhaseWidthRad: 2 * Math.PI, seed: 4 } },
      ),
      computation: { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 0, contactOhms: 0 },
    });
    const x = Array.from({ length: 31 }, (_, i) => (0.6 * i) / 30);
    const g = seededGaussian(9);
    const y = engineCurve(engine, input, "fieldTesla", x, {}).map((v) => v * (1 + 0.01 * g()));
    const r = runFit(engine, {
      input,
      sweepParameter: "fieldTesla",
      x,
      y,
      sigma: null,
      fit: [{ parameter: "node.forward", initial: 0.45, min: 0.15, max: 0.95 }],
    });
    const p = r.parameters[0];
    expect(Math.abs(p.value - 0.62)).toBeLessThan(3 * p.stderr!);
    expect(p.value).not.toBe(0.45);
    expect(r.converged).toBe(true);
    expect(r.quality).toBe("good");
  }, 180_000);
});
