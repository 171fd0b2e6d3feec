/**
 * The database side every job kind shares (the row is the system of record; the BullMQ job only
 * points at it): claim (status -> running, attempts + 1), cancellation before the start, the
 * finishing update (written once: only a row still `running` is finished), the usage-ledger row
 * (unique per run, so a retried job never writes two), marking failed when the queue gives up,
 * and the queries of the recovery pass. Kind-specific columns come in as SQL fragments.
 */
import "@/server/server-only";
import { sql, type SQL } from "drizzle-orm";
import { billingPeriod } from "@/server/billing/budget";
import { queuePriority } from "@/server/billing/limits";
import { getDb, type Executor } from "@/server/db";
import type { PlanId } from "@/shared/plans";
import type { JobItem, JobKind } from "./kinds";

export type { Executor };

const tableOf = (kind: JobKind) => sql.identifier(kind.table);
const also = (extra: SQL | undefined, joiner: "and" | "or") => (extra ? sql` ${sql.raw(joiner)} (${extra})` : sql``);

/**
 * Marks the row `running` (attempts + 1; started_at kept from the first attempt). Also takes a
 * row already `running`: its previous worker died and the job was retried. Undefined when the row
 * is finished, cancelled, asked to cancel, not of this kind, or `where` does not hold.
 */
export async function claimJobRow<R extends Record<string, unknown>>(
  db: Executor,
  kind: JobKind,
  id: string,
  opts: { returning: SQL; set?: SQL; where?: SQL },
): Promise<R | undefined> {
  const [row] = await db.execute<Record<string, unknown>>(sql`
    update ${tableOf(kind)} set status = 'running', started_at = coalesce(started_at, now()), attempts = attempts + 1${opts.set ? sql`, ${opts.set}` : sql``}
    where id = ${id} and status in ('queued', 'running') and cancel_requested_at is null and ${kind.scope}${also(opts.where, "and")}
    returning ${opts.returning}`);
  return row as R | undefined;
}

/**
 * A member asks to cancel, in one statement: a queued row is cancelled at once, a running one is
 * flagged for its worker (which stops within a second and records what it spent). False when the
 * row had already finished (or is not in this workspace), so a job finishing meanwhile is untouched.
 */
export async function requestCancel(db: Executor, kind: JobKind, id: string, workspaceId: string): Promise<boolean> {
  const rows = await db.execute(sql`
    update ${tableOf(kind)} set
      cancel_requested_at = coalesce(cancel_requested_at, now()),
      status = case when status = 'queued' then 'cancelled'::job_status else status end,
      finished_at = case when status = 'queued' then now() else finished_at end
    where id = ${id} and workspace_id = ${workspaceId} and status in ('queued', 'running') and ${kind.scope}
    returning id`);
  return rows.length > 0;
}

/** A row asked to cancel (or for which `alsoWhen` holds) before its compute began: cancelled, nothing spent. */
export async function cancelUnstarted(db: Executor, kind: JobKind, id: string, alsoWhen?: SQL): Promise<boolean> {
  const rows = await db.execute(sql`
    update ${tableOf(kind)} set status = 'cancelled', finished_at = now(), cancel_requested_at = coalesce(cancel_requested_at, now())
    where id = ${id} and status in ('queued', 'running') and ${kind.scope} and (cancel_requested_at is not null${also(alsoWhen, "or")})
    returning id`);
  return rows.length > 0;
}

/** Locks a row still `running` inside a finishing transaction; undefined when another attempt finished it first. */
export async function lockRunningRow<R extends Record<string, unknown>>(tx: Executor, kind: JobKind, id: string, columns: SQL): Promise<R | undefined> {
  const [row] = await tx.execute<Record<string, unknown>>(sql`select status, ${columns} from ${tableOf(kind)} where id = ${id} for update`);
  return row && row.status === "running" ? (row as R) : undefined;
}

/**
 * The finishing update: status, finished_at and the kind's own columns, only while the row is
 * still `running` (so a second attempt finishing the same job writes nothing). True when written.
 */
export async function finishJobRow(tx: Executor, kind: JobKind, id: string, status: "succeeded" | "failed" | "cancelled", set: SQL): Promise<boolean> {
  const rows = await tx.execute(sql`
    update ${tableOf(kind)} set status = ${status}::job_status, finished_at = now(), ${set}
    where id = ${id} and status = 'running'
    returning id`);
  return rows.length > 0;
}

/**
 * The usage-ledger row of a metered run, at the plan the run was accepted under (the price shown
 * before it started; work accepted on Lab and finished after a suspension is still owed), else the
 * workspace's plan now (a suspended workspace pays the free rate). Unique per run: writing it again
 * does nothing.
 */
export async function writeLedgerRow(tx: Executor, row: { workspaceId: string; userId: string | null; runId: string; computeSeconds: number }): Promise<void> {
  await tx.execute(sql`
    insert into usage_ledger (workspace_id, user_id, run_id, compute_seconds, plan, period)
    select w.id, ${row.userId}, ${row.runId}, ${row.computeSeconds},
      coalesce(r.plan, case when w.plan_state = 'suspended' then 'free'::plan_name else w.plan end), ${billingPeriod()}
    from workspaces w left join runs r on r.id = ${row.runId} where w.id = ${row.workspaceId}
    on conflict (run_id) do nothing`);
}

/** After the queue gave up on a job (retries exhausted, stalled too often): failed, not left hanging. */
export async function markJobFailed(db: Executor, kind: JobKind, id: string, message: string): Promise<boolean> {
  const rows = await db.execute(sql`
    update ${tableOf(kind)} set status = 'failed', finished_at = now(), error = ${JSON.stringify({ code: kind.workerFailedCode, message })}::jsonb
    where id = ${id} and status in ('queued', 'running') returning id`);
  return rows.length > 0;
}

export interface UnfinishedJob extends JobItem {
  status: "queued" | "running";
  /** Running, and its worker has been silent for longer than staleAfterMs (kinds with heartbeats only). */
  stale: boolean;
}

/**
 * Rows the database holds as unfinished, for the recovery pass (oldest first). Rows younger than
 * 3 s are left to the submission's own enqueue. Kinds without heartbeats report only `queued`
 * rows: a running one's job is watched by the queue's stalled-job check.
 */
export async function unfinishedJobs(kind: JobKind, staleAfterMs: number, limit = 10_000): Promise<UnfinishedJob[]> {
  const t = tableOf(kind);
  const statuses = kind.heartbeats ? sql`('queued', 'running')` : sql`('queued')`;
  const stale = kind.heartbeats ? sql`(heartbeat_at is null or heartbeat_at < now() - make_interval(secs => ${staleAfterMs / 1000}))` : sql`false`;
  const priority = kind.storesPriority ? sql`priority` : sql`null::int`;
  const rows = await getDb().execute<{ id: string; priority: number | null; plan: PlanId | null; status: "queued" | "running"; stale: boolean }>(sql`
    select id, status, ${priority} as priority, ${stale} as stale,
      (select case when w.plan_state = 'suspended' then 'free'::plan_name else w.plan end from workspaces w where w.id = ${t}.workspace_id) as plan
    from ${t} where status in ${statuses} and ${kind.scope} and created_at < now() - interval '3 seconds'
    order by created_at limit ${limit}`);
  return rows.map((r) => ({ id: r.id, status: r.status, stale: r.stale, priority: r.priority ?? queuePriority(r.plan ?? "free") }));
}

/** Puts rows whose worker vanished (and whose job is gone) back to `queued`. Kinds with heartbeats only. */
export async function requeueStaleRunning(kind: JobKind, ids: string[], staleAfterMs: number): Promise<string[]> {
  if (ids.length === 0 || !kind.heartbeats) return [];
  const rows = await getDb().execute<{ id: string }>(sql`
    update ${tableOf(kind)} set status = 'queued', worker_id = null, progress = 0
    where id in (${sql.join(
      ids.map((id) => sql`${id}::uuid`),
      sql`, `,
    )}) and status = 'running' and ${kind.scope}
      and (heartbeat_at is null or heartbeat_at < now() - make_interval(secs => ${staleAfterMs / 1000}))
    returning id`);
  return rows.map((r) => r.id);
}
