/**
 * A sweep's status, progress and compute-seconds are derived from its points (child runs).
 * refreshSweep locks the sweep row first, so two workers finishing points at once serialise and
 * the second one counts both. Kept with the runs: a point's every change of status (claimed,
 * finished, cancelled, failed) refreshes its sweep here, and the sweeps module reads it too.
 */
import { sql } from "drizzle-orm";
import type { Db } from "@/server/db";
import type { SweepCounts } from "@/shared/api";
export type { SweepCounts };

type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
type Executor = Db | Tx;

/** Status of a sweep from its points' counts. */
export function deriveSweepStatus(c: SweepCounts, cancelRequested: boolean): "queued" | "running" | "succeeded" | "failed" | "cancelled" {
  const unfinished = c.queued + c.running;
  if (unfinished > 0) return c.running > 0 || c.succeeded + c.failed + c.cancelled > 0 ? "running" : "queued";
  if (cancelRequested || c.cancelled > 0) return "cancelled";
  if (c.failed > 0) return "failed";
  return "succeeded";
}

export async function refreshSweep(tx: Executor, sweepId: string): Promise<void> {
  const locked = await tx.execute<{ cancel: boolean }>(sql`select cancel_requested_at is not null as cancel from sweeps where id = ${sweepId} for update`);
  if (locked.length === 0) return;
  const [agg] = await tx.execute<{
    queued: number;
    running: number;
    succeeded: number;
    failed: number;
    cancelled: number;
    total: number;
    partial: number;
    seconds: number;
    engine: string | null;
    started: Date | null;
  }>(sql`
    select
      count(*) filter (where status = 'queued')::int as queued,
      count(*) filter (where status = 'running')::int as running,
      count(*) filter (where status = 'succeeded')::int as succeeded,
      count(*) filter (where status = 'failed')::int as failed,
      count(*) filter (where status = 'cancelled')::int as cancelled,
      count(*)::int as total,
      coalesce(sum(case when status = 'running' then progress else 0 end), 0)::float8 as partial,
      coalesce(sum(compute_seconds), 0)::float8 as seconds,
      max(engine_version) as engine,
      min(started_at) as started
    from runs where sweep_id = ${sweepId}`);
  const counts: SweepCounts = { queued: agg.queued, running: agg.running, succeeded: agg.succeeded, failed: agg.failed, cancelled: agg.cancelled };
  const status = deriveSweepStatus(counts, locked[0].cancel);
  const done = agg.succeeded + agg.failed + agg.cancelled;
  const progress = agg.total === 0 ? 1 : Math.min(1, (done + agg.partial) / agg.total);
  const finished = status === "succeeded" || status === "failed" || status === "cancelled";
  await tx.execute(sql`
    update sweeps set
      status = ${status}::job_status,
      progress = ${finished && status === "succeeded" ? 1 : progress},
      compute_seconds = ${agg.seconds},
      engine_version = coalesce(${agg.engine}, engine_version),
      started_at = coalesce(started_at, ${agg.started}),
      finished_at = case when ${finished} then coalesce(finished_at, now()) else null end
    where id = ${sweepId}`);
}
