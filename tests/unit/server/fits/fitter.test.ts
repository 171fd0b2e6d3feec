import { describe, expect, it } from "vitest";
import { FitCancelled, FitInputError, fitCurve } from "@/server/fits/fitter";
import { seededGaussian } from "../../../support/random";

// Analytic stand-in for a magnetoconductance: background c plus an oscillation of amplitude A
// and period P (tesla). Parameters differ by orders of magnitude, as engine parameters do.
const xs = Array.from({ length: 120 }, (_, i) => -0.3 + (0.6 * i) / 119);
const model = (v: Record<string, number>) => xs.map((b) => v.c + v.A * Math.cos((2 * Math.PI * b) / v.P) + v.slopePerT * 1e3 * b * 1e-3);
const truth = { c: 2.4, A: 0.15, P: 0.061, slopePerT: 0.8 };
const specs = [
  { parameter: "c", initial: 2.0, min: 0, max: 5 },
  { parameter: "A", initial: 0.1, min: 0, max: 1 },
  { parameter: "P", initial: 0.058, min: 0.04, max: 0.09 },
  { parameter: "slopePerT", initial: 0, min: -5, max: 5 },
];

describe("fitCurve (Levenberg-Marquardt, uncertainties from the Jacobian)", () => {
  it("fits synthetic data back within the reported uncertainties, for several noise seeds", () => {
    const sigmaNoise = 0.01;
    let inside1 = 0;
    let total = 0;
    for (const seed of [1, 2, 3, 4, 5, 6]) {
      const g = seededGaussian(seed);
      const y = model(truth).map((v) => v + sigmaNoise * g());
      const r = fitCurve(model, { x: xs, y, sigma: xs.map(() => sigmaNoise) }, specs);
      expect(r.converged).toBe(true);
      // chi2/dof of a correct model with the true sigma is 1 within a few sqrt(2/dof)
      expect(Math.abs(r.chi2PerDof - 1)).toBeLessThan(4 * Math.sqrt(2 / r.dof));
      for (const p of r.parameters) {
        const t = truth[p.parameter as keyof typeof truth];
        expect(p.stderr).not.toBeNull();
        // Within 3 standard errors always; about 68 % within 1 (counted below).
        expect(Math.abs(p.value - t)).toBeLessThan(3 * p.stderr!);
        total++;
        if (Math.abs(p.value - t) < p.stderr!) inside1++;
      }
      expect(r.correlation.length).toBe(4);
      expect(r.correlation[0][0]).toBe(1);
      expect(r.residuals.length).toBe(xs.length);
    }
    expect(inside1 / total).toBeGreaterThan(0.4);
  });

  it("without a sigma column scales the covariance by the residual variance", () => {
    const g = seededGaussian(9);
    const y = model(truth).map((v) => v + 0.02 * g());
    const r = fitCurve(model, { x: xs, y }, specs);
    expect(r.weighted).toBe(false);
    // chi2/dof is then the residual variance: close to 0.02^2
    expect(Math.sqrt(r.chi2PerDof)).toBeGreaterThan(0.015);
    expect(Math.sqrt(r.chi2PerDof)).toBeLessThan(0.025);
    const P = r.parameters.find((p) => p.parameter === "P")!;
    expect(Math.abs(P.value - truth.P)).toBeLessThan(3 * P.stderr!);
  });

  it("multi-start (global stage off) escapes a local minimum that a single start falls into", () => {
    const g = seededGaussian(4);
    const y = model(truth).map((v) => v + 0.01 * g());
    const far = specs.map((s) => (s.parameter === "P" ? { ...s, initial: 0.085 } : s));
    const single = fitCurve(model, { x: xs, y }, far, { globalStarts: 0, profilePoints: 0 });
    const multi = fitCurve(model, { x: xs, y }, far, { globalStarts: 0, multiStart: 8, seed: 2, profilePoints: 0 });
    expect(multi.chi2).toBeLessThanOrEqual(single.chi2);
    expect(multi.starts.length).toBe(8);
    expect(multi.starts.every((s) => s.stage === "local")).toBe(true);
    expect(Math.abs(multi.parameters.find((p) => p.parameter === "P")!.value - truth.P)).toBeLessThan(0.001);
  });

  it("reports progress per iteration and can be cancelled", () => {
    const y = model(truth);
    const seen: number[] = [];
    fitCurve(model, { x: xs, y }, specs, { onIteration: (i) => seen.push(i.iteration) });
    expect(seen[0]).toBe(1);
    expect(seen.length).toBeGreaterThan(1);
    let calls = 0;
    expect(() => fitCurve(model, { x: xs, y }, specs, { shouldCancel: () => ++calls > 5 })).toThrow(FitCancelled);
  });

  it("rejects bad parameter specs by field", () => {
    expect(() => fitCurve(model, { x: xs, y: xs }, [{ parameter: "A", initial: 2, min: 0, max: 1 }])).toThrow(/fit\.0\.initial/);
    expect(() => fitCurve(model, { x: xs, y: xs }, [{ parameter: "A", initial: 0, min: 1, max: 0 }])).toThrow(FitInputError);
    expect(() => fitCurve(model, { x: xs.slice(0, 2), y: xs.slice(0, 2) }, specs)).toThrow(/more points than parameters/);
  });
});
