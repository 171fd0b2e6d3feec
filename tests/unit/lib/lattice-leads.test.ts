// The drawing shows every lead's channels in both directions (src/lib/lattice.ts, leadStubs
// beside the kind-1 links); on a periodic sample as many channels enter from each lead as leave
// into it, the same counts as the engine's sample graph (src/engine/network/lattice.ts, physics.md
// section 2: valley K runs R -> R + a_j; K' is reversed).
import { describe, expect, it } from "vitest";
import { networkGeometry, type NetworkGeometry } from "@/lib/lattice";
import { leadDirection, leadSide } from "@/components/network/NetworkDrawing";
import { buildSample } from "@/engine/network/lattice";
import { CH_LEFT_IN, CH_LEFT_OUT, CH_RIGHT_IN, CH_RIGHT_OUT } from "@/engine/network/graph";
import { parseNetwork } from "@/engine";

/** Lead channels of the drawing by lead and direction. */
function drawnLeadChannels(g: NetworkGeometry) {
  const count = { left: { in: 0, out: 0 }, right: { in: 0, out: 0 } };
  const add = (x0: number, x1: number, of: "link" | "stub") => count[leadSide(g, x0, x1)][leadDirection(g, of)]++;
  for (let i = 0; i < g.linkCount; i++) if (g.linkKind[i] === 1) add(g.links[4 * i], g.links[4 * i + 2], "link");
  const s = g.leadStubs ?? new Float32Array(0);
  for (let i = 0; i < s.length / 4; i++) add(s[4 * i], s[4 * i + 2], "stub");
  return count;
}

describe("lead channels in the drawing", () => {
  for (const lattice of ["triangular", "square"] as const)
    for (const transverse of ["periodic", "open"] as const)
      it(`${lattice}, ${transverse}: channels enter and leave at both leads, as many as the engine's sample has`, () => {
        const [columns, rows] = [5, 4];
        const g = networkGeometry({ lattice, columns, rows, transverse, valley: "K" });
        const drawn = drawnLeadChannels(g);
        const net = parseNetwork({
          lattice,
          size: { columns, rows },
          transverse,
          periodNm: 100,
          node: lattice === "triangular" ? { forward: 0.5, left: 0.25, right: 0.25 } : { turning: 0.5 },
        });
        const engine = buildSample(net, { mode: "leads", fluxPerPlaquette: 0, sample: 0 });
        const kinds = Array.from(engine.chKind);
        const n = (k: number) => kinds.filter((c) => c === k).length;
        for (const side of ["left", "right"] as const) {
          expect(drawn[side].in).toBeGreaterThan(0);
          expect(drawn[side].out).toBeGreaterThan(0);
          // Open edges: the engine's virtual edge nodes at the corners add lead channels the drawing does not draw.
          if (transverse === "periodic") expect(drawn[side].in).toBe(drawn[side].out);
        }
        if (lattice === "triangular" && transverse === "periodic") {
          // The drawing's triangular layout is the engine's; the square drawing is a schematic grid.
          expect(drawn.left).toEqual({ in: n(CH_LEFT_IN), out: n(CH_LEFT_OUT) });
          expect(drawn.right).toEqual({ in: n(CH_RIGHT_IN), out: n(CH_RIGHT_OUT) });
        }
        // Every stub entering from a lead ends at a node (its head, valley K) on that lead's face.
        const s = g.leadStubs!;
        const nodes = new Set(Array.from({ length: g.nodeCount }, (_, k) => `${g.nodes[2 * k].toFixed(3)},${g.nodes[2 * k + 1].toFixed(3)}`));
        for (let i = 0; i < s.length / 4; i++) {
          expect(nodes.has(`${s[4 * i + 2].toFixed(3)},${s[4 * i + 3].toFixed(3)}`)).toBe(true);
          expect(Math.min(Math.abs(s[4 * i + 2] - g.bounds.xMin), Math.abs(s[4 * i + 2] - g.bounds.xMax))).toBeLessThanOrEqual(0.5);
        }
      });

  it("reverses every lead channel in valley K'", () => {
    const k = drawnLeadChannels(networkGeometry({ lattice: "triangular", columns: 4, rows: 4, transverse: "periodic", valley: "K" }));
    const gK = networkGeometry({ lattice: "triangular", columns: 4, rows: 4, transverse: "periodic", valley: "K" });
    const kp = networkGeometry({ lattice: "triangular", columns: 4, rows: 4, transverse: "periodic", valley: "K'" });
    expect(leadDirection(kp, "stub")).toBe("out");
    expect(leadDirection(kp, "link")).toBe("in");
    // The stub entering at a node in K leaves from it in K'.
    expect([kp.leadStubs![0], kp.leadStubs![1]]).toEqual([gK.leadStubs![2], gK.leadStubs![3]]);
    expect(drawnLeadChannels(kp)).toEqual(k);
  });
});
