/**
 * The worker's database side of a run (the system of record): claim, heartbeat and progress,
 * cancellation checks, and the one transaction that writes the result, the status, the
 * compute-seconds, the engine version, the input hash and the usage-ledger row together.
 */
import "@/server/server-only";
import { sql } from "drizzle-orm";
import { billingPeriod } from "@/server/billing/budget";
import { getDb } from "@/server/db";
import { refreshSweep } from "./sweep-progress";

/** Run kinds the engine computes on the `runs` queue (other modules may keep companion rows of their own kinds). */
export const ENGINE_RUN_KINDS = ["conductance", "spectrum", "dos", "ldos", "localization"] as const;
const engineKinds = sql.raw(ENGINE_RUN_KINDS.map((k) => `'${k}'`).join(", "));

export interface ClaimedRun {
  id: string;
  workspaceId: string;
  createdBy: string | null;
  sweepId: string | null;
  input: unknown;
  attempts: number;
}

/**
 * Marks a run `running` for this worker. Also takes a run already `running` (its previous worker
 * died and the job was retried). Returns null when there is nothing to do: finished, cancelled,
 * or its cancellation was requested (then it is marked cancelled here, with no compute spent).
 */
export async function claimRun(runId: string, workerId: string): Promise<ClaimedRun | null> {
  return getDb().transaction(async (tx) => {
    const [pre] = await tx.execute<{ sweep_id: string | null }>(sql`select sweep_id from runs where id = ${runId}`);
    if (!pre) return null;
    if (pre.sweep_id) await tx.execute(sql`select 1 from sweeps where id = ${pre.sweep_id} for update`);
    const [row] = await tx.execute<{ id: string; workspace_id: string; created_by: string | null; sweep_id: string | null; input: unknown; attempts: number }>(sql`
      update runs set status = 'running', started_at = coalesce(started_at, now()), attempts = attempts + 1,
        heartbeat_at = now(), worker_id = ${workerId}, progress = 0
      where id = ${runId} and status in ('queued', 'running') and cancel_requested_at is null and kind in (${engineKinds})
        and not exists (select 1 from sweeps s where s.id = runs.sweep_id and s.cancel_requested_at is not null)
      returning id, workspace_id, created_by, sweep_id, input, attempts`);
    if (!row) {
      // Cancellation requested before it started (or its sweep was cancelled): cancelled, nothing spent.
      const cancelled = await tx.execute(sql`
        update runs set status = 'cancelled', finished_at = now(), cancel_requested_at = coalesce(cancel_requested_at, now())
        where id = ${runId} and status in ('queued', 'running') and kind in (${engineKinds})
          and (cancel_requested_at is not null or exists (select 1 from sweeps s where s.id = runs.sweep_id and s.cancel_requested_at is not null))
        returning id`);
      if (cancelled.length > 0 && pre.sweep_id) await refreshSweep(tx, pre.sweep_id);
      return null;
    }
    if (row.sweep_id) await refreshSweep(tx, row.sweep_id);
    return { id: row.id, workspaceId: row.workspace_id, createdBy: row.created_by, sweepId: row.sweep_id, input: row.input, attempts: row.attempts };
  });
}

/** True when the run or its sweep asked to stop, or the run is no longer ours to finish. */
export async function shouldStop(runId: string): Promise<boolean> {
  const [row] = await getDb().execute<{ stop: boolean }>(sql`
    select (r.status <> 'running' or r.cancel_requested_at is not null or coalesce(s.cancel_requested_at is not null, false)) as stop
    from runs r left join sweeps s on s.id = r.sweep_id where r.id = ${runId}`);
  return row ? row.stop : true;
}

export async function writeProgress(runId: string, progress: number): Promise<void> {
  await getDb().execute(sql`update runs set progress = ${progress}, heartbeat_at = now() where id = ${runId} and status = 'running'`);
}

export interface RunOutcome {
  outcome: "succeeded" | "cancelled" | "failed";
  resultJson?: string;
  error?: { code: string; message: string; field?: string };
  cpuSeconds: number;
  engineVersion: string;
  inputHash: string | null;
}

/**
 * One transaction: result, status, compute-seconds, engine version, input hash, and the usage
 * ledger row (unique per run, so a retried run never writes two). Succeeded and cancelled runs
 * are billed for the CPU time they spent; failed runs are not. Returns false when the run was no
 * longer running (another attempt finished it first): then nothing is written.
 */
export async function finishRun(run: ClaimedRun, out: RunOutcome): Promise<boolean> {
  return getDb().transaction(async (tx) => {
    if (run.sweepId) await tx.execute(sql`select 1 from sweeps where id = ${run.sweepId} for update`);
    const result = out.outcome === "succeeded" && out.resultJson !== undefined ? sql`${out.resultJson}::json` : sql`null`;
    const error = out.error ? sql`${JSON.stringify(out.error)}::jsonb` : sql`null`;
    const updated = await tx.execute<{ id: string }>(sql`
      update runs set status = ${out.outcome}::job_status, result = ${result}, error = ${error},
        compute_seconds = ${out.cpuSeconds}, engine_version = ${out.engineVersion},
        input_hash = coalesce(${out.inputHash}, input_hash),
        progress = case when ${out.outcome === "succeeded"} then 1 else progress end,
        finished_at = now(), heartbeat_at = now()
      where id = ${run.id} and status = 'running'
      returning id`);
    if (updated.length === 0) return false;
    // Every succeeded run has its row (a sweep's points each have one); a cancelled run has one when it spent compute.
    if (out.outcome === "succeeded" || (out.outcome === "cancelled" && out.cpuSeconds > 0)) {
      await tx.execute(sql`
        insert into usage_ledger (workspace_id, user_id, run_id, compute_seconds, plan, period)
        select w.id, ${run.createdBy}, ${run.id}, ${out.cpuSeconds}, case when w.plan_state = 'suspended' then 'free'::plan_name else w.plan end, ${billingPeriod()}
        from workspaces w where w.id = ${run.workspaceId}
        on conflict (run_id) do nothing`);
    }
    if (run.sweepId) await refreshSweep(tx, run.sweepId);
    return true;
  });
}

/** After the queue gave up on a job (retries exhausted): the run is failed, not left hanging. */
export async function markRunFailed(runId: string, message: string): Promise<void> {
  await getDb().transaction(async (tx) => {
    const [row] = await tx.execute<{ sweep_id: string | null }>(sql`select sweep_id from runs where id = ${runId}`);
    if (!row) return;
    if (row.sweep_id) await tx.execute(sql`select 1 from sweeps where id = ${row.sweep_id} for update`);
    const done = await tx.execute(sql`
      update runs set status = 'failed', finished_at = now(), error = ${JSON.stringify({ code: "worker_error", message })}::jsonb
      where id = ${runId} and status in ('queued', 'running') returning id`);
    if (done.length > 0 && row.sweep_id) await refreshSweep(tx, row.sweep_id);
  });
}

/** Runs the database holds as unfinished, for the recovery pass (oldest first). */
export async function unfinishedRuns(staleAfterMs: number, limit = 10_000) {
  return getDb().execute<{ id: string; priority: number; status: "queued" | "running"; stale: boolean }>(sql`
    select id, priority, status, (heartbeat_at is null or heartbeat_at < now() - make_interval(secs => ${staleAfterMs / 1000})) as stale
    from runs where status in ('queued', 'running') and kind in (${engineKinds}) and created_at < now() - interval '3 seconds'
    order by created_at limit ${limit}`);
}

/** Puts runs whose worker vanished (and whose job is gone) back to `queued`. */
export async function requeueStaleRunning(ids: string[], staleAfterMs: number): Promise<string[]> {
  if (ids.length === 0) return [];
  const rows = await getDb().execute<{ id: string }>(sql`
    update runs set status = 'queued', worker_id = null, progress = 0
    where id in (${sql.join(ids.map((id) => sql`${id}::uuid`), sql`, `)}) and status = 'running'
      and (heartbeat_at is null or heartbeat_at < now() - make_interval(secs => ${staleAfterMs / 1000}))
    returning id`);
  return rows.map((r) => r.id);
}
