/**
 * The worker's database side of a run (the system of record): claim, heartbeat and progress,
 * cancellation checks, and the one transaction that writes the result, the status, the
 * compute-seconds, the engine version, the input hash and the usage-ledger row together. The
 * steps every job kind shares (claim, finish once, ledger row, mark failed) are src/server/jobs;
 * this module adds what is a run's own: heartbeats and the sweep a point belongs to.
 */
import "@/server/server-only";
import { sql } from "drizzle-orm";
import { getDb } from "@/server/db";
import { cancelUnstarted, claimJobRow, finishJobRow, JOB_KINDS, markJobFailed, writeLedgerRow } from "@/server/jobs";
import { refreshSweep } from "./sweep-progress";

export { ENGINE_RUN_KINDS } from "@/server/jobs";
const RUN = JOB_KINDS.run;
const sweepCancelled = sql`exists (select 1 from sweeps s where s.id = runs.sweep_id and s.cancel_requested_at is not null)`;

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
    const row = await claimJobRow<{ id: string; workspace_id: string; created_by: string | null; sweep_id: string | null; input: unknown; attempts: number }>(
      tx,
      RUN,
      runId,
      {
        set: sql`heartbeat_at = now(), worker_id = ${workerId}, progress = 0`,
        where: sql`not ${sweepCancelled}`,
        returning: sql`id, workspace_id, created_by, sweep_id, input, attempts`,
      },
    );
    if (!row) {
      // Cancellation requested before it started (or its sweep was cancelled): cancelled, nothing spent.
      const cancelled = await cancelUnstarted(tx, RUN, runId, sweepCancelled);
      if (cancelled && pre.sweep_id) await refreshSweep(tx, pre.sweep_id);
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
    const written = await finishJobRow(
      tx,
      RUN,
      run.id,
      out.outcome,
      sql`
      result = ${result}, error = ${error}, compute_seconds = ${out.cpuSeconds}, engine_version = ${out.engineVersion},
      input_hash = coalesce(${out.inputHash}, input_hash),
      progress = case when ${out.outcome === "succeeded"} then 1 else progress end, heartbeat_at = now()`,
    );
    if (!written) return false;
    // Every succeeded run has its row (a sweep's points each have one); a cancelled run has one when it spent compute.
    if (out.outcome === "succeeded" || (out.outcome === "cancelled" && out.cpuSeconds > 0)) {
      await writeLedgerRow(tx, { workspaceId: run.workspaceId, userId: run.createdBy, runId: run.id, computeSeconds: out.cpuSeconds });
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
    const done = await markJobFailed(tx, RUN, runId, message);
    if (done && row.sweep_id) await refreshSweep(tx, row.sweep_id);
  });
}
