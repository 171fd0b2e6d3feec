/**
 * Recovery of lost jobs, for every kind. The database is the system of record: a row it holds as
 * `queued` without a BullMQ job (Redis flushed or lost, or the submission could not reach Redis)
 * is enqueued again; for kinds with heartbeats, a `running` row whose job is gone and whose
 * worker has been silent for `staleAfterMs` goes back to `queued` first. The worker runs a pass
 * at start and periodically (worker/main.ts). Safe from several workers at once (job id = row
 * id); a short Redis lock per queue keeps them from doing the same work twice.
 */
import type { Redis } from "ioredis";
import { enqueueJobs } from "./enqueue";
import type { JobKind } from "./kinds";
import { requeueStaleRunning, unfinishedJobs } from "./lifecycle";

export interface RecoveryOptions {
  /** BullMQ key prefix (QUEUE_PREFIX). */
  prefix: string;
  staleAfterMs: number;
  /** How long one worker holds the pass for a queue. */
  lockMs: number;
}

/** One pass for one kind; returns how many jobs it enqueued. */
export async function recoverLostJobs(kind: JobKind, redis: Redis, opts: RecoveryOptions): Promise<number> {
  const lockKey = `${opts.prefix}:${kind.queue}:triskel-recovery-lock`;
  const got = await redis.set(lockKey, String(process.pid), "PX", opts.lockMs, "NX");
  if (got !== "OK") return 0;
  const rows = await unfinishedJobs(kind, opts.staleAfterMs);
  if (rows.length === 0) return 0;
  const pipeline = redis.pipeline();
  for (const r of rows) pipeline.exists(`${opts.prefix}:${kind.queue}:${r.id}`);
  const exists = (await pipeline.exec()) ?? [];
  const missing = rows.filter((_, i) => Number(exists[i]?.[1] ?? 0) === 0);
  const queued = missing.filter((r) => r.status === "queued");
  const staleRunning = missing.filter((r) => r.status === "running" && r.stale).map((r) => r.id);
  const reset = new Set(await requeueStaleRunning(kind, staleRunning, opts.staleAfterMs));
  const toEnqueue = [...queued, ...missing.filter((r) => reset.has(r.id))].map((r) => ({ id: r.id, priority: r.priority }));
  if (toEnqueue.length > 0) {
    await enqueueJobs(kind, toEnqueue);
    console.log(`[worker] recovery: enqueued ${toEnqueue.length} ${kind.name}(s) the ${kind.queue} queue had lost (${reset.size} were stuck running)`);
  }
  return toEnqueue.length;
}
