/**
 * The `fits` queue: one job per fit (job id = fit id). The fit itself runs in a worker thread
 * (src/server/fits/fit-thread.ts) so this event loop keeps the job lock, writes progress once a
 * second and passes cancellation on. Outcome, companion run and ledger row: one transaction
 * (src/server/fits/execution.ts), written at most once however often the job is retried.
 */
import { Queue, Worker, type ConnectionOptions, type Job } from "bullmq";
import { Piscina } from "piscina";
import type { Redis } from "ioredis";
import { claimFit, finishFit, fitShouldStop, markFitFailed, queuedFits, writeFitProgress } from "../src/server/fits/execution";
import type { FitTask, FitTaskOutcome } from "../src/server/fits/fit-thread";
import { QUEUES } from "../src/server/queue";

export function startFitsWorker(connection: Redis, prefix: string): Worker {
  const pool = new Piscina<FitTask, FitTaskOutcome>({
    filename: new URL("../src/server/fits/fit-thread.ts", import.meta.url).href,
    minThreads: 0,
    maxThreads: 1,
    idleTimeout: 60_000,
    concurrentTasksPerWorker: 1,
  });

  async function processFit(job: Job<{ fitId: string }>) {
    const fitId = job.data?.fitId ?? job.id!;
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
    const written = await finishFit(fit, {
      status: out.outcome,
      result: out.outcome === "succeeded" ? out.result : undefined,
      error: out.outcome === "succeeded" ? undefined : out.error,
      computeSeconds: out.cpuSeconds,
      engineVersion: out.engineVersion,
    });
    return { status: out.outcome, written };
  }

  const worker = new Worker(QUEUES.fits, processFit, { connection: connection as ConnectionOptions, prefix, concurrency: 1, lockDuration: 60_000, maxStalledCount: 3 });
  worker.on("failed", (job, err) => {
    if (!job) return;
    if (job.attemptsMade >= (job.opts.attempts ?? 1) || /stalled more than/i.test(err.message)) {
      markFitFailed(job.data?.fitId ?? job.id!, err.message).catch((e) => console.error(`[fits] could not mark fit ${job.id} failed: ${(e as Error).message}`));
    }
  });
  worker.on("closed", () => void pool.destroy());

  // Fits the database holds as queued but Redis lost (job id = fit id, so adding twice is harmless).
  void (async () => {
    const queue = new Queue(QUEUES.fits, { connection: connection as ConnectionOptions, prefix });
    try {
      for (const { id } of await queuedFits()) await queue.add("fit", { fitId: id }, { jobId: id, attempts: 3, backoff: { type: "exponential", delay: 2000 }, removeOnComplete: { age: 3600 }, removeOnFail: { age: 86400 } });
    } catch (e) {
      console.error(`[fits] re-enqueue scan: ${(e as Error).message}`);
    } finally {
      await queue.close().catch(() => {});
    }
  })();
  return worker;
}
