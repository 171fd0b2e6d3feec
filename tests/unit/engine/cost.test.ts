/**
 * The cost model (src/engine/cost.ts): properties that hold whatever the machine's speed — no
 * timing here (scripts/bench-cost.ts compares the estimates with measured CPU time).
 */
import { describe, expect, it } from "vitest";
import { parseComputeInput, getKernels, type ComputeInput } from "@/engine/index";
import { classicalDecayRate, conductanceEnergyEvaluations, costBackend, estimateCost, estimatedResonanceWidth, simulateSweep } from "@/engine/cost";
import { COST_CONSTANTS, KERNEL_FIGURES } from "@/engine/cost-constants";
import { buildSample } from "@/engine/network/lattice";
import type { ConductanceComputation } from "@/engine/schema";

const tri = (columns: number, rows = columns, extra: Record<string, unknown> = {}) => ({
  lattice: "triangular",
  size: { columns, rows },
  periodNm: 100,
  node: { forward: 0.6, left: 0.25, right: 0.15 },
  disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 1 },
  ...extra,
});
const sq = (columns: number, rows = columns) => ({
  lattice: "square",
  size: { columns, rows },
  periodNm: 60,
  node: { turning: 0.5 },
  disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 2 },
});
const input = (network: object, computation: object): ComputeInput => parseComputeInput({ network, computation });
const seconds = (inp: ComputeInput, backend: "openblas" | "ts") => estimateCost(inp, { backend }).computeSeconds;
const BACKENDS = ["openblas", "ts"] as const;

function increasing(xs: number[]): boolean {
  return xs.every((x, i) => i === 0 || x > xs[i - 1]);
}

describe("cost model: growth with the size of the work", () => {
  it("grows monotonically with the network for every kind that sweeps a sample, on both backends", () => {
    for (const backend of BACKENDS) {
      expect(increasing([8, 16, 24, 32, 48, 64, 96, 128, 200].map((W) => seconds(input(tri(W), { kind: "conductance" }), backend)))).toBe(true);
      expect(increasing([8, 16, 32, 64, 128].map((W) => seconds(input(sq(W), { kind: "conductance" }), backend)))).toBe(true);
      expect(increasing([16, 32, 64, 128, 256].map((C) => seconds(input(tri(C, 16), { kind: "localization", ensemble: { samples: 2 } }), backend)))).toBe(true);
      expect(increasing([8, 16, 24, 32, 48].map((W) => seconds(input(tri(W), { kind: "ldos" }), backend)))).toBe(true);
      expect(
        increasing(
          [8, 16, 24, 32].map((W) => seconds(input(sq(W), { kind: "dos", source: "sample", energies: { fromMeV: 0, toMeV: 10, points: 10 } }), backend)),
        ),
      ).toBe(true);
      expect(
        increasing([1, 2, 4, 8, 16, 32, 64].map((q) => seconds(input(tri(4), { kind: "spectrum", flux: { numerator: 1, denominator: q } }), backend))),
      ).toBe(true);
      expect(increasing([4, 8, 16, 32, 64].map((k) => seconds(input(tri(4), { kind: "dos", kMesh: k }), backend)))).toBe(true);
    }
  });

  it("is linear in the number of samples, energies and k points", () => {
    for (const backend of BACKENDS) {
      const one = estimateCost(input(tri(24), { kind: "conductance", ensemble: { samples: 2 } }), { backend });
      const many = estimateCost(input(tri(24), { kind: "conductance", ensemble: { samples: 16 } }), { backend });
      const sweeps = (e: typeof one) => e.breakdown.filter((b) => b.item.startsWith("slice composition")).reduce((a, b) => a + b.seconds, 0);
      expect(sweeps(many) / sweeps(one)).toBeCloseTo(8, 9);
      const dos = (points: number) =>
        seconds(input(sq(16), { kind: "dos", source: "sample", energies: { fromMeV: 0, toMeV: 10, points } }), backend) - COST_CONSTANTS.baseSeconds;
      expect((dos(41) - dos(21)) / (dos(21) - dos(1))).toBeCloseTo(1, 9);
      const spec = (pps: number) =>
        seconds(input(tri(4), { kind: "spectrum", flux: { numerator: 1, denominator: 8 }, pathPointsPerSegment: pps }), backend) - COST_CONSTANTS.baseSeconds;
      expect(spec(48) / spec(24)).toBeCloseTo(145 / 73, 9);
    }
  });

  it("counts the energies of a thermal average: the fixed rule n + n/2 + 1, the adaptive rule from the narrowest resonance", () => {
    const net = parseComputeInput({ network: tri(16), computation: { kind: "conductance" } }).network;
    const cond = (c: object) => parseComputeInput({ network: tri(16), computation: { kind: "conductance", ...c } }).computation as ConductanceComputation;
    expect(conductanceEnergyEvaluations(net, cond({}))).toBe(1);
    expect(conductanceEnergyEvaluations(net, cond({ temperatureK: 5, temperaturePoints: 40 }))).toBe(61);
    expect(conductanceEnergyEvaluations(net, cond({ temperatureK: 5, temperaturePoints: 2 }))).toBe(5);
    // the sweeps of a fixed rule scale with its energies
    for (const backend of BACKENDS) {
      const e = (points: number) => estimateCost(input(tri(16), { kind: "conductance", temperatureK: 5, temperaturePoints: points }), { backend });
      const sweeps = (x: ReturnType<typeof e>) => x.breakdown.filter((b) => b.item.startsWith("slice composition")).reduce((a, b) => a + b.seconds, 0);
      expect(sweeps(e(40)) / sweeps(e(10))).toBeCloseTo(61 / 16, 9);
    }
    // adaptive: a wider Fermi window needs more energies, never more than temperatureMaxEnergies + 1;
    // a narrower resonance (a longer sample) needs more
    const n2 = conductanceEnergyEvaluations(net, cond({ temperatureK: 2 })),
      n20 = conductanceEnergyEvaluations(net, cond({ temperatureK: 20 }));
    expect(n20).toBeGreaterThan(2 * n2);
    expect(n2).toBeGreaterThan(15 * 8);
    expect(conductanceEnergyEvaluations(net, cond({ temperatureK: 20, temperatureMaxEnergies: 500 }))).toBe(501);
    const longer = parseComputeInput({ network: tri(32, 16), computation: { kind: "conductance" } }).network;
    expect(conductanceEnergyEvaluations(longer, cond({ temperatureK: 2 }))).toBeGreaterThan(n2);
    // the adaptive estimate includes the resonance search
    expect(
      estimateCost(input(tri(16), { kind: "conductance", temperatureK: 2 })).breakdown.some(
        (b) => b.item.startsWith("narrowest-resonance search") && b.seconds > 0,
      ),
    ).toBe(true);
  });

  it("estimates the narrowest resonance from the classical escape rate: diffusive 1/L^2, faster for forward-going nodes", () => {
    const rate = (columns: number) =>
      classicalDecayRate(
        buildSample(parseComputeInput({ network: tri(columns, 8), computation: { kind: "conductance" } }).network, {
          mode: "leads",
          fluxPerPlaquette: 0,
          sample: 0,
        }),
      );
    const r8 = rate(8),
      r16 = rate(16),
      r32 = rate(32);
    expect(r8 / r16).toBeGreaterThan(3);
    expect(r8 / r16).toBeLessThan(4.5);
    expect(r16 / r32).toBeGreaterThan(3);
    expect(r16 / r32).toBeLessThan(4.5);
    const w = (network: object) => estimatedResonanceWidth(parseComputeInput({ network, computation: { kind: "conductance" } }).network);
    expect(w(tri(16, 16, { node: { forward: 0.9, left: 0.05, right: 0.05 } }))).toBeGreaterThan(2 * w(tri(16)));
    // beyond 16 columns the rate is extrapolated; it keeps falling with the length
    expect(increasing([64, 48, 32, 24, 16, 12].map((C) => w(tri(C, 16))))).toBe(true);
  });
});

describe("cost model: backends", () => {
  it("uses the selected kernels, and the native figures where none was selected (the browser)", () => {
    expect(costBackend()).toBe(getKernels().name === "ts" ? "ts" : "openblas");
    const inp = input(tri(64), { kind: "conductance" });
    expect(estimateCost(inp).computeSeconds).toBe(seconds(inp, costBackend()));
    const g = globalThis as { window?: unknown; document?: unknown };
    g.window = {};
    g.document = {};
    try {
      expect(costBackend()).toBe("openblas");
    } finally {
      delete g.window;
      delete g.document;
    }
  });

  it("native figures are faster per multiply-add than the TypeScript ones, as documented in cost-constants.ts", () => {
    const nat = KERNEL_FIGURES.openblas,
      ts = KERNEL_FIGURES.ts;
    expect(nat.gemmMulAddSeconds).toBeLessThan(ts.gemmMulAddSeconds / 4);
    expect(nat.matmulMulAddSeconds).toBeLessThan(ts.matmulMulAddSeconds / 4);
    expect(nat.inverseCubeSeconds).toBeLessThan(ts.inverseCubeSeconds / 4);
    expect(nat.blochCubeSeconds).toBeLessThan(ts.blochCubeSeconds);
    for (const f of [nat, ts]) for (const v of Object.values(f)) expect(v).toBeGreaterThanOrEqual(0);
  });

  it("large dense sweeps cost more on the TypeScript kernels; small ones stay in TypeScript on both", () => {
    // below the absorber's thresholds (nr x nc <= 4096, nc <= 64) both backends run the same code
    const g = buildSample(parseComputeInput({ network: tri(8), computation: { kind: "conductance" } }).network, {
      mode: "leads",
      fluxPerPlaquette: 0,
      sample: 0,
    });
    expect(simulateSweep(g, -1, "openblas").seconds).toBe(simulateSweep(g, -1, "ts").seconds);
    for (const W of [64, 96, 128]) {
      const inp = input(tri(W), { kind: "conductance" });
      expect(seconds(inp, "ts") / seconds(inp, "openblas")).toBeGreaterThan(1.5);
    }
    expect(seconds(input(tri(48), { kind: "ldos" }), "ts")).toBeGreaterThan(seconds(input(tri(48), { kind: "ldos" }), "openblas"));
    expect(seconds(input(tri(4), { kind: "spectrum", flux: { numerator: 1, denominator: 32 } }), "ts")).toBeGreaterThan(
      seconds(input(tri(4), { kind: "spectrum", flux: { numerator: 1, denominator: 32 } }), "openblas"),
    );
  });

  it("keeps the memory estimate independent of the backend; the breakdown adds up", () => {
    for (const computation of [
      { kind: "conductance" },
      { kind: "conductance", temperatureK: 2 },
      { kind: "ldos" },
      { kind: "localization" },
      { kind: "dos", source: "sample" },
      { kind: "dos" },
      { kind: "spectrum" },
    ]) {
      const inp = input(tri(32), computation);
      const a = estimateCost(inp, { backend: "openblas" }),
        b = estimateCost(inp, { backend: "ts" });
      expect(a.peakMemoryBytes).toBe(b.peakMemoryBytes);
      for (const e of [a, b]) expect(e.breakdown.reduce((s, x) => s + x.seconds, 0) + COST_CONSTANTS.baseSeconds).toBeCloseTo(e.computeSeconds, 12);
    }
  });
});

describe("cost model: Bloch sizes and closed square samples", () => {
  it("uses the magnetic cell the engine builds: the flux fraction reduced, one cell at zero flux", () => {
    for (const backend of BACKENDS) {
      const s = (numerator: number, denominator: number) => seconds(input(tri(4), { kind: "spectrum", flux: { numerator, denominator } }), backend);
      expect(s(2, 16)).toBe(s(1, 8));
      expect(s(0, 7)).toBe(s(0, 1));
      expect(s(3, 16)).toBeGreaterThan(s(1, 8));
    }
  });

  it("estimates closed square samples longer than the pieces (even columns only)", () => {
    // (the 3-column piece a closed square sample cannot have made the estimate throw before)
    for (const computation of [{ kind: "ldos" }, { kind: "dos", source: "sample", energies: { fromMeV: 0, toMeV: 10, points: 10 } }]) {
      const e = estimateCost(input(sq(16), computation));
      expect(e.computeSeconds).toBeGreaterThan(COST_CONSTANTS.baseSeconds);
    }
  });
});
