/**
 * The engine against the numpy script a theorist would write, in one run on one machine
 * (part of `npm run bench`; alone: `node_modules/.bin/tsx scripts/bench-versus-numpy.ts`).
 *
 * Per W (32, 64, 96, 128, 192): the engine's conductance of a W x W triangular cylinder at one
 * energy, each valley timed on its own (valley K with the R + T = N check, valley K' without, as
 * `compute` does), against numpy composing the same number of star products of the same size (W
 * slices, each a dense 2W x 2W scattering matrix; `scripts/bench-numpy.py`, Debian python3-numpy,
 * default threads). The two sides run in alternating rounds and each keeps its best round, so a
 * burst of load from other processes hits both. Ratio = engine per valley (mean of K and K') / numpy.
 *
 * Then the TypeScript fallback's case: W = 64, both valleys, `compute` on the TypeScript kernels;
 * the command line's start-up (the bundle, npm run, the tsx it replaced).
 * `--lab`: also the largest Lab network, 400 x 400, one energy, both valleys, once in the worker's
 * engine pool of two threads (valley K' on the helper thread, as the worker runs it) and once with
 * `compute` on one thread, each in a child process: wall and CPU time and peak memory (maximum
 * resident set).
 * `--sizes=32,64`: other sizes. `TRISKEL_BENCH_ROUNDS` (default 3; 2 at W >= 128) rounds per size.
 * `TRISKEL_BENCH_PATH=general`: the general path instead of the block path (the engine before the blocks).
 * Threads: the defaults on both sides (OpenBLAS's, one per core) unless OPENBLAS_NUM_THREADS is set,
 * in which case both sides get it.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { parseComputeInput, getKernels, setKernels, tsKernels, compute, type ComputeInput } from "../src/engine/index";
import { buildSample } from "../src/engine/network/lattice";
import { reverseGraph } from "../src/engine/network/graph";
import { sampleTransport } from "../src/engine/compute/conductance";
import { networkScale, energyPhase, fluxPerPlaquette } from "../src/engine/compute/common";
import type { Network } from "../src/engine/schema";
import { createEnginePool } from "../worker/pool";
import { offerHelpers } from "../worker/helpers";

const SELF = fileURLToPath(import.meta.url);
/** TRISKEL_BENCH_PATH=general times the general path (groups of at most 16 unlinked nodes) instead of the block path. */
const PATH = process.env.TRISKEL_BENCH_PATH === "general" ? "general" : "block";
const ROOT = path.resolve(path.dirname(SELF), "..");

function input(W: number): ComputeInput {
  return parseComputeInput({
    network: {
      lattice: "triangular",
      size: { columns: W, rows: W },
      transverse: "periodic",
      twistDegrees: 0.11,
      node: { forward: 0.6, left: 0.25, right: 0.15 },
      disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 1 },
    },
    computation: { kind: "conductance", energyMeV: 1.0, fieldTesla: 0.2 },
  });
}

/** One engine round: seconds (wall) of valley K and valley K' at one energy, and G. */
function engineRound(W: number): { k: number; kp: number; g: number; check: number } {
  const inp = input(W);
  const net = inp.network as Network;
  if (inp.computation.kind !== "conductance") throw new Error("unexpected kind");
  const scale = networkScale(net);
  const gK = buildSample(net, { mode: "leads", fluxPerPlaquette: fluxPerPlaquette(scale, inp.computation.fieldTesla), sample: 0 });
  const gKp = reverseGraph(gK);
  const th = energyPhase(scale, inp.computation.energyMeV);
  let t0 = performance.now();
  const a = sampleTransport(gK, th, true, undefined, true, PATH);
  const k = (performance.now() - t0) / 1000;
  t0 = performance.now();
  const b = sampleTransport(gKp, th, true, undefined, false, PATH);
  const kp = (performance.now() - t0) / 1000;
  return { k, kp, g: a.transmission + b.transmission, check: a.conservationError };
}

function numpyRound(W: number): { seconds: number; numpy: string } | { error: string } {
  const py = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";
  const r = spawnSync(py, [path.join(ROOT, "scripts/bench-numpy.py")], {
    input: JSON.stringify({ sizes: [W], repeat: 1 }),
    encoding: "utf8",
    timeout: 900_000,
  });
  if (r.status !== 0) return { error: (r.stderr || String(r.error)).split("\n").filter(Boolean).slice(-1)[0] ?? "failed" };
  const d = JSON.parse(r.stdout) as { numpy: string; results: { W: number; seconds: number }[] };
  return { seconds: d.results[0].seconds, numpy: d.numpy };
}

const load = () =>
  os
    .loadavg()
    .map((x) => x.toFixed(1))
    .join(" ");

function lab(): void {
  console.log("\nLargest Lab network: 400 x 400, one energy, both valleys (own process each)");
  for (const mode of ["pool", "serial"]) {
    const r = spawnSync(path.join(ROOT, "node_modules/.bin/tsx"), [SELF, "--lab-child", mode], { encoding: "utf8", timeout: 3_600_000 });
    if (r.status !== 0) console.log(`   ${mode}: failed: ${(r.stderr || String(r.error)).split("\n").slice(-3).join(" ")}`);
    else console.log(`   ${r.stdout.trim()}`);
  }
  console.log(`   load average after: ${load()}`);
}

/**
 * `pool`: as the worker runs it, in its engine pool (two threads, worker/pool.ts) with helpers
 * (worker/helpers.ts): valley K' on the second thread. `serial`: `compute` on this thread.
 * Wall and CPU time (all threads of the process), peak memory (maximum resident set).
 */
async function labChild(mode: string): Promise<void> {
  compute(input(16)); // JIT warm-up
  const c0 = process.cpuUsage(),
    t0 = performance.now();
  if (PATH === "general") {
    // the general path has no switch in compute: both valleys through sampleTransport, as compute runs them
    const e = engineRound(400);
    const wall = (performance.now() - t0) / 1000,
      c = process.cpuUsage(c0);
    console.log(
      `${getKernels().name}, general path: ${wall.toFixed(1)} s wall (K ${e.k.toFixed(1)} s, K' ${e.kp.toFixed(1)} s), ${((c.user + c.system) / 1e6).toFixed(1)} s CPU, ` +
        `peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB; T_K + T_K' = ${e.g.toFixed(6)}`,
    );
    return;
  }
  let r: ReturnType<typeof compute>;
  let label = `${getKernels().name}, compute on one thread`;
  if (mode === "pool") {
    const pool = createEnginePool(2);
    const control = new SharedArrayBuffer(16);
    // warm both threads up
    await Promise.all([0, 1].map(() => pool.run({ input: input(16), control })));
    const c1 = process.cpuUsage(),
      t1 = performance.now();
    const helpers = offerHelpers(pool, control);
    const out = await pool.run({ input: input(400), control, helpers: helpers.port }, { transferList: [helpers.port] });
    helpers.close();
    const wall = (performance.now() - t1) / 1000,
      c = process.cpuUsage(c1);
    await pool.destroy();
    if (out.outcome !== "succeeded") throw new Error(`pool run ${out.outcome}: ${JSON.stringify(out.error)}`);
    r = JSON.parse(out.resultJson) as ReturnType<typeof compute>;
    if (r.kind !== "conductance") throw new Error("unexpected kind");
    console.log(
      `worker pool, 2 threads (${r.engineVersion}, pieces on the helper thread: ${out.helped?.pieces ?? 0}): ${wall.toFixed(1)} s wall, ` +
        `${((c.user + c.system) / 1e6).toFixed(1)} s CPU (billed ${out.cpuSeconds.toFixed(1)} s), peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB; ` +
        `G = ${r.conductance.total.toFixed(12)} e2/h, |R + T - N| = ${r.checks.currentConservationError.toExponential(1)}`,
    );
    return;
  }
  r = compute(input(400));
  const wall = (performance.now() - t0) / 1000,
    c = process.cpuUsage(c0);
  if (r.kind !== "conductance") throw new Error("unexpected kind");
  label += ` (OpenBLAS threads ${process.env.OPENBLAS_NUM_THREADS ?? "default"})`;
  console.log(
    `${label}: ${wall.toFixed(1)} s wall, ${((c.user + c.system) / 1e6).toFixed(1)} s CPU, peak RSS ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB; ` +
      `G = ${r.conductance.total.toFixed(12)} e2/h, |R + T - N| = ${r.checks.currentConservationError.toExponential(1)}`,
  );
}

/** Command-line start-up: a tiny computation (4 x 4, one energy) through each way of calling it, best of 5 (wall, whole process). */
function cliStartup(): void {
  const dir = mkdtempSync(path.join(os.tmpdir(), "triskel-bench-cli-"));
  const file = path.join(dir, "tiny.json");
  writeFileSync(
    file,
    JSON.stringify({
      network: {
        lattice: "triangular",
        size: { columns: 4, rows: 4 },
        transverse: "periodic",
        twistDegrees: 0.11,
        node: { forward: 0.6, left: 0.2, right: 0.2 },
      },
      computation: { kind: "conductance", energyMeV: 0.3 },
    }),
  );
  const ways: [string, string, string[]][] = [
    ["node scripts/cli.mjs (the bundle, dist/engine-cli.mjs)", process.execPath, [path.join(ROOT, "scripts/cli.mjs"), "compute", file]],
    ["npm run -s cli (the same, after npm's own start-up)", "npm", ["run", "-s", "cli", "--", "compute", file]],
    ["tsx src/engine/cli.ts (before the bundle)", path.join(ROOT, "node_modules/.bin/tsx"), [path.join(ROOT, "src/engine/cli.ts"), "compute", file]],
    ["node -e 0 (Node itself)", process.execPath, ["-e", "0"]],
  ];
  console.log(`\nCommand-line start-up (4 x 4 conductance, best of 5, wall), load average ${load()}; target <= 0.2 s for the command line`);
  const outputs = new Set<string>();
  for (const [label, cmd, args] of ways) {
    let best = Infinity;
    for (let i = 0; i < 5; i++) {
      const t0 = performance.now();
      const r = spawnSync(cmd, args, { cwd: ROOT, encoding: "utf8" });
      best = Math.min(best, (performance.now() - t0) / 1000);
      if (r.status !== 0) throw new Error(`${label}: exit ${r.status}: ${r.stderr}`);
      if (args[0] !== "-e") outputs.add(r.stdout);
    }
    console.log(`   ${label}: ${best.toFixed(3)} s`);
  }
  console.log(`   outputs identical: ${outputs.size === 1}`);
}

/** The TypeScript fallback's target case: W = 64, one energy, both valleys (compute), best of 3 rounds after a warm-up. */
function tsFallback(): void {
  const previous = setKernels(tsKernels);
  try {
    compute(input(64));
    let wall = Infinity,
      cpu = Infinity;
    for (let i = 0; i < 3; i++) {
      const c0 = process.cpuUsage(),
        t0 = performance.now();
      compute(input(64));
      wall = Math.min(wall, (performance.now() - t0) / 1000);
      const c = process.cpuUsage(c0);
      cpu = Math.min(cpu, (c.user + c.system) / 1e6);
    }
    console.log(`\nTypeScript kernels, W = 64, one energy, both valleys (compute, best of 3): ${wall.toFixed(3)} s wall, ${cpu.toFixed(3)} s CPU`);
  } finally {
    setKernels(previous);
  }
}

function main(): void {
  const arg = process.argv.find((a) => a.startsWith("--sizes="));
  const sizes = arg ? arg.slice(8).split(",").map(Number) : [32, 64, 96, 128, 192];
  const rounds = Number(process.env.TRISKEL_BENCH_ROUNDS ?? 0);
  console.log(
    `Engine (${getKernels().name}, ${PATH} path) against numpy, same run; ${os.cpus()[0]?.model ?? "cpu"} x ${os.cpus().length}, load average ${load()}`,
  );
  console.log(`OpenBLAS threads: ${process.env.OPENBLAS_NUM_THREADS ?? "default"} on both sides`);
  engineRound(16); // JIT warm-up
  engineRound(32);
  console.log("| W | engine K s | engine K' s | engine per valley s | numpy (W star products of 2W x 2W) s | engine / numpy | R+T-N |");
  console.log("| --- | --- | --- | --- | --- | --- | --- |");
  let numpyVersion = "";
  for (const W of sizes) {
    const n = rounds || (W >= 128 ? 2 : 3);
    let k = Infinity,
      kp = Infinity,
      np = Infinity,
      check = 0,
      err = "";
    for (let i = 0; i < n; i++) {
      const e = engineRound(W);
      k = Math.min(k, e.k);
      kp = Math.min(kp, e.kp);
      check = Math.max(check, e.check);
      const p = numpyRound(W);
      if ("error" in p) err = p.error;
      else {
        np = Math.min(np, p.seconds);
        numpyVersion = p.numpy;
      }
    }
    const per = (k + kp) / 2;
    console.log(
      `| ${W} | ${k.toFixed(4)} | ${kp.toFixed(4)} | ${per.toFixed(4)} | ${Number.isFinite(np) ? np.toFixed(4) : `n/a (${err})`} | ` +
        `${Number.isFinite(np) ? (per / np).toFixed(2) : "-"} | ${check.toExponential(0)} |`,
    );
  }
  console.log(`numpy ${numpyVersion || "n/a"}; best of the rounds on each side, wall time; load average after: ${load()}`);
  tsFallback();
  cliStartup();
  if (process.argv.includes("--lab")) lab();
}

const child = process.argv.indexOf("--lab-child");
if (child >= 0)
  labChild(process.argv[child + 1] ?? "serial").catch((e) => {
    console.error(e);
    process.exit(1);
  });
else main();
