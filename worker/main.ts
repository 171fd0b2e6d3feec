import { Worker, type ConnectionOptions } from "bullmq";
import { loadEnvOrExit } from "../src/env";
import { QUEUES, newRedis } from "../src/server/queue";
import { processSystemJob } from "./system";

// The Triskel worker process: consumes the BullMQ queues. Several of these, on several
// machines, can share one Redis and one PostgreSQL. Stops cleanly on SIGTERM / SIGINT.
const env = loadEnvOrExit();
const connection = newRedis(env.REDIS_URL);
connection.on("error", (err) => console.error(`[worker] redis: ${err.message}`));

const workers: Worker[] = [
  new Worker(QUEUES.system, processSystemJob, { connection: connection as ConnectionOptions, prefix: env.QUEUE_PREFIX, concurrency: 4 }),
];
for (const w of workers) {
  w.on("failed", (job, err) => console.error(`[worker] ${w.name} job ${job?.id} failed: ${err.message}`));
  w.on("error", (err) => console.error(`[worker] ${w.name}: ${err.message}`));
}
console.log(`[worker] pid ${process.pid} consuming ${workers.map((w) => w.name).join(", ")} (prefix ${env.QUEUE_PREFIX})`);

let stopping = false;
async function stop(signal: string) {
  if (stopping) return;
  stopping = true;
  console.log(`[worker] ${signal}: finishing current jobs and closing`);
  const force = setTimeout(() => process.exit(1), 15_000);
  force.unref();
  await Promise.allSettled(workers.map((w) => w.close()));
  await connection.quit().catch(() => connection.disconnect());
  process.exit(0);
}
process.on("SIGTERM", () => void stop("SIGTERM"));
process.on("SIGINT", () => void stop("SIGINT"));

// Billing: meter-event sender, spend-cap e-mails and grace periods (worker/billing.ts).
void import("./billing").then((billing) => billing.startBillingLoop());
