import { describe, expect, it } from "vitest";
import { parseComputeInput, type DosComputation, type LdosComputation } from "@/engine/schema";
import { computeDos, sampleDos } from "@/engine/compute/dos";
import { computeLdos, linkResolventDiagonal } from "@/engine/compute/ldos";
import { buildClosedSample } from "@/engine/compute/closed";
import { networkScale } from "@/engine/compute/common";
import { channelPhases, reverseGraph } from "@/engine/network/graph";
import { graphJson, numpy, randomUnitary } from "./helpers/reference";
import { seededUniform } from "../../support/random";

const make = (network: object, computation: object) =>
  parseComputeInput({
    network: { lattice: "triangular", size: { columns: 4, rows: 4 }, periodNm: 130, node: { forward: 0.5, left: 0.3, right: 0.2 }, ...network },
    computation,
  });

describe("check 6: DOS sum rule, 3 states per channel per cell per energy period", () => {
  // Source: trace formula, physics.md section 3: each eigenphase of U contributes one state per period (exact).
  const rand = seededUniform(77);
  const nodes: object[] = [
    { forward: 0.5, left: 0.3, right: 0.2 },
    { forward: 1 },
    { matrix: randomUnitary(3, rand) },
    { forward: 0.2, left: 0.1, right: 0.7, branch: -1, phaseRad: 2 },
  ];
  for (const node of nodes) {
    it(`Bloch DOS integrates to 3 per cell for node ${JSON.stringify(node).slice(0, 60)}`, () => {
      const inp = make({ node }, { kind: "dos", kMesh: 6, energies: { fromMeV: 0, toMeV: 1, points: 2 } });
      const r = computeDos(inp.network, inp.computation as DosComputation);
      expect(Math.abs(r.checks.statesPerCellPerPeriod - 3)).toBeLessThan(1e-9);
      // and by integrating the reported DOS over one period on a uniform periodic grid
      const period = r.energyPeriodMeV,
        N = 400;
      const full = computeDos(inp.network, { ...(inp.computation as DosComputation), energies: { fromMeV: 0, toMeV: period * (1 - 1 / N), points: N } });
      const integral = full.dosPerMeVPerCell.valleyK.reduce((a, b) => a + b, 0) * (period / N);
      expect(Math.abs(integral - 3)).toBeLessThan(1e-9);
      // carrier density over one period: 3 states x spin 2 x valley 2 per cell
      const count = full.carrierDensityPerCm2[N - 1] * full.cellAreaNm2 * 1e-14;
      expect(Math.abs(count - 12 * (1 - 1 / N))).toBeLessThan(0.2);
    });
  }
  it("two channels per link: 6 states per cell per period; flux 1/3 keeps the count", () => {
    const inp = make({ channelsPerLink: 2 }, { kind: "dos", kMesh: 4, flux: { numerator: 1, denominator: 3 }, energies: { fromMeV: 0, toMeV: 1, points: 2 } });
    expect(computeDos(inp.network, inp.computation as DosComputation).checks.statesPerCellPerPeriod).toBeCloseTo(6, 9);
  });
  it("finite closed sample: the trace formula integrates to the link count per cell", () => {
    const inp = make({ size: { columns: 3, rows: 2 }, disorder: { linkPhaseWidthRad: 6, seed: 3 } }, { kind: "dos", source: "sample", broadeningMeV: 2 });
    const scale = networkScale(inp.network);
    const N = 64,
      period = scale.energyPeriodMeV;
    const r = computeDos(inp.network, { ...(inp.computation as DosComputation), energies: { fromMeV: 0, toMeV: period * (1 - 1 / N), points: N } });
    const integral = r.dosPerMeVPerCell.valleyK.reduce((a, b) => a + b, 0) * (period / N);
    expect(Math.abs(integral - 3)).toBeLessThan(1e-6);
    expect(r.checks.statesPerCellPerPeriod).toBe(3);
  });
});

describe("trace formula on finite closed networks against numpy", () => {
  // Source: numpy.linalg.eigvals of the whole link-to-link operator U0; rho(E) = (tau/2pi) sum_n P_r(E tau + alpha_n).
  it("sample DOS from the determinant sweep equals the eigenphase sum (ring with open edges, field)", () => {
    const inp = make(
      { transverse: "open", size: { columns: 4, rows: 3 }, disorder: { linkPhaseWidthRad: 5, forwardSpread: 0.2, seed: 5 } },
      { kind: "dos", source: "sample", fieldTesla: 0.3 },
    );
    const scale = networkScale(inp.network);
    const g = buildClosedSample(inp.network, scale, 0.3, 0, "computation.fieldTesla");
    const ref = numpy({ op: "link_eigvals", graph: graphJson(g, channelPhases(g, 0, 0)) });
    const alphas = ref.re.map((re, i) => Math.atan2(ref.im[i], re));
    for (const gg of [g]) {
      for (const [E, broad] of [
        [1.3, 0.5],
        [7.7, 0.2],
      ]) {
        const eta = broad / scale.energyScaleMeV,
          r = Math.exp(-eta),
          th = E / scale.energyScaleMeV;
        const exact = alphas.reduce((a, al) => a + (1 - r * r) / (1 - 2 * r * Math.cos(th + al) + r * r), 0) / (2 * Math.PI * scale.energyScaleMeV);
        const got = sampleDos(gg, scale, E, eta);
        expect(Math.abs(got - exact) / exact).toBeLessThan(1e-7);
      }
    }
  });
  it("LDOS on every link equals the diagonal of (1 - U)^-1 from numpy, and sums to the DOS", () => {
    for (const transverse of ["open", "periodic"] as const) {
      const inp = make(
        { transverse, size: { columns: 4, rows: transverse === "open" ? 3 : 4 }, disorder: { linkPhaseWidthRad: 6, seed: 12 } },
        { kind: "ldos", energyMeV: 2.5, broadeningMeV: 0.4 },
      );
      const scale = networkScale(inp.network);
      const g = buildClosedSample(inp.network, scale, 0, 0, "computation.fieldTesla");
      for (const gg of [g, reverseGraph(g)]) {
        const eta = 0.4 / scale.energyScaleMeV,
          th = 2.5 / scale.energyScaleMeV;
        const diag = linkResolventDiagonal(gg, th, eta);
        const ref = numpy({ op: "resolvent_diag", graph: graphJson(gg, channelPhases(gg, th, eta)) });
        let worst = 0;
        for (let c = 0; c < gg.channelCount; c++) worst = Math.max(worst, Math.abs(diag[c] - (2 * ref.re[c] - 1)));
        expect(worst).toBeLessThan(1e-9);
      }
      const r = computeLdos(inp.network, inp.computation as LdosComputation);
      const dos = sampleDos(g, scale, 2.5, 0.4 / scale.energyScaleMeV) * 2 * 2; // two valleys (equal at B = 0), two spins
      expect(Math.abs(r.totalDosPerMeV - dos) / dos).toBeLessThan(1e-7);
      expect(r.links.fromXNm.length).toBe(g.channelCount);
      expect(r.ldosPerMeV.total.every((x) => x > 0)).toBe(true);
    }
  });
  it("a torus refuses a field that is not a whole number of flux quanta: at parse time and in the computation", () => {
    const torus = /computation.fieldTesla: a closed periodic sample \(a torus\) holds a whole number of flux quanta/;
    expect(() => make({ size: { columns: 4, rows: 4 } }, { kind: "ldos", fieldTesla: 0.1 })).toThrow(torus);
    expect(() => make({ size: { columns: 4, rows: 4 } }, { kind: "dos", source: "sample", fieldTesla: 0.1 })).toThrow(torus);
    // open transverse edges make the closed sample a ring, which holds any flux
    expect(() => make({ size: { columns: 4, rows: 4 }, transverse: "open" }, { kind: "ldos", fieldTesla: 0.1 })).not.toThrow();
    const inp = make({ size: { columns: 4, rows: 4 } }, { kind: "ldos", fieldTesla: 0 });
    expect(() => computeLdos(inp.network, { ...(inp.computation as LdosComputation), fieldTesla: 0.1 })).toThrow(torus);
  });
});
