/**
 * Bench: a W x W Hall bar (triangular, open edges, the default six-terminal bar) at one energy,
 * both valleys, next to the two-terminal conductance of the same sample (npm run bench). The Hall
 * bar keeps every terminal's rows and is composed on the general path, so it costs more than the
 * two-terminal figure on the block path; the ratio is printed.
 */
import os from "node:os";
import { compute, parseComputeInput } from "../src/engine";

function input(W: number, kind: "hallBar" | "conductance") {
  return parseComputeInput({
    network: {
      lattice: "triangular",
      size: { columns: W, rows: W },
      transverse: "open",
      twistDegrees: 0.11,
      node: { forward: 0.5, left: 0.25, right: 0.25 },
      disorder: { linkPhaseWidthRad: 2 * Math.PI, seed: 1 },
    },
    computation: { kind, energyMeV: 1.0, fieldTesla: 0.1 },
  });
}

function time(f: () => unknown, repeats = 3): number {
  f(); // warm-up
  const t: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    f();
    t.push((performance.now() - t0) / 1000);
  }
  return t.sort((a, b) => a - b)[Math.floor(repeats / 2)];
}

console.log(`\nHall bar versus two-terminal conductance (median of 3, ${os.cpus()[0]?.model ?? "unknown CPU"}, Node ${process.version})`);
console.log("   W   Hall bar s   two-terminal s   ratio   R_xx (ohm)   R_xy (ohm)");
for (const W of [16, 32, 64]) {
  const hb = input(W, "hallBar"),
    tt = input(W, "conductance");
  let r: { resistances?: { longitudinalOhms: number | null; hallOhms: number | null } } = {};
  const h = time(() => (r = compute(hb) as typeof r));
  const c = time(() => compute(tt));
  console.log(
    `${String(W).padStart(4)}   ${h.toFixed(3).padStart(10)}   ${c.toFixed(3).padStart(14)}   ${(h / c).toFixed(2).padStart(5)}   ` +
      `${(r.resistances?.longitudinalOhms ?? NaN).toFixed(1).padStart(10)}   ${(r.resistances?.hallOhms ?? NaN).toFixed(1).padStart(10)}`,
  );
}
