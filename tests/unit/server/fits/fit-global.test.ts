// The global stage and the honest outcome of a fit (docs/data-and-fits.md, "Method" and "Warnings
// and their thresholds"). Cheap synthetic models with rugged chi2 landscapes (sums of cosines whose
// phases depend on the parameters, standing in for interference fingerprints) and one small real
// engine model (a disordered 4 x 4 triangular network, conductance against field, twist fitted).
import { describe, expect, it } from "vitest";
import { parseComputeInput } from "@/engine";
import { engine } from "@/server/fits/engine";
import {
  DEFAULT_PROFILE_ITERATIONS,
  DEFAULT_PROFILE_POINTS,
  defaultGlobalStarts,
  FIT_CHECKS,
  fitCurve,
  latinHypercube,
  type CurveModel,
} from "@/server/fits/fitter";
import { engineCurve, expectedEvaluations, runFit } from "@/server/fits/model";
import { seededGaussian, seededUniform } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

const xs = Array.from({ length: 60 }, (_, i) => i / 59);
const sigma = 0.05;
const sigmas = xs.map(() => sigma);
const noisy = (curve: number[], seed: number, s = sigma) => {
  const g = seededGaussian(seed);
  return curve.map((v) => v + s * g());
};
const within = (value: number, truth: number, stderr: number | null, k = 3) => stderr !== null && Math.abs(value - truth) < k * stderr;

// One parameter: three harmonics whose phases turn 3, 5 and 8 times as p crosses [0, 1].
const rugged1: CurveModel = (v) => xs.map((x) => [3, 5, 8].reduce((s, c, m) => s + Math.cos(2 * Math.PI * (m + 1) * x + 2 * Math.PI * c * v.p), 0));
// Two parameters: the harmonics' phases mix p and q.
const A = [1, 2, 3];
const B = [2, 1, 2];
const rugged2: CurveModel = (v) => xs.map((x) => A.reduce((s, a, m) => s + Math.cos(2 * Math.PI * (m + 1) * x + 2 * Math.PI * (a * v.p + B[m] * v.q)), 0));

describe("global stage", () => {
  it("one parameter: the local fit from a far start stays in a wrong minimum (flagged poor); the global stage finds the truth", () => {
    const spec = [{ parameter: "p", initial: 0.45, min: 0.15, max: 0.95 }];
    for (const seed of [1, 2, 3]) {
      const data = { x: xs, y: noisy(rugged1({ p: 0.62 }), seed), sigma: sigmas };
      const local = fitCurve(rugged1, data, spec, { globalStarts: 0, profilePoints: 0 });
      expect(local.diagnostics.globalStarts).toBe(0);
      expect(Math.abs(local.parameters[0].value - 0.62)).toBeGreaterThan(0.05);
      expect(local.quality).toBe("poor");
      expect(local.flags).toContain("chi2_high");
      const global = fitCurve(rugged1, data, spec);
      expect(global.diagnostics.globalStarts).toBe(defaultGlobalStarts(1));
      expect(within(global.parameters[0].value, 0.62, global.parameters[0].stderr)).toBe(true);
      expect(global.converged).toBe(true);
      expect(global.quality).toBe("good");
      expect(global.flags).toEqual([]);
      expect(global.warnings).toEqual([]);
    }
  });

  it("two parameters: recovered from a far start with a global stage of 48 points, not without it", () => {
    // A two-dimensional rugged landscape needs more points than the default 24 (8k + 8): the
    // number is the user's to set, as here.
    const spec = [
      { parameter: "p", initial: 0.45, min: 0.15, max: 0.95 },
      { parameter: "q", initial: 0.7, min: 0, max: 1 },
    ];
    const truth = { p: 0.62, q: 0.3 };
    for (const seed of [1, 2]) {
      const data = { x: xs, y: noisy(rugged2(truth), seed), sigma: sigmas };
      const local = fitCurve(rugged2, data, spec, { globalStarts: 0, profilePoints: 0 });
      expect(local.quality).toBe("poor");
      expect(within(local.parameters[0].value, truth.p, local.parameters[0].stderr, 10)).toBe(false);
      const global = fitCurve(rugged2, data, spec, { globalStarts: 48, multiStart: 4 });
      expect(global.quality).toBe("good");
      for (const p of global.parameters) expect(within(p.value, truth[p.parameter as "p" | "q"], p.stderr)).toBe(true);
      expect(Math.abs(global.chi2PerDof - 1)).toBeLessThan(4 * Math.sqrt(2 / global.dof));
    }
  });

  it("lists every start (the initial values first, a Latin hypercube after) and where each descent ended; deterministic per seed", () => {
    const spec = [
      { parameter: "p", initial: 0.45, min: 0.15, max: 0.95 },
      { parameter: "q", initial: 0.7, min: 0, max: 1 },
    ];
    const data = { x: xs, y: noisy(rugged2({ p: 0.62, q: 0.3 }), 4), sigma: sigmas };
    const r = fitCurve(rugged2, data, spec, { globalStarts: 20, multiStart: 4, seed: 9 });
    const global = r.starts.filter((s) => s.stage === "global");
    const local = r.starts.filter((s) => s.stage === "local");
    expect(global.length).toBe(20);
    expect(local.length).toBe(4);
    expect(r.starts.map((s) => s.start)).toEqual(Array.from({ length: 24 }, (_, i) => i + 1));
    expect(global[0].initial).toEqual({ p: 0.45, q: 0.7 });
    for (const g of global) {
      expect(g.final).toEqual(g.initial);
      expect(g.iterations).toBe(0);
      // the chi2 listed is the model's at that point
      const c = rugged2(g.initial).reduce((s, y, i) => s + ((data.y[i] - y) / sigma) ** 2, 0);
      expect(g.chi2).toBeCloseTo(c, 6);
    }
    // Latin hypercube: the 19 points after the initial values take one stratum each in every coordinate.
    for (const [name, s] of [
      ["p", spec[0]],
      ["q", spec[1]],
    ] as const) {
      const strata = global.slice(1).map((g) => Math.floor(((g.initial[name] - s.min) / (s.max - s.min)) * 19));
      expect(new Set(strata).size).toBe(19);
    }
    // the descents start from the four best global points, and never end above where they began
    const best4 = global
      .map((g) => g.chi2)
      .sort((a, b) => a - b)
      .slice(0, 4);
    for (const l of local) {
      const from = global.find((g) => g.initial.p === l.initial.p && g.initial.q === l.initial.q)!;
      expect(best4).toContain(from.chi2);
      expect(l.chi2).toBeLessThanOrEqual(from.chi2);
      expect(l.final.p).not.toBe(l.initial.p);
    }
    expect(r.chi2).toBe(Math.min(...local.map((l) => l.chi2)));
    expect(r.evaluations).toBeGreaterThanOrEqual(20);
    const again = fitCurve(rugged2, data, spec, { globalStarts: 20, multiStart: 4, seed: 9 });
    expect(again.starts).toEqual(r.starts);
    expect(again.parameters).toEqual(r.parameters);
    const other = fitCurve(rugged2, data, spec, { globalStarts: 20, multiStart: 4, seed: 10 });
    expect(other.starts[1].initial).not.toEqual(r.starts[1].initial);
  });

  it("latinHypercube puts one point in each stratum of every coordinate", () => {
    const pts = latinHypercube(37, 3, seededUniform(5));
    for (let j = 0; j < 3; j++) expect(new Set(pts.map((p) => Math.floor(p[j] * 37))).size).toBe(37);
  });

  it("globalStarts 0 or 1 turns the global stage off; multiStart counts the local descents; the estimate includes the global points", () => {
    const spec = [{ parameter: "p", initial: 0.45, min: 0.15, max: 0.95 }];
    const data = { x: xs, y: noisy(rugged1({ p: 0.62 }), 5), sigma: sigmas };
    for (const g of [0, 1]) {
      const r = fitCurve(rugged1, data, spec, { globalStarts: g, multiStart: 2 });
      expect(r.starts.map((s) => s.stage)).toEqual(["local", "local"]);
      expect(r.starts[0].initial).toEqual({ p: 0.45 });
    }
    const on = fitCurve(rugged1, data, spec, { globalStarts: 12, multiStart: 5 });
    expect(on.starts.filter((s) => s.stage === "local").length).toBe(5);
    expect(on.diagnostics).toMatchObject({ globalStarts: 12, localStarts: 5 });
    // evaluations: global points + descents of at most 8 iterations of (k + 1) curves + the final Jacobian (2k + 1)
    expect(expectedEvaluations(1, { globalStarts: 12, multiStart: 5, profilePoints: 0 })).toBe(12 + 5 * 8 * 2 + 3);
    expect(expectedEvaluations(1, { globalStarts: 0, multiStart: 5, profilePoints: 0 })).toBe(5 * (1 + 8 * 2) + 3);
    expect(expectedEvaluations(2, { profilePoints: 0 })).toBe(defaultGlobalStarts(2) + 3 * 8 * 3 + 5);
    // ... and the chi2 profiles: one curve per point with one parameter; with k, per point a start and k curves per refit iteration
    expect(expectedEvaluations(1, { globalStarts: 12, multiStart: 5 })).toBe(12 + 5 * 8 * 2 + 3 + DEFAULT_PROFILE_POINTS);
    expect(expectedEvaluations(2)).toBe(defaultGlobalStarts(2) + 3 * 8 * 3 + 5 + 2 * DEFAULT_PROFILE_POINTS * (1 + DEFAULT_PROFILE_ITERATIONS * 2));
    expect(defaultGlobalStarts(1)).toBe(16);
    expect(defaultGlobalStarts(7)).toBe(64);
  });
});

describe("honest outcome", () => {
  it("converged means converged: a descent that cannot leave its start is not converged and is flagged not_moved", () => {
    // A plateau: the model changes only in steps of 0.05 in p, so LM sees no slope at the start
    // and every step is rejected. (The former rule called this converged after 2 iterations.)
    const plateau: CurveModel = (v) => xs.map((x) => Math.cos(2 * Math.PI * x * (1 + Math.floor(v.p * 20) / 20)));
    const data = { x: xs, y: noisy(plateau({ p: 0.8 }), 6, 0.02), sigma: xs.map(() => 0.02) };
    const r = fitCurve(plateau, data, [{ parameter: "p", initial: 0.42, min: 0.3, max: 1 }], { globalStarts: 0, profilePoints: 0 });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBeGreaterThan(2);
    expect(r.parameters[0].value).toBe(0.42);
    expect(r.flags).toEqual(expect.arrayContaining(["not_moved", "not_converged"]));
    expect(r.quality).toBe("poor");
    expect(r.warnings.some((w) => /did not move/.test(w))).toBe(true);
    expect(r.starts[0].converged).toBe(false);
  });

  it("a model that cannot describe the data is flagged: chi2 high with sigma, structured residuals without", () => {
    const truthModel: CurveModel = (v) => xs.map((x) => v.a * Math.cos(2 * Math.PI * x) + 0.4 * Math.sin(6 * Math.PI * x));
    const missing: CurveModel = (v) => xs.map((x) => v.a * Math.cos(2 * Math.PI * x));
    const spec = [{ parameter: "a", initial: 0.5, min: 0, max: 2 }];
    const y = noisy(truthModel({ a: 1 }), 7);
    const withSigma = fitCurve(missing, { x: xs, y, sigma: sigmas }, spec);
    expect(withSigma.chi2PerDof).toBeGreaterThan(FIT_CHECKS.chi2PerDofHigh);
    expect(withSigma.flags).toEqual(["chi2_high"]);
    expect(withSigma.quality).toBe("poor");
    expect(withSigma.warnings[0]).toMatch(/chi2\/dof is .*above 3/);
    const noSigma = fitCurve(missing, { x: xs, y }, spec);
    expect(noSigma.diagnostics.residualStructure!).toBeGreaterThan(FIT_CHECKS.residualStructureHigh);
    expect(noSigma.flags).toEqual(["chi2_high"]);
    // the right model, without sigma, is not flagged: its residuals are noise (ratio about 1)
    const right = fitCurve(truthModel, { x: xs, y }, spec);
    expect(right.flags).toEqual([]);
    expect(right.diagnostics.residualStructure!).toBeGreaterThan(0.5);
    expect(right.diagnostics.residualStructure!).toBeLessThan(1.6);
    // an uncertainty column ten times the scatter: chi2 low
    const tooWide = fitCurve(truthModel, { x: xs, y, sigma: xs.map(() => 10 * sigma) }, spec);
    expect(tooWide.flags).toEqual(["chi2_low"]);
  });

  it("a parameter the data cannot determine is flagged: ignored, negligible, or only in a combination with another", () => {
    const y = noisy(
      xs.map((x) => Math.cos(2 * Math.PI * x)),
      8,
    );
    const data = { x: xs, y, sigma: sigmas };
    const a = { parameter: "a", initial: 0.5, min: 0, max: 2 };
    const b = { parameter: "b", initial: 0.3, min: 0, max: 1 };
    const ignored = fitCurve((v) => xs.map((x) => v.a * Math.cos(2 * Math.PI * x)), data, [a, b]);
    expect(ignored.flags).toEqual(["undetermined"]);
    expect(ignored.parameters[1].stderr).toBeNull();
    expect(within(ignored.parameters[0].value, 1, ignored.parameters[0].stderr)).toBe(true);
    // a contact-resistance-like parameter: a real but negligible effect (1e-6 of the signal per unit)
    const negligible = fitCurve((v) => xs.map((x) => v.a * Math.cos(2 * Math.PI * x) + 1e-6 * v.b), data, [a, b]);
    // (b drifts freely, so it may also end on a bound)
    expect(negligible.flags).toContain("undetermined");
    expect(negligible.flags).not.toContain("chi2_high");
    expect(negligible.parameters[1].stderr!).toBeGreaterThan(b.max - b.min);
    expect(negligible.warnings.some((w) => /^b is hardly determined/.test(w))).toBe(true);
    // only a + b matters: both named, the condition number infinite or above the threshold
    const sum = fitCurve((v) => xs.map((x) => (v.a + v.b) * Math.cos(2 * Math.PI * x)), data, [a, b]);
    expect(sum.flags).toContain("undetermined");
    expect(sum.parameters.map((p) => p.stderr)).toEqual([null, null]);
    expect(sum.diagnostics.conditionNumber === null || sum.diagnostics.conditionNumber > FIT_CHECKS.conditionNumberMax).toBe(true);
    // the same data with one parameter: determined, good
    const one = fitCurve((v) => xs.map((x) => v.a * Math.cos(2 * Math.PI * x)), data, [a]);
    expect(one.quality).toBe("good");
    expect(one.diagnostics.conditionNumber).toBe(1);
  });

  it("starts that end in different minima of similar chi2 are flagged competing_minima", () => {
    // cos is even: p and -p give the same curve, so the data cannot choose the sign.
    const symmetric: CurveModel = (v) => xs.map((x) => Math.cos(2 * Math.PI * 1.5 * v.p * x) + 0.5 * Math.cos(2 * Math.PI * 3 * v.p * x));
    const data = { x: xs, y: noisy(symmetric({ p: 0.6 }), 10), sigma: sigmas };
    const r = fitCurve(symmetric, data, [{ parameter: "p", initial: 0.3, min: -1, max: 1 }]);
    expect(r.flags).toEqual(["competing_minima"]);
    expect(r.quality).toBe("poor");
    expect(Math.abs(Math.abs(r.parameters[0].value) - 0.6)).toBeLessThan(3 * r.parameters[0].stderr!);
    const ends = r.starts.filter((s) => s.stage === "local").map((s) => s.final.p);
    expect(ends.some((p) => p > 0.5) && ends.some((p) => p < -0.5)).toBe(true);
    expect(r.warnings[0]).toMatch(/different minimum of similar chi2/);
    // bounds that leave one sign: no competition
    const positive = fitCurve(symmetric, data, [{ parameter: "p", initial: 0.3, min: 0.05, max: 1 }]);
    expect(positive.flags).toEqual([]);
  });

  it("a parameter on a bound is flagged on_bound", () => {
    const data = {
      x: xs,
      y: noisy(
        xs.map((x) => 1.5 * Math.cos(2 * Math.PI * x)),
        10,
      ),
      sigma: sigmas,
    };
    const r = fitCurve((v) => xs.map((x) => v.a * Math.cos(2 * Math.PI * x)), data, [{ parameter: "a", initial: 0.5, min: 0, max: 1 }]);
    expect(r.parameters[0].atBound).toBe(true);
    expect(r.flags).toContain("on_bound");
  });

  it("stderr of a straight line equals the textbook covariance of linear least squares", () => {
    // Weighted straight line y = a + b x: with S = sum 1/s_i^2, Sx = sum x_i/s_i^2, Sxx = sum x_i^2/s_i^2,
    // D = S Sxx - Sx^2: var(a) = Sxx / D, var(b) = S / D, cov(a, b) = -Sx / D (Press et al.,
    // Numerical Recipes, 3rd ed., section 15.2 "Fitting Data to a Straight Line"). The fitter scales
    // its covariance by chi2/dof, so the comparison does too.
    const x = Array.from({ length: 25 }, (_, i) => -1 + i / 12);
    const s = x.map((_, i) => 0.05 + 0.02 * (i % 4));
    const g = seededGaussian(11);
    const y = x.map((xi, i) => 0.7 - 1.3 * xi + s[i] * g());
    const r = fitCurve((v) => x.map((xi) => v.a + v.b * xi), { x, y, sigma: s }, [
      { parameter: "a", initial: 0, min: -5, max: 5 },
      { parameter: "b", initial: 0, min: -5, max: 5 },
    ]);
    const w = s.map((si) => 1 / si ** 2);
    const S = w.reduce((t, v) => t + v, 0);
    const Sx = w.reduce((t, v, i) => t + v * x[i], 0);
    const Sxx = w.reduce((t, v, i) => t + v * x[i] ** 2, 0);
    const Sy = w.reduce((t, v, i) => t + v * y[i], 0);
    const Sxy = w.reduce((t, v, i) => t + v * x[i] * y[i], 0);
    const D = S * Sxx - Sx * Sx;
    const aHat = (Sxx * Sy - Sx * Sxy) / D;
    const bHat = (S * Sxy - Sx * Sy) / D;
    const chi2 = x.reduce((t, xi, i) => t + ((y[i] - aHat - bHat * xi) / s[i]) ** 2, 0);
    const scale = chi2 / (x.length - 2);
    const [pa, pb] = r.parameters;
    expect(pa.value).toBeCloseTo(aHat, 6);
    expect(pb.value).toBeCloseTo(bHat, 6);
    expect(r.chi2).toBeCloseTo(chi2, 6);
    expect(pa.stderr! / Math.sqrt((Sxx / D) * scale)).toBeCloseTo(1, 5);
    expect(pb.stderr! / Math.sqrt((S / D) * scale)).toBeCloseTo(1, 5);
    expect(r.covariance[0][1] / ((-Sx / D) * scale)).toBeCloseTo(1, 5);
  });
});

describe("global stage on the real engine", () => {
  // A disordered 4 x 4 triangular cylinder: its conductance against field is an interference
  // fingerprint, and chi2 against the twist has many local minima (synthetic data).
  const input = parseComputeInput({
    network: triangularNetwork({ columns: 4, rows: 4 }, { forward: 0.5, left: 0.25, right: 0.25 }, { disorder: { linkPhaseWidthRad: 2 * Math.PI, seed: 3 } }),
    computation: { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 0, contactOhms: 0 },
  });
  const x = Array.from({ length: 21 }, (_, i) => (0.3 * i) / 20);

  it("recovers the twist from a far start only with the global stage; the stuck local fit is flagged poor", () => {
    const clean = engineCurve(engine, input, "fieldTesla", x, { twistDegrees: 0.11 });
    const s = 0.01;
    const y = noisy(clean, 12, s);
    const job = { input, sweepParameter: "fieldTesla", x, y, sigma: x.map(() => s), fit: [{ parameter: "twistDegrees", initial: 0.13, min: 0.08, max: 0.14 }] };
    const local = runFit(engine, { ...job, options: { globalStarts: 0, profilePoints: 0 } });
    expect(Math.abs(local.parameters[0].value - 0.11)).toBeGreaterThan(0.005);
    expect(local.quality).toBe("poor");
    expect(local.flags).toContain("chi2_high");
    const global = runFit(engine, job);
    expect(within(global.parameters[0].value, 0.11, global.parameters[0].stderr)).toBe(true);
    expect(global.quality).toBe("good");
    expect(global.converged).toBe(true);
    expect(global.starts.filter((t) => t.stage === "global").length).toBe(defaultGlobalStarts(1));
  }, 120_000);
});
