import "@/server/server-only";
import type { JobsOptions } from "bullmq";
import { getQueue, QUEUES } from "@/server/queue";

/** Job data on the `runs` queue; the run row (the system of record) holds everything else. */
export interface RunJobData {
  runId: string;
}

export const RUN_JOB_NAME = "run";

export function runJobOptions(runId: string, priority: number): JobsOptions {
  return {
    jobId: runId,
    priority,
    // Engine errors are recorded on the run and do not throw; a throw means the database or
    // Redis failed, worth a retry.
    attempts: 3,
    backoff: { type: "exponential", delay: 2000 },
    removeOnComplete: { age: 3600, count: 5000 },
    removeOnFail: { age: 24 * 3600 },
  };
}

/** Adds one BullMQ job per run (job id = run id, so adding twice is harmless). */
export async function enqueueRuns(items: { id: string; priority: number }[]): Promise<void> {
  const queue = getQueue(QUEUES.runs);
  for (let i = 0; i < items.length; i += 500) {
    const chunk = items.slice(i, i + 500);
    await queue.addBulk(chunk.map((r) => ({ name: RUN_JOB_NAME, data: { runId: r.id } satisfies RunJobData, opts: runJobOptions(r.id, r.priority) })));
  }
}

/**
 * Enqueues after the rows are committed. If Redis is unreachable the runs stay `queued` in the
 * database and a worker's recovery pass enqueues them later, so the submission still succeeds.
 */
export async function enqueueAfterCommit(items: { id: string; priority: number }[]): Promise<boolean> {
  try {
    // The queue connection waits for Redis while it is down (offline queue): give up after a few
    // seconds so the submission answers; the job is added when Redis is back or by recovery.
    let timer: NodeJS.Timeout | undefined;
    const timeout = new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error("Redis did not answer within 3 s")), 3000);
    });
    try {
      await Promise.race([enqueueRuns(items), timeout]);
    } finally {
      clearTimeout(timer);
    }
    return true;
  } catch (err) {
    console.error(`[runs] could not enqueue ${items.length} run(s) now; the worker's recovery pass will: ${(err as Error).message}`);
    return false;
  }
}
