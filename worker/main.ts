import { availableParallelism, hostname } from "node:os";
// Native linear-algebra kernels start no threads of their own (compute-seconds are measured per
// engine thread): the engine's loader sets that in every engine thread (src/engine/native/index.ts).

import { Worker, type ConnectionOptions } from "bullmq";
import { loadEnvOrExit } from "../src/env";
import { closeDb } from "../src/server/db";
import { JOB_KINDS, recoverLostJobs, rowIdOf } from "../src/server/jobs";
import { QUEUES, closeQueues, newRedis } from "../src/server/queue";
import { markRunFailed } from "../src/server/runs/execution";
import { makeHoldBeforeFinish } from "./drill-hold";
import { createEnginePool } from "./pool";
import { makeRunProcessor } from "./runs";
import { processSystemJob } from "./system";

// The Triskel worker process: consumes the BullMQ queues. Several of these, on several
// machines, can share one Redis and one PostgreSQL. Stops cleanly on SIGTERM / SIGINT.
const env = loadEnvOrExit();
const connection = newRedis(env.REDIS_URL);
connection.on("error", (err) => console.error(`[worker] redis: ${err.message}`));

const workerId = `${hostname()}:${process.pid}`;
// At least one engine thread per core: a run's valleys and samples use the threads other runs leave free (worker/helpers.ts).
const poolSize = env.WORKER_POOL_SIZE ?? Math.max(env.WORKER_CONCURRENCY, availableParallelism());
const pool = createEnginePool(poolSize);
const holdBeforeFinish = makeHoldBeforeFinish(env);

const runsWorker = new Worker(QUEUES.runs, makeRunProcessor(pool, workerId, holdBeforeFinish, env.WORKER_PARALLEL_RUNS === "1"), {
  connection: connection as ConnectionOptions,
  prefix: env.QUEUE_PREFIX,
  concurrency: env.WORKER_CONCURRENCY,
  lockDuration: env.WORKER_LOCK_MS,
  stalledInterval: env.WORKER_STALLED_INTERVAL_MS,
  // A run whose worker died is retried (its ledger row is written once, by the attempt that finishes).
  maxStalledCount: 5,
});
runsWorker.on("failed", (job, err) => {
  if (!job) return;
  const attempts = job.opts.attempts ?? 1;
  if (job.attemptsMade >= attempts || /stalled more than/i.test(err.message)) {
    markRunFailed(rowIdOf(JOB_KINDS.run, job), err.message).catch((e) =>
      console.error(`[worker] could not mark run ${job.id} failed: ${(e as Error).message}`),
    );
  }
});

const workers: Worker[] = [
  new Worker(QUEUES.system, processSystemJob, { connection: connection as ConnectionOptions, prefix: env.QUEUE_PREFIX, concurrency: 4 }),
  // Fits: their own queue, processor and thread (worker/fits.ts).
  (await import("./fits")).startFitsWorker(connection, env.QUEUE_PREFIX, holdBeforeFinish),
  runsWorker,
];
for (const w of workers) {
  w.on("failed", (job, err) => console.error(`[worker] ${w.name} job ${job?.id} failed: ${err.message}`));
  w.on("error", (err) => console.error(`[worker] ${w.name}: ${err.message}`));
}
console.log(
  `[worker] pid ${process.pid} consuming ${workers.map((w) => w.name).join(", ")} ` +
    `(prefix ${env.QUEUE_PREFIX}, concurrency ${env.WORKER_CONCURRENCY}, engine threads ${poolSize})`,
);

// Recovery: on start and periodically, for every job kind, enqueue the rows the database holds as
// queued but Redis lost (src/server/jobs/recovery.ts).
const recoveryOptions = { prefix: env.QUEUE_PREFIX, staleAfterMs: 3 * env.WORKER_LOCK_MS, lockMs: Math.max(1000, env.WORKER_RECOVERY_INTERVAL_MS - 500) };
let recovering = false;
let stopping = false;
async function recover() {
  if (recovering || stopping) return;
  recovering = true;
  try {
    for (const kind of Object.values(JOB_KINDS)) {
      try {
        await recoverLostJobs(kind, connection, recoveryOptions);
      } catch (err) {
        console.error(`[worker] recovery pass (${kind.queue}) failed: ${(err as Error).message}`);
      }
    }
  } finally {
    recovering = false;
  }
}
const recoveryTimer = setInterval(() => void recover(), env.WORKER_RECOVERY_INTERVAL_MS);
void recover();

async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  clearInterval(recoveryTimer);
  console.log(`[worker] ${signal}: finishing current jobs and closing`);
  const force = setTimeout(() => process.exit(1), 15_000);
  force.unref();
  await Promise.allSettled(workers.map((w) => w.close()));
  await pool.destroy().catch(() => {});
  await closeQueues().catch(() => {});
  await connection.quit().catch(() => connection.disconnect());
  await closeDb().catch(() => {});
  process.exit(0);
}
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));

// Billing: meter-event sender, spend-cap e-mails and grace periods (worker/billing.ts).
void import("./billing").then((billing) => billing.startBillingLoop());
