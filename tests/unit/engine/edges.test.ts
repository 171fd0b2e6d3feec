/** Engine v2 (physics.md section 6): open edges, zone points, thermal accuracy, strip lengths, time limit. */
import { describe, expect, it } from "vitest";
import { parseComputeInput, type SpectrumComputation } from "@/engine/schema";
import { compute } from "@/engine/compute";
import { computeSpectrum } from "@/engine/compute/spectrum";
import { periodicCell } from "@/engine/compute/spectrum-cell";
import { buildSample } from "@/engine/network/lattice";
import { CH_LEFT_IN, CH_LEFT_OUT, CH_RIGHT_IN, CH_RIGHT_OUT, reverseGraph } from "@/engine/network/graph";
import { circulantAmplitudes, triangularNodeMatrix } from "@/engine/network/node-matrices";
import { fermiKernel, KRONROD_15, kronrodPanel, thermalAverage } from "@/engine/compute/quadrature";
import { sampleTransport } from "@/engine/compute/conductance";
import { networkScale } from "@/engine/compute/common";
import { checkResourceLimits, EngineLimitError } from "@/engine/index";

const cond = (network: object, computation: object = {}) =>
  compute(parseComputeInput({ network, computation: { kind: "conductance", ...computation } })) as Extract<ReturnType<typeof compute>, { kind: "conductance" }>;
const wrap2pi = (x: number) => ((x % (2 * Math.PI)) + 2 * Math.PI) % (2 * Math.PI);

describe("open square strip (Chalker & Coddington, J. Phys. C 21, 2665 (1988), standard termination)", () => {
  it("each lead gives and takes the same number of channels", () => {
    for (const columns of [5, 6])
      for (const rows of [1, 4]) {
        const inp = parseComputeInput({
          network: { lattice: "square", size: { columns, rows }, transverse: "open", periodNm: 100, node: { turning: 0.3 } },
          computation: { kind: "conductance" },
        });
        const g = buildSample(inp.network, { mode: "leads", fluxPerPlaquette: 0, sample: 0 });
        const count = (k: number) => Array.from(g.chKind).filter((x) => x === k).length;
        expect([count(CH_LEFT_IN), count(CH_LEFT_OUT), count(CH_RIGHT_IN), count(CH_RIGHT_OUT)]).toEqual([rows, rows, rows, rows]);
      }
  });
  it("quantum Hall plateau: g = 1 deep in one phase, 0 in the other; R + T = N", () => {
    const net = (turning: number, w = 2 * Math.PI) => ({
      lattice: "square",
      size: { columns: 24, rows: 6 },
      transverse: "open",
      periodNm: 100,
      node: { turning },
      disorder: { linkPhaseWidthRad: w, seed: 3 },
    });
    // (p = 0 or 1 exactly leaves closed plaquettes at exact resonance: a singular network)
    const plateau = cond(net(0.05), { ensemble: { samples: 8 } });
    expect(Math.abs(plateau.conductance.total - 1)).toBeLessThan(1e-2);
    expect(cond(net(0.95), { ensemble: { samples: 8 } }).conductance.total).toBeLessThan(1e-2);
    expect(plateau.checks.currentConservationError).toBeLessThan(1e-10);
  });
  it("critical point p = 1/2, full phase disorder, L = 16 (8 rows x 16 columns): mean g matches our numpy reference 0.664(5) (physics.md section 6)", () => {
    const r = cond(
      {
        lattice: "square",
        size: { columns: 16, rows: 8 },
        transverse: "open",
        periodNm: 100,
        node: { turning: 0.5 },
        disorder: { linkPhaseWidthRad: 2 * Math.PI, seed: 5 },
      },
      { ensemble: { samples: 400 } },
    );
    const se = Math.hypot(r.ensemble?.stderr.total ?? 0, 0.005);
    expect(Math.abs(r.conductance.total - 0.664)).toBeLessThan(4 * se);
  });
});

describe("mirror-symmetric gauge of probability nodes (exact mirror symmetry y -> -y, physics.md section 6)", () => {
  it("arg(s_l conj s_r) lies in (-pi/3, pi/3]; left = right gives s_l = s_r", () => {
    for (const [f, l, r] of [
      [0.5, 0.3, 0.2],
      [0.2, 0.5, 0.3],
      [0.6, 0.2, 0.2],
      [0.15, 0.45, 0.4],
    ])
      for (const b of [1, -1] as const)
        for (const chi of [0, 1.3, -2.9]) {
          const { sl, sr } = circulantAmplitudes(f, l, r, b, chi);
          const d = Math.atan2(sl[1] * sr[0] - sl[0] * sr[1], sl[0] * sr[0] + sl[1] * sr[1]);
          expect(d).toBeGreaterThan(-Math.PI / 3 - 1e-12);
          expect(d).toBeLessThanOrEqual(Math.PI / 3 + 1e-12);
          if (l === r) {
            expect(sl[0]).toBe(sr[0]);
            expect(sl[1]).toBe(sr[1]);
          }
        }
  });
  it("audit case: 5 x 5 open, forward 0.5, E = 3.7 meV: G_K(+0.13 T) = G_K(-0.13 T) (0.984, the audit's mirror-symmetric value)", () => {
    const net = { lattice: "triangular", size: { columns: 5, rows: 5 }, transverse: "open", periodNm: 141, node: { forward: 0.5 } };
    const p = cond(net, { energyMeV: 3.7, fieldTesla: 0.13 }),
      m = cond(net, { energyMeV: 3.7, fieldTesla: -0.13 });
    expect(Math.abs(p.conductance.valleyK - m.conductance.valleyK)).toBeLessThan(1e-10);
    expect(p.conductance.valleyK).toBeCloseTo(0.984, 3);
    expect(p.conductance.total).toBeCloseTo(5.937, 3);
  });
  it("G_K(B) = G_K(-B) on mirror-symmetric open samples (odd rows, left = right) at random E and B", () => {
    for (const [E, B, f] of [
      [0.7, 0.31, 0.3],
      [5.2, -0.05, 0.75],
      [11, 0.9, 0.5],
    ]) {
      const net = { lattice: "triangular", size: { columns: 4, rows: 7 }, transverse: "open", periodNm: 120, node: { forward: f } };
      expect(
        Math.abs(cond(net, { energyMeV: E, fieldTesla: B }).conductance.valleyK - cond(net, { energyMeV: E, fieldTesla: -B }).conductance.valleyK),
      ).toBeLessThan(1e-10);
    }
  });
  it("the same node written as a triple, as its matrix, as a relabelled matrix or with random diagonal phases gives the same open-edge result", () => {
    const toRows = (m: Float64Array): [number, number][][] =>
      [0, 1, 2].map((i) => [0, 1, 2].map((j) => [m[2 * (i * 3 + j)], m[2 * (i * 3 + j) + 1]] as [number, number]));
    const relabel = (m: Float64Array, a: number[]) => {
      const o = new Float64Array(18);
      for (let i = 0; i < 3; i++)
        for (let j = 0; j < 3; j++) {
          const ph = a[i] - a[j],
            re = m[2 * (i * 3 + j)],
            im = m[2 * (i * 3 + j) + 1];
          o[2 * (i * 3 + j)] = re * Math.cos(ph) - im * Math.sin(ph);
          o[2 * (i * 3 + j) + 1] = re * Math.sin(ph) + im * Math.cos(ph);
        }
      return o;
    };
    for (const [f, l, r, b, chi] of [
      [0.5, 0.3, 0.2, 1, 0.4],
      [0.3, 0.25, 0.45, -1, -1.1],
    ] as [number, number, number, 1 | -1, number][]) {
      const base = { lattice: "triangular", size: { columns: 4, rows: 5 }, transverse: "open", periodNm: 130 };
      const ref = cond({ ...base, node: { forward: f, left: l, right: r, branch: b, phaseRad: chi } }, { energyMeV: 2.1, fieldTesla: 0.2 });
      const S = triangularNodeMatrix(f, l, r, b, chi);
      for (const a of [
        [0, 0, 0],
        [0, (2 * Math.PI) / 3, (4 * Math.PI) / 3],
        [0, 0.7, -2.3],
      ]) {
        const x = cond({ ...base, node: { matrix: toRows(relabel(S, a)) } }, { energyMeV: 2.1, fieldTesla: 0.2 });
        expect(Math.abs(x.conductance.valleyK - ref.conductance.valleyK)).toBeLessThan(1e-9);
        expect(Math.abs(x.conductance.total - ref.conductance.total)).toBeLessThan(1e-9);
      }
    }
  });
});

describe("high-symmetry points by their defining property (zone geometry, physics.md section 6)", () => {
  it("triangular: K has k.a_j = 2 pi/3 for all j and |K| = 4 pi/3l; M has 2M in the reciprocal lattice and |M| = 2 pi/(sqrt3 l)", () => {
    const l = 141;
    const inp = parseComputeInput({
      network: { lattice: "triangular", size: { columns: 2, rows: 2 }, periodNm: l, node: { forward: 0.5 } },
      computation: { kind: "spectrum", pathPointsPerSegment: 6 },
    });
    const r = computeSpectrum(inp.network, inp.computation as SpectrumComputation);
    const at = (label: string) => r.kPointsPerNm[(r.pathLabels ?? []).find((p) => p.label === label)?.index ?? -1];
    const a = [
      [l, 0],
      [-l / 2, (Math.sqrt(3) * l) / 2],
      [-l / 2, (-Math.sqrt(3) * l) / 2],
    ];
    const K = at("K"),
      M = at("M");
    for (const aj of a) expect(wrap2pi(K[0] * aj[0] + K[1] * aj[1])).toBeCloseTo((2 * Math.PI) / 3, 10);
    expect(Math.hypot(K[0], K[1])).toBeCloseTo((4 * Math.PI) / (3 * l), 12);
    for (const aj of a) {
      const x = (2 * (M[0] * aj[0] + M[1] * aj[1])) / (2 * Math.PI);
      expect(Math.abs(x - Math.round(x))).toBeLessThan(1e-10);
    }
    expect(Math.hypot(M[0], M[1])).toBeCloseTo((2 * Math.PI) / (Math.sqrt(3) * l), 12);
    // M lies on the zone edge that ends at K: |K - M| = |M| tan 30 degrees
    expect(Math.hypot(K[0] - M[0], K[1] - M[1])).toBeCloseTo((2 * Math.PI) / (3 * l), 12);
  });
  it("square: X = (pi/d, 0) and M = (pi/d, pi/d) for the network's own Bloch cell of constant d", () => {
    const inp = parseComputeInput({
      network: { lattice: "square", size: { columns: 2, rows: 2 }, periodNm: 100, node: { turning: 0.3 } },
      computation: { kind: "spectrum", pathPointsPerSegment: 4 },
    });
    const cell = periodicCell(inp.network, 0, 1);
    const r = computeSpectrum(inp.network, inp.computation as SpectrumComputation);
    const at = (label: string) => r.kPointsPerNm[(r.pathLabels ?? []).find((p) => p.label === label)?.index ?? -1];
    const d1 = cell.a1.map((x) => x * 100),
      d2 = cell.a2.map((x) => x * 100);
    const X = at("X"),
      M = at("M");
    expect(X[0] * d1[0] + X[1] * d1[1]).toBeCloseTo(Math.PI, 10);
    expect(X[0] * d2[0] + X[1] * d2[1]).toBeCloseTo(0, 10);
    expect(M[0] * d1[0] + M[1] * d1[1]).toBeCloseTo(Math.PI, 10);
    expect(M[0] * d2[0] + M[1] * d2[1]).toBeCloseTo(Math.PI, 10);
  });
});

describe("thermal average (against a brute-force integral)", () => {
  it("Gauss-Kronrod 15 is exact to degree 22 and its Gauss 7 to degree 13 (exact polynomial integrals)", () => {
    for (const p of [0, 4, 12, 13, 22]) {
      const exact = p % 2 === 0 ? 2 / (p + 1) : 0;
      const r = kronrodPanel((x) => [x ** p], -1, 1);
      expect(r.value[0]).toBeCloseTo(exact, 14);
      if (p <= 13) expect(r.error[0]).toBeLessThan(1e-14);
    }
    expect(KRONROD_15.wK.reduce((a, b) => a + b, 0) * 2 - KRONROD_15.wK[7]).toBeCloseTo(2, 14);
  });
  it("resonant 6 x 6 sample: 1e-4 relative accuracy at 1.5 K and at kT equal to the period, error reported", () => {
    const network = { lattice: "triangular", size: { columns: 6, rows: 6 }, periodNm: 141, node: { forward: 0.2 } };
    const inp = parseComputeInput({ network, computation: { kind: "conductance" } });
    const sc = networkScale(inp.network);
    const g = buildSample(inp.network, { mode: "leads", fluxPerPlaquette: 0, sample: 0 }),
      gr = reverseGraph(g);
    const G = (e: number) => {
      const th = e / sc.energyScaleMeV;
      return sampleTransport(g, th, false, undefined, false).transmission + sampleTransport(gr, th, false, undefined, false).transmission;
    };
    const kB = 1.380649e-23 / 1.602176634e-22;
    for (const T of [1.5, sc.energyPeriodMeV / kB]) {
      const kT = kB * T,
        mu = 1.3,
        N = 12000;
      // brute force: trapezoid over one period (exact for a periodic integrand once resolved) with the kernel's images
      let bf = 0;
      const lo = mu - sc.energyPeriodMeV / 2;
      for (let i = 0; i < N; i++) {
        const e = lo + (sc.energyPeriodMeV * i) / N;
        let w = 0;
        for (let n = -400; n <= 400; n++) w += fermiKernel(e - mu + n * sc.energyPeriodMeV, kT);
        bf += G(e) * w;
      }
      bf *= sc.energyPeriodMeV / N;
      const r = cond(network, { energyMeV: mu, temperatureK: T });
      const total = r.conductance.total / 2; // spin 2
      expect(Math.abs(total - bf) / bf).toBeLessThan(1e-4);
      expect(r.thermal?.converged).toBe(true);
      expect(r.thermal?.estimatedRelativeError).toBeLessThan(1e-4);
      expect(r.warnings).toEqual([]);
    }
  });
  it("a fixed rule too coarse for the structure says so in its warnings", () => {
    const r = cond(
      { lattice: "triangular", size: { columns: 6, rows: 6 }, periodNm: 141, node: { forward: 0.2 } },
      { energyMeV: 1.3, temperatureK: 10, temperaturePoints: 8 },
    );
    expect(r.thermal?.method).toBe("gauss-legendre");
    expect(r.thermal?.converged).toBe(false);
    expect(r.warnings[0]).toMatch(/thermal average/);
  });
  it("a periodic integrand averaged by the rule equals the analytic Fourier result (Sommerfeld: w^(omega) = pi kT omega / sinh)", () => {
    const P = 10,
      kT = 0.7;
    const r = thermalAverage((e) => [Math.cos((2 * Math.PI * e) / P)], 0, kT, P, { relativeTolerance: 1e-10, maxEnergies: 5000, scale: 1, panelMeV: 1 });
    const om = (2 * Math.PI) / P;
    expect(r.values[0]).toBeCloseTo((Math.PI * kT * om) / Math.sinh(Math.PI * kT * om), 9);
  });
});

describe("localization lengths and the compute-time limit", () => {
  it("lengthsNm are the distances from the left lead, one per column, spaced by the column pitch (open and periodic)", () => {
    for (const [lattice, transverse, pitch] of [
      ["triangular", "open", 1],
      ["triangular", "periodic", 1],
      ["square", "open", Math.SQRT1_2],
    ] as const) {
      const r = compute(
        parseComputeInput({
          network: {
            lattice,
            size: { columns: 7, rows: lattice === "triangular" ? 4 : 3 },
            transverse,
            periodNm: 100,
            node: lattice === "square" ? { turning: 0.4 } : { forward: 0.4 },
            disorder: { linkPhaseWidthRad: 6 },
          },
          computation: { kind: "localization", ensemble: { samples: 2 } },
        }),
      ) as Extract<ReturnType<typeof compute>, { kind: "localization" }>;
      expect(r.lengthsNm.length).toBe(7);
      r.lengthsNm.forEach((L, i) => expect(L).toBeCloseTo((i + 1) * pitch * 100, 9));
    }
  });
  it("a 1000 x 1000 closed-sample DOS is refused up front with the estimate and the limit", () => {
    const huge = parseComputeInput({
      network: { lattice: "triangular", size: { columns: 1000, rows: 1000 }, periodNm: 100, node: { forward: 0.5 } },
      computation: { kind: "dos", source: "sample" },
    });
    expect(() => checkResourceLimits(huge)).toThrow(EngineLimitError);
    expect(() => checkResourceLimits(huge)).toThrow(/compute-hours|GB/);
  });
});
