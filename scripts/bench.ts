/**
 * `npm run bench`: speed and memory of the network-model engine on this machine.
 *  1. Conductance of triangular W x W networks (W = 16, 32, 64, 128) at one energy, both valleys:
 *     wall time, compute (CPU) time, peak memory (each size in its own process), scaling exponent.
 *  2. A 100-point energy sweep at W = 32 over a piscina worker-thread pool (one thread per core)
 *     against one thread: wall time and speed-up.
 *  3. The same star products in numpy (Debian python3-numpy) and in the engine's dense kernels:
 *     composing W slices of 2W x 2W scattering matrices; ratio engine / numpy.
 * This file is also the pool's worker module (default export) and the single-size child
 * (`--single W`). Figures are recorded in src/engine/README.md.
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { isMainThread } from "node:worker_threads";
import { Piscina } from "piscina";
import { compute, parseComputeInput, getKernels, engineVersion, estimateCost, type ComputeInput } from "../src/engine/index";

const SELF = fileURLToPath(import.meta.url);
const ROOT = path.resolve(path.dirname(SELF), "..");

function network(W: number, energyMeV = 1.0): ComputeInput {
  return parseComputeInput({
    network: {
      lattice: "triangular",
      size: { columns: W, rows: W },
      transverse: "periodic",
      twistDegrees: 0.11,
      node: { forward: 0.6, left: 0.25, right: 0.15 },
      disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 1 },
    },
    computation: { kind: "conductance", energyMeV, fieldTesla: 0.2 },
  });
}

/** Worker task: one conductance at one energy; returns the total conductance and CPU seconds. */
export default function task({ W, energyMeV }: { W: number; energyMeV: number }): { g: number; cpu: number } {
  const c0 = process.cpuUsage();
  const r = compute(network(W, energyMeV));
  const c1 = process.cpuUsage(c0);
  if (r.kind !== "conductance") throw new Error("unexpected kind");
  return { g: r.conductance.total, cpu: (c1.user + c1.system) / 1e6 };
}

function single(W: number): void {
  // warm the JIT on a small network first
  compute(network(8));
  compute(network(24));
  const input = network(W);
  if (W <= 32) compute(input); // small sizes: time the second run (steady state)
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const r = compute(input);
  const wall = (performance.now() - t0) / 1000;
  const c1 = process.cpuUsage(c0);
  if (r.kind !== "conductance") throw new Error("unexpected kind");
  const est = estimateCost(input);
  process.stdout.write(
    JSON.stringify({
      W,
      wall,
      cpu: (c1.user + c1.system) / 1e6,
      maxRssMB: process.resourceUsage().maxRSS / 1024,
      estimateSeconds: est.computeSeconds,
      estimateMB: est.peakMemoryBytes / 2 ** 20,
      g: r.conductance.total,
      err: r.checks.currentConservationError,
      backend: getKernels().name,
    }),
  );
}

function fitExponent(xs: number[], ys: number[]): number {
  const lx = xs.map(Math.log),
    ly = ys.map(Math.log);
  const mx = lx.reduce((a, b) => a + b, 0) / lx.length,
    my = ly.reduce((a, b) => a + b, 0) / ly.length;
  let sxy = 0,
    sxx = 0;
  for (let i = 0; i < lx.length; i++) {
    sxy += (lx[i] - mx) * (ly[i] - my);
    sxx += (lx[i] - mx) ** 2;
  }
  return sxy / sxx;
}

/** Dense star-product composition with the engine's kernels (same algorithm as bench-numpy.py). */
function tsDenseStar(W: number): number {
  const k = getKernels();
  const n = 2 * W;
  // a unitary 2W x 2W slice: a random phase permutation mixed by a fixed rotation (cheap and exact)
  const s = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) {
    const j = (i * 7 + 3) % n;
    const ph = i * 0.37;
    s[2 * (i * n + j)] = Math.cos(ph);
    s[2 * (i * n + j) + 1] = Math.sin(ph);
  }
  const block = (m: Float64Array, r0: number, c0: number) => {
    const b = new Float64Array(2 * W * W);
    for (let i = 0; i < W; i++) b.set(m.subarray(2 * ((r0 + i) * n + c0), 2 * ((r0 + i) * n + c0 + W)), 2 * i * W);
    return b;
  };
  const eye = new Float64Array(2 * W * W);
  for (let i = 0; i < W; i++) eye[2 * (i * W + i)] = 1;
  const sub = (a: Float64Array, b: Float64Array) => a.map((x, i) => x - b[i]);
  const add = (a: Float64Array, b: Float64Array) => a.map((x, i) => x + b[i]);
  const t0 = performance.now();
  let acc = s;
  for (let step = 0; step < W - 1; step++) {
    const r1 = block(acc, 0, 0),
      t1p = block(acc, 0, W),
      t1 = block(acc, W, 0),
      r1p = block(acc, W, W);
    const r2 = block(s, 0, 0),
      t2p = block(s, 0, W),
      t2 = block(s, W, 0),
      r2p = block(s, W, W);
    const x1 = k.solve(sub(eye, k.matmul(r1p, r2, W, W, W)), t1, W, W);
    const x2 = k.solve(sub(eye, k.matmul(r1p, r2, W, W, W)), k.matmul(r1p, t2p, W, W, W), W, W);
    const y = k.solve(sub(eye, k.matmul(r2, r1p, W, W, W)), t2p, W, W);
    const out = new Float64Array(2 * n * n);
    const put = (b: Float64Array, r0: number, c0: number) => {
      for (let i = 0; i < W; i++) out.set(b.subarray(2 * i * W, 2 * (i + 1) * W), 2 * ((r0 + i) * n + c0));
    };
    put(k.matmul(t2, x1, W, W, W), W, 0);
    put(add(r1, k.matmul(k.matmul(t1p, r2, W, W, W), x1, W, W, W)), 0, 0);
    put(k.matmul(t1p, y, W, W, W), 0, W);
    put(add(r2p, k.matmul(t2, x2, W, W, W)), W, W);
    acc = out;
  }
  return (performance.now() - t0) / 1000;
}

async function main(): Promise<void> {
  const sizes = [16, 32, 64, 128];
  const cores = os.availableParallelism ? os.availableParallelism() : os.cpus().length;
  console.log(`Triskel engine ${engineVersion()} on ${os.cpus()[0]?.model ?? "unknown CPU"}, ${cores} cores, Node ${process.version}`);
  console.log("\n1. Conductance of a triangular W x W network (W columns, W rows, cylinder), one energy, both valleys");
  let rows: { W: number; wall: number; cpu: number }[] = [];
  const backends = ["ts", "openblas"];
  for (const backend of backends) {
    const these: { W: number; wall: number; cpu: number }[] = [];
    let header = false;
    for (const W of sizes) {
      const r = spawnSync(process.execPath, [...process.execArgv, SELF, "--single", String(W)], {
        cwd: ROOT,
        encoding: "utf8",
        maxBuffer: 1 << 24,
        env: { ...process.env, TRISKEL_KERNELS: backend },
      });
      if (r.status !== 0) {
        console.log(`   backend ${backend}: not available (${(r.stderr.trim().split("\n").pop() ?? "").slice(0, 160)})`);
        break;
      }
      const d = JSON.parse(r.stdout);
      if (!header) {
        console.log(`   backend ${d.backend}\n   W   wall s   compute s   peak RSS MB   estimate s   estimate MB   G (e2/h)   R+T-N`);
        header = true;
      }
      these.push(d);
      console.log(
        `${String(W).padStart(4)} ${d.wall.toFixed(3).padStart(8)} ${d.cpu.toFixed(3).padStart(11)} ${d.maxRssMB.toFixed(0).padStart(13)} ` +
          `${d.estimateSeconds.toFixed(3).padStart(12)} ${d.estimateMB.toFixed(0).padStart(13)} ` +
          `${d.g.toFixed(4).padStart(10)} ${d.err.toExponential(1).padStart(7)}`,
      );
    }
    if (these.length >= 3) {
      const ex = fitExponent(
        these.map((r) => r.W),
        these.map((r) => r.cpu),
      );
      const exLarge = fitExponent(
        these.slice(-3).map((r) => r.W),
        these.slice(-3).map((r) => r.cpu),
      );
      console.log(
        `   compute time ~ W^${ex.toFixed(2)} over all sizes, W^${exLarge.toFixed(2)} over the largest three (W slices)` +
          `: per slice W^${(ex - 1).toFixed(2)} (W^${(exLarge - 1).toFixed(2)}), target <= W^3`,
      );
    }
    if (backend === "ts") rows = these;
  }

  console.log("\n2. 100-point energy sweep at W = 32 (piscina worker threads)");
  const energies = Array.from({ length: 100 }, (_, i) => (i * 30) / 100);
  const sweep = async (threads: number) => {
    // the pool threads use the TypeScript kernels (the targets of issue 3 are for them)
    const pool = new Piscina({ filename: SELF, minThreads: threads, maxThreads: threads, idleTimeout: 60000, env: { ...process.env, TRISKEL_KERNELS: "ts" } });
    await Promise.all(Array.from({ length: threads }, () => pool.run({ W: 8, energyMeV: 0 }))); // warm-up
    const t0 = performance.now();
    const out = await Promise.all(energies.map((e) => pool.run({ W: 32, energyMeV: e }) as Promise<{ g: number; cpu: number }>));
    const wall = (performance.now() - t0) / 1000;
    await pool.destroy();
    return { wall, out };
  };
  const one = await sweep(1);
  const many = await sweep(cores);
  const same = one.out.every((r, i) => Math.abs(r.g - many.out[i].g) < 1e-12);
  const cpuSum = (o: { cpu: number }[]) => o.reduce((a, b) => a + b.cpu, 0);
  void cpuSum;
  console.log(
    `   load average before: ${os
      .loadavg()
      .map((x) => x.toFixed(1))
      .join(" ")}`,
  );
  console.log(
    `   1 thread: ${one.wall.toFixed(2)} s wall;  ${cores} threads: ${many.wall.toFixed(2)} s wall;  ` +
      `speed-up ${(one.wall / many.wall).toFixed(2)}x (ideal ${cores}x); results identical: ${same}`,
  );

  console.log("\n3. The same star products: composing W slices of 2W x 2W scattering matrices");
  const py = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";
  const np = spawnSync(py, [path.join(ROOT, "scripts/bench-numpy.py")], { input: JSON.stringify({ sizes, repeat: 2 }), encoding: "utf8" });
  if (np.status !== 0) {
    console.log(`   numpy not available (${(np.stderr || String(np.error)).split("\n").slice(-2)[0]}): column skipped`);
  } else {
    const d = JSON.parse(np.stdout) as { numpy: string; results: { W: number; seconds: number }[] };
    console.log(`   numpy ${d.numpy}`);
    console.log("   W   numpy dense s   engine kernels dense s   ratio   engine (local updates, 2 valleys) s   ratio");
    for (const r of d.results) {
      const ts = r.W <= 64 ? tsDenseStar(r.W) : NaN;
      const eng = rows.find((x) => x.W === r.W);
      const engS = eng ? eng.cpu : NaN;
      console.log(
        `${String(r.W).padStart(4)} ${r.seconds.toFixed(4).padStart(15)} ` +
          `${Number.isNaN(ts) ? "   (skipped)".padStart(24) : ts.toFixed(4).padStart(24)} ` +
          `${Number.isNaN(ts) ? "     -" : (ts / r.seconds).toFixed(1).padStart(7)} ` +
          `${engS.toFixed(4).padStart(37)} ${(engS / r.seconds).toFixed(1).padStart(7)}`,
      );
    }
    console.log("   (numpy composes one valley with dense 2W x 2W star products; the engine computes both valleys with local rank-q updates)");
  }
}

if (isMainThread) {
  const i = process.argv.indexOf("--single");
  if (i >= 0) single(Number(process.argv[i + 1]));
  else
    main().catch((e) => {
      console.error(e);
      process.exit(1);
    });
}
