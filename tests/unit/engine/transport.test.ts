import { describe, expect, it } from "vitest";
import { parseComputeInput, type Network, type ConductanceComputation } from "@/engine/schema";
import { computeConductance, leadChannels, composeSample, sampleTransport } from "@/engine/compute/conductance";
import { buildSample } from "@/engine/network/lattice";
import { channelPhases, reverseGraph, CH_LINK } from "@/engine/network/graph";
import { networkScale } from "@/engine/compute/common";
import { graphJson, numpy, randomUnitary } from "./helpers/reference";
import { seededUniform } from "../../support/random";

function input(network: object, computation: object = {}) {
  return parseComputeInput({
    network: { lattice: "triangular", size: { columns: 5, rows: 4 }, periodNm: 120, node: { forward: 0.5, left: 0.3, right: 0.2 }, ...network },
    computation: { kind: "conductance", ...computation },
  });
}
const G = (net: Network, c: ConductanceComputation) => computeConductance(net, c);

describe("check 3: forward-only nodes transmit every injected channel (exact)", () => {
  // Source: with S = 1 every node is a permutation, so each injected channel reaches the far lead (exact law).
  for (const transverse of ["periodic", "open"] as const) {
    for (const lattice of ["triangular"] as const) {
      it(`${lattice}, ${transverse}, with disorder and field, both valleys`, () => {
        const inp = input(
          {
            lattice,
            transverse,
            size: { columns: 7, rows: transverse === "open" ? 5 : 6 },
            node: { forward: 1 },
            disorder: { linkPhaseWidthRad: 6.2, seed: 3 },
          },
          { fieldTesla: 0.37, energyMeV: 1.7 },
        );
        const r = G(inp.network, inp.computation as ConductanceComputation);
        expect(r.conductance.valleyK).toBeCloseTo(r.channels.valleyK, 12);
        expect(r.conductance.valleyKPrime as number).toBeCloseTo(r.channels.valleyKPrime as number, 12);
        const rows = inp.network.size.rows;
        // right-moving channels across a vertical cut: one per row; open edges add one edge channel in K'
        expect(r.channels.valleyK).toBe(rows);
        expect(r.channels.valleyKPrime).toBe(transverse === "open" ? rows + 1 : rows);
        expect(r.transmissionEigenvalues.valleyK.every((t) => Math.abs(t - 1) < 1e-12)).toBe(true);
        expect(r.fano as number).toBeLessThan(1e-12);
      });
    }
  }
  it("two identical channels per link double every count", () => {
    const inp = input({ node: { forward: 1 }, channelsPerLink: 2 });
    const r = G(inp.network, inp.computation as ConductanceComputation);
    expect(r.channels.valleyK).toBe(8);
    expect(r.conductance.valleyK).toBeCloseTo(8, 12);
    expect(r.conductance.total).toBeCloseTo(2 * 16, 11);
  });
});

describe("check 2: the composed sample matrix conserves current, R + T = N to 1e-10", () => {
  // Source: unitarity of the scattering matrix (current conservation, exact law).
  it("disordered triangular samples, open and periodic, in field", () => {
    for (const transverse of ["periodic", "open"] as const) {
      const inp = input(
        { transverse, size: { columns: 12, rows: 8 }, disorder: { linkPhaseWidthRad: 6.28, forwardSpread: 0.2, seed: 11 } },
        { fieldTesla: 1.3, energyMeV: 2.2 },
      );
      const r = G(inp.network, inp.computation as ConductanceComputation);
      expect(r.checks.currentConservationError).toBeLessThan(1e-10);
      expect(r.conductance.valleyK).toBeGreaterThan(0);
      expect(r.conductance.valleyK).toBeLessThan(r.channels.valleyK);
    }
  });
});

describe("check 4: Onsager, total G(B) = G(-B)", () => {
  // Source: Onsager-Casimir reciprocity for two-terminal conductance; valley K' is the time reverse of K.
  it("holds for the total while each valley alone is not symmetric", () => {
    for (const transverse of ["periodic", "open"] as const) {
      const base = input({ transverse, size: { columns: 6, rows: 6 }, disorder: { linkPhaseWidthRad: 5, forwardSpread: 0.1, seed: 5 } }, { energyMeV: 1.1 });
      const plus = G(base.network, { ...(base.computation as ConductanceComputation), fieldTesla: 0.21 });
      const minus = G(base.network, { ...(base.computation as ConductanceComputation), fieldTesla: -0.21 });
      expect(Math.abs(plus.conductance.total - minus.conductance.total)).toBeLessThan(1e-10);
      expect(Math.abs(plus.conductance.valleyK - minus.conductance.valleyK)).toBeGreaterThan(1e-4);
      // and the K' valley at B is the K valley at -B (up to the edge channel count difference)
      expect(plus.conductance.valleyKPrime as number).toBeCloseTo(minus.conductance.valleyK + (transverse === "open" ? 1 : 0), 10);
    }
  });
});

describe("check 5: flux periodicity with period h / (e A_triangle)", () => {
  // Source: the Peierls phases around every elementary triangle change by 2 pi per flux quantum (exact gauge law).
  it("conductance repeats in field with the period, cylinder and open strip, both lattices", () => {
    for (const [lattice, transverse, node] of [
      ["triangular", "periodic", { forward: 0.4, left: 0.35, right: 0.25 }],
      ["triangular", "open", { forward: 0.4, left: 0.35, right: 0.25 }],
      ["square", "periodic", { turning: 0.4 }],
      ["square", "open", { turning: 0.3 }],
    ] as const) {
      const base = input({ lattice, transverse, node, size: { columns: 6, rows: 4 }, disorder: { linkPhaseWidthRad: 4, seed: 9 } }, { energyMeV: 0.7 });
      const period = networkScale(base.network).fieldPeriodTesla;
      const c = base.computation as ConductanceComputation;
      const a = G(base.network, { ...c, fieldTesla: 0.13 });
      const b = G(base.network, { ...c, fieldTesla: 0.13 + period });
      const d = G(base.network, { ...c, fieldTesla: 0.13 - 2 * period });
      expect(Math.abs(a.conductance.total - b.conductance.total)).toBeLessThan(1e-10);
      expect(Math.abs(a.conductance.total - d.conductance.total)).toBeLessThan(1e-10);
      const half = G(base.network, { ...c, fieldTesla: 0.13 + period / 2 });
      expect(Math.abs(a.conductance.total - half.conductance.total)).toBeGreaterThan(1e-6);
    }
  });
  it("the field period is h/e over the triangle area sqrt3/4 l^2", () => {
    const s = networkScale(input({}).network);
    expect(s.fieldPeriodTesla).toBeCloseTo(4.135667696e-15 / ((Math.sqrt(3) / 4) * 120e-9 ** 2), 8);
  });
  it("every elementary triangle of a sample encloses 2 pi phi of Peierls phase (both gauges, seams included)", () => {
    const phi = 0.137;
    for (const [transverse, mode] of [
      ["periodic", "leads"],
      ["open", "leads"],
      ["open", "ring"],
      ["periodic", "ring"],
    ] as const) {
      const net = input({ transverse, size: { columns: 4, rows: 4 } }).network;
      // a torus needs a whole number of flux quanta: 2 * 4 * 4 triangles
      const f = mode === "ring" && transverse === "periodic" ? 3 / 32 : phi;
      const g = buildSample(net, { mode, fluxPerPlaquette: f, sample: 0 });
      const out = new Map<number, number[]>();
      for (let c = 0; c < g.channelCount; c++)
        if (g.chKind[c] === CH_LINK) {
          const a = g.chFromNode[c];
          if (!out.has(a)) out.set(a, []);
          (out.get(a) as number[]).push(c);
        }
      let triangles = 0;
      for (const [a, l1s] of out)
        for (const l1 of l1s)
          for (const l2 of out.get(g.chToNode[l1]) ?? [])
            for (const l3 of out.get(g.chToNode[l2]) ?? []) {
              if (g.chToNode[l3] !== a || !g.nodeReal[a] || !g.nodeReal[g.chToNode[l1]] || !g.nodeReal[g.chToNode[l2]]) continue;
              const s = g.chThetaB[l1] + g.chThetaB[l2] + g.chThetaB[l3];
              // orientation from the unwrapped segments: up triangles counter-clockwise (+), down clockwise (-)
              const cross =
                (g.chSegment[4 * l1 + 2] - g.chSegment[4 * l1]) * (g.chSegment[4 * l2 + 3] - g.chSegment[4 * l2 + 1]) -
                (g.chSegment[4 * l1 + 3] - g.chSegment[4 * l1 + 1]) * (g.chSegment[4 * l2 + 2] - g.chSegment[4 * l2]);
              const expected = Math.sign(cross) * 2 * Math.PI * f;
              const d = s - expected;
              expect(Math.abs(Math.atan2(Math.sin(d), Math.cos(d)))).toBeLessThan(1e-9);
              triangles++;
            }
      expect(triangles).toBeGreaterThan(20);
    }
  });
});

describe("check 7: independent dense solve of the whole network (numpy) agrees to 1e-9", () => {
  // Source: numpy.linalg.solve (Debian python3-numpy) on the full linear system of all link amplitudes.
  const rand = seededUniform(20240607);
  const cases: { name: string; net: object; fieldTesla: number }[] = [
    {
      name: "triangular probability nodes, spread, disorder, field, cylinder",
      net: { size: { columns: 5, rows: 4 }, disorder: { linkPhaseWidthRad: 6.28, forwardSpread: 0.3, seed: 2 } },
      fieldTesla: 0.31,
    },
    {
      name: "triangular explicit random unitary node, open edges",
      net: { transverse: "open", size: { columns: 4, rows: 3 }, node: { matrix: randomUnitary(3, rand) }, disorder: { linkPhaseWidthRad: 3, seed: 4 } },
      fieldTesla: -0.2,
    },
    {
      name: "triangular two mixed channels (6 x 6 node)",
      net: { size: { columns: 3, rows: 2 }, channelsPerLink: 2, node: { matrix: randomUnitary(6, rand) }, disorder: { linkPhaseWidthRad: 2, seed: 8 } },
      fieldTesla: 0.5,
    },
    {
      name: "square network, spread, open",
      net: {
        lattice: "square",
        transverse: "open",
        size: { columns: 6, rows: 3 },
        node: { turning: 0.4 },
        disorder: { linkPhaseWidthRad: 6, forwardSpread: 0.4, seed: 1 },
      },
      fieldTesla: 0.9,
    },
    {
      name: "square network, cylinder",
      net: { lattice: "square", size: { columns: 5, rows: 3 }, node: { turning: 0.65 }, disorder: { linkPhaseWidthRad: 6, seed: 6 } },
      fieldTesla: 0.1,
    },
  ];
  for (const cs of cases) {
    it(cs.name, () => {
      const inp = input(cs.net, { fieldTesla: cs.fieldTesla, energyMeV: 3.3 });
      const scale = networkScale(inp.network);
      const phi = (cs.fieldTesla * scale.plaquetteAreaM2) / 4.135667696e-15;
      const gK = buildSample(inp.network, { mode: "leads", fluxPerPlaquette: phi, sample: 0 });
      for (const g of [gK, reverseGraph(gK)]) {
        const theta = 3.3 / scale.energyScaleMeV;
        const z = channelPhases(g, theta);
        const abs = composeSample(g, theta);
        const ref = numpy<{ rows: number[]; cols: number[]; re: number[]; im: number[] }>({ op: "scattering", graph: graphJson(g, z) });
        let worst = 0;
        ref.rows.forEach((ro, i) =>
          ref.cols.forEach((co, j) => {
            const [re, im] = abs.entry(ro, co);
            worst = Math.max(worst, Math.hypot(re - ref.re[i * ref.cols.length + j], im - ref.im[i * ref.cols.length + j]));
          }),
        );
        expect(worst).toBeLessThan(1e-9);
        const { leftIn, rightOut } = leadChannels(g);
        expect(ref.cols.length).toBe(leftIn.length + leadChannels(g).rightIn.length);
        expect(rightOut.length).toBeGreaterThan(0);
        expect(sampleTransport(g, theta, false).conservationError).toBeLessThan(1e-10);
      }
    });
  }
});

describe("sample geometry (README diagram)", () => {
  // Source: physics.md section 2: link j runs from R to R + a_j, a1 = l(1,0), a2 = l(-1/2, sqrt3/2), a3 = -a1 - a2.
  it("every lattice link of valley K is the vector a_j of its slot; K' links are reversed", () => {
    const g = buildSample(input({ size: { columns: 4, rows: 4 } }).network, { mode: "leads", fluxPerPlaquette: 0, sample: 0 });
    const a = [
      [1, 0],
      [-0.5, Math.sqrt(3) / 2],
      [-0.5, -Math.sqrt(3) / 2],
    ];
    for (let c = 0; c < g.channelCount; c++) {
      const slot = g.chFromNode[c] >= 0 ? g.chFromSlot[c] : g.chToSlot[c];
      expect(g.chSegment[4 * c + 2] - g.chSegment[4 * c]).toBeCloseTo(a[slot % 3][0], 12);
      expect(g.chSegment[4 * c + 3] - g.chSegment[4 * c + 1]).toBeCloseTo(a[slot % 3][1], 12);
      if (g.chFromNode[c] >= 0 && g.chToNode[c] >= 0) expect(g.chFromSlot[c]).toBe(g.chToSlot[c]);
    }
    const r = reverseGraph(g);
    expect(r.chSegment[2] - r.chSegment[0]).toBeCloseTo(-(g.chSegment[2] - g.chSegment[0]), 12);
  });
});
