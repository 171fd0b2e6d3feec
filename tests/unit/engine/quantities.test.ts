import { describe, expect, it } from "vitest";
import { parseComputeInput, type ConductanceComputation, type LocalizationComputation } from "@/engine/schema";
import { computeConductance } from "@/engine/compute/conductance";
import { computeLocalization } from "@/engine/compute/localization";
import { gaussLegendre, thermalNodes } from "@/engine/compute/quadrature";
import { BOLTZMANN_J_PER_K, JOULE_PER_MEV, CONDUCTANCE_QUANTUM_S } from "@/engine/constants";

const inp = (network: object, computation: object) =>
  parseComputeInput({
    network: {
      lattice: "triangular",
      size: { columns: 6, rows: 4 },
      periodNm: 140,
      node: { forward: 0.5, left: 0.3, right: 0.2 },
      disorder: { linkPhaseWidthRad: 4, seed: 3 },
      ...network,
    },
    computation,
  });

describe("thermal smearing, contact resistance, Fano factor", () => {
  it("Gauss-Legendre integrates polynomials exactly; thermal weights sum to 1", () => {
    // Source: Gauss-Legendre quadrature with n points is exact for degree <= 2n - 1 (exact law).
    const { x, w } = gaussLegendre(7);
    const integral = (p: number) => x.reduce((a, xi, i) => a + w[i] * xi ** p, 0);
    expect(integral(0)).toBeCloseTo(2, 13);
    expect(integral(12)).toBeCloseTo(2 / 13, 13);
    expect(thermalNodes(1, 0.1, 24).weights.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 13);
  });
  it("G(T) equals a brute-force integral of G(E)(-df/dE) and tends to G(E_F) as T -> 0", () => {
    // Source: Landauer formula at finite temperature; reference is a dense midpoint rule over +-30 kT.
    const T = 4;
    const kT = (BOLTZMANN_J_PER_K * T) / JOULE_PER_MEV;
    const c0 = inp({}, { kind: "conductance", energyMeV: 2 });
    const at = (E: number) => computeConductance(c0.network, { ...(c0.computation as ConductanceComputation), energyMeV: E }).conductance.total;
    let ref = 0;
    const N = 300,
      lo = 2 - 30 * kT,
      h = (60 * kT) / N;
    for (let i = 0; i < N; i++) {
      const E = lo + (i + 0.5) * h;
      const x = (E - 2) / kT;
      ref += at(E) * (1 / (4 * kT * Math.cosh(x / 2) ** 2)) * h;
    }
    const got = computeConductance(c0.network, { ...(c0.computation as ConductanceComputation), temperatureK: T, temperaturePoints: 64 }).conductance.total;
    expect(Math.abs(got - ref) / ref).toBeLessThan(3e-4);
    const cold = computeConductance(c0.network, { ...(c0.computation as ConductanceComputation), temperatureK: 0.001 }).conductance.total;
    expect(cold).toBeCloseTo(at(2), 6);
  });
  it("series contact resistance: ohms = 1/G + contactOhms; Fano from the transmission eigenvalues", () => {
    const c = inp({}, { kind: "conductance", energyMeV: 1, contactOhms: 1000 });
    const r = computeConductance(c.network, c.computation as ConductanceComputation);
    expect(r.ohms as number).toBeCloseTo(1 / (r.conductance.total * CONDUCTANCE_QUANTUM_S) + 1000, 6);
    expect(r.siemens).toBeCloseTo(1 / (r.ohms as number), 15);
    const ts = [...r.transmissionEigenvalues.valleyK, ...(r.transmissionEigenvalues.valleyKPrime as number[])];
    const f = ts.reduce((a, t) => a + t * (1 - t), 0) / ts.reduce((a, t) => a + t, 0);
    expect(r.fano as number).toBeCloseTo(f, 10);
    expect(ts.reduce((a, t) => a + t, 0) * 2).toBeCloseTo(r.conductance.total, 10);
  });
  it("ensembles: seeds are reproducible, mean/std/stderr are consistent", () => {
    const c = inp({}, { kind: "conductance", ensemble: { samples: 5 } });
    const a = computeConductance(c.network, c.computation as ConductanceComputation),
      b = computeConductance(c.network, c.computation as ConductanceComputation);
    expect(a.ensemble).toEqual(b.ensemble);
    const e = a.ensemble as NonNullable<typeof a.ensemble>;
    expect(e.stderr.total).toBeCloseTo(e.std.total / Math.sqrt(5), 14);
    expect(e.histogram.counts.reduce((x, y) => x + y, 0)).toBe(5);
    expect(e.std.total).toBeGreaterThan(0);
  });
});

describe("localization", () => {
  it("disordered strips localize with the same xi in both valleys at B = 0; forward-only strips do not", () => {
    // Source: time reversal maps valley K onto K' (T_K'(L) = T_K(L) at B = 0 on a cylinder, exact).
    const c = inp({ size: { columns: 40, rows: 4 }, disorder: { linkPhaseWidthRad: 6.28, seed: 4 } }, { kind: "localization", ensemble: { samples: 4 } });
    const r = computeLocalization(c.network, c.computation as LocalizationComputation);
    const xiK = r.localizationLength.valleyK,
      xiKp = r.localizationLength.valleyKPrime;
    expect(xiK).not.toBeNull();
    expect(Math.abs((xiK?.nm as number) - (xiKp?.nm as number)) / (xiK?.nm as number)).toBeLessThan(1e-9);
    expect(r.lambda.valleyK as number).toBeCloseTo((xiK?.nm as number) / r.widthNm, 12);
    expect(r.lengthsNm.length).toBe(40);
    const clean = inp({ size: { columns: 20, rows: 4 }, node: { forward: 1 } }, { kind: "localization", ensemble: { samples: 1 } });
    expect(computeLocalization(clean.network, clean.computation as LocalizationComputation).localizationLength.valleyK).toBeNull();
  });
});
