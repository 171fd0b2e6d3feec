/**
 * Kernel backends side by side: `node_modules/.bin/tsx scripts/bench-kernels.ts`.
 *
 * For N = 64, 128, 256: complex matrix product (zgemm) and the Redheffer star product of two
 * 2N x 2N scattering matrices (two N x N solves and eight products), with the TypeScript kernels,
 * the OpenBLAS kernels and numpy (/usr/bin/python3, Debian's numpy on the same system OpenBLAS)
 * doing the same operations; then W = 128 triangular conductance (both valleys) with each backend.
 * Prints GFLOP/s and the ratio native / numpy (time; 1.0 = as fast as numpy).
 *
 * Threads: one OpenBLAS thread on every side by default (the engine runs in worker threads with
 * OPENBLAS_NUM_THREADS=1); TRISKEL_BENCH_THREADS=N changes it for both. numpy gets the same
 * OPENBLAS_CORETYPE as the native loader chose (the Debian OpenBLAS would otherwise fall back to
 * its generic kernels on this processor), OPENBLAS_L2_SIZE unset, and also runs once with neither
 * variable for comparison; the core each run used is printed.
 * TRISKEL_BENCH_QUICK=1: fewer repetitions and no TypeScript conductance (for a quick look).
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import os from "node:os";

const threads = process.env.TRISKEL_BENCH_THREADS ?? "1";
process.env.OPENBLAS_NUM_THREADS = threads; // before the native kernels load OpenBLAS
const quick = process.env.TRISKEL_BENCH_QUICK === "1";

const { loadNativeKernels } = await import("../src/engine/native/index");
const { tsKernels } = await import("../src/engine/linalg/kernels");
const { setKernels } = await import("../src/engine/linalg/kernels");
type ComplexKernels = import("../src/engine/linalg/kernels").ComplexKernels;

const loaded = loadNativeKernels();
if (!loaded.ok) {
  console.log(`native kernels unavailable: ${loaded.reason}`);
  process.exit(1);
}
const native = loaded.kernels;
const SIZES = [64, 128, 256];
const BUDGET_S = quick ? 0.15 : 0.4; // per measurement

/** Best time per call (s) over batches filling the budget. */
function timeIt(f: () => void, budget = BUDGET_S): number {
  f();
  let best = Infinity,
    spent = 0,
    reps = 1;
  while (spent < budget || best === Infinity) {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) f();
    const dt = (performance.now() - t0) / 1000;
    best = Math.min(best, dt / reps);
    spent += dt;
    if (dt < 0.02) reps *= 2;
  }
  return best;
}

function random(n: number, seed: number): Float64Array {
  let s = seed >>> 0;
  const out = new Float64Array(2 * n);
  for (let i = 0; i < out.length; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[i] = s / 4294967296 - 0.5;
  }
  return out;
}

/** A 2N x 2N scattering matrix as four N x N blocks (random, scaled so that 1 - r r' is invertible). */
function blocks(n: number, seed: number) {
  const scale = (x: Float64Array, f: number) => x.map((v) => v * f);
  const f = 1 / Math.sqrt(n);
  return {
    r: scale(random(n * n, seed), f),
    tp: scale(random(n * n, seed + 1), f),
    t: scale(random(n * n, seed + 2), f),
    rp: scale(random(n * n, seed + 3), f),
  };
}

function identityMinus(x: Float64Array, n: number): Float64Array {
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = -x[i];
  for (let i = 0; i < n; i++) out[2 * (i * n + i)] += 1;
  return out;
}

function add(x: Float64Array, y: Float64Array): Float64Array {
  const out = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) out[i] = x[i] + y[i];
  return out;
}

/** S1 * S2 (Redheffer): t = t2 (1 - r1' r2)^-1 t1, r = r1 + t1' r2 (1 - r1' r2)^-1 t1, and the primed twins. */
function star(k: ComplexKernels, s1: ReturnType<typeof blocks>, s2: ReturnType<typeof blocks>, n: number) {
  const x = k.solve(identityMinus(k.matmul(s1.rp, s2.r, n, n, n), n), s1.t, n, n);
  const t = k.matmul(s2.t, x, n, n, n);
  const r = add(s1.r, k.matmul(s1.tp, k.matmul(s2.r, x, n, n, n), n, n, n));
  const y = k.solve(identityMinus(k.matmul(s2.r, s1.rp, n, n, n), n), s2.tp, n, n);
  const tp = k.matmul(s1.tp, y, n, n, n);
  const rp = add(s2.rp, k.matmul(s2.t, k.matmul(s1.rp, y, n, n, n), n, n, n));
  return { r, tp, t, rp };
}
const starFlops = (n: number) => 8 * 8 * n ** 3 + 2 * ((8 / 3) * n ** 3 + 8 * n ** 3); // 8 products; 2 LU factorizations and solves with N right-hand sides

const PY = `
import json, os, sys, time, ctypes
import numpy as np
sizes = json.loads(sys.argv[1]); budget = float(sys.argv[2])
def best(f):
    f(); b = float('inf'); spent = 0.0; reps = 1
    while spent < budget or b == float('inf'):
        t0 = time.perf_counter()
        for _ in range(reps): f()
        dt = time.perf_counter() - t0
        b = min(b, dt / reps); spent += dt
        if dt < 0.02: reps *= 2
    return b
def rnd(n, seed):
    g = np.random.default_rng(seed)
    return (g.random((n, n)) - 0.5 + 1j * (g.random((n, n)) - 0.5)) / np.sqrt(n)
def star(s1, s2):
    r1, tp1, t1, rp1 = s1; r2, tp2, t2, rp2 = s2
    n = r1.shape[0]; I = np.eye(n)
    x = np.linalg.solve(I - rp1 @ r2, t1)
    y = np.linalg.solve(I - r2 @ rp1, tp2)
    return (r1 + tp1 @ (r2 @ x), tp1 @ y, t2 @ x, rp2 + t2 @ (rp1 @ y))
out = {}
for n in sizes:
    a, b = rnd(n, 1), rnd(n, 2)
    s1 = tuple(rnd(n, 10 + i) for i in range(4)); s2 = tuple(rnd(n, 20 + i) for i in range(4))
    out[str(n)] = {"gemm": best(lambda: a @ b), "star": best(lambda: star(s1, s2))}
core = "unknown"
for line in open("/proc/self/maps"):
    p = line.split()[-1]
    if ("blas" in p) and p.endswith(tuple(".so" + s for s in ("", ".0", ".3"))):
        try:
            lib = ctypes.CDLL(p); lib.openblas_get_corename.restype = ctypes.c_char_p
            core = lib.openblas_get_corename().decode(); break
        except Exception: pass
out["core"] = core; out["numpy"] = np.__version__
print(json.dumps(out))
`;

function numpyRun(env: Record<string, string | undefined>): { core: string; numpy: string; [n: string]: unknown } | null {
  const python = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";
  const childEnv: Record<string, string> = {};
  for (const [k, v] of Object.entries({ ...process.env, ...env })) if (v !== undefined) childEnv[k] = v;
  const r = spawnSync(python, ["-c", PY, JSON.stringify(SIZES), String(BUDGET_S)], { env: childEnv as NodeJS.ProcessEnv, encoding: "utf8", timeout: 300_000 });
  if (r.status !== 0) {
    console.log(`numpy run failed: ${(r.stderr || String(r.error)).split("\n").slice(-2).join(" ")}`);
    return null;
  }
  return JSON.parse(r.stdout);
}

const fmt = (s: number) => (s >= 0.1 ? `${s.toFixed(3)} s` : s >= 1e-3 ? `${(s * 1e3).toFixed(2)} ms` : `${(s * 1e6).toFixed(1)} us`);
const gf = (flops: number, s: number) => `${(flops / s / 1e9).toFixed(1)}`;

console.log(`# Triskel kernel backends, ${new Date().toISOString()}`);
console.log(
  `native: OpenBLAS core ${loaded.info.coreName} (OPENBLAS_CORETYPE=${loaded.info.coreType ?? "unset"}, ${loaded.info.coreTypeSource}), ` +
    `${loaded.addon.getThreads()} thread(s), malloc tuning ${loaded.info.mallocTuned ? "on" : "off"}; ${loaded.info.config}`,
);
console.log(
  `machine: ${os.cpus()[0]?.model ?? "?"}, ${os.cpus().length} cores, load average ${os
    .loadavg()
    .map((x) => x.toFixed(1))
    .join(" ")}`,
);

// Native and numpy measured in alternating rounds (best of the rounds on each side), so that a
// change of load on a shared machine does not favour one side; TypeScript once.
const ROUNDS = quick ? 1 : 3;
type Times = Record<number, { gemm: number; star: number }>;
const timings: Record<"ts" | "openblas", Times> = { ts: {}, openblas: {} };
let npTuned: ReturnType<typeof numpyRun> = null;
const keepBest = (into: Times, n: number, t: { gemm: number; star: number }) => {
  const old = into[n];
  into[n] = old ? { gemm: Math.min(old.gemm, t.gemm), star: Math.min(old.star, t.star) } : t;
};
for (let round = 0; round < ROUNDS; round++) {
  for (const n of SIZES) {
    const a = random(n * n, 1),
      b = random(n * n, 2);
    const s1 = blocks(n, 10),
      s2 = blocks(n, 20);
    for (const [name, k] of [
      ["openblas", native],
      ["ts", tsKernels],
    ] as const) {
      if (name === "ts" && round > 0) continue;
      const slow = name === "ts";
      keepBest(timings[name], n, {
        gemm: timeIt(() => k.matmul(a, b, n, n, n), slow && n >= 256 ? 0.05 : BUDGET_S),
        star: timeIt(() => star(k, s1, s2, n), slow && n >= 128 ? 0.05 : BUDGET_S),
      });
    }
  }
  const r = numpyRun({ OPENBLAS_NUM_THREADS: threads, OPENBLAS_CORETYPE: loaded.info.coreType ?? undefined, OPENBLAS_L2_SIZE: undefined });
  if (r) {
    if (!npTuned) npTuned = r;
    else
      for (const n of SIZES) {
        const cur = npTuned[String(n)] as { gemm: number; star: number },
          nxt = r[String(n)] as { gemm: number; star: number };
        npTuned[String(n)] = { gemm: Math.min(cur.gemm, nxt.gemm), star: Math.min(cur.star, nxt.star) };
      }
  }
}
const npPlain = numpyRun({ OPENBLAS_NUM_THREADS: threads, OPENBLAS_CORETYPE: undefined, OPENBLAS_L2_SIZE: undefined });
const npLabel = (r: typeof npTuned) => (r ? `numpy ${r.numpy} (core ${r.core})` : "numpy n/a");
console.log(
  `numpy: ${npLabel(npTuned)} with OPENBLAS_CORETYPE=${loaded.info.coreType ?? "unset"}; ` +
    `${npLabel(npPlain)} with neither OPENBLAS_CORETYPE nor OPENBLAS_L2_SIZE`,
);
console.log("");
console.log("| op | N | ts | openblas | numpy (same core) | numpy (no env) | openblas / numpy | openblas GFLOP/s | numpy GFLOP/s |");
console.log("| --- | --- | --- | --- | --- | --- | --- | --- | --- |");
for (const op of ["gemm", "star"] as const) {
  for (const n of SIZES) {
    const flops = op === "gemm" ? 8 * n ** 3 : starFlops(n);
    const t = timings.ts[n][op],
      o = timings.openblas[n][op];
    const nt = npTuned ? (npTuned[String(n)] as { gemm: number; star: number })[op] : NaN;
    const np0 = npPlain ? (npPlain[String(n)] as { gemm: number; star: number })[op] : NaN;
    const ref = Math.min(nt, Number.isNaN(np0) ? Infinity : np0);
    console.log(
      `| ${op === "gemm" ? "zgemm" : "star product"} | ${n} | ${fmt(t)} | ${fmt(o)} | ` +
        `${Number.isNaN(nt) ? "n/a" : fmt(nt)} | ${Number.isNaN(np0) ? "n/a" : fmt(np0)} | ${Number.isFinite(ref) ? (o / ref).toFixed(2) : "n/a"} | ` +
        `${gf(flops, o)} | ${Number.isFinite(ref) ? gf(flops, ref) : "n/a"} |`,
    );
  }
}

// W = 128 triangular conductance, both valleys, with each backend.
const { compute } = await import("../src/engine/compute");
const { parseComputeInput } = await import("../src/engine/schema");
const W = 128;
const input = parseComputeInput({
  network: { lattice: "triangular", size: { columns: W, rows: W }, periodNm: 120, node: { forward: 0.5, left: 0.3, right: 0.2 }, degeneracy: { valley: 2 } },
  computation: { kind: "conductance", energyMeV: 1.3, fieldTesla: 0.2 },
});
console.log("");
const results: Record<string, { seconds: number; total: number }> = {};
for (const [name, k] of [
  ["openblas", native],
  ["ts", tsKernels],
] as const) {
  if (quick && name === "ts") continue;
  setKernels(k);
  const t0 = performance.now();
  const r = compute(input) as unknown as { conductance: { total: number } };
  results[name] = { seconds: (performance.now() - t0) / 1000, total: r.conductance.total };
}
const line = Object.entries(results)
  .map(([k, v]) => `${k} ${v.seconds.toFixed(2)} s (G = ${v.total.toPrecision(12)} e2/h)`)
  .join("; ");
const ratio = results.ts ? `; ts / openblas = ${(results.ts.seconds / results.openblas.seconds).toFixed(1)}x` : "";
console.log(
  `load average ${os
    .loadavg()
    .map((x) => x.toFixed(1))
    .join(" ")}`,
);
console.log(`W = ${W} triangular conductance (${W} x ${W} nodes, both valleys): ${line}${ratio}`);
