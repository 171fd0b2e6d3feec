/**
 * Two runs at a time on a worker's engine pool (worker/pool.ts), with and without helper threads
 * (worker/helpers.ts), round after round: the case that killed a worker process with SIGSEGV on
 * 2026-12-04 (OpenBLAS's zheevd read past its buffers: src/engine/native/src/slack.h). Every result
 * must equal the same input computed alone on one thread.
 *
 *   node_modules/.bin/tsx scripts/stress-engine-threads.ts [rounds]      (default 40)
 *
 * Prints one line per round; exits 0 when every round succeeded with the serial numbers, 1 on a
 * wrong or failed result. A crash of the process (the defect this guards against) ends it with
 * the signal's exit status, 139 for SIGSEGV: run it in a child process (tests/soak/engine-threads.test.ts).
 */
import { createEnginePool } from "../worker/pool";
import { offerHelpers } from "../worker/helpers";
import type { EngineOutcome } from "../worker/engine-thread";

const rounds = Number(process.argv[2] ?? 40);
const pool = createEnginePool(2);

const network = (W: number, seed: number) => ({
  lattice: "triangular",
  size: { columns: W, rows: W },
  transverse: "periodic",
  twistDegrees: 0.11,
  node: { forward: 0.6, left: 0.25, right: 0.15 },
  disorder: { linkPhaseWidthRad: 2 * Math.PI, seed },
});

async function run(input: unknown, helpers: boolean): Promise<EngineOutcome> {
  const control = new SharedArrayBuffer(16);
  if (!helpers) return pool.run({ input, control });
  const h = offerHelpers(pool, control);
  try {
    // parallelMinNodes 0: hand pieces over even for these small graphs
    return await pool.run({ input, control, helpers: h.port, parallelMinNodes: 0 }, { transferList: [h.port] });
  } finally {
    h.close();
  }
}

const t0 = Date.now();
let wrong = 0;
for (let r = 0; r < rounds; r++) {
  const helpers = r % 2 === 1;
  const inputs = [
    { network: network(40, r), computation: { kind: "conductance", energyMeV: 0.7, fieldTesla: 0.2 } },
    { network: network(40, r + 100), computation: { kind: "conductance", energyMeV: 0.4, ensemble: { samples: 3 } } },
  ];
  // the second starts up to 0.3 s after the first, so the runs overlap in every phase
  // with helpers: the ensemble run (6 pieces) offers them, and the single-energy run's thread helps once it is done
  const outs = await Promise.all(
    inputs.map((input, k) => new Promise((res) => setTimeout(res, k * Math.random() * 300)).then(() => run(input, helpers && k === 1))),
  );
  const alone = await Promise.all(inputs.map((input) => run(input, false)));
  const notes = outs.map((o, k) => {
    const a = alone[k];
    if (o.outcome !== "succeeded" || a.outcome !== "succeeded") return `${o.outcome}${"error" in o ? ` (${o.error.message})` : ""}`;
    return o.resultJson === a.resultJson ? `same${o.helped ? ` (helpers: ${o.helped.pieces} pieces)` : ""}` : "DIFFERENT";
  });
  const bad = notes.filter((n) => !n.startsWith("same")).length;
  wrong += bad;
  console.log(`round ${r + 1}/${rounds} ${helpers ? "with" : "without"} helpers, ${((Date.now() - t0) / 1000).toFixed(1)} s: ${notes.join(", ")}`);
}
await pool.destroy();
console.log(wrong === 0 ? `all ${rounds} rounds gave the serial results` : `${wrong} results were wrong or failed`);
process.exit(wrong === 0 ? 0 : 1);
