import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { reachableForwardRange } from "@/engine/network/node-matrices";
import {
  parseComputeInput,
  EngineInputError,
  applyParameter,
  inputHash,
  SWEEPABLE_PARAMETERS,
  estimateCost,
  checkResourceLimits,
  EngineLimitError,
  compute,
  EngineCancelledError,
  ENGINE_VERSION,
  COST_CONSTANTS,
} from "@/engine/index";

const base = {
  network: { lattice: "triangular", size: { columns: 4, rows: 4 }, periodNm: 140, node: { forward: 0.5, left: 0.3, right: 0.2 } },
  computation: { kind: "conductance" },
};
const withNet = (n: object, c: object = {}) => ({ network: { ...base.network, ...n }, computation: { ...base.computation, ...c } });
function fieldOf(json: unknown): string {
  try {
    parseComputeInput(json);
    return "ok";
  } catch (e) {
    if (e instanceof EngineInputError) return e.field;
    throw e;
  }
}

describe("network schema", () => {
  it("applies the defaults: degeneracy per lattice, velocity, disorder, transverse", () => {
    const t = parseComputeInput(base).network;
    expect(t.degeneracy).toEqual({ spin: 2, valley: 2 });
    expect(t.modeVelocityMps).toBe(1e6);
    expect(t.transverse).toBe("periodic");
    expect(t.disorder).toEqual({ linkPhaseWidthRad: 0, forwardSpread: 0, seed: 1 });
    const s = parseComputeInput(withNet({ lattice: "square", node: { turning: 0.5 } })).network;
    expect(s.degeneracy).toEqual({ spin: 1, valley: 1 });
    expect(parseComputeInput(withNet({ node: { forward: 0.4 } })).network.node).toMatchObject({ forward: 0.4, left: 0.3, right: 0.3, branch: 1, phaseRad: 0 });
  });
  it("names the field, the problem and the allowed range", () => {
    expect(fieldOf(withNet({ node: { forward: 0.05 } }))).toBe("network.node.forward");
    try {
      parseComputeInput(withNet({ node: { forward: 0.05 } }));
    } catch (e) {
      expect((e as Error).message).toMatch(/forward >= 1\/9/);
      expect((e as Error).message).not.toMatch(/\n/);
    }
    expect(fieldOf(withNet({ node: { forward: 1.5 } }))).toBe("network.node.forward");
    expect(fieldOf(withNet({ size: { columns: 0, rows: 4 } }))).toBe("network.size.columns");
    expect(fieldOf(withNet({ size: { columns: 4, rows: 3 } }))).toBe("network.size.rows");
    expect(fieldOf(withNet({ colour: "red" }))).toBe("network.colour");
    expect(fieldOf(withNet({ periodNm: undefined }))).toBe("network.periodNm");
    expect(
      fieldOf(
        withNet({
          node: {
            matrix: [
              [
                [1, 0],
                [0, 0],
                [0, 0],
              ],
              [
                [0, 0],
                [1, 0],
                [0, 0],
              ],
              [
                [0, 0],
                [0, 0],
                [0.5, 0],
              ],
            ],
          },
        }),
      ),
    ).toBe("network.node.matrix");
    expect(fieldOf(withNet({}, { kind: "conductance", temperatureK: -1 }))).toBe("computation.temperatureK");
    expect(fieldOf(withNet({}, { kind: "teleport" }))).toBe("computation.kind");
    expect(fieldOf(withNet({ lattice: "square", node: { forward: 0.5 } }))).toBe("network.node");
    expect(fieldOf(withNet({ disorder: { forwardSpread: 0.9 } }))).toBe("network.disorder.forwardSpread");
    try {
      parseComputeInput(withNet({ colour: "red" }));
    } catch (e) {
      expect((e as Error).message).toMatch(/unknown field\(s\) "colour"/);
    }
  });
  it("property: every reachable probability node parses; its hash is stable and key-order independent (fast-check)", () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0.05, max: 0.95, noNaN: true }), fc.integer({ min: 1, max: 30 }), (u, t, c) => {
        const range = reachableForwardRange(t, 1 - t, 0.9);
        const f = range.min + 1e-9 + (range.max - range.min - 2e-9) * u;
        const json = withNet({ size: { columns: c, rows: 2 }, node: { forward: f, left: (1 - f) * t, right: (1 - f) * (1 - t) } });
        const a = parseComputeInput(json);
        const reordered = { computation: json.computation, network: Object.fromEntries(Object.entries(json.network).reverse()) };
        expect(inputHash(parseComputeInput(reordered))).toBe(inputHash(a));
        expect(inputHash(a)).toMatch(/^[0-9a-f]{64}$/);
      }),
      { numRuns: 100 },
    );
  });
  it("property: random JSON values never crash the parser, they pass or raise EngineInputError (fast-check)", () => {
    fc.assert(
      fc.property(fc.anything(), (x) => {
        try {
          parseComputeInput(x);
        } catch (e) {
          expect(e).toBeInstanceOf(EngineInputError);
          expect((e as EngineInputError).field.length).toBeGreaterThan(0);
        }
      }),
      { numRuns: 300 },
    );
    fc.assert(
      fc.property(fc.record({ forward: fc.double(), left: fc.double(), right: fc.double() }), (node) => {
        try {
          parseComputeInput(withNet({ node }));
        } catch (e) {
          expect(e).toBeInstanceOf(EngineInputError);
          expect((e as EngineInputError).field).toMatch(/^network\.node/);
        }
      }),
      { numRuns: 200 },
    );
  });
});

describe("applyParameter", () => {
  const inp = parseComputeInput(base);
  it("node.forward rescales left and right keeping their ratio", () => {
    const out = applyParameter(inp, "node.forward", 0.8).network.node as { forward: number; left: number; right: number };
    expect(out.forward).toBe(0.8);
    expect(out.left / out.right).toBeCloseTo(1.5, 12);
    expect(out.left + out.right).toBeCloseTo(0.2, 12);
  });
  it("computation and network fields; re-validated; unknown names list the allowed ones", () => {
    expect((applyParameter(inp, "fieldTesla", 0.3).computation as { fieldTesla: number }).fieldTesla).toBe(0.3);
    expect(applyParameter(inp, "twistDegrees", 0.2).network).toMatchObject({ twistDegrees: 0.2 });
    expect(applyParameter(inp, "twistDegrees", 0.2).network.periodNm).toBeUndefined();
    expect(applyParameter(inp, "disorder.seed", 7.6).network.disorder.seed).toBe(8);
    expect(() => applyParameter(inp, "node.forward", 0.05)).toThrow(/forward >= 1\/9/);
    expect(() => applyParameter(inp, "colour", 1)).toThrow(/allowed: energyMeV, fieldTesla/);
    expect(() => applyParameter(inp, "node.turning", 0.5)).toThrow(EngineInputError);
    expect(SWEEPABLE_PARAMETERS.every((p) => p.bounds.min < p.bounds.max && p.unit.length > 0)).toBe(true);
  });
});

describe("cost model, limits, progress and cancellation", () => {
  it("estimates grow with size; the largest Lab network (400 x 400) stays under 2 GB for every kind", () => {
    const small = estimateCost(parseComputeInput(withNet({ size: { columns: 16, rows: 16 } })));
    const large = estimateCost(parseComputeInput(withNet({ size: { columns: 64, rows: 64 } })));
    expect(large.computeSeconds - COST_CONSTANTS.baseSeconds).toBeGreaterThan(20 * (small.computeSeconds - COST_CONSTANTS.baseSeconds));
    for (const computation of [
      { kind: "conductance" },
      { kind: "ldos" },
      { kind: "localization" },
      { kind: "dos", source: "sample" },
      { kind: "dos" },
      { kind: "spectrum" },
    ]) {
      const e = estimateCost(parseComputeInput(withNet({ size: { columns: 400, rows: 400 } }, computation)));
      expect(e.peakMemoryBytes).toBeLessThan(2 * 1024 ** 3);
    }
  });
  it("refuses up front a computation over 2 GB with the reason", () => {
    const huge = parseComputeInput(withNet({ size: { columns: 2000, rows: 2000 } }, { kind: "ldos" }));
    expect(() => checkResourceLimits(huge)).toThrow(EngineLimitError);
    expect(() => compute(huge)).toThrow(/GB of memory, over the 2.00 GB limit/);
  });
  it("reports progress from 0 to 1 and honours cancellation", () => {
    const inp = parseComputeInput(withNet({ size: { columns: 30, rows: 20 } }, { kind: "conductance", ensemble: { samples: 2 } }));
    const seen: number[] = [];
    const r = compute(inp, { onProgress: (f) => seen.push(f) });
    expect(r.engineVersion).toBe(ENGINE_VERSION);
    expect(seen[0]).toBe(0);
    expect(seen[seen.length - 1]).toBe(1);
    // A cancel request ends the computation with EngineCancelledError whether it comes at the
    // first check (every 20 ms of work) or at the last one before the result (a fast machine may
    // finish this sample before 20 ms have passed; the count of checks depends on its speed).
    let calls = 0;
    expect(() => compute(inp, { shouldCancel: () => ++calls >= 1 })).toThrow(EngineCancelledError);
    expect(calls).toBe(1);
  });
});
