import type { Queue } from "bullmq";
import type { Redis } from "ioredis";
import { enqueueRuns } from "../src/server/runs/enqueue";
import { requeueStaleRunning, unfinishedRuns } from "../src/server/runs/execution";

/**
 * The database is the system of record: any run it holds as `queued` without a BullMQ job (Redis
 * flushed or lost, or the submission could not reach Redis) is enqueued again; a `running` run
 * whose job is gone and whose worker has been silent for `staleAfterMs` goes back to `queued`
 * first. Safe to run from several workers at once (job id = run id); a short Redis lock keeps
 * them from doing the same work twice.
 */
export async function recoverLostRuns(queue: Queue, redis: Redis, opts: { prefix: string; staleAfterMs: number; lockMs: number }): Promise<number> {
  const lockKey = `${opts.prefix}:${queue.name}:triskel-recovery-lock`;
  const got = await redis.set(lockKey, String(process.pid), "PX", opts.lockMs, "NX");
  if (got !== "OK") return 0;
  const rows = await unfinishedRuns(opts.staleAfterMs);
  if (rows.length === 0) return 0;
  const pipeline = redis.pipeline();
  for (const r of rows) pipeline.exists(`${opts.prefix}:${queue.name}:${r.id}`);
  const exists = (await pipeline.exec()) ?? [];
  const missing = rows.filter((_, i) => Number(exists[i]?.[1] ?? 0) === 0);
  const queued = missing.filter((r) => r.status === "queued");
  const staleRunning = missing.filter((r) => r.status === "running" && r.stale).map((r) => r.id);
  const reset = new Set(await requeueStaleRunning(staleRunning, opts.staleAfterMs));
  const toEnqueue = [...queued, ...missing.filter((r) => reset.has(r.id))].map((r) => ({ id: r.id, priority: r.priority }));
  if (toEnqueue.length > 0) {
    await enqueueRuns(toEnqueue);
    console.log(`[worker] recovery: enqueued ${toEnqueue.length} run(s) the queue had lost (${reset.size} were stuck running)`);
  }
  return toEnqueue.length;
}
