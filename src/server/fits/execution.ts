/**
 * The worker's database side of a fit: claim, progress, cancellation checks, and the one
 * transaction that writes the result together with the metering: a companion `runs` row of kind
 * "fit" (created only at the end, already finished, so run recovery never picks it up) and its
 * usage-ledger row. The fit row is locked and its run_id checked inside that transaction, so a
 * retried job never writes a second ledger row.
 */
import "@/server/server-only";
import { sql } from "drizzle-orm";
import { billingPeriod } from "@/server/billing/budget";
import { getDb } from "@/server/db";

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
  const [row] = await db.execute<{ id: string; workspace_id: string; created_by: string | null; dataset_id: string; input: Record<string, unknown>; input_hash: string; estimated_compute_seconds: number; attempts: number }>(sql`
    update fits set status = 'running', started_at = coalesce(started_at, now()), attempts = attempts + 1
    where id = ${fitId} and status in ('queued', 'running') and cancel_requested_at is null
    returning id, workspace_id, created_by, dataset_id, input, input_hash, estimated_compute_seconds, attempts`);
  if (!row) {
    await db.execute(sql`update fits set status = 'cancelled', finished_at = now() where id = ${fitId} and status in ('queued', 'running') and cancel_requested_at is not null`);
    return null;
  }
  const [d] = await db.execute<{ points: ClaimedFit["points"] }>(sql`select points from datasets where id = ${row.dataset_id} and workspace_id = ${row.workspace_id}`);
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
  const [row] = await getDb().execute<{ stop: boolean }>(sql`select (status <> 'running' or cancel_requested_at is not null) as stop from fits where id = ${fitId}`);
  return row ? row.stop : true;
}

export async function writeFitProgress(fitId: string, progress: number, lastIteration: unknown): Promise<void> {
  await getDb().execute(sql`update fits set progress = ${progress}, last_iteration = ${JSON.stringify(lastIteration)}::jsonb where id = ${fitId} and status = 'running'`);
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
    const [cur] = await tx.execute<{ status: string; run_id: string | null; started_at: string | null }>(sql`select status, run_id, started_at from fits where id = ${fit.id} for update`);
    if (!cur || cur.status !== "running") return false;
    let runId = cur.run_id;
    if (!runId) {
      const [ws] = await tx.execute<{ plan: string; plan_state: string }>(sql`select plan, plan_state from workspaces where id = ${fit.workspaceId}`);
      const plan = ws?.plan_state === "suspended" ? "free" : (ws?.plan ?? "free");
      const summary = out.status === "succeeded" ? { fitId: fit.id, chi2PerDof: (out.result as { chi2PerDof?: number })?.chi2PerDof ?? null } : { fitId: fit.id };
      const [run] = await tx.execute<{ id: string }>(sql`
        insert into runs (workspace_id, created_by, kind, input, status, progress, result, error, estimated_compute_seconds, compute_seconds, engine_version, input_hash, attempts, started_at, finished_at)
        values (${fit.workspaceId}, ${fit.createdBy}, 'fit', ${JSON.stringify({ fitId: fit.id, ...fit.input })}::jsonb, ${out.status}, 1,
          ${JSON.stringify(summary)}::json, ${out.error ? JSON.stringify(out.error) : null}::jsonb, ${fit.estimatedComputeSeconds}, ${out.computeSeconds},
          ${out.engineVersion}, ${fit.inputHash}, ${fit.attempts}, coalesce(${cur.started_at}::timestamptz, now()), now())
        returning id`);
      runId = run.id;
      await tx.execute(sql`
        insert into usage_ledger (workspace_id, user_id, run_id, compute_seconds, plan, period)
        values (${fit.workspaceId}, ${fit.createdBy}, ${runId}, ${out.computeSeconds}, ${plan}, ${billingPeriod()})
        on conflict (run_id) do nothing`);
    }
    await tx.execute(sql`
      update fits set status = ${out.status}, progress = ${out.status === "succeeded" ? 1 : sql`progress`}, result = ${out.result === undefined ? null : JSON.stringify(out.result)}::jsonb,
        error = ${out.error ? JSON.stringify(out.error) : null}::jsonb, compute_seconds = ${out.computeSeconds}, engine_version = ${out.engineVersion},
        run_id = ${runId}, finished_at = now()
      where id = ${fit.id}`);
    return true;
  });
}

export async function markFitFailed(fitId: string, message: string): Promise<void> {
  await getDb().execute(sql`update fits set status = 'failed', error = ${JSON.stringify({ code: "worker_failed", message })}::jsonb, finished_at = now() where id = ${fitId} and status in ('queued', 'running')`);
}

/** Fits the database holds as queued (for re-enqueueing after Redis lost them). */
export async function queuedFits(limit = 1000): Promise<{ id: string }[]> {
  return getDb().execute<{ id: string }>(sql`select id from fits where status = 'queued' order by created_at limit ${limit}`);
}
