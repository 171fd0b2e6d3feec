/**
 * Hall bars (computation kind hallBar; physics.md section 6, Landauer-Buettiker). Sources:
 * current conservation and gauge invariance (rows and columns of G sum to zero); Onsager-Buettiker
 * reciprocity G_ij(B) = G_ji(-B), R_mn,kl(B) = R_kl,mn(-B) (Buettiker, Phys. Rev. Lett. 57, 1761
 * (1986), cited from memory); the von Klitzing constant h/e^2 = 25812.80745 ohm (exact in SI since
 * 2019: h and e fixed); an independent dense solve of the whole network in numpy (Debian
 * python3-numpy, tests/unit/engine/helpers/dense_reference.py); the two-terminal conductance kind.
 */
import { describe, expect, it } from "vitest";
import { compute } from "@/engine/compute";
import { parseComputeInput } from "@/engine/schema";
import { EngineInputError } from "@/engine/errors";
import { buildSample } from "@/engine/network/lattice";
import { CH_CONTACT_IN, CH_CONTACT_OUT, CH_LEFT_IN, CH_LEFT_OUT, CH_RIGHT_IN, CH_RIGHT_OUT, channelPhases, reverseGraph } from "@/engine/network/graph";
import { defaultContacts, terminalTransmissions, type HallBarResult } from "@/engine/compute/hall-bar";
import { energyPhase, fluxPerPlaquette, networkScale } from "@/engine/compute/common";
import { triangularNetwork } from "@/shared/networks";
import { graphJson, numpy } from "./helpers/reference";

const R_K = 25812.80745; // h / e^2 in ohms, exact (SI 2019)

const hall = (network: object, computation: object = {}) =>
  compute(parseComputeInput({ network, computation: { kind: "hallBar", ...computation } })) as HallBarResult & { engineVersion: string };

const disorderedTri = (columns = 9, rows = 6, seed = 3) =>
  triangularNetwork({ columns, rows }, { forward: 0.5, left: 0.3, right: 0.2 }, { transverse: "open", disorder: { linkPhaseWidthRad: 2 * Math.PI, seed } });
const square = (turning: number, columns = 16, rows = 8, seed = 2) => ({
  lattice: "square",
  size: { columns, rows },
  transverse: "open",
  periodNm: 100,
  node: { turning },
  disorder: { linkPhaseWidthRad: 2 * Math.PI, seed },
});
// the square network's edge sites sit in the odd columns
const squareContacts = [
  { name: "top1", edge: "top", fromColumn: 5, toColumn: 5 },
  { name: "bottom1", edge: "bottom", fromColumn: 5, toColumn: 5 },
  { name: "top2", edge: "top", fromColumn: 11, toColumn: 11 },
  { name: "bottom2", edge: "bottom", fromColumn: 11, toColumn: 11 },
];

const farContacts = [
  { name: "top1", edge: "top", fromColumn: 13, toColumn: 13 },
  { name: "bottom1", edge: "bottom", fromColumn: 13, toColumn: 13 },
  { name: "top2", edge: "top", fromColumn: 27, toColumn: 27 },
  { name: "bottom2", edge: "bottom", fromColumn: 27, toColumn: 27 },
];

describe("Hall bar: sum rules and reciprocity", () => {
  it("every row and column of G sums to zero (current conservation, gauge invariance) to 1e-10, with disorder and field, at T = 0 and T > 0", () => {
    for (const [net, extra] of [
      [disorderedTri(), { energyMeV: 1.3, fieldTesla: 0.4 }],
      [disorderedTri(8, 5, 7), { energyMeV: 0.2, fieldTesla: -0.2, temperatureK: 2, temperaturePoints: 8 }],
      [square(0.4), { contacts: squareContacts, fieldTesla: 0.1 }],
    ] as const) {
      const r = hall(net, extra);
      const G = r.conductanceMatrix.values;
      for (let i = 0; i < G.length; i++) {
        expect(Math.abs(G[i].reduce((a, b) => a + b, 0))).toBeLessThan(1e-10);
        expect(Math.abs(G.reduce((a, row) => a + row[i], 0))).toBeLessThan(1e-10);
      }
      expect(r.checks.rowSumError).toBeLessThan(1e-10);
      expect(r.checks.columnSumError).toBeLessThan(1e-10);
      expect(r.checks.unitarityError).toBeLessThan(1e-10);
      expect(r.warnings).toEqual([]);
      // a real conductance matrix: the diagonal positive, the rest not
      G.forEach((row, i) => row.forEach((v, j) => (i === j ? expect(v).toBeGreaterThan(0) : expect(v).toBeLessThanOrEqual(1e-12))));
    }
  });

  it("Onsager-Buettiker: G_ij(B) = G_ji(-B) and R_mn,kl(B) = R_kl,mn(-B) with disorder", () => {
    const measurements = [
      { current: ["source", "drain"], voltage: ["top1", "bottom1"] },
      { current: ["top1", "bottom1"], voltage: ["source", "drain"] },
      { current: ["source", "top2"], voltage: ["bottom1", "drain"] },
      { current: ["bottom1", "drain"], voltage: ["source", "top2"] },
    ];
    const plus = hall(disorderedTri(), { energyMeV: 0.9, fieldTesla: 0.35, measurements });
    const minus = hall(disorderedTri(), { energyMeV: 0.9, fieldTesla: -0.35, measurements });
    const Gp = plus.conductanceMatrix.values,
      Gm = minus.conductanceMatrix.values;
    let asym = 0;
    for (let i = 0; i < Gp.length; i++)
      for (let j = 0; j < Gp.length; j++) {
        expect(Math.abs(Gp[i][j] - Gm[j][i])).toBeLessThan(1e-10);
        asym = Math.max(asym, Math.abs(Gp[i][j] - Gp[j][i]));
      }
    // the field really breaks the symmetry of G itself (so the check is not trivially met)
    expect(asym).toBeGreaterThan(1e-3);
    expect(plus.fourTerminalOhms[0].ohms! / minus.fourTerminalOhms[1].ohms!).toBeCloseTo(1, 9);
    expect(plus.fourTerminalOhms[2].ohms! / minus.fourTerminalOhms[3].ohms!).toBeCloseTo(1, 9);
    expect(Math.abs(plus.fourTerminalOhms[0].ohms! - plus.fourTerminalOhms[1].ohms!)).toBeGreaterThan(1);
  });
});

describe("Hall bar: against other computations", () => {
  it("two terminals (contacts: []) reduce exactly to the conductance kind", () => {
    for (const [net, extra] of [
      [disorderedTri(), { energyMeV: 1.1, fieldTesla: 0.25 }],
      [square(0.45), { fieldTesla: 0.05 }],
    ] as const) {
      const h = hall(net, { ...extra, contacts: [], contactOhms: 250 });
      const c = compute(parseComputeInput({ network: net, computation: { kind: "conductance", ...extra, contactOhms: 250 } })) as {
        conductance: { total: number };
        ohms: number;
      };
      const g = c.conductance.total;
      expect(h.conductanceMatrix.terminals).toEqual(["source", "drain"]);
      const G = h.conductanceMatrix.values;
      expect(Math.abs(G[0][0] - g)).toBeLessThan(1e-10 * Math.max(1, g));
      expect(Math.abs(G[1][0] + g)).toBeLessThan(1e-10 * Math.max(1, g));
      expect(h.resistances.twoTerminalOhms! / c.ohms).toBeCloseTo(1, 10);
      expect(h.resistances.longitudinalOhms).toBeNull();
      expect(h.resistances.hallOhms).toBeNull();
    }
  });

  it("a small bar agrees with a dense numpy solve of the whole network to 1e-9 (every T_ij, both valleys)", () => {
    const inp = parseComputeInput({ network: disorderedTri(6, 5, 11), computation: { kind: "hallBar", energyMeV: 0.7, fieldTesla: 0.3 } });
    const net = inp.network;
    const contacts = defaultContacts(net.size.columns);
    const scale = networkScale(net);
    const gK = buildSample(net, { mode: "leads", fluxPerPlaquette: fluxPerPlaquette(scale, 0.3), sample: 0, contacts });
    const th = energyPhase(scale, 0.7);
    for (const g of [gK, reverseGraph(gK)]) {
      const nT = 2 + contacts.length;
      const mine = terminalTransmissions(g, nT, th);
      const z = channelPhases(g, th);
      const ref = numpy<{ rows: number[]; cols: number[]; re: number[]; im: number[] }>({ op: "scattering", graph: graphJson(g, z) });
      const term = (c: number) => {
        const k = g.chKind[c];
        return k === CH_LEFT_IN || k === CH_LEFT_OUT ? 0 : k === CH_RIGHT_IN || k === CH_RIGHT_OUT ? 1 : 2 + g.chContact![c];
      };
      const T = new Array<number>(nT * nT).fill(0);
      ref.rows.forEach((a, i) =>
        ref.cols.forEach((b, j) => {
          const idx = i * ref.cols.length + j;
          T[term(a) * nT + term(b)] += ref.re[idx] ** 2 + ref.im[idx] ** 2;
        }),
      );
      for (let q = 0; q < nT * nT; q++) expect(Math.abs(mine.T[q] - T[q])).toBeLessThan(1e-9);
      // the side contacts are real terminals: they take and give channels
      expect(Array.from(g.chKind).filter((k) => k === CH_CONTACT_IN).length).toBeGreaterThanOrEqual(4);
      expect(Array.from(g.chKind).filter((k) => k === CH_CONTACT_OUT).length).toBeGreaterThanOrEqual(4);
    }
  });
});

describe("Hall bar: quantized Hall resistance and insulator (square network, Chalker & Coddington open strip)", () => {
  it("deep in the quantum Hall phase |R_xy| = h/e^2 = 25812.80745 ohm and R_xx = 0 to 1e-6 relative, for several disorder seeds and both field signs", () => {
    for (const seed of [1, 2, 3])
      for (const B of [0, 0.2, -0.2]) {
        // turning 0.01, 40 columns with the contacts 13 columns from the leads: the bulk is
        // localized within about a plaquette, and what still tunnels from a face lead to a side
        // contact (about 1e-5 of h/e^2 on a 16-column bar at turning 0.02) is far below 1e-6
        const r = hall(square(0.01, 40, 8, seed), { contacts: farContacts, fieldTesla: B });
        expect(Math.abs(Math.abs(r.resistances.hallOhms!) / R_K - 1)).toBeLessThan(1e-6);
        expect(Math.abs(r.resistances.longitudinalOhms!) / R_K).toBeLessThan(1e-6);
        // the two-terminal resistance of a single edge channel is h/e^2 too
        expect(Math.abs(r.resistances.twoTerminalOhms! / R_K - 1)).toBeLessThan(1e-6);
      }
  });

  it("in the other phase the bar insulates: resistances far above h/e^2", () => {
    const r = hall(square(0.98), { contacts: squareContacts });
    expect(r.resistances.twoTerminalOhms!).toBeGreaterThan(1e3 * R_K);
    expect(Math.abs(r.resistances.longitudinalOhms!)).toBeGreaterThan(100 * R_K);
  });
});

describe("Hall bar: symmetry and contract", () => {
  it("a mirror-symmetric clean triangular bar (left = right, odd rows, contacts facing each other) has R_xy = 0 at B = 0, and not at B != 0", () => {
    const net = triangularNetwork({ columns: 9, rows: 7 }, { forward: 0.4, left: 0.3, right: 0.3 }, { transverse: "open" });
    for (const E of [0.3, 1.2, 2.5]) {
      const r = hall(net, { energyMeV: E });
      expect(Math.abs(r.resistances.hallOhms!)).toBeLessThan(1e-9 * R_K);
      expect(r.resistances.longitudinalOhms!).not.toBe(0);
    }
    const b = hall(net, { energyMeV: 1.2, fieldTesla: 0.3 });
    expect(Math.abs(b.resistances.hallOhms!)).toBeGreaterThan(1);
  });

  it("default contacts: the six-terminal bar at floor(C/3) and floor(2C/3); terminals list their windows and channels per valley", () => {
    const r = hall(disorderedTri(10, 6));
    expect(r.terminals.map((t) => [t.name, t.edge, t.fromColumn, t.toColumn])).toEqual([
      ["source", "left", null, null],
      ["drain", "right", null, null],
      ["top1", "top", 3, 3],
      ["bottom1", "bottom", 3, 3],
      ["top2", "top", 6, 6],
      ["bottom2", "bottom", 6, 6],
    ]);
    for (const t of r.terminals.slice(2)) {
      expect(t.channels.valleyK.in).toBeGreaterThan(0);
      expect(t.channels.valleyKPrime).not.toBeNull();
    }
    expect(r.conductanceMatrix.perValley.valleyKPrime).not.toBeNull();
    expect(r.resistances.unit).toBe("ohm");
  });

  it("refuses, naming the field: a periodic sample, overlapping, out-of-range or empty windows, duplicate names, unknown terminals", () => {
    const refuse = (network: object, computation: object, field: string, message: RegExp) => {
      try {
        parseComputeInput({ network, computation: { kind: "hallBar", ...computation } });
      } catch (e) {
        expect(e).toBeInstanceOf(EngineInputError);
        expect((e as EngineInputError).field).toBe(field);
        expect((e as Error).message).toMatch(message);
        return;
      }
      throw new Error(`accepted: ${JSON.stringify(computation)}`);
    };
    const periodic = triangularNetwork({ columns: 6, rows: 4 }, { forward: 0.5, left: 0.25, right: 0.25 });
    refuse(periodic, {}, "network.transverse", /open/);
    const open = disorderedTri();
    const c = (name: string, edge: string, fromColumn: number, toColumn: number) => ({ name, edge, fromColumn, toColumn });
    refuse(open, { contacts: [c("a", "top", 2, 4), c("b", "top", 4, 5)] }, "computation.contacts.1.fromColumn", /overlaps "a"/);
    refuse(open, { contacts: [c("a", "top", 2, 9)] }, "computation.contacts.0.toColumn", /outside the sample \(columns 0 to 8\)/);
    refuse(open, { contacts: [c("a", "top", 4, 2)] }, "computation.contacts.0.toColumn", /empty window/);
    refuse(open, { contacts: [c("a", "top", 2, 2), c("a", "bottom", 2, 2)] }, "computation.contacts.1.name", /used twice/);
    refuse(open, { contacts: [c("source", "top", 2, 2)] }, "computation.contacts.0.name", /left lead/);
    refuse(square(0.3), { contacts: [c("a", "top", 4, 4)] }, "computation.contacts.0", /touches no edge channel.*odd columns/);
    refuse(open, { measurements: [{ current: ["source", "drain"], voltage: ["top1", "top9"] }] }, "computation.measurements.0.voltage.1", /no terminal "top9"/);
    refuse(open, { measurements: [{ current: ["top1", "top1"], voltage: ["top1", "top2"] }] }, "computation.measurements.0.current", /two different/);
  });

  it("an ensemble gives mean, std and stderr of the resistances over disorder samples", () => {
    const r = hall(disorderedTri(8, 6), { energyMeV: 0.5, ensemble: { samples: 4 } });
    expect(r.ensemble!.samples).toBe(4);
    expect(r.ensemble!.undetermined).toBe(0);
    expect(r.ensemble!.std.longitudinalOhms!).toBeGreaterThan(0);
    expect(r.ensemble!.stderr.longitudinalOhms!).toBeCloseTo(r.ensemble!.std.longitudinalOhms! / 2, 9);
    // the samples differ: the mean is not the first sample's value
    const first = hall(disorderedTri(8, 6), { energyMeV: 0.5 });
    expect(r.ensemble!.mean.longitudinalOhms).not.toBeCloseTo(first.resistances.longitudinalOhms!, 6);
  });
});
