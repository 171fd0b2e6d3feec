// chi2 profiles (docs/data-and-fits.md, "chi2 profiles") and the parameters added to the fit
// (node phase, forward spread). The exact check: for a model linear in its parameters the profile
// of one parameter, the others refitted, is the parabola chi2_min + (a - a_hat)^2 / C_aa with C the
// unscaled covariance (J^T W J)^-1, so it crosses chi2_min + chi2/dof at a_hat -+ stderr (the
// textbook property of linear least squares, e.g. Press et al., Numerical Recipes, section 15.6;
// cited from memory).
import { describe, expect, it } from "vitest";
import { parseComputeInput } from "@/engine";
import { engine } from "@/server/fits/engine";
import { DEFAULT_PROFILE_POINTS, fitCurve, profileInterval, type CurveModel } from "@/server/fits/fitter";
import { engineCurve, expectedEvaluations, runFit } from "@/server/fits/model";
import { seededGaussian } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

const xs = Array.from({ length: 60 }, (_, i) => i / 59);
const noisy = (curve: number[], seed: number, s: number) => {
  const g = seededGaussian(seed);
  return curve.map((v) => v + s * g());
};
const within = (value: number, truth: number, stderr: number | null, k = 3) => stderr !== null && Math.abs(value - truth) < k * stderr;

describe("chi2 profiles", () => {
  it("linear model: the profile with the other parameter refitted is the exact parabola and crosses the level at value -+ stderr", () => {
    const line: CurveModel = (v) => xs.map((x) => v.a + v.b * x);
    const s = 0.05;
    const y = noisy(line({ a: 0.3, b: 1.2 }), 21, s);
    const sig = xs.map(() => s);
    // Closed form (weighted straight line): D = S Sxx - Sx^2, a_hat, b_hat, C_aa = Sxx / D (unscaled).
    const w = 1 / (s * s);
    const S = xs.length * w,
      Sx = xs.reduce((t, x) => t + x * w, 0),
      Sxx = xs.reduce((t, x) => t + x * x * w, 0),
      Sy = y.reduce((t, v) => t + v * w, 0),
      Sxy = xs.reduce((t, x, i) => t + x * y[i] * w, 0);
    const D = S * Sxx - Sx * Sx;
    const aHat = (Sxx * Sy - Sx * Sxy) / D;
    const Caa = Sxx / D;
    const width = 4 * Math.sqrt(Caa);
    const specs = [
      { parameter: "a", initial: aHat - 0.5 * width, min: aHat - width, max: aHat + width },
      { parameter: "b", initial: 1, min: 0, max: 3 },
    ];
    const r = fitCurve(line, { x: xs, y, sigma: sig }, specs, { profilePoints: 33, profileIterations: 4 });
    expect(r.quality).toBe("good");
    const pa = r.profiles!.find((p) => p.parameter === "a")!;
    expect(pa.refitted).toBe(true);
    expect(pa.points.length).toBe(34); // 33 across the bounds and the best value
    expect(pa.deltaChi2).toBeCloseTo(r.chi2PerDof, 12);
    for (const pt of pa.points) {
      expect(pt.chi2 - (r.chi2 + (pt.value - aHat) ** 2 / Caa)).toBeLessThan(1e-6 * r.chi2 + 1e-6);
      expect(pt.chi2 - (r.chi2 + (pt.value - aHat) ** 2 / Caa)).toBeGreaterThan(-1e-6 * r.chi2 - 1e-6);
      // the other parameter was refitted: b follows the conditional optimum (Sxy - a Sx) / Sxx
      expect(pt.others.b).toBeCloseTo((Sxy - pt.value * Sx) / Sxx, 5);
    }
    const se = r.parameters[0].stderr!;
    expect((pa.interval.high! - r.parameters[0].value) / se).toBeCloseTo(1, 1);
    expect((r.parameters[0].value - pa.interval.low!) / se).toBeCloseTo(1, 1);
    // points in ascending value, spanning the bounds
    const values = pa.points.map((p) => p.value);
    expect(values).toEqual([...values].sort((p, q) => p - q));
    expect(values[0]).toBeCloseTo(specs[0].min, 12);
    expect(values[values.length - 1]).toBeCloseTo(specs[0].max, 12);
  });

  it("profileInterval interpolates the crossings and says null where the profile stays under the level up to a bound", () => {
    const pts = [
      { value: 0, chi2: 10 },
      { value: 1, chi2: 2 },
      { value: 2, chi2: 0 },
      { value: 3, chi2: 0.5 },
    ];
    expect(profileInterval(pts, 2, 1)).toEqual({ low: 1.5, high: null });
  });

  it("a profile point below the best: the fit descends from it and reports the lower minimum (profileImproved)", () => {
    // One parameter, three harmonics: a local descent from 0.45 stays in a wrong minimum (see fit-global.test.ts).
    const rugged: CurveModel = (v) => xs.map((x) => [3, 5, 8].reduce((t, c, m) => t + Math.cos(2 * Math.PI * (m + 1) * x + 2 * Math.PI * c * v.p), 0));
    const data = { x: xs, y: noisy(rugged({ p: 0.62 }), 2, 0.05), sigma: xs.map(() => 0.05) };
    const spec = [{ parameter: "p", initial: 0.45, min: 0.15, max: 0.95 }];
    const stuck = fitCurve(rugged, data, spec, { globalStarts: 0, profilePoints: 0 });
    expect(within(stuck.parameters[0].value, 0.62, stuck.parameters[0].stderr, 10)).toBe(false);
    const r = fitCurve(rugged, data, spec, { globalStarts: 0, profilePoints: 41 });
    expect(r.diagnostics.profileImproved).toBe(true);
    expect(r.starts.map((s) => s.stage)).toEqual(["local", "profile"]);
    expect(within(r.parameters[0].value, 0.62, r.parameters[0].stderr)).toBe(true);
    expect(r.chi2).toBeLessThan(stuck.chi2);
    // the profiles were taken again around the new best: no point lies below it
    for (const pt of r.profiles![0].points) expect(pt.chi2).toBeGreaterThanOrEqual(r.chi2);
    // one parameter: chi2 evaluated at every point, nothing refitted; each value is the model's chi2 there
    expect(r.profiles![0].refitted).toBe(false);
    for (const pt of r.profiles![0].points) {
      const c = rugged({ p: pt.value }).reduce((t, yv, i) => t + ((data.y[i] - yv) / 0.05) ** 2, 0);
      expect(pt.chi2).toBeCloseTo(c, 6);
    }
  });

  it("profilePoints 0 turns the profiles off; the default is on, and the estimate counts its curves", () => {
    const line: CurveModel = (v) => xs.map((x) => v.a * x);
    const data = { x: xs, y: noisy(line({ a: 2 }), 3, 0.1), sigma: xs.map(() => 0.1) };
    const spec = [{ parameter: "a", initial: 1, min: 0, max: 4 }];
    const off = fitCurve(line, data, spec, { profilePoints: 0 });
    expect(off.profiles).toEqual([]);
    expect(off.diagnostics.profilePoints).toBe(0);
    const on = fitCurve(line, data, spec);
    expect(on.profiles!.length).toBe(1);
    expect(on.diagnostics.profilePoints).toBe(DEFAULT_PROFILE_POINTS);
    // one model curve per profile point (one the fit already computed, here a bound, comes from the cache)
    expect(on.evaluations - off.evaluations).toBeLessThanOrEqual(DEFAULT_PROFILE_POINTS);
    expect(on.evaluations - off.evaluations).toBeGreaterThanOrEqual(DEFAULT_PROFILE_POINTS - 1);
    expect(expectedEvaluations(1) - expectedEvaluations(1, { profilePoints: 0 })).toBe(DEFAULT_PROFILE_POINTS);
  });
});

describe("node phase and forward spread on the real engine (synthetic data)", () => {
  const input = parseComputeInput({
    network: triangularNetwork({ columns: 4, rows: 4 }, { forward: 0.55, left: 0.25, right: 0.2 }, { disorder: { linkPhaseWidthRad: 2 * Math.PI, seed: 3 } }),
    computation: { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 0, contactOhms: 0 },
  });
  const x = Array.from({ length: 21 }, (_, i) => (0.3 * i) / 20);
  const s = 0.01;

  it("forward spread: recovered from a far start within its standard error", () => {
    const y = noisy(engineCurve(engine, input, "fieldTesla", x, { "disorder.forwardSpread": 0.12 }), 5, s);
    const r = runFit(engine, {
      input,
      sweepParameter: "fieldTesla",
      x,
      y,
      sigma: x.map(() => s),
      fit: [{ parameter: "disorder.forwardSpread", initial: 0.02, min: 0, max: 0.2 }],
    });
    expect(within(r.parameters[0].value, 0.12, r.parameters[0].stderr)).toBe(true);
    expect(r.quality).toBe("good");
  }, 120_000);

  it("node phase: the data fit as well at two phases; the fit says so (competing minima) and the truth is one of the ends", () => {
    const y = noisy(engineCurve(engine, input, "fieldTesla", x, { "node.phaseRad": 1 }), 5, s);
    const r = runFit(engine, {
      input,
      sweepParameter: "fieldTesla",
      x,
      y,
      sigma: x.map(() => s),
      fit: [{ parameter: "node.phaseRad", initial: -2, min: -Math.PI, max: Math.PI }],
    });
    expect(Math.abs(r.chi2PerDof - 1)).toBeLessThan(4 * Math.sqrt(2 / r.dof));
    const ends = r.starts.filter((t) => t.stage !== "global").map((t) => t.final["node.phaseRad"]);
    const se = r.parameters[0].stderr!;
    if (!within(r.parameters[0].value, 1, se)) {
      expect(r.flags).toContain("competing_minima");
      expect(ends.some((v) => Math.abs(v - 1) < 3 * se)).toBe(true);
    }
  }, 120_000);
});
