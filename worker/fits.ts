/**
 * The `fits` queue: one job per fit (job id = fit id). The fit itself runs in a worker thread
 * (src/server/fits/fit-thread.ts) so this event loop keeps the job lock, writes progress once a
 * second and passes cancellation on. The global stage's model curves are independent: they are
 * computed first, split over the fits' threads (one per engine thread of this process, at most
 * the machine's cores) and handed to the fit, which gives the same result as computing them
 * itself (tests/unit/server/fits/fit-parallel.test.ts); compute-seconds are the sum over threads. Outcome, companion run and ledger row: one transaction
 * (src/server/fits/execution.ts), written at most once however often the job is retried. Fits
 * the database holds as queued but Redis lost are enqueued again by the periodic recovery pass
 * every kind shares (src/server/jobs/recovery.ts, run from worker/main.ts).
 */
import { Worker, type ConnectionOptions, type Job } from "bullmq";
import { Piscina } from "piscina";
import type { Redis } from "ioredis";
import { claimFit, finishFit, fitShouldStop, markFitFailed, writeFitProgress } from "../src/server/fits/execution";
import { JOB_KINDS, rowIdOf } from "../src/server/jobs";
import { availableParallelism } from "node:os";
import type { CurvesOutcome, CurvesTask, FitTask, FitTaskOutcome } from "../src/server/fits/fit-thread";
import { globalStageShare, globalStartPoints, type FitParameterSpec } from "../src/server/fits/fitter";
import { loadEnvOrExit } from "../src/env";
import { QUEUES } from "../src/server/queue";
import type { HoldBeforeFinish } from "./drill-hold";

export function startFitsWorker(connection: Redis, prefix: string, holdBeforeFinish: HoldBeforeFinish = async () => {}): Worker {
  const env = loadEnvOrExit();
  const threads = Math.max(1, Math.min(availableParallelism(), env.WORKER_POOL_SIZE ?? env.WORKER_CONCURRENCY));
  const pool = new Piscina<FitTask | CurvesTask, FitTaskOutcome | CurvesOutcome>({
    filename: new URL("../src/server/fits/fit-thread.ts", import.meta.url).href,
    minThreads: 0,
    maxThreads: threads,
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
    let lastProgress = -1;
    const timer = setInterval(() => {
      void (async () => {
        const iteration = Atomics.load(flags, 1);
        // (The global stage has no iterations: its progress alone moves.)
        if (iteration !== lastIteration || floats[0] !== lastProgress) {
          lastIteration = iteration;
          lastProgress = floats[0];
          await writeFitProgress(fitId, floats[0], { iteration, chi2: floats[1] });
          await job.updateProgress(Math.round(floats[0] * 1000) / 1000);
        }
        if (await fitShouldStop(fitId)) Atomics.store(flags, 0, 1);
      })().catch((e) => console.error(`[fits] progress of ${fitId}: ${(e as Error).message}`));
    }, 1000);
    let out: FitTaskOutcome;
    try {
      const global = await globalStageInParallel(fit.input, fit.points.x, control, floats);
      if (global.outcome === "curves") {
        out = (await pool.run({ input: fit.input, points: fit.points, control, globalCurves: global.curves })) as FitTaskOutcome;
        out = { ...out, cpuSeconds: out.cpuSeconds + global.cpuSeconds };
      } else if (global.outcome === "none") {
        out = (await pool.run({ input: fit.input, points: fit.points, control })) as FitTaskOutcome;
      } else {
        out = { outcome: global.outcome, error: global.error, cpuSeconds: global.cpuSeconds, cpuSource: global.cpuSource, engineVersion: global.engineVersion };
      }
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

  /**
   * The global stage's curves, split into one share per thread and computed in parallel; progress
   * meanwhile is that stage's share of the fit times the curves done. "none" when the fit has no
   * global stage (or one thread only: the fit then computes them itself, as before).
   */
  async function globalStageInParallel(
    input: Record<string, unknown>,
    x: number[],
    control: SharedArrayBuffer,
    floats: Float64Array,
  ): Promise<{ outcome: "none" } | { outcome: "curves"; curves: number[][]; cpuSeconds: number } | Exclude<CurvesOutcome, { outcome: "curves" }>> {
    const specs = input.fit as FitParameterSpec[];
    const options = (input.options ?? {}) as Parameters<typeof globalStartPoints>[1];
    const values = globalStartPoints(specs, options);
    if (values.length === 0 || threads < 2) return { outcome: "none" };
    const shares = Math.min(threads, values.length);
    const counters = Array.from({ length: shares }, () => new SharedArrayBuffer(4));
    const share = globalStageShare(specs.length, options);
    const ticker = setInterval(() => {
      const done = counters.reduce((t, c) => t + Atomics.load(new Int32Array(c), 0), 0);
      floats[0] = (share * done) / values.length;
    }, 250);
    try {
      const parts = await Promise.all(
        counters.map(
          (counter, i) => pool.run({ kind: "curves", input, x, values: values.filter((_, j) => j % shares === i), control, counter }) as Promise<CurvesOutcome>,
        ),
      );
      const cpuSeconds = parts.reduce((t, p) => t + p.cpuSeconds, 0);
      const bad = parts.find((p): p is Exclude<CurvesOutcome, { outcome: "curves" }> => p.outcome !== "curves");
      if (bad) return { ...bad, cpuSeconds };
      const curves = values.map((_, j) => (parts[j % shares] as Extract<CurvesOutcome, { outcome: "curves" }>).curves[Math.floor(j / shares)]);
      return { outcome: "curves", curves, cpuSeconds };
    } finally {
      clearInterval(ticker);
    }
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
