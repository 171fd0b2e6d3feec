/**
 * The `fits` queue: one job per fit (job id = fit id). The fit itself runs in a worker thread
 * (src/server/fits/fit-thread.ts) so this event loop keeps the job lock, writes progress once a
 * second and passes cancellation on. Outcome, companion run and ledger row: one transaction
 * (src/server/fits/execution.ts), written at most once however often the job is retried. Fits
 * the database holds as queued but Redis lost are enqueued again by the periodic recovery pass
 * every kind shares (src/server/jobs/recovery.ts, run from worker/main.ts).
 */
import { Worker, type ConnectionOptions, type Job } from "bullmq";
import { Piscina } from "piscina";
import type { Redis } from "ioredis";
import { claimFit, finishFit, fitShouldStop, markFitFailed, writeFitProgress } from "../src/server/fits/execution";
import { JOB_KINDS, rowIdOf } from "../src/server/jobs";
import type { FitTask, FitTaskOutcome } from "../src/server/fits/fit-thread";
import { QUEUES } from "../src/server/queue";
import type { HoldBeforeFinish } from "./drill-hold";

export function startFitsWorker(connection: Redis, prefix: string, holdBeforeFinish: HoldBeforeFinish = async () => {}): Worker {
  const pool = new Piscina<FitTask, FitTaskOutcome>({
    filename: new URL("../src/server/fits/fit-thread.ts", import.meta.url).href,
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: 60_000,
    concurrentTasksPerWorker: 1,
  });

  async function processFit(job: Job<{ fitId: string }>) {
    const fitId = rowIdOf(JOB_KINDS.fit, job);
    const fit = await claimFit(fitId);
    if (!fit) return { skipped: true };
    const control = new SharedArrayBuffer(24);
    const flags = new Int32Array(control, 0, 2);
    const floats = new Float64Array(control, 8, 2);
    let lastIteration = -1;
    const timer = setInterval(() => {
      void (async () => {
        const iteration = Atomics.load(flags, 1);
        if (iteration !== lastIteration) {
          lastIteration = iteration;
          await writeFitProgress(fitId, floats[0], { iteration, chi2: floats[1] });
          await job.updateProgress(Math.round(floats[0] * 1000) / 1000);
        }
        if (await fitShouldStop(fitId)) Atomics.store(flags, 0, 1);
      })().catch((e) => console.error(`[fits] progress of ${fitId}: ${(e as Error).message}`));
    }, 1000);
    let out: FitTaskOutcome;
    try {
      out = await pool.run({ input: fit.input, points: fit.points, control });
    } finally {
      clearInterval(timer);
    }
    // Fault drills only (worker/drill-hold.ts): a no-op unless the drill hook is on.
    await holdBeforeFinish("fit", fitId, { outcome: out.outcome, cpuSeconds: out.cpuSeconds });
    const written = await finishFit(fit, {
      status: out.outcome,
      result: out.outcome === "succeeded" ? out.result : undefined,
      error: out.outcome === "succeeded" ? undefined : out.error,
      computeSeconds: out.cpuSeconds,
      engineVersion: out.engineVersion,
    });
    return { status: out.outcome, computeSeconds: out.cpuSeconds, cpuSource: out.cpuSource, written };
  }

  const worker = new Worker(QUEUES.fits, processFit, {
    connection: connection as ConnectionOptions,
    prefix,
    concurrency: 1,
    lockDuration: 60_000,
    maxStalledCount: 3,
  });
  worker.on("failed", (job, err) => {
    if (!job) return;
    if (job.attemptsMade >= (job.opts.attempts ?? 1) || /stalled more than/i.test(err.message)) {
      markFitFailed(rowIdOf(JOB_KINDS.fit, job), err.message).catch((e) =>
        console.error(`[fits] could not mark fit ${job.id} failed: ${(e as Error).message}`),
      );
    }
  });
  worker.on("closed", () => void pool.destroy());

  return worker;
}
