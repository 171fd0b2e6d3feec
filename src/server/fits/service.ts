/**
 * Fits: submission (validation, estimate, budget, queue), reads, lists, cancellation, export.
 * Every query is scoped to the caller's workspace.
 */
import "@/server/server-only";
import { and, desc, eq, lt } from "drizzle-orm";
import { z } from "zod";
import { computeCostUsd } from "@/shared/plans";
import { Y_MEASURES_INFO, yMeasuresOf } from "@/shared/csv";
import { MODEL_CAUTION } from "@/shared/exports";
import { quantity, UNITS } from "@/shared/quantities";
import type { FitCreated, FitDetail, FitDryRun, FitExport, FitList, FitSettings } from "@/shared/api";
import type { Caller } from "@/server/auth";
import { requirePermission } from "@/server/auth";
import { assertWithinBudget, reserveBudget } from "@/server/billing/budget";
import { assertJobComputeWithinPlan, queuePriority } from "@/server/billing/limits";
import { getDb } from "@/server/db";
import { datasets, fits } from "@/server/db/schema";
import { beforeTime, pageLimit } from "@/server/http/cursor";
import { ApiError, zodToApiError } from "@/server/http/errors";
import { enqueueAfterCommit, JOB_KINDS, requestCancel } from "@/server/jobs";
import { resolveSubmission } from "@/server/runs/service";
import { ENGINE_VERSION, engine, inputHash, secondsPerEvaluation } from "./engine";
import { FitInputError, fitStages, MAX_GLOBAL_STARTS, MAX_LOCAL_STARTS, MAX_PROFILE_POINTS, validateSpecs } from "./fitter";
import { applyValues, checkFitSpecs, expectedEvaluations, SWEEP_FOR_QUANTITY } from "./model";

const spec = z.object({ parameter: z.string().min(1), initial: z.number(), min: z.number(), max: z.number() }).strict();
export const fitBody = z
  .object({
    datasetId: z.string().min(1, "name the dataset to fit"),
    network: z.union([z.string(), z.record(z.string(), z.unknown())]).optional(),
    networkId: z.string().optional(),
    networkVersion: z.number().int().min(1).optional(),
    computation: z.record(z.string(), z.unknown()),
    sweepParameter: z.string().min(1),
    fit: z.array(spec).min(1, "list at least one parameter to fit").max(7, "at most 7 parameters"),
    options: z
      .object({
        multiStart: z.number().int().min(1).max(MAX_LOCAL_STARTS).optional(),
        globalStarts: z.number().int().min(0).max(MAX_GLOBAL_STARTS).optional(),
        maxIterations: z.number().int().min(1).max(200).optional(),
        profilePoints: z
          .number()
          .int()
          .min(0)
          .max(MAX_PROFILE_POINTS)
          .refine((v) => v !== 1, "a chi2 profile needs at least 2 points (0 turns the profiles off)")
          .optional(),
        profileIterations: z.number().int().min(1).max(20).optional(),
        seed: z
          .number()
          .int()
          .min(0)
          .max(2 ** 31 - 1)
          .optional(),
      })
      .strict()
      .optional(),
  })
  .strict();
export type FitBody = z.infer<typeof fitBody>;

type FitRow = typeof fits.$inferSelect;

const uuidRe = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Every check of a fit submission (the budget's too) and its estimate, writing nothing. */
async function prepareFit(caller: Caller, raw: unknown) {
  requirePermission(caller, "work.create");
  const parsed = fitBody.safeParse(raw);
  if (!parsed.success) throw zodToApiError(parsed.error);
  const body = parsed.data;
  if (!uuidRe.test(body.datasetId)) throw new ApiError("not_found", `datasetId: no dataset ${body.datasetId} in this workspace.`, { field: "datasetId" });
  const db = getDb();
  const [dataset] = await db
    .select()
    .from(datasets)
    .where(and(eq(datasets.id, body.datasetId), eq(datasets.workspaceId, caller.workspaceId)));
  if (!dataset) throw new ApiError("not_found", `datasetId: no dataset ${body.datasetId} in this workspace.`, { field: "datasetId" });
  const allowed = SWEEP_FOR_QUANTITY[dataset.xQuantity] ?? [];
  if (!allowed.includes(body.sweepParameter)) {
    throw new ApiError(
      "invalid_input",
      allowed.length
        ? `sweepParameter: this dataset's x is ${dataset.xQuantity} in ${dataset.xUnit}; map it to ${allowed.join(" or ")}.`
        : `sweepParameter: this dataset's x is ${dataset.xQuantity === "gateVoltage" ? "gate voltage" : "carrier density"}; ` +
            `the engine has no parameter for it yet, so only field (fieldTesla) datasets can be fitted.`,
      { field: "sweepParameter", allowed },
    );
  }
  // The engine checks the network and computation objects as the client sent them: zod's record
  // copies drop keys such as "__proto__", which the engine's unknown-field check must still see.
  const sent = raw as { network?: unknown; computation?: Record<string, unknown> };
  const computation: Record<string, unknown> = Object.create(null);
  for (const key of Object.keys(sent.computation ?? {})) computation[key] = (sent.computation as Record<string, unknown>)[key];
  // What the data measure decides what the model computes: a two-terminal conductance, or a Hall bar's R_xx or R_xy.
  const measured = yMeasuresOf(dataset.mapping);
  const kind = measured === "twoTerminal" ? "conductance" : "hallBar";
  if (computation.kind !== undefined && computation.kind !== kind)
    throw new ApiError(
      "invalid_input",
      measured === "twoTerminal"
        ? 'computation.kind: this dataset holds a two-terminal conductance; fit it with "conductance".'
        : `computation.kind: this dataset holds ${Y_MEASURES_INFO[measured].label}; fit it with "hallBar" (a network with transverse "open").`,
      { field: "computation.kind", allowed: [kind] },
    );
  computation.kind = kind;
  // The same network resolution and engine validation as runs (saved network in this workspace or
  // inline; engine errors answer 422 with the field through the engine door's mapper; plan limits).
  // A saved network may also be named by its id in `network` (then not also in `networkId`).
  const idInNetwork = typeof body.network === "string" && body.networkId === undefined;
  const { input } = await resolveSubmission(caller, {
    network: idInNetwork ? undefined : sent.network,
    networkId: idInNetwork ? (body.network as string) : body.networkId,
    networkVersion: body.networkVersion,
    computation,
  });
  const points = dataset.points;
  try {
    validateSpecs(body.fit, points.x.length);
    checkFitSpecs(body.fit);
  } catch (err) {
    if (err instanceof FitInputError) throw new ApiError("invalid_input", err.message, { field: err.field });
    throw err;
  }
  // Every bound and start must be a valid engine input (e.g. node.forward >= 1/9 for equal turns).
  for (const [i, s] of body.fit.entries()) {
    for (const which of ["initial", "min", "max"] as const) {
      try {
        engine.applyParameter(input as never, s.parameter, s[which]);
      } catch (err) {
        throw new ApiError("invalid_input", `fit.${i}.${which}: ${(err as Error).message}`, { field: `fit.${i}.${which}` });
      }
    }
  }
  // Parameters can constrain one another (node.forward +- forwardSpread / 2 must stay a valid
  // probability): every corner of the box of bounds must be a valid engine input too. The allowed
  // region is convex in these parameters, so the corners cover the inside (up to 2^5 corners).
  if (body.fit.length > 1 && body.fit.length <= 5) {
    for (let corner = 0; corner < 1 << body.fit.length; corner++) {
      const at = Object.fromEntries(body.fit.map((s, j) => [s.parameter, corner & (1 << j) ? s.max : s.min]));
      try {
        applyValues(engine, input, at);
      } catch (err) {
        const where = Object.entries(at)
          .map(([p, v]) => `${p} = ${v}`)
          .join(", ");
        throw new ApiError("invalid_input", `fit: the bounds together are not a valid model at ${where}: ${(err as Error).message}; narrow the bounds.`, {
          field: "fit",
        });
      }
    }
  }
  // The cost per evaluation at the upper bounds (e.g. the most temperature points).
  const worst = applyValues(engine, input, Object.fromEntries(body.fit.map((s) => [s.parameter, s.max])));
  try {
    engine.applyParameter(input as never, body.sweepParameter, points.x[0]);
  } catch (err) {
    throw new ApiError("invalid_input", `sweepParameter: ${(err as Error).message}`, { field: "sweepParameter" });
  }
  const evaluations = expectedEvaluations(body.fit.length, body.options);
  const estimatedComputeSeconds = evaluations * points.x.length * secondsPerEvaluation(worst);
  assertJobComputeWithinPlan(caller.plan, estimatedComputeSeconds, `The fit (${evaluations * points.x.length} engine evaluations)`);
  await assertWithinBudget(caller.workspaceId, estimatedComputeSeconds);
  const estimate = {
    computeSeconds: round(estimatedComputeSeconds, 3),
    costUsd: round(computeCostUsd(caller.plan, estimatedComputeSeconds), 4),
    engineEvaluations: evaluations * points.x.length,
  };
  return { body, dataset, input, estimatedComputeSeconds, estimate, measured };
}

/** POST /api/v1/fits?dryRun=true: the checks and the estimate (global and local stages as they would run), nothing written. */
export async function estimateFit(caller: Caller, raw: unknown): Promise<FitDryRun> {
  const { body, dataset, input, estimate } = await prepareFit(caller, raw);
  const stages = fitStages(body.fit.length, body.options);
  return {
    dryRun: true as const,
    estimate,
    stages: {
      globalStarts: stages.globalStarts,
      localStarts: stages.localStarts,
      maxIterations: stages.maxIterations,
      profilePoints: stages.profilePoints,
      profileIterations: stages.profileIterations,
    },
    points: dataset.points.x.length,
    modelCurves: estimate.engineEvaluations / dataset.points.x.length,
    inputHash: inputHash(input as never),
  };
}

export async function createFit(caller: Caller, raw: unknown): Promise<FitCreated> {
  const { body, dataset, input, estimatedComputeSeconds, estimate, measured } = await prepareFit(caller, raw);
  const db = getDb();
  const stored: FitSettings = { ...input, sweepParameter: body.sweepParameter, fit: body.fit, options: body.options ?? {}, measured };
  // The queued fit is the reservation: written in the transaction that checked the budget under the workspace's lock.
  const row = await db.transaction(async (tx) => {
    await reserveBudget(tx, caller.workspaceId, estimatedComputeSeconds);
    const [inserted] = await tx
      .insert(fits)
      .values({
        workspaceId: caller.workspaceId,
        createdBy: caller.userId,
        datasetId: dataset.id,
        input: stored,
        estimatedComputeSeconds,
        inputHash: inputHash(input as never),
        dataHash: dataset.dataHash,
        engineVersion: ENGINE_VERSION,
        plan: caller.plan,
      })
      .returning();
    return inserted;
  });
  await enqueueAfterCommit("fit", [{ id: row.id, priority: queuePriority(caller.plan) }]);
  return { id: row.id, status: row.status, estimate };
}

const round = (x: number, d: number) => Math.round(x * 10 ** d) / 10 ** d;

export function fitView(f: FitRow, datasetName?: string): Omit<FitDetail, "datasetSynthetic"> {
  return {
    id: f.id,
    datasetId: f.datasetId,
    datasetName: datasetName ?? null,
    status: f.status,
    progress: f.progress,
    lastIteration: f.lastIteration,
    result: f.result,
    error: f.error,
    settings: {
      network: f.input.network,
      computation: f.input.computation,
      sweepParameter: f.input.sweepParameter,
      fit: f.input.fit,
      options: f.input.options,
      measured: f.input.measured ?? "twoTerminal",
    },
    estimatedComputeSeconds: f.estimatedComputeSeconds,
    computeSeconds: f.computeSeconds,
    engineVersion: f.engineVersion,
    inputHash: f.inputHash,
    dataHash: f.dataHash,
    createdAt: f.createdAt.toISOString(),
    startedAt: f.startedAt?.toISOString() ?? null,
    finishedAt: f.finishedAt?.toISOString() ?? null,
  };
}

async function loadFit(caller: Caller, id: string) {
  requirePermission(caller, "results.view");
  if (!uuidRe.test(id)) throw new ApiError("not_found", `No fit ${id} in this workspace.`);
  const [row] = await getDb()
    .select({ fit: fits, datasetName: datasets.name, synthetic: datasets.synthetic })
    .from(fits)
    .innerJoin(datasets, eq(datasets.id, fits.datasetId))
    .where(and(eq(fits.id, id), eq(fits.workspaceId, caller.workspaceId)));
  if (!row) throw new ApiError("not_found", `No fit ${id} in this workspace.`);
  return row;
}

export async function getFit(caller: Caller, id: string): Promise<FitDetail> {
  const r = await loadFit(caller, id);
  return { ...fitView(r.fit, r.datasetName), datasetSynthetic: r.synthetic };
}

export async function listFits(caller: Caller, query: URLSearchParams): Promise<FitList> {
  requirePermission(caller, "results.view");
  const limit = pageLimit(query.get("limit"));
  const beforeDate = beforeTime(query.get("before"));
  const datasetId = query.get("datasetId");
  if (datasetId && !uuidRe.test(datasetId)) throw new ApiError("invalid_input", "datasetId: must be a dataset id.", { field: "datasetId" });
  const rows = await getDb()
    .select({ fit: fits, datasetName: datasets.name })
    .from(fits)
    .innerJoin(datasets, eq(datasets.id, fits.datasetId))
    .where(
      and(
        eq(fits.workspaceId, caller.workspaceId),
        beforeDate ? lt(fits.createdAt, beforeDate) : undefined,
        datasetId ? eq(fits.datasetId, datasetId) : undefined,
      ),
    )
    .orderBy(desc(fits.createdAt), desc(fits.id))
    .limit(limit + 1);
  const items = rows.slice(0, limit).map((r) => {
    const v = fitView(r.fit, r.datasetName);
    return {
      ...v,
      result: v.result ? { parameters: v.result.parameters, chi2PerDof: v.result.chi2PerDof, quality: v.result.quality, flags: v.result.flags } : null,
    };
  });
  return { items, nextBefore: rows.length > limit ? items[items.length - 1].createdAt : null };
}

export async function cancelFit(caller: Caller, id: string): Promise<FitDetail> {
  const r = await loadFit(caller, id);
  // The same rule as runs, from the permissions table: one's own work, or others' with work.manageOthers.
  if (r.fit.createdBy !== caller.userId) requirePermission(caller, "work.manageOthers");
  else requirePermission(caller, "work.create");
  if (!(await requestCancel(getDb(), JOB_KINDS.fit, id, caller.workspaceId))) {
    const [now] = await getDb().select({ status: fits.status }).from(fits).where(eq(fits.id, id));
    const status = now?.status ?? r.fit.status;
    throw new ApiError("conflict", `Fit ${id} has already ${status === "cancelled" ? "been cancelled" : status}; nothing to cancel.`, { status });
  }
  return getFit(caller, id);
}

/** The export: every setting, the engine version, the data hash, the result. */
export async function exportFit(caller: Caller, id: string): Promise<FitExport> {
  const r = await loadFit(caller, id);
  const [d] = await getDb()
    .select()
    .from(datasets)
    .where(and(eq(datasets.id, r.fit.datasetId), eq(datasets.workspaceId, caller.workspaceId)));
  const v = fitView(r.fit, r.datasetName);
  return {
    format: "triskel-fit-report/1",
    exportedAt: new Date().toISOString(),
    fit: { id: v.id, status: v.status, createdAt: v.createdAt, finishedAt: v.finishedAt, computeSeconds: v.computeSeconds },
    engineVersion: v.engineVersion,
    inputHash: v.inputHash,
    dataset: {
      id: d.id,
      name: d.name,
      synthetic: d.synthetic,
      dataHash: d.dataHash,
      dataHashAlgorithm: "sha256 of the original file",
      mapping: d.mapping,
      rows: d.rows,
      xUnit: d.xUnit,
      yUnit: Y_MEASURES_INFO[yMeasuresOf(d.mapping)].unit,
      originalFilename: d.originalFilename,
    },
    settings: v.settings,
    algorithm: {
      method:
        "global stage: seeded Latin hypercube of model curves over the bounds (the initial values one of the points), then " +
        "Levenberg-Marquardt from the best distinct points (ml-levenberg-marquardt 5.1 steps; bounded, in coordinates scaled to the bounds)",
      uncertainties: "standard errors sqrt(diag((J^T W J)^-1 * chi2/dof)); J the model Jacobian by central differences at the optimum",
      model:
        yMeasuresOf({ yMeasures: v.settings.measured }) === "twoTerminal"
          ? "engine two-terminal conductance, total over valleys and spins, in e2/h, at every data x"
          : `engine Hall bar (kind hallBar), ${Y_MEASURES_INFO[v.settings.measured!].label} in ohm for a current from source to drain, at every data x`,
    },
    result: v.result,
    caution:
      "Results are predictions of a phenomenological model, not measurements; " +
      "node probabilities and mode velocity are model parameters, not material constants.",
  };
}

/** The `#` lines that open a fit's CSV files: the fit, engine, input and dataset hashes, the caution. */
function fitCsvHeader(id: string, fit: { engineVersion: string | null; inputHash: string; dataHash: string }): string[] {
  return [`# Triskel fit ${id}; engine ${fit.engineVersion}; input sha256 ${fit.inputHash}; dataset sha256 ${fit.dataHash}`, `# ${MODEL_CAUTION}`];
}

/**
 * CSV of the model curve and the residuals at the data's x, the columns named by the export rule
 * of src/shared/quantities.ts: `field_T,model_conductance_e2h,residual_e2h` (a Hall-bar fit:
 * `model_longitudinal_resistance_ohm` or `model_hall_resistance_ohm`, `residual_ohm`).
 */
export async function fitCurveCsv(caller: Caller, id: string): Promise<{ filename: string; csv: string }> {
  const r = await loadFit(caller, id);
  const result = r.fit.result as { curve?: { x: number[]; y: number[] }; residuals?: number[] } | null;
  if (!result?.curve) throw new ApiError("conflict", `Fit ${id} has no model curve yet (status ${r.fit.status}).`);
  const x = quantity(r.fit.input.sweepParameter ?? "fieldTesla").column;
  const lines = [
    ...fitCsvHeader(id, r.fit),
    yMeasuresOf({ yMeasures: r.fit.input.measured }) === "twoTerminal"
      ? `${x},model_conductance_e2h,residual_e2h`
      : `${x},model_${r.fit.input.measured === "hall" ? "hall" : "longitudinal"}_resistance_ohm,residual_ohm`,
    ...result.curve.x.map((x, i) => `${x},${result.curve!.y[i]},${result.residuals?.[i] ?? ""}`),
  ];
  return { filename: `fit-${id.slice(0, 8)}-model.csv`, csv: lines.join("\n") + "\n" };
}

/**
 * CSV of the chi2 profiles: one row per profile point, the profiled parameter and its value, chi2,
 * the one-standard-error level (best chi2 + chi2/dof) and the other fitted parameters after their refit.
 */
export async function fitProfilesCsv(caller: Caller, id: string): Promise<{ filename: string; csv: string }> {
  const r = await loadFit(caller, id);
  const result = r.fit.result as FitDetail["result"];
  if (!result) throw new ApiError("conflict", `Fit ${id} has no result yet (status ${r.fit.status}).`);
  const profiles = result.profiles ?? [];
  if (profiles.length === 0)
    throw new ApiError("conflict", `Fit ${id} has no chi2 profiles (they were turned off with options.profilePoints = 0, or the fit predates them).`);
  const names = result.parameters.map((p) => p.parameter);
  const lines = [
    ...fitCsvHeader(id, r.fit),
    `# chi2 of the fit ${result.chi2}; value is the profiled parameter's, in profiled_unit; fitted_* are every fitted parameter after the refit`,
    ["profiled_parameter", "profiled_unit", "value", "chi2_1", "one_sigma_level_1", ...names.map((n) => `fitted_${quantity(n).column}`)].join(","),
    ...profiles.flatMap((p) =>
      p.points.map((pt) =>
        [
          p.parameter,
          UNITS[quantity(p.parameter).unit],
          pt.value,
          pt.chi2,
          result.chi2 + p.deltaChi2,
          ...names.map((n) => (n === p.parameter ? pt.value : (pt.others[n] ?? ""))),
        ].join(","),
      ),
    ),
  ];
  return { filename: `fit-${id.slice(0, 8)}-profiles.csv`, csv: lines.join("\n") + "\n" };
}
