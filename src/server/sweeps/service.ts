/**
 * Sweeps: a grid of runs over one or two parameters, optionally each an ensemble of disorder
 * samples. Submission checks every point (schema, engine limits, plan limits) and the budget for
 * the sum of the points' estimates before anything is written; then the sweep row and one child
 * run per point are written in one transaction and each point becomes its own job, so many
 * workers share one sweep.
 */
import "@/server/server-only";
import { and, asc, desc, eq, sql, type SQL } from "drizzle-orm";
import { z } from "zod";
import { computeCostUsd } from "@/shared/plans";
import { scanTitle } from "@/shared/kinds";
import { sweepCsv } from "@/shared/exports";
import { env } from "@/env";
import type { SweepCreated, SweepDetail, SweepDryRun, SweepGrid, SweepList, SweepSummary } from "@/shared/api";
import type { Caller } from "@/server/auth";
import { requirePermission } from "@/server/auth";
import { assertWithinBudget, reserveBudget } from "@/server/billing/budget";
import { assertSweepWithinPlan, queuePriority } from "@/server/billing/limits";
import { getDb } from "@/server/db";
import { networks, networkVersions, runs, sweeps } from "@/server/db/schema";
import { ENGINE_VERSION, canonicalJson, kindOf, sweepableParameters, type ComputeInput } from "@/server/engine";
import { createHash } from "node:crypto";
import { beforeCursor, createdAtText, decodeCursor, encodeCursor, pageLimit } from "@/server/http/cursor";
import { ApiError, zodToApiError } from "@/server/http/errors";
import { isUuid } from "@/server/networks/service";
import { enqueueAfterCommit } from "@/server/jobs";
import { INLINE_LIMITS, runAnalysis } from "@/server/offload";
import { RUN_STATUSES, resolveSubmission } from "@/server/runs/service";
import { deriveSweepStatus, refreshSweep, type SweepCounts } from "@/server/runs/sweep-progress";
import { axesSchema, ensembleSchema, gridShape, gridSize, pointCoordinates, resolveAxis, scalarQuantities, type ResolvedAxis } from "@/shared/sweep-axes";
import { checkSweepAxes } from "@/shared/sweep-checks";

export const sweepBody = z
  .object({
    name: z.string().trim().min(1).max(200).optional(),
    network: z.unknown().optional(),
    networkId: z.string().optional(),
    networkVersion: z.number().int().min(1).optional(),
    computation: z.unknown(),
    axes: axesSchema,
    ensemble: ensembleSchema.optional(),
  })
  .strict();

export { pointInput } from "@/server/offload/sweep-points";

function checkParameters(axes: ResolvedAxis[]) {
  const allowed = sweepableParameters();
  axes.forEach((a, k) => {
    const known = allowed.length === 0 || allowed.includes(a.parameter) || allowed.some((p) => p.endsWith(".*") && a.parameter.startsWith(p.slice(0, -1)));
    if (!known)
      throw new ApiError("invalid_input", `axes.${k}.parameter: "${a.parameter}" cannot be swept; allowed: ${allowed.join(", ")}.`, {
        field: `axes.${k}.parameter`,
        allowed,
      });
  });
  if (axes.length === 2 && axes[0].parameter === axes[1].parameter)
    throw new ApiError("invalid_input", "axes.1.parameter: the two axes must sweep different parameters.", { field: "axes.1.parameter" });
}

/**
 * A point the engine refused because its axis asks for values the engine never accepts (a node
 * probability out of the reachable range, a field a torus does not allow, ...): the scan builder's
 * sentence for that axis (src/shared/sweep-checks.ts) in place of the first point's engine text,
 * with the refused values, the allowed ones and the nearest valid axis in the details.
 */
function explainRefusedAxis(err: unknown, base: ComputeInput, axes: ResolvedAxis[]): unknown {
  if (!(err instanceof ApiError) || err.code !== "invalid_input") return err;
  const [problem] = checkSweepAxes(base, axes);
  if (!problem) return err;
  return new ApiError("invalid_input", problem.message, {
    field: `axes.${problem.axis}`,
    reason: problem.reason,
    refusedValues: problem.refused,
    ...(problem.reason === "node" ? { allowedRanges: problem.allowedRanges } : {}),
    ...(problem.reason === "torusField" ? { fieldStepTesla: problem.fieldStepTesla, allowedFields: problem.allowedFields } : {}),
    ...(problem.fix ? { nearestValidAxis: { parameter: problem.parameter, ...problem.fix } } : {}),
    pointError: err.message,
  });
}

async function prepareSweep(caller: Caller, body: unknown, dryRun: boolean) {
  requirePermission(caller, "work.create");
  const parsed = sweepBody.safeParse(body);
  if (!parsed.success) throw zodToApiError(parsed.error);
  const b = parsed.data;
  // The sweep's ensemble is the engine's: each point averages over `samples` disorder seeds.
  const computation = b.ensemble && b.computation && typeof b.computation === "object" ? { ...(b.computation as object), ensemble: b.ensemble } : b.computation;
  const { input: base, networkVersionId } = await resolveSubmission(caller, { ...b, computation });
  const axes = b.axes.map(resolveAxis);
  checkParameters(axes);
  const pointCount = gridSize(axes);
  assertSweepWithinPlan(caller.plan, pointCount, b.ensemble?.samples ?? 1);

  // Every point is validated (schema, engine limits, plan) before anything is written: in the
  // analysis thread unless the sweep is a single point (src/server/offload/). A submission keeps
  // the checked points to write them; a dry run needs only the total.
  const { total, points } = await runAnalysis(
    { kind: "sweepPoints", plan: caller.plan, base, axes, pointCount, keepPoints: !dryRun },
    pointCount <= INLINE_LIMITS.sweepPoints,
  ).catch((err: unknown) => {
    throw explainRefusedAxis(err, base, axes);
  });
  await assertWithinBudget(caller.workspaceId, total);
  return { b, base, networkVersionId, axes, pointCount, points, total };
}

/** Every check of a sweep (the budget's for the sum of its points) and the estimate, writing nothing. */
export async function estimateSweep(caller: Caller, body: unknown): Promise<SweepDryRun> {
  const { b, axes, pointCount, total } = await prepareSweep(caller, body, true);
  return {
    dryRun: true as const,
    pointCount,
    axes,
    ensemble: b.ensemble ?? null,
    estimate: { computeSeconds: round(total, 3), costUsd: round(computeCostUsd(caller.plan, total), 4) },
  };
}

export async function createSweep(caller: Caller, body: unknown): Promise<SweepCreated> {
  const { b, base, networkVersionId, axes, pointCount, points, total } = await prepareSweep(caller, body, false);
  const priority = queuePriority(caller.plan);
  const kind = kindOf(base);
  const db = getDb();
  const { sweep, ids } = await db.transaction(async (tx) => {
    // The queued points are the reservation: written in the transaction that checked the budget under the workspace's lock.
    await reserveBudget(tx, caller.workspaceId, total);
    const [sweep] = await tx
      .insert(sweeps)
      .values({
        workspaceId: caller.workspaceId,
        createdBy: caller.userId,
        networkVersionId,
        name: b.name ?? defaultName(kind, axes),
        input: base,
        axes,
        ensemble: b.ensemble ?? null,
        pointCount,
        status: "queued",
        estimatedComputeSeconds: total,
      })
      .returning();
    const ids: string[] = [];
    for (let i = 0; i < points.length; i += 1000) {
      const rows = await tx
        .insert(runs)
        .values(
          points.slice(i, i + 1000).map((p, j) => ({
            workspaceId: caller.workspaceId,
            createdBy: caller.userId,
            networkVersionId,
            sweepId: sweep.id,
            sweepPointIndex: i + j,
            kind,
            input: p.input,
            status: "queued" as const,
            estimatedComputeSeconds: p.estimate,
            inputHash: p.hash,
            priority,
            plan: caller.plan,
          })),
        )
        .returning({ id: runs.id });
      ids.push(...rows.map((r) => r.id));
    }
    return { sweep, ids };
  });
  await enqueueAfterCommit(
    "run",
    ids.map((id) => ({ id, priority })),
  );
  return {
    id: sweep.id,
    name: sweep.name,
    status: sweep.status,
    pointCount,
    axes,
    ensemble: sweep.ensemble,
    estimate: { computeSeconds: round(total, 3), costUsd: round(computeCostUsd(caller.plan, total), 4) },
    createdAt: sweep.createdAt.toISOString(),
  };
}

function defaultName(kind: string, axes: ResolvedAxis[]): string {
  return scanTitle(
    kind,
    axes.map((a) => a.parameter),
  );
}
const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;

async function loadSweep(caller: Caller, id: string) {
  if (!isUuid(id)) throw new ApiError("not_found", `No sweep with id ${id} in this group.`, { sweepId: id });
  const [row] = await getDb()
    .select({ sweep: sweeps, networkId: networkVersions.networkId, networkVersion: networkVersions.version, networkName: networks.name })
    .from(sweeps)
    .leftJoin(networkVersions, eq(networkVersions.id, sweeps.networkVersionId))
    .leftJoin(networks, eq(networks.id, networkVersions.networkId))
    .where(and(eq(sweeps.id, id), eq(sweeps.workspaceId, caller.workspaceId)));
  if (!row) throw new ApiError("not_found", `No sweep with id ${id} in this group.`, { sweepId: id });
  return row;
}

async function loadPoints(sweepId: string) {
  return getDb()
    .select({
      id: runs.id,
      index: runs.sweepPointIndex,
      status: runs.status,
      progress: runs.progress,
      computeSeconds: runs.computeSeconds,
      result: runs.result,
      error: runs.error,
      engineVersion: runs.engineVersion,
    })
    .from(runs)
    .where(eq(runs.sweepId, sweepId))
    .orderBy(asc(runs.sweepPointIndex));
}

type SweepRow = typeof sweeps.$inferSelect;

function sweepSummary(s: SweepRow, plan: Caller["plan"], networkId: string | null, networkVersion: number | null): SweepSummary {
  return {
    id: s.id,
    name: s.name,
    status: s.status,
    progress: s.progress,
    pointCount: s.pointCount,
    axes: s.axes,
    ensemble: s.ensemble ?? null,
    networkId,
    networkVersion,
    estimate: { computeSeconds: round(s.estimatedComputeSeconds, 3), costUsd: round(computeCostUsd(plan, s.estimatedComputeSeconds), 4) },
    computeSeconds: s.computeSeconds,
    engineVersion: s.engineVersion,
    createdBy: s.createdBy,
    createdAt: s.createdAt.toISOString(),
    startedAt: s.startedAt?.toISOString() ?? null,
    finishedAt: s.finishedAt?.toISOString() ?? null,
    cancelRequestedAt: s.cancelRequestedAt?.toISOString() ?? null,
  };
}

/** The sweep with live progress and the result grid (readable while it runs). */
export async function getSweep(caller: Caller, id: string): Promise<SweepDetail> {
  requirePermission(caller, "results.view");
  const { sweep, networkId, networkVersion, networkName } = await loadSweep(caller, id);
  const pts = await loadPoints(sweep.id);
  const axes = sweep.axes as ResolvedAxis[];
  const counts: SweepCounts = { queued: 0, running: 0, succeeded: 0, failed: 0, cancelled: 0 };
  let partial = 0;
  let seconds = 0;
  const points = pts.map((p) => {
    counts[p.status] += 1;
    if (p.status === "running") partial += p.progress;
    seconds += p.computeSeconds ?? 0;
    return {
      index: p.index,
      coordinates: pointCoordinates(axes, p.index ?? 0),
      runId: p.id,
      status: p.status,
      progress: p.progress,
      computeSeconds: p.computeSeconds,
      quantities: p.status === "succeeded" ? scalarQuantities(p.result) : null,
      error: p.error ?? null,
    };
  });
  const done = counts.succeeded + counts.failed + counts.cancelled;
  const status = deriveSweepStatus(counts, sweep.cancelRequestedAt !== null);
  const summary = sweepSummary(sweep, caller.plan, networkId, networkVersion);
  return {
    ...summary,
    status,
    progress: pts.length === 0 ? 1 : status === "succeeded" ? 1 : Math.min(1, (done + partial) / pts.length),
    computeSeconds: seconds,
    counts,
    networkName,
    inputHash: sweepInputHash(sweep.input, axes, sweep.ensemble ?? null),
    input: sweep.input,
    grid: resultGrid(axes, points),
    points,
  };
}

/** sha256 (hex) of the canonical JSON of the scan's base input, axes and ensemble: the same inputs give the same hash. */
export function sweepInputHash(input: unknown, axes: ResolvedAxis[], ensemble: unknown): string {
  return createHash("sha256").update(canonicalJson({ input, axes, ensemble })).digest("hex");
}

/**
 * The result grid: for each scalar quantity, its values in point order (row-major over the axes,
 * the first axis slowest), null where a point has not succeeded (yet).
 */
function resultGrid(axes: ResolvedAxis[], points: { quantities: Record<string, number> | null }[]): SweepGrid {
  const names = [...new Set(points.flatMap((p) => Object.keys(p.quantities ?? {})))];
  const quantities: Record<string, (number | null)[]> = {};
  for (const n of names) quantities[n] = points.map((p) => p.quantities?.[n] ?? null);
  return { shape: gridShape(axes), parameters: axes.map((a) => a.parameter), quantities };
}

/** The filter of GET /api/v1/sweeps (besides limit and cursor). */
export const sweepListQuery = z.object({ status: z.enum(RUN_STATUSES).optional() });

export async function listSweeps(caller: Caller, query: URLSearchParams): Promise<SweepList> {
  requirePermission(caller, "results.view");
  const q = sweepListQuery.safeParse({ status: query.get("status") ?? undefined });
  if (!q.success) throw zodToApiError(q.error);
  const limit = pageLimit(query.get("limit"));
  const cursor = decodeCursor(query.get("cursor"));
  const where: (SQL | undefined)[] = [eq(sweeps.workspaceId, caller.workspaceId), beforeCursor(sweeps.createdAt, sweeps.id, cursor)];
  if (q.data.status) where.push(eq(sweeps.status, q.data.status));
  const rows = await getDb()
    .select({ sweep: sweeps, networkId: networkVersions.networkId, networkVersion: networkVersions.version, at: createdAtText(sweeps.createdAt) })
    .from(sweeps)
    .leftJoin(networkVersions, eq(networkVersions.id, sweeps.networkVersionId))
    .where(and(...where))
    .orderBy(desc(sweeps.createdAt), desc(sweeps.id))
    .limit(limit + 1);
  const page = rows.slice(0, limit);
  const last = page[page.length - 1];
  return {
    sweeps: page.map((r) => sweepSummary(r.sweep, caller.plan, r.networkId, r.networkVersion)),
    nextCursor: rows.length > limit && last ? encodeCursor(last.at, last.sweep.id) : null,
  };
}

/** Cancels a sweep: queued points at once, running points within a second (their worker stops them). */
export async function cancelSweep(caller: Caller, id: string): Promise<SweepDetail> {
  requirePermission(caller, "results.view");
  const { sweep } = await loadSweep(caller, id);
  if (sweep.createdBy !== caller.userId) requirePermission(caller, "work.manageOthers");
  else requirePermission(caller, "work.create");
  const live = await getSweep(caller, id);
  if (live.status === "succeeded" || live.status === "failed" || live.status === "cancelled") {
    throw new ApiError("conflict", `Sweep ${id} has already ${live.status === "cancelled" ? "been cancelled" : live.status}; nothing to cancel.`, {
      status: live.status,
    });
  }
  await getDb().transaction(async (tx) => {
    // Lock the sweep first (a point's claim locks it too), then stamp the request with the clock
    // as it is after the lock: a claim that won the lock committed before this instant, and every
    // later claim sees the request. (now() is the transaction's start and could precede such a claim.)
    await tx.execute(sql`select 1 from sweeps where id = ${sweep.id} for update`);
    await tx.execute(sql`update sweeps set cancel_requested_at = coalesce(cancel_requested_at, clock_timestamp()) where id = ${sweep.id}`);
    await tx.execute(
      sql`update runs set status = 'cancelled', cancel_requested_at = clock_timestamp(), finished_at = clock_timestamp()
          where sweep_id = ${sweep.id} and status = 'queued'`,
    );
    await tx.execute(
      sql`update runs set cancel_requested_at = coalesce(cancel_requested_at, clock_timestamp()) where sweep_id = ${sweep.id} and status = 'running'`,
    );
    await refreshSweep(tx, sweep.id);
  });
  return getSweep(caller, id);
}

/** The sweep's results as CSV (src/shared/exports.ts: `#` lines with the inputs, engine version, input hash, export time; unit-suffixed columns). */
export async function sweepResultsCsv(caller: Caller, id: string): Promise<{ filename: string; body: string }> {
  const s = await getSweep(caller, id);
  const url = `${env().APP_URL.replace(/\/$/, "")}/sweeps/${s.id}`;
  return { filename: `triskel-sweep-${s.id}.csv`, body: sweepCsv(s, { engineVersion: ENGINE_VERSION, exportedAt: new Date(), url }) };
}
