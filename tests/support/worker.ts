// The running worker process, seen from the tests: a ping through the `system` queue, and the tail
// of its log for failure messages. Polls the job's state in Redis rather than waiting on queue
// events, so a missed event cannot fail a test whose job did complete.
import { existsSync, readFileSync } from "node:fs";
import { dirname, join } from "node:path";
import { Job, Queue } from "bullmq";
import { Redis } from "ioredis";
import { redisUrl } from "./services";

export type Pong = { pong: boolean; echo: unknown; workerPid: number; at: string };

/** The last lines of the worker log that scripts/test.sh (and any replacement worker) writes. */
export function workerLogTail(lines = 30): string {
  const pidFile = process.env.TRISKEL_WORKER_PID_FILE;
  const log = pidFile ? join(dirname(pidFile), "worker.log") : "";
  if (!log || !existsSync(log)) return "(no worker log found)";
  return readFileSync(log, "utf8").trimEnd().split("\n").slice(-lines).join("\n");
}

/** Enqueues a `ping` on the system queue and resolves with the worker's answer, or throws with what was seen. */
export async function pingWorker(data: unknown = { hello: "network" }, timeoutMs = 60_000): Promise<Pong> {
  const connection = new Redis(redisUrl(), { maxRetriesPerRequest: null });
  const queue = new Queue("system", { connection, prefix: process.env.QUEUE_PREFIX ?? "triskel" });
  try {
    const job = await queue.add("ping", data, { removeOnComplete: 100, removeOnFail: 100 });
    const until = Date.now() + timeoutMs;
    let state = "unknown";
    while (Date.now() < until) {
      // State first, then the job as stored: read in the other order, a job that finishes in
      // between would show state "completed" with the return value it had while still active.
      state = await queue.getJobState(job.id!);
      if (state === "completed" || state === "failed") {
        const done = await Job.fromId(queue, job.id!);
        if (state === "failed") throw new Error(`the ping failed in the worker: ${done?.failedReason}`);
        return done!.returnvalue as Pong;
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    throw new Error(`no worker answered a ping within ${timeoutMs / 1000} s (job ${job.id} is ${state}); worker log:\n${workerLogTail()}`);
  } finally {
    await queue.close();
    await connection.quit();
  }
}
