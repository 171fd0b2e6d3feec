// The global stage computed elsewhere (worker/fits.ts splits its curves over the fits' threads) gives
// the same fit as the fit computing them itself: same starts, values, chi2, evaluations, profiles.
import { describe, expect, it } from "vitest";
import { fitCurve, globalStageShare, globalStartPoints, type CurveModel } from "@/server/fits/fitter";
import runFitTask, { type CurvesOutcome, type FitTaskOutcome } from "@/server/fits/fit-thread";
import { engineCurve } from "@/server/fits/model";
import { engine, parseComputeInput } from "@/server/fits/engine";
import { seededGaussian } from "../../../support/random";
import { triangularNetwork } from "@/shared/networks";

const xs = Array.from({ length: 40 }, (_, i) => i / 39);
const A = [1, 2, 3];
const B = [2, 1, 2];
const rugged2: CurveModel = (v) => xs.map((x) => A.reduce((s, a, m) => s + Math.cos(2 * Math.PI * (m + 1) * x + 2 * Math.PI * (a * v.p + B[m] * v.q)), 0));

describe("global stage computed in parallel", () => {
  it("the fit given the global curves equals the fit computing them, for several seeds and sizes", () => {
    const specs = [
      { parameter: "p", initial: 0.45, min: 0.15, max: 0.95 },
      { parameter: "q", initial: 0.7, min: 0, max: 1 },
    ];
    const g = seededGaussian(3);
    const data = { x: xs, y: rugged2({ p: 0.62, q: 0.3 }).map((v) => v + 0.05 * g()), sigma: xs.map(() => 0.05) };
    for (const options of [{}, { globalStarts: 48, multiStart: 4, seed: 5 }, { globalStarts: 80, seed: 2 }]) {
      const serial = fitCurve(rugged2, data, specs, options);
      const points = globalStartPoints(specs, options);
      expect(points).toEqual(serial.starts.filter((s) => s.stage === "global").map((s) => s.initial));
      // curves computed "elsewhere", in two interleaved shares as worker/fits.ts splits them
      const shares = [0, 1].map((i) => points.filter((_, j) => j % 2 === i).map(rugged2));
      const curves = points.map((_, j) => shares[j % 2][Math.floor(j / 2)]);
      let calls = 0;
      const counted: CurveModel = (v) => (calls++, rugged2(v));
      const parallel = fitCurve(counted, data, specs, { ...options, globalCurves: curves });
      expect(parallel).toEqual(serial);
      // the fit computed only what the global stage did not
      expect(calls).toBe(serial.evaluations - points.length);
    }
  });

  it("the global stage's share of the progress matches the fit's own accounting", () => {
    // 1 parameter, default: 16 global points, 3 descents x 40 iterations x 2 curves, 9 profile points
    expect(globalStageShare(1)).toBeCloseTo(16 / (16 + 3 * 40 * 2 + 9), 12);
    expect(globalStageShare(1, { globalStarts: 0 })).toBe(0);
    expect(() =>
      fitCurve(rugged2, { x: xs, y: rugged2({ p: 0.5, q: 0.5 }) }, [{ parameter: "p", initial: 0.5, min: 0, max: 1 }], { globalCurves: [[]] }),
    ).toThrow(/globalCurves holds 1 curves for 16 global points/);
  });

  it("the thread's curves task computes the engine's model curves; the fit task given them gives the serial fit", () => {
    const network = triangularNetwork({ columns: 2, rows: 2 }, { forward: 0.5, left: 0.25, right: 0.25 });
    const computation = { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 0, contactOhms: 0 };
    const x = Array.from({ length: 12 }, (_, i) => -1 + (2 * i) / 11);
    const input = parseComputeInput({ network, computation });
    const fit = [{ parameter: "node.forward", initial: 0.4, min: 0.2, max: 0.9 }];
    const y = engineCurve(engine, input, "fieldTesla", x, { "node.forward": 0.63 });
    const options = { globalStarts: 6, multiStart: 2, profilePoints: 5 };
    const job = { network, computation, sweepParameter: "fieldTesla", fit, options };
    const values = globalStartPoints(fit, options);
    const control = new SharedArrayBuffer(24);
    const counter = new SharedArrayBuffer(4);
    const curves = runFitTask({ kind: "curves", input: job, x, values, control, counter }) as CurvesOutcome;
    expect(curves.outcome).toBe("curves");
    if (curves.outcome !== "curves") return;
    expect(new Int32Array(counter)[0]).toBe(6);
    values.forEach((v, i) => expect(curves.curves[i]).toEqual(engineCurve(engine, input, "fieldTesla", x, v)));
    const points = { x, y, sigma: null };
    const serial = runFitTask({ input: job, points, control }) as FitTaskOutcome;
    const given = runFitTask({ input: job, points, control, globalCurves: curves.curves }) as FitTaskOutcome;
    expect(serial.outcome).toBe("succeeded");
    expect(given.outcome).toBe("succeeded");
    if (serial.outcome === "succeeded" && given.outcome === "succeeded") expect(given.result).toEqual(serial.result);
    // a cancelled curves task says so
    Atomics.store(new Int32Array(control, 0, 1), 0, 1);
    expect((runFitTask({ kind: "curves", input: job, x, values, control, counter }) as CurvesOutcome).outcome).toBe("cancelled");
  });
});
