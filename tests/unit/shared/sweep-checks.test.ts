// The scan builder's checks of its axes (src/shared/sweep-checks.ts) against the engine's own
// validation: the reachable range of a node probability (reachableParameterRanges) says "allowed"
// exactly when the engine's parse accepts the point's node, for many random values; the field
// steps of a torus (torusFieldStepTesla) match the engine's refusal; the fixes offered are accepted.
import { describe, expect, it } from "vitest";
import {
  applyParameter,
  allowedTorusFields,
  reachableForwardRange,
  EngineInputError,
  parseComputeInput,
  reachableParameterRanges,
  torusAllowsField,
  torusFieldStepTesla,
  type ComputeInput,
} from "@/engine/browser";
import { FLUX_QUANTUM_WB, periodFromTwistNm } from "@/engine/constants";
import { checkSweepAxes } from "@/shared/sweep-checks";
import { resolveAxis } from "@/shared/sweep-axes";
import { seededUniform } from "../../support/random";

const accepts = (input: ComputeInput, parameter: string, value: number) => {
  try {
    applyParameter(input, parameter, value);
    return true;
  } catch (err) {
    if (err instanceof EngineInputError) return false;
    throw err;
  }
};

const triangular = (node: object, extra: object = {}, computation: object = { kind: "conductance" }) =>
  parseComputeInput({ network: { lattice: "triangular", size: { columns: 6, rows: 4 }, twistDegrees: 0.11, node, ...extra }, computation });

describe("reachable node ranges: the builder's rule is the engine's", () => {
  // Source: the engine's schema (network.node: checkTriangularNode, the triangle of sqrt(f r),
  // sqrt(l f), sqrt(r l); physics.md section 2); the range must say allowed exactly when it accepts.
  it("node.forward, node.left and node.right: inside the range exactly when the engine accepts (random nodes and values)", () => {
    const rand = seededUniform(21);
    let checked = 0;
    let refusedSeen = 0;
    for (let n = 0; n < 40; n++) {
      // a reachable base node with a random left:right ratio
      const t = 0.02 + 0.96 * rand();
      const r0 = reachableForwardRange(t, 1 - t, 0.9);
      const f0 = r0.min + 0.01 + (r0.max - r0.min - 0.02) * rand();
      const node = { forward: f0, left: (1 - f0) * t, right: (1 - f0) * (1 - t) };
      const base = triangular(node);
      for (const parameter of ["node.forward", "node.left", "node.right"]) {
        const hi = parameter === "node.forward" ? 1 : 1 - f0;
        const ranges = reachableParameterRanges(base.network, parameter)!;
        expect(ranges.length, `${parameter} at ${JSON.stringify(node)}`).toBeGreaterThan(0);
        for (let i = 0; i < 25; i++) {
          const v = hi * rand();
          // a hair away from the boundary (the engine's check has a 1e-12 tolerance)
          if (ranges.some((r) => Math.abs(v - r.min) < 1e-9 || Math.abs(v - r.max) < 1e-9)) continue;
          const inside = ranges.some((r) => v >= r.min && v <= r.max);
          expect(inside, `${parameter} = ${v} at ${JSON.stringify(node)}: ranges ${JSON.stringify(ranges)}`).toBe(accepts(base, parameter, v));
          checked++;
          if (!inside) refusedSeen++;
        }
      }
    }
    expect(checked).toBeGreaterThan(2500);
    expect(refusedSeen).toBeGreaterThan(300);
  });

  it("the ends of the range are accepted; for left = right the forward range is [1/9, 1]", () => {
    const base = triangular({ forward: 0.6, left: 0.2, right: 0.2 });
    const [range] = reachableParameterRanges(base.network, "node.forward")!;
    expect(range.min).toBeCloseTo(1 / 9, 9);
    expect(range.max).toBe(1);
    expect(accepts(base, "node.forward", range.min)).toBe(true);
    expect(accepts(base, "node.forward", range.min - 1e-6)).toBe(false);
  });

  it("with a forward spread the range shrinks by half the spread at each end, as the engine requires", () => {
    const base = triangular({ forward: 0.6, left: 0.15, right: 0.25 }, { disorder: { forwardSpread: 0.1 } });
    const [plain] = reachableParameterRanges(triangular({ forward: 0.6, left: 0.15, right: 0.25 }).network, "node.forward")!;
    const [range] = reachableParameterRanges(base.network, "node.forward")!;
    expect(range.min).toBeCloseTo(plain.min + 0.05, 12);
    expect(range.max).toBeCloseTo(plain.max - 0.05, 12);
    const rand = seededUniform(5);
    for (let i = 0; i < 200; i++) {
      const v = rand();
      if (Math.abs(v - range.min) < 1e-9 || Math.abs(v - range.max) < 1e-9) continue;
      expect(v >= range.min && v <= range.max, `forward ${v}`).toBe(accepts(base, "node.forward", v));
    }
  });

  it("the square node's turning probability with a spread", () => {
    const base = parseComputeInput({
      network: { lattice: "square", size: { columns: 4, rows: 4 }, periodNm: 100, node: { turning: 0.5 }, disorder: { forwardSpread: 0.2 } },
      computation: { kind: "conductance" },
    });
    const [range] = reachableParameterRanges(base.network, "node.turning")!;
    expect(range).toEqual({ min: 0.1, max: 0.9 });
    for (const v of [0.05, 0.09, 0.11, 0.5, 0.89, 0.91]) expect(v >= range.min && v <= range.max, `turning ${v}`).toBe(accepts(base, "node.turning", v));
  });
});

describe("scan axes over node probabilities, in words", () => {
  // The case of the issue: a network with left:right = 0.375:0.625, a scan over forward 0.05..0.95.
  const base = triangular({ forward: 0.2, left: 0.3, right: 0.5 });
  it("flags exactly the values the engine refuses, says why and what is allowed, and offers a range the engine accepts", () => {
    const axis = { parameter: "node.forward", from: 0.05, to: 0.95, points: 11 };
    const [p] = checkSweepAxes(base, [axis]);
    const values = resolveAxis(axis).values;
    expect(p.refused).toEqual(values.filter((v) => !accepts(base, "node.forward", v)));
    expect(p.refused.length).toBeGreaterThan(0);
    expect(p.reason).toBe("node");
    expect(p.message).toMatch(/^Axis 1, forward probability: \d+ of 11 values \(0\.05, .*\) (is|are) not reachable: no unitary node has them/);
    expect(p.message).toMatch(/keeps left and right turning in the network's ratio 0\.375 : 0\.625/);
    expect(p.message).toMatch(/must lie between 0\.\d+ and 0\.\d+/);
    expect(p.message).not.toMatch(/sqrt\(|\[0\./);
    expect(p.fix).not.toBeNull();
    const fixed = resolveAxis({ parameter: "node.forward", ...(p.fix as { from: number; to: number; points: number }) });
    expect(fixed.values).toHaveLength(11);
    for (const v of fixed.values) expect(accepts(base, "node.forward", v), `fixed value ${v}`).toBe(true);
    expect(checkSweepAxes(base, [fixed])).toEqual([]);
    // nearest: the fixed range runs from the lowest to the highest reachable value (four decimals, rounded inwards)
    expect(p.allowedRanges).toHaveLength(1);
    const { min, max } = p.allowedRanges[0];
    expect(min).toBeGreaterThan(0.05);
    expect(max).toBeLessThan(0.95);
    expect((p.fix as { from: number }).from - min).toBeLessThan(1e-4);
    expect(max - (p.fix as { to: number }).to).toBeLessThan(1e-4);
  });
  it("a turn on a node with forward below 1/9 has two reachable intervals, both named", () => {
    const low = triangular({ forward: 0.07, left: 0.85, right: 0.08 });
    const ranges = reachableParameterRanges(low.network, "node.left")!;
    expect(ranges).toHaveLength(2);
    // mirror images: left and right exchange
    expect(ranges[0].min + ranges[1].max).toBeCloseTo(0.93, 9);
    const [p] = checkSweepAxes(low, [{ parameter: "node.left", from: 0.4, to: 0.9, points: 6 }]);
    expect(p.message).toMatch(/keeps forward at 0\.07 .* must lie between [\d.]+ and [\d.]+ or between [\d.]+ and [\d.]+\.$/);
    // the nearer interval, the upper one
    const fix = p.fix as { from: number; to: number };
    expect(fix.from).toBeGreaterThanOrEqual(ranges[1].min);
    expect(fix.to).toBeLessThanOrEqual(ranges[1].max);
  });
  it("a list of values keeps the reachable ones", () => {
    const [p] = checkSweepAxes(base, [{ parameter: "node.forward", values: [0.05, 0.5, 0.8, 0.9] }]);
    expect(p.refused).toEqual([0.05, 0.9]);
    expect(p.fix).toEqual({ values: [0.5, 0.8] });
  });
  it("an axis the engine accepts has no problem; other refusals keep the engine's reason", () => {
    expect(checkSweepAxes(base, [{ parameter: "energyMeV", from: 0, to: 5, points: 6 }])).toEqual([]);
    const [p] = checkSweepAxes(base, [{ parameter: "size.rows", values: [4, 5] }]);
    expect(p.reason).toBe("refused");
    expect(p.refused).toEqual([5]);
    expect(p.message).toMatch(/even number of rows/);
  });
});

describe("field steps of a torus", () => {
  // Source: flux quantisation through a closed surface; the engine's rule (network/torus.ts, used
  // by the closed-sample computations): B * plaquettes * A_plaquette / (h/e) must be whole.
  const ldos = triangular({ forward: 0.6, left: 0.2, right: 0.2 }, {}, { kind: "ldos", energyMeV: 1 });
  const step = torusFieldStepTesla(ldos.network)!;
  it("the step is one flux quantum through the whole sample", () => {
    const l = periodFromTwistNm(0.11) * 1e-9;
    const area = 2 * 6 * 4 * (Math.sqrt(3) / 4) * l * l;
    expect(step).toBeCloseTo(FLUX_QUANTUM_WB / area, 12);
    expect(torusFieldStepTesla(triangular({ forward: 0.6 }, { transverse: "open" }).network)).toBeNull();
  });
  it("allowed exactly when the engine's parse accepts the field (random fields and multiples)", () => {
    const rand = seededUniform(8);
    let whole = 0;
    for (let i = 0; i < 300; i++) {
      const v = i % 3 === 0 ? Math.round(40 * (rand() - 0.5)) * step : 40 * step * (rand() - 0.5);
      const ok = torusAllowsField(ldos.network, v);
      if (ok) whole++;
      expect(ok, `field ${v}`).toBe(accepts(ldos, "fieldTesla", v));
    }
    expect(whole).toBeGreaterThanOrEqual(100);
    const near = allowedTorusFields(ldos.network, 2.5 * step, 2);
    expect(near.below.map((x) => x / step)).toEqual([2, 1].map((n) => expect.closeTo(n, 9)));
    expect(near.above.map((x) => x / step)).toEqual([3, 4].map((n) => expect.closeTo(n, 9)));
  });
  it("a field scan of an LDOS map on a torus: the refused values, the allowed fields near the range and a snapped axis the engine accepts", () => {
    const axis = { parameter: "fieldTesla", from: 0, to: 1, points: 6 };
    const [p] = checkSweepAxes(ldos, [axis]);
    expect(p.reason).toBe("torusField");
    expect(p.refused).toEqual(resolveAxis(axis).values.filter((v) => !accepts(ldos, "fieldTesla", v)));
    expect(p.refused.length).toBe(5);
    expect(p.message).toMatch(/5 of 6 values \(0\.2 T, 0\.4 T, 0\.6 T, 0\.8 T, 1 T\) are not allowed/);
    expect(p.message).toMatch(/a torus\), which holds a whole number of flux quanta h\/e, so the field must be a multiple of [\d.e-]+ T for this 6 × 4 sample/);
    expect(p.fieldStepTesla).toBe(step);
    for (const f of p.allowedFields) expect(torusAllowsField(ldos.network, f)).toBe(true);
    // 0 is allowed (its own nearest); 1 T lies between two allowed fields
    expect(p.allowedFields).toHaveLength(3);
    expect(p.allowedFields[0]).toBe(0);
    expect(p.allowedFields[1]).toBeLessThan(1);
    expect(p.allowedFields[2]).toBeGreaterThan(1);
    expect(p.allowedFields[2] - p.allowedFields[1]).toBeCloseTo(step, 12);
    expect(p.message).toMatch(/The allowed fields nearest the ends of the axis: 0 T \(from 0 T\); [\d.]+ T and [\d.]+ T \(to 1 T\)\./);
    const fix = p.fix as { from: number; to: number; points: number };
    const values = resolveAxis({ parameter: "fieldTesla", ...fix }).values;
    expect(values.length).toBeGreaterThan(1);
    for (const v of values) expect(accepts(ldos, "fieldTesla", v), `snapped ${v}`).toBe(true);
    expect(values).toHaveLength(6);
    expect(fix.from).toBe(0);
    expect(1 - fix.to).toBeGreaterThanOrEqual(-step / 2);
    expect(1 - fix.to).toBeLessThan(step * 6);
    // conductance uses leads, not a closed sample: no field rule
    const conductance = triangular({ forward: 0.6 });
    expect(checkSweepAxes(conductance, [axis])).toEqual([]);
  });
  it("a list of fields snaps each to its nearest allowed field", () => {
    const [p] = checkSweepAxes(ldos, [{ parameter: "fieldTesla", values: [0.3 * step, 2.6 * step] }]);
    const fix = p.fix as { values: number[] };
    expect(fix.values.map((v) => v / step)).toEqual([0, 3].map((n) => expect.closeTo(n, 9)));
  });
});
