import { describe, expect, it } from "vitest";
import { parseNetwork, type Network } from "@/engine/schema";
import { buildSample } from "@/engine/network/lattice";
import { channelPhases, reverseGraph, CH_LEFT_OUT, type NetworkGraph } from "@/engine/network/graph";
import { blockSchedule } from "@/engine/network/blocks";
import { Absorber } from "@/engine/scattering/absorber";
import { sampleTransport } from "@/engine/compute/conductance";
import { randomUnitary } from "./helpers/reference";
import { seededUniform } from "../../support/random";

// The block path (scattering/block-step.ts: blocks of about a column with links inside them) and
// the general path (Absorber.step: groups of at most 16 unlinked nodes) compute the same dense
// scattering matrix: the same Redheffer star products in a different grouping, so they agree to
// rounding. Source: associativity of the star product (exact); unitarity (exact law) for R + T = N.

function randomNetwork(rand: () => number, lattice: "triangular" | "square", transverse: "open" | "periodic"): Network {
  const columns = 2 + Math.floor(rand() * 11);
  let rows = 2 + Math.floor(rand() * 11);
  if (lattice === "triangular" && transverse === "periodic") rows += rows % 2;
  const forward = 0.3 + 0.45 * rand(); // inside the reachable range at left:right = 2:1 with the spread below
  return parseNetwork({
    version: 1,
    lattice,
    size: { columns, rows },
    transverse,
    periodNm: 50 + 200 * rand(),
    node: lattice === "triangular" ? { forward, left: ((1 - forward) * 2) / 3, right: (1 - forward) / 3 } : { turning: 0.2 + 0.6 * rand() },
    disorder: { linkPhaseWidthRad: 2 * Math.PI * rand(), forwardSpread: lattice === "triangular" ? 0.05 : 0.2 * rand(), seed: Math.floor(rand() * 1e6) },
  });
}

/** Largest |S_general - S_block| over every (out, in) channel pair, and the largest |S|. */
function compare(g: NetworkGraph, theta: number, skipKind = -1): { diff: number; size: number; blocks: number; groups: number } {
  const z = channelPhases(g, theta);
  const a = new Absorber(g, z, false, undefined, 16, skipKind, "general");
  a.run();
  const b = new Absorber(g, z, false, undefined, 16, skipKind, "block");
  b.run();
  let diff = 0,
    size = 0;
  expect(b.nr).toBe(a.nr);
  expect(b.nc).toBe(a.nc);
  expect(Array.from(b.rowCh.subarray(0, b.nr)).sort((x, y) => x - y)).toEqual(Array.from(a.rowCh.subarray(0, a.nr)).sort((x, y) => x - y));
  expect(Array.from(b.colCh.subarray(0, b.nc)).sort((x, y) => x - y)).toEqual(Array.from(a.colCh.subarray(0, a.nc)).sort((x, y) => x - y));
  // every entry of the live matrix (a channel without a row or column reads 0 on both)
  for (let r = 0; r < a.nr; r++)
    for (let c = 0; c < a.nc; c++) {
      const o = a.rowCh[r],
        i = a.colCh[c];
      const x = a.entry(o, i),
        y = b.entry(o, i);
      diff = Math.max(diff, Math.hypot(x[0] - y[0], x[1] - y[1]));
      size = Math.max(size, Math.hypot(x[0], x[1]));
    }
  return { diff, size, blocks: b.order.length, groups: a.order.length };
}

describe("block path against the general graph path", () => {
  for (const lattice of ["triangular", "square"] as const)
    for (const transverse of ["periodic", "open"] as const)
      it(`${lattice}, ${transverse}: random disordered networks, both valleys, the whole matrix to 1e-12`, () => {
        const rand = seededUniform(lattice === "triangular" ? (transverse === "open" ? 11 : 12) : transverse === "open" ? 13 : 14);
        let fewerSteps = 0;
        for (let trial = 0; trial < 6; trial++) {
          const net = randomNetwork(rand, lattice, transverse);
          const gK = buildSample(net, { mode: "leads", fluxPerPlaquette: 0.3 * (rand() - 0.5), sample: trial });
          for (const [g, skip] of [
            [gK, -1],
            [reverseGraph(gK), -1],
            [reverseGraph(gK), CH_LEFT_OUT],
          ] as const) {
            const r = compare(g, 2 * Math.PI * rand(), skip);
            expect(r.size).toBeGreaterThan(0.1);
            expect(r.diff, `${net.size.columns} x ${net.size.rows}`).toBeLessThan(1e-12 * r.size);
            if (r.blocks < r.groups) fewerSteps++;
          }
          // current conservation on the block path (both valleys)
          const theta = 2 * Math.PI * rand();
          for (const g of [gK, reverseGraph(gK)]) expect(sampleTransport(g, theta, false, undefined, true, "block").conservationError).toBeLessThan(1e-10);
        }
        // the blocks are larger than the general groups on the triangular lattice (links inside a column)
        if (lattice === "triangular") expect(fewerSteps).toBeGreaterThan(0);
      });

  it("36 x 36 networks (blocks large enough for the selected backend's solve and update)", () => {
    for (const [lattice, transverse] of [
      ["triangular", "periodic"],
      ["triangular", "open"],
      ["square", "open"],
    ] as const) {
      const net = parseNetwork({
        version: 1,
        lattice,
        size: { columns: 36, rows: 36 },
        transverse,
        periodNm: 150,
        node: lattice === "triangular" ? { forward: 0.6, left: 0.25, right: 0.15 } : { turning: 0.45 },
        disorder: { linkPhaseWidthRad: 6.2, seed: 9 },
      });
      const gK = buildSample(net, { mode: "leads", fluxPerPlaquette: 0.01, sample: 0 });
      for (const g of [gK, reverseGraph(gK)]) {
        const r = compare(g, 1.3);
        expect(r.diff, `${lattice} ${transverse}`).toBeLessThan(1e-12 * r.size);
      }
    }
  });

  it("explicit node matrices: one channel per link and two mixed channels (6 x 6)", () => {
    const rand = seededUniform(21);
    for (const [channelsPerLink, n] of [
      [1, 3],
      [2, 6],
    ] as const)
      for (const transverse of ["open", "periodic"] as const) {
        const net = parseNetwork({
          version: 1,
          lattice: "triangular",
          size: { columns: 5, rows: 4 },
          transverse,
          periodNm: 120,
          channelsPerLink,
          node: { matrix: randomUnitary(n, rand) },
          disorder: { linkPhaseWidthRad: 3, seed: 5 },
        });
        const gK = buildSample(net, { mode: "leads", fluxPerPlaquette: 0.07, sample: 0 });
        for (const g of [gK, reverseGraph(gK)]) {
          const r = compare(g, 0.9);
          expect(r.diff).toBeLessThan(1e-12 * r.size);
          expect(sampleTransport(g, 0.4, false, undefined, true, "block").conservationError).toBeLessThan(1e-10);
        }
      }
  });

  it("a block never holds a link from a later member to an earlier one, and every node is in exactly one block", () => {
    const rand = seededUniform(31);
    for (const lattice of ["triangular", "square"] as const)
      for (const transverse of ["periodic", "open"] as const) {
        const g = buildSample(randomNetwork(rand, lattice, transverse), { mode: "leads", fluxPerPlaquette: 0, sample: 0 });
        for (const graph of [g, reverseGraph(g)]) {
          const seen = new Uint8Array(graph.nodeCount);
          for (const block of blockSchedule(graph)) {
            const pos = new Map<number, number>();
            block.forEach((m, t) => pos.set(m, t));
            for (const m of block) {
              expect(seen[m]).toBe(0);
              seen[m] = 1;
              for (let s = graph.slotOffset[m]; s < graph.slotOffset[m] + graph.slotCount[m]; s++) {
                const to = graph.chToNode[graph.outChannel[s]];
                if (pos.has(to)) expect(pos.get(to) as number).toBeGreaterThan(pos.get(m) as number);
              }
            }
          }
          expect(seen.every((x) => x === 1)).toBe(true);
        }
      }
  });

  it("closed samples: the product of the block determinants is det(1 - U) of the general path", () => {
    const rand = seededUniform(41);
    for (const lattice of ["triangular", "square"] as const) {
      const net = randomNetwork(rand, lattice, "open");
      const g = buildSample(net, { mode: "ring", fluxPerPlaquette: 0, sample: 0 });
      const z = channelPhases(g, 0.7, 0.05);
      const prod = (path: "general" | "block"): [number, number] => {
        const a = new Absorber(g, z, true, undefined, 16, -1, path);
        a.run();
        const d = a.stepDet as Float64Array;
        let re = 1,
          im = 0;
        for (let i = 0; i < d.length / 2; i++) [re, im] = [re * d[2 * i] - im * d[2 * i + 1], re * d[2 * i + 1] + im * d[2 * i]];
        return [re, im];
      };
      const [ar, ai] = prod("general"),
        [br, bi] = prod("block");
      expect(Math.hypot(ar - br, ai - bi)).toBeLessThan(1e-10 * Math.hypot(ar, ai));
    }
  });
});
