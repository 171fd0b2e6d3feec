import type { Job } from "bullmq";
import type { Piscina } from "piscina";
import { JOB_KINDS, rowIdOf } from "../src/server/jobs";
import { claimRun, finishRun, shouldStop, writeProgress } from "../src/server/runs/execution";
import type { HoldBeforeFinish } from "./drill-hold";
import type { EngineOutcome, EngineTask } from "./engine-thread";
import { offerHelpers } from "./helpers";

const CANCEL_POLL_MS = 400;
const PROGRESS_WRITE_MS = 1000;
const HEARTBEAT_MS = 5000;

/**
 * Processor of the `runs` queue: claim the run in the database, compute it in a pool thread,
 * poll for cancellation (within a second) and write progress (about once a second), then write
 * everything in one transaction.
 */
export function makeRunProcessor(
  pool: Piscina<EngineTask, EngineOutcome>,
  workerId: string,
  holdBeforeFinish: HoldBeforeFinish = async () => {},
  parallelRuns = false,
) {
  return async function processRun(job: Job) {
    const runId = rowIdOf(JOB_KINDS.run, job);
    const run = await claimRun(runId, workerId);
    if (!run) return { runId, skipped: true };

    const control = new SharedArrayBuffer(16);
    const cancelFlag = new Int32Array(control, 0, 1);
    const progress = new Float64Array(control, 8, 1);
    let lastWritten = 0;
    let lastWriteAt = Date.now();
    let busy = false;
    const timer = setInterval(() => {
      if (busy) return;
      busy = true;
      void (async () => {
        try {
          if (await shouldStop(runId)) Atomics.store(cancelFlag, 0, 1);
          const now = Date.now();
          const p = progress[0];
          // Progress about once a second while it moves; a heartbeat every few seconds regardless.
          if ((now - lastWriteAt >= PROGRESS_WRITE_MS && p !== lastWritten) || now - lastWriteAt >= HEARTBEAT_MS) {
            lastWriteAt = now;
            lastWritten = p;
            await writeProgress(runId, p);
            await job.updateProgress(Math.round(p * 1000) / 1000).catch(() => {});
          }
        } catch (err) {
          console.error(`[worker] run ${runId}: progress/cancel check failed: ${(err as Error).message}`);
        } finally {
          busy = false;
        }
      })();
    }, CANCEL_POLL_MS);

    // both valleys (and ensemble samples) of the run on the pool's free threads (worker/helpers.ts), when switched on (WORKER_PARALLEL_RUNS)
    const helpers = parallelRuns ? offerHelpers(pool, control) : null;
    let out: EngineOutcome;
    try {
      out = helpers
        ? await pool.run({ input: run.input, control, helpers: helpers.port }, { transferList: [helpers.port] })
        : await pool.run({ input: run.input, control });
    } finally {
      clearInterval(timer);
      helpers?.close();
    }
    // Fault drills only (worker/drill-hold.ts): a no-op unless the drill hook is on.
    await holdBeforeFinish("run", runId, { outcome: out.outcome, cpuSeconds: out.cpuSeconds });
    const written = await finishRun(run, out);
    return { runId, outcome: out.outcome, computeSeconds: out.cpuSeconds, cpuSource: out.cpuSource, written };
  };
}
