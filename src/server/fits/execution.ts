/**
 * The worker's database side of a fit: claim, progress, cancellation checks, and the one
 * transaction that writes the result together with the metering: a companion `runs` row of kind
 * "fit" (created only at the end, already finished, so run recovery never picks it up) and its
 * usage-ledger row. The fit row is locked and its run_id checked inside that transaction, so a
 * retried job never writes a second ledger row. The steps every job kind shares (claim, finish
 * once, ledger row, mark failed) are src/server/jobs.
 */
import "@/server/server-only";
import { sql } from "drizzle-orm";
import { getDb } from "@/server/db";
import { cancelUnstarted, claimJobRow, finishJobRow, JOB_KINDS, lockRunningRow, markJobFailed, writeLedgerRow } from "@/server/jobs";

const FIT = JOB_KINDS.fit;

export interface ClaimedFit {
  id: string;
  workspaceId: string;
  createdBy: string | null;
  datasetId: string;
  input: Record<string, unknown>;
  points: { x: number[]; y: number[]; sigma: number[] | null };
  inputHash: string;
  estimatedComputeSeconds: number;
  attempts: number;
}

export async function claimFit(fitId: string): Promise<ClaimedFit | null> {
  const db = getDb();
  const row = await claimJobRow<{
    id: string;
    workspace_id: string;
    created_by: string | null;
    dataset_id: string;
    input: Record<string, unknown>;
    input_hash: string;
    estimated_compute_seconds: number;
    attempts: number;
  }>(db, FIT, fitId, {
    returning: sql`id, workspace_id, created_by, dataset_id, input, input_hash, estimated_compute_seconds, attempts`,
  });
  if (!row) {
    await cancelUnstarted(db, FIT, fitId);
    return null;
  }
  const [d] = await db.execute<{ points: ClaimedFit["points"] }>(
    sql`select points from datasets where id = ${row.dataset_id} and workspace_id = ${row.workspace_id}`,
  );
  if (!d) return null;
  return {
    id: row.id,
    workspaceId: row.workspace_id,
    createdBy: row.created_by,
    datasetId: row.dataset_id,
    input: row.input,
    points: d.points,
    inputHash: row.input_hash,
    estimatedComputeSeconds: Number(row.estimated_compute_seconds),
    attempts: row.attempts,
  };
}

export async function fitShouldStop(fitId: string): Promise<boolean> {
  const [row] = await getDb().execute<{ stop: boolean }>(
    sql`select (status <> 'running' or cancel_requested_at is not null) as stop from fits where id = ${fitId}`,
  );
  return row ? row.stop : true;
}

export async function writeFitProgress(fitId: string, progress: number, lastIteration: unknown): Promise<void> {
  await getDb().execute(
    sql`update fits set progress = ${progress}, last_iteration = ${JSON.stringify(lastIteration)}::jsonb where id = ${fitId} and status = 'running'`,
  );
}

export interface FitOutcome {
  status: "succeeded" | "failed" | "cancelled";
  result?: unknown;
  error?: { code: string; message: string; field?: string };
  computeSeconds: number;
  engineVersion: string;
}

/** Writes the outcome, the companion run and the ledger row once. Returns false if already finished. */
export async function finishFit(fit: ClaimedFit, out: FitOutcome): Promise<boolean> {
  return getDb().transaction(async (tx) => {
    const cur = await lockRunningRow<{ run_id: string | null; started_at: string | null }>(tx, FIT, fit.id, sql`run_id, started_at`);
    if (!cur) return false;
    let runId = cur.run_id;
    if (!runId) {
      const summary =
        out.status === "succeeded" ? { fitId: fit.id, chi2PerDof: (out.result as { chi2PerDof?: number })?.chi2PerDof ?? null } : { fitId: fit.id };
      const [run] = await tx.execute<{ id: string }>(sql`
        insert into runs (workspace_id, created_by, kind, input, status, progress, result, error, estimated_compute_seconds, compute_seconds,
          engine_version, input_hash, attempts, started_at, finished_at, plan)
        values (${fit.workspaceId}, ${fit.createdBy}, 'fit', ${JSON.stringify({ fitId: fit.id, ...fit.input })}::jsonb, ${out.status}, 1,
          ${JSON.stringify(summary)}::json, ${out.error ? JSON.stringify(out.error) : null}::jsonb, ${fit.estimatedComputeSeconds}, ${out.computeSeconds},
          ${out.engineVersion}, ${fit.inputHash}, ${fit.attempts}, coalesce(${cur.started_at}::timestamptz, now()), now(),
          (select plan from fits where id = ${fit.id}))
        returning id`);
      runId = run.id;
      await writeLedgerRow(tx, { workspaceId: fit.workspaceId, userId: fit.createdBy, runId, computeSeconds: out.computeSeconds });
    }
    await finishJobRow(
      tx,
      FIT,
      fit.id,
      out.status,
      sql`
      progress = ${out.status === "succeeded" ? 1 : sql`progress`}, result = ${out.result === undefined ? null : JSON.stringify(out.result)}::jsonb,
      error = ${out.error ? JSON.stringify(out.error) : null}::jsonb, compute_seconds = ${out.computeSeconds}, engine_version = ${out.engineVersion},
      run_id = ${runId}`,
    );
    return true;
  });
}

/** After the queue gave up on the job (retries exhausted, stalled too often): failed, not left hanging. */
export async function markFitFailed(fitId: string, message: string): Promise<void> {
  await markJobFailed(getDb(), FIT, fitId, message);
}
