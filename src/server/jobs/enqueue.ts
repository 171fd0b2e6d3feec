/**
 * Enqueue, after the job's row is committed: one BullMQ job per row (job id = row id). The
 * database is the system of record: if Redis does not answer within a few seconds the row stays
 * `queued` and the worker's periodic recovery pass (worker/recovery.ts) enqueues it later, so a
 * submission never hangs on Redis and never fails because of it.
 */
import "@/server/server-only";
import { getQueue } from "@/server/queue";
import { JOB_KINDS, jobData, jobOptions, type JobItem, type JobKind, type JobKindName } from "./kinds";

export const ENQUEUE_TIMEOUT_MS = 3000;

/** Adds the jobs (in chunks of 500); throws when Redis fails. */
export async function enqueueJobs(kind: JobKind, items: JobItem[]): Promise<void> {
  const queue = getQueue(kind.queue);
  for (let i = 0; i < items.length; i += 500) {
    const chunk = items.slice(i, i + 500);
    await queue.addBulk(chunk.map((r) => ({ name: kind.name, data: jobData(kind, r.id), opts: jobOptions(kind, r.id, r.priority) })));
  }
}

/** Rejects when `work` has not settled within `ms`. */
export async function withTimeout<T>(work: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error(`${what} did not answer within ${ms / 1000} s`)), ms);
  });
  try {
    return await Promise.race([work, timeout]);
  } finally {
    clearTimeout(timer);
  }
}

/** Enqueues committed rows; false (logged) when Redis failed or was too slow: recovery enqueues them later. */
export async function enqueueAfterCommit(kindName: JobKindName, items: JobItem[], timeoutMs = ENQUEUE_TIMEOUT_MS): Promise<boolean> {
  const kind = JOB_KINDS[kindName];
  try {
    // The queue connection waits for Redis while it is down (offline queue): give up after a few
    // seconds so the submission answers; the job is added when Redis is back or by recovery.
    await withTimeout(enqueueJobs(kind, items), timeoutMs, "Redis");
    return true;
  } catch (err) {
    console.error(`[jobs] could not enqueue ${items.length} ${kind.name}(s) now; the worker's recovery pass will: ${(err as Error).message}`);
    return false;
  }
}
