/**
 * Runs: submission (validation, plan limits, estimate, budget, then the row, then the job),
 * lists, reads, cancellation and the JSON export. Every query is scoped to the caller's workspace.
 */
import "@/server/server-only";
import { and, desc, eq, inArray, isNull, type SQL } from "drizzle-orm";
import { z } from "zod";
import { computeCostUsd } from "@/shared/plans";
import { JOB_STATUSES, type RunCreated, type RunDetail, type RunDryRun, type RunList, type RunSummary } from "@/shared/api";
import type { Caller } from "@/server/auth";
import { requirePermission } from "@/server/auth";
import { assertWithinBudget, reserveBudget } from "@/server/billing/budget";
import { assertEnsembleWithinPlan, assertJobComputeWithinPlan, assertNetworkWithinPlan, queuePriority } from "@/server/billing/limits";
import { getDb } from "@/server/db";
import { networkVersions, runs } from "@/server/db/schema";
import { estimateSeconds, inputHash, kindOf, networkSize, parseInput, type ComputeInput } from "@/server/engine";
import { beforeCursor, createdAtText, decodeCursor, encodeCursor, pageLimit } from "@/server/http/cursor";
import { ApiError, zodToApiError } from "@/server/http/errors";
import { enqueueAfterCommit, JOB_KINDS, requestCancel } from "@/server/jobs";
import { isUuid, resolveNetwork } from "@/server/networks/service";
import { refreshSweep } from "./sweep-progress";

/** The statuses of a job (the contract's list). */
export const RUN_STATUSES = JOB_STATUSES;
export type RunStatus = (typeof RUN_STATUSES)[number];

/** `{ network | networkId, networkVersion?, computation }`: the command line's file, or a saved network by id. */
export const submissionBody = z
  .object({
    network: z.unknown().optional(),
    networkId: z.string().optional(),
    networkVersion: z.number().int().min(1).optional(),
    computation: z.unknown(),
  })
  .strict();

export interface ResolvedSubmission {
  input: ComputeInput;
  networkVersionId: string | null;
}

/** Resolves the network (inline or saved, in the caller's workspace) and validates the whole input. */
export async function resolveSubmission(
  caller: Caller,
  body: { network?: unknown; networkId?: string; networkVersion?: number; computation?: unknown },
): Promise<ResolvedSubmission> {
  const hasInline = body.network !== undefined;
  const hasId = body.networkId !== undefined;
  if (hasInline === hasId) {
    throw new ApiError("invalid_input", "Send exactly one of `network` (an inline network description) or `networkId` (a saved network).", {
      field: hasInline ? "networkId" : "network",
    });
  }
  if (body.networkVersion !== undefined && !hasId) throw new ApiError("invalid_input", "networkVersion: only with networkId.", { field: "networkVersion" });
  if (body.computation === undefined)
    throw new ApiError("invalid_input", "computation: required; say what to compute (engine schema).", { field: "computation" });
  let network = body.network;
  let networkVersionId: string | null = null;
  if (hasId) {
    if (!isUuid(body.networkId!)) throw new ApiError("not_found", `No network with id ${body.networkId} in this group.`, { field: "networkId" });
    const saved = await resolveNetwork(caller, body.networkId!, body.networkVersion);
    network = saved.definition;
    networkVersionId = saved.networkVersionId;
  }
  const input = parseInput({ network, computation: body.computation });
  assertNetworkWithinPlan(caller.plan, networkSize(input.network));
  assertEnsembleWithinPlan(caller.plan, input);
  return { input, networkVersionId };
}

function estimateView(plan: Caller["plan"], seconds: number) {
  return { computeSeconds: round(seconds, 3), costUsd: round(computeCostUsd(plan, seconds), 4) };
}
const round = (x: number, digits: number) => Math.round(x * 10 ** digits) / 10 ** digits;

async function prepareRun(caller: Caller, body: unknown) {
  requirePermission(caller, "work.create");
  const parsed = submissionBody.safeParse(body);
  if (!parsed.success) throw zodToApiError(parsed.error);
  const { input, networkVersionId } = await resolveSubmission(caller, parsed.data);
  const estimated = estimateSeconds(input);
  assertJobComputeWithinPlan(caller.plan, estimated, "The calculation");
  await assertWithinBudget(caller.workspaceId, estimated);
  return { input, networkVersionId, estimated };
}

/** Every check of a submission (the budget's too) and the estimate, writing nothing: the cost shown before starting. */
export async function estimateRun(caller: Caller, body: unknown): Promise<RunDryRun> {
  const { input, estimated } = await prepareRun(caller, body);
  return { dryRun: true as const, kind: kindOf(input), inputHash: inputHash(input), estimate: estimateView(caller.plan, estimated), input };
}

export async function createRun(caller: Caller, body: unknown): Promise<RunCreated> {
  const { input, networkVersionId, estimated } = await prepareRun(caller, body);
  const priority = queuePriority(caller.plan);
  // The queued row is the reservation: written in the transaction that checked the budget under the workspace's lock.
  const row = await getDb().transaction(async (tx) => {
    await reserveBudget(tx, caller.workspaceId, estimated);
    const [inserted] = await tx
      .insert(runs)
      .values({
        workspaceId: caller.workspaceId,
        createdBy: caller.userId,
        networkVersionId,
        kind: kindOf(input),
        input,
        status: "queued",
        estimatedComputeSeconds: estimated,
        inputHash: inputHash(input),
        priority,
        plan: caller.plan,
      })
      .returning();
    return inserted;
  });
  await enqueueAfterCommit("run", [{ id: row.id, priority }]);
  return {
    id: row.id,
    status: row.status,
    estimate: estimateView(caller.plan, estimated),
    kind: row.kind,
    inputHash: row.inputHash,
    createdAt: row.createdAt.toISOString(),
  };
}

const runColumns = {
  run: runs,
  networkId: networkVersions.networkId,
  networkVersion: networkVersions.version,
  at: createdAtText(runs.createdAt),
};

type RunJoined = { run: typeof runs.$inferSelect; networkId: string | null; networkVersion: number | null; at: string };

export function runView(r: RunJoined, plan: Caller["plan"]): RunSummary {
  const run = r.run;
  return {
    id: run.id,
    kind: run.kind,
    status: run.status,
    progress: run.progress,
    networkId: r.networkId,
    networkVersion: r.networkVersion,
    sweepId: run.sweepId,
    sweepPointIndex: run.sweepPointIndex,
    estimate: estimateView(plan, run.estimatedComputeSeconds),
    computeSeconds: run.computeSeconds,
    engineVersion: run.engineVersion,
    inputHash: run.inputHash,
    attempts: run.attempts,
    createdBy: run.createdBy,
    createdAt: run.createdAt.toISOString(),
    startedAt: run.startedAt?.toISOString() ?? null,
    finishedAt: run.finishedAt?.toISOString() ?? null,
    cancelRequestedAt: run.cancelRequestedAt?.toISOString() ?? null,
    error: run.error ?? null,
  };
}

/** One calculation with its input and result. */
export function runDetail(r: RunJoined, plan: Caller["plan"]): RunDetail {
  return { ...runView(r, plan), input: r.run.input, result: r.run.result ?? null };
}

/** The filters of GET /api/v1/runs (besides limit and cursor). */
export const runListQuery = z.object({
  status: z.enum(RUN_STATUSES).optional(),
  kind: z.string().min(1).max(40).optional(),
  networkId: z
    .string()
    .regex(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i, "must be a network id")
    .optional(),
  sweepId: z
    .string()
    .regex(/^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i, "must be a sweep id")
    .optional(),
  includeSweepPoints: z.enum(["true", "false"]).optional(),
});

/** Newest first. Without sweepId, sweep points are left out unless includeSweepPoints=true. */
export async function listRuns(caller: Caller, query: URLSearchParams): Promise<RunList> {
  requirePermission(caller, "results.view");
  const q = runListQuery.safeParse(Object.fromEntries([...query.entries()].filter(([k]) => k !== "limit" && k !== "cursor")));
  if (!q.success) throw zodToApiError(q.error);
  const limit = pageLimit(query.get("limit"));
  const cursor = decodeCursor(query.get("cursor"));
  const f = q.data;
  const where: (SQL | undefined)[] = [eq(runs.workspaceId, caller.workspaceId), beforeCursor(runs.createdAt, runs.id, cursor)];
  if (f.status) where.push(eq(runs.status, f.status));
  if (f.kind) where.push(eq(runs.kind, f.kind));
  if (f.networkId)
    where.push(
      inArray(runs.networkVersionId, getDb().select({ id: networkVersions.id }).from(networkVersions).where(eq(networkVersions.networkId, f.networkId))),
    );
  if (f.sweepId) where.push(eq(runs.sweepId, f.sweepId));
  else if (f.includeSweepPoints !== "true") where.push(isNull(runs.sweepId));
  const rows = await getDb()
    .select(runColumns)
    .from(runs)
    .leftJoin(networkVersions, eq(networkVersions.id, runs.networkVersionId))
    .where(and(...where))
    .orderBy(desc(runs.createdAt), desc(runs.id))
    .limit(limit + 1);
  const page = rows.slice(0, limit);
  const last = page[page.length - 1];
  return { runs: page.map((r) => runView(r, caller.plan)), nextCursor: rows.length > limit && last ? encodeCursor(last.at, last.run.id) : null };
}

async function loadRun(caller: Caller, id: string): Promise<RunJoined> {
  if (!isUuid(id)) throw new ApiError("not_found", `No run with id ${id} in this group.`, { runId: id });
  const [row] = await getDb()
    .select(runColumns)
    .from(runs)
    .leftJoin(networkVersions, eq(networkVersions.id, runs.networkVersionId))
    .where(and(eq(runs.id, id), eq(runs.workspaceId, caller.workspaceId)));
  if (!row) throw new ApiError("not_found", `No run with id ${id} in this group.`, { runId: id });
  return row;
}

export async function getRun(caller: Caller, id: string): Promise<RunDetail> {
  requirePermission(caller, "results.view");
  return runDetail(await loadRun(caller, id), caller.plan);
}

/** The result exactly as the command line prints it for the same input (one line of JSON). */
export async function runResultJson(caller: Caller, id: string): Promise<string> {
  requirePermission(caller, "results.view");
  const r = await loadRun(caller, id);
  if (r.run.status !== "succeeded") {
    throw new ApiError("conflict", `Run ${id} is ${r.run.status}; its result exists once it has succeeded.`, { status: r.run.status });
  }
  return `${JSON.stringify(r.run.result)}\n`;
}

/**
 * Cancels a run: a queued one at once; a running one is flagged and its worker stops it within a
 * second, recording the compute-seconds it spent. Finished runs answer 409.
 */
export async function cancelRun(caller: Caller, id: string): Promise<RunDetail> {
  requirePermission(caller, "results.view");
  const r = await loadRun(caller, id);
  if (r.run.createdBy !== caller.userId) requirePermission(caller, "work.manageOthers");
  else requirePermission(caller, "work.create");
  if (!(await requestCancel(getDb(), JOB_KINDS.run, id, caller.workspaceId))) {
    throw new ApiError("conflict", `Run ${id} has already ${r.run.status === "cancelled" ? "been cancelled" : r.run.status}; nothing to cancel.`, {
      status: r.run.status,
    });
  }
  if (r.run.sweepId) await refreshSweepAfterCancel(r.run.sweepId);
  return getRun(caller, id);
}

async function refreshSweepAfterCancel(sweepId: string) {
  await getDb().transaction((tx) => refreshSweep(tx, sweepId));
}
