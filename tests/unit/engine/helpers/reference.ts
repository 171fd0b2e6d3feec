/** Helpers for the engine tests: numpy (Debian python3-numpy) as an independent reference. */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import path from "node:path";
import type { NetworkGraph } from "@/engine/network/graph";

const PY = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";
const SCRIPT = path.join(import.meta.dirname, "dense_reference.py");

export function numpy<T = { re: number[]; im: number[]; shape: number[] }>(request: object): T {
  const r = spawnSync(PY, [SCRIPT], { input: JSON.stringify(request), encoding: "utf8", maxBuffer: 256 * 1024 * 1024 });
  if (r.status !== 0) throw new Error(`numpy reference failed: ${r.stderr || r.error}`);
  return JSON.parse(r.stdout) as T;
}

export function split(a: Float64Array): { re: number[]; im: number[] } {
  const re: number[] = [],
    im: number[] = [];
  for (let i = 0; i < a.length; i += 2) {
    re.push(a[i]);
    im.push(a[i + 1]);
  }
  return { re, im };
}

export function graphJson(g: NetworkGraph, z: Float64Array): object {
  const nodes = [];
  for (let n = 0; n < g.nodeCount; n++) {
    const k = g.slotCount[n],
      o = 2 * g.matrixOffset[n];
    const m = split(g.matrices.subarray(o, o + 2 * k * k));
    nodes.push({ k, ...m, inChannel: Array.from(g.inChannel.subarray(g.slotOffset[n], g.slotOffset[n] + k)) });
  }
  const channels = [];
  for (let c = 0; c < g.channelCount; c++)
    channels.push({ from: g.chFromNode[c], fromSlot: g.chFromSlot[c], to: g.chToNode[c], zr: z[2 * c], zi: z[2 * c + 1] });
  return { nodes, channels };
}

/** Random unitary n x n (Gram-Schmidt of a random complex matrix), as [[re, im]] rows. */
export function randomUnitary(n: number, rand: () => number): [number, number][][] {
  const cols: [number, number][][] = [];
  for (let j = 0; j < n; j++) {
    let v: [number, number][] = Array.from({ length: n }, () => [rand() - 0.5, rand() - 0.5]);
    for (const u of cols) {
      let pr = 0,
        pi = 0;
      for (let i = 0; i < n; i++) {
        pr += u[i][0] * v[i][0] + u[i][1] * v[i][1];
        pi += u[i][0] * v[i][1] - u[i][1] * v[i][0];
      }
      v = v.map((x, i) => [x[0] - (pr * u[i][0] - pi * u[i][1]), x[1] - (pr * u[i][1] + pi * u[i][0])]);
    }
    const nrm = Math.sqrt(v.reduce((a, x) => a + x[0] * x[0] + x[1] * x[1], 0));
    cols.push(v.map((x) => [x[0] / nrm, x[1] / nrm]));
  }
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => cols[j][i]));
}

export function randomComplex(n: number, rand: () => number): Float64Array {
  return Float64Array.from({ length: 2 * n }, () => rand() * 2 - 1);
}
