import { describe, expect, it } from "vitest";
import { checkFitSpecs, conductanceOf, engineCurve, expectedEvaluations, runFit, type EngineLike } from "@/server/fits/model";
import { seededGaussian } from "../../../support/random";

// A stand-in with the engine's contract (applyParameter on dotted paths, compute -> conductance.total
// in e2/h): an Aharonov-Bohm-like oscillation whose amplitude grows with the turning probability,
// in series with the contact resistance (G = 1 / (1/G0 + R_c e^2/h), h/e^2 = 25812.80745 ohm).
type In = { network: { node: { forward: number; left: number; right: number } }; computation: { fieldTesla: number; contactOhms: number } };
const standIn: EngineLike = {
  applyParameter: ((input: In, parameter: string, value: number) => {
    const c = structuredClone(input);
    if (parameter === "node.forward") {
      const ratio = c.network.node.left / (c.network.node.left + c.network.node.right);
      c.network.node = { forward: value, left: (1 - value) * ratio, right: (1 - value) * (1 - ratio) };
    } else if (parameter === "contactOhms" || parameter === "fieldTesla") c.computation[parameter] = value;
    else throw new Error(`unknown parameter ${parameter}`);
    return c;
  }) as never,
  compute: ((input: In) => {
    const f = input.network.node.forward;
    const g0 = 4 * (f + (1 - f) * 0.3 * Math.cos((2 * Math.PI * input.computation.fieldTesla) / 0.583));
    const g = 1 / (1 / g0 + input.computation.contactOhms / 25812.80745);
    return { conductance: { total: g, unit: "e2/h" } };
  }) as never,
};
const base: In = { network: { node: { forward: 0.5, left: 0.25, right: 0.25 } }, computation: { fieldTesla: 0, contactOhms: 0 } };

describe("engine-backed fit model", () => {
  it("evaluates one engine computation per data x with the fitted values applied", () => {
    const y = engineCurve(standIn, base, "fieldTesla", [0, 0.2915], { "node.forward": 0.5, contactOhms: 0 });
    expect(y[0]).toBeCloseTo(4 * (0.5 + 0.5 * 0.3), 12);
    expect(y[1]).toBeCloseTo(4 * (0.5 - 0.5 * 0.3), 12);
    expect(conductanceOf({ ensemble: { mean: { total: 2.5 } }, conductance: { total: 1 } })).toBe(2.5);
    expect(conductanceOf({ conductance: { total: 3 }, siemens: 3.874045865e-5 })).toBeCloseTo(1, 9);
    expect(() => conductanceOf({})).toThrow(/conductance.total/);
  });

  it("fits node.forward and contactOhms back within the reported uncertainties (several seeds)", () => {
    const x = Array.from({ length: 120 }, (_, i) => -1.5 + (3 * i) / 119);
    const truth = { "node.forward": 0.55, contactOhms: 600 };
    for (const seed of [1, 2, 3]) {
      const g = seededGaussian(seed);
      const y = engineCurve(standIn, base, "fieldTesla", x, truth).map((v) => v + 0.004 * g());
      const r = runFit(standIn, {
        input: base,
        sweepParameter: "fieldTesla",
        x,
        y,
        sigma: x.map(() => 0.004),
        fit: [
          { parameter: "node.forward", initial: 0.5, min: 0.2, max: 0.9 },
          { parameter: "contactOhms", initial: 300, min: 0, max: 3000 },
        ],
      });
      for (const p of r.parameters) expect(Math.abs(p.value - truth[p.parameter as keyof typeof truth])).toBeLessThan(3 * p.stderr!);
      expect(r.chi2PerDof).toBeLessThan(1.6);
    }
  });

  it("refuses parameters it cannot fit and period with twist together", () => {
    expect(() => checkFitSpecs([{ parameter: "energyMeV", initial: 1, min: 0, max: 2 }])).toThrow(/cannot be fitted/);
    expect(() =>
      checkFitSpecs([
        { parameter: "periodNm", initial: 100, min: 50, max: 200 },
        { parameter: "twistDegrees", initial: 0.1, min: 0.05, max: 0.2 },
      ]),
    ).toThrow(/fit one of them/);
    expect(expectedEvaluations(2)).toBeGreaterThan(2);
  });
});

describe("the fit form's parameter list on the real engine", () => {
  it("every listed parameter's proposed start and bounds are a valid model of the demo network; a valid pair is found in either order", async () => {
    const { engine } = await import("@/server/fits/engine");
    const { parseComputeInput } = await import("@/engine");
    const { FIT_PARAMETERS } = await import("@/shared/fit-parameters");
    const { LK07_COMPUTATION, LK07_NETWORK } = await import("@/shared/lk07");
    const { applyValues } = await import("@/server/fits/model");
    const input = parseComputeInput({ network: LK07_NETWORK, computation: LK07_COMPUTATION });
    for (const p of FIT_PARAMETERS) {
      for (const v of [p.initial, p.min, p.max]) expect(() => engine.applyParameter(input as never, p.parameter, v), `${p.parameter} = ${v}`).not.toThrow();
      // each changes the model: a parameter listed for fitting that the conductance ignored would be undetermined
      const at = (v: number) => conductanceOf(engine.compute(engine.applyParameter(input as never, p.parameter, v) as never));
      // (min against the middle: the node phase's bounds -pi and pi are the same model)
      if (p.parameter !== "temperatureK") expect(at(p.min), p.parameter).not.toBeCloseTo(at((p.min + p.max) / 2), 6);
    }
    // The engine checks node.forward +- forwardSpread / 2 after every parameter applied: a valid
    // pair can pass through an invalid intermediate in one order, and applyValues tries the other.
    const spread = engine.applyParameter(input as never, "disorder.forwardSpread", 0.1);
    expect(() => engine.applyParameter(spread as never, "node.forward", 0.97)).toThrow(/forwardSpread/);
    const ok = applyValues(engine, spread, { "node.forward": 0.92 }) as { network: { node: { forward: number } } };
    expect(ok.network.node.forward).toBe(0.92);
    const wide = engine.applyParameter(input as never, "disorder.forwardSpread", 0.85);
    // from a wide spread, forward 0.6 then spread 0.1 fails at the first step (0.6 +- 0.425 leaves the range) but the reverse order works
    expect(() => engine.applyParameter(wide as never, "node.forward", 0.6)).toThrow();
    const both = applyValues(engine, wide, { "node.forward": 0.6, "disorder.forwardSpread": 0.1 }) as {
      network: { node: { forward: number }; disorder: { forwardSpread: number } };
    };
    expect(both.network.node.forward).toBe(0.6);
    expect(both.network.disorder.forwardSpread).toBe(0.1);
  });
});
