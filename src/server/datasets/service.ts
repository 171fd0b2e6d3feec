/**
 * Datasets: upload (multipart CSV + column mapping), list, read, period analysis. Every query is
 * scoped to the caller's workspace.
 */
import "@/server/server-only";
import { createHash } from "node:crypto";
import { and, desc, eq, lt } from "drizzle-orm";
import { z } from "zod";
import type { Caller } from "@/server/auth";
import { requirePermission } from "@/server/auth";
import { getDb } from "@/server/db";
import { datasets } from "@/server/db/schema";
import { beforeTime, pageLimit } from "@/server/http/cursor";
import { ApiError, zodToApiError } from "@/server/http/errors";
import { readBodyCapped } from "@/server/http/body";
import { INLINE_LIMITS, runAnalysis } from "@/server/offload";
import {
  countCsvRecords,
  DATASET_MAX_BYTES,
  DATASET_MAX_ROWS,
  DatasetCsvError,
  parseDatasetCsv,
  Y_MEASURES,
  Y_MEASURES_INFO,
  yMeasuresOf,
  type ColumnMapping,
  type ParsedDataset,
} from "@/shared/csv";
import { X_UNITS, Y_UNITS } from "@/shared/units";
import { PeriodAnalysisError, periodFftLength } from "@/shared/period";
import type { DatasetDetail, DatasetPeriod, DatasetPoints, DatasetSummary } from "@/shared/api";

export const uploadFields = z.object({
  name: z.string().trim().min(1, "give the dataset a name").max(200, "at most 200 characters"),
  xColumn: z.string().trim().min(1, "name the CSV column that holds x"),
  xUnit: z.enum(X_UNITS, { message: `must be one of ${X_UNITS.join(", ")}` }),
  yColumn: z.string().trim().min(1, "name the CSV column that holds y"),
  yUnit: z.enum(Y_UNITS, { message: `must be one of ${Y_UNITS.join(", ")}` }),
  sigmaColumn: z.string().trim().min(1).optional(),
  temperatureColumn: z.string().trim().min(1).optional(),
  yMeasures: z.enum(Y_MEASURES, { message: `must be one of ${Y_MEASURES.join(", ")}` }).optional(),
  description: z.string().max(2000, "at most 2000 characters").optional(),
});

type Row = typeof datasets.$inferSelect;

export function sha256Hex(text: string): string {
  return createHash("sha256").update(text, "utf8").digest("hex");
}

export function datasetSummary(d: Row): DatasetSummary {
  const p = d.points as DatasetPoints;
  return {
    id: d.id,
    name: d.name,
    synthetic: d.synthetic,
    description: d.description,
    rows: d.rows,
    xQuantity: d.xQuantity,
    xUnit: d.xUnit,
    yUnit: Y_MEASURES_INFO[yMeasuresOf(d.mapping)].unit,
    yMeasures: yMeasuresOf(d.mapping),
    hasSigma: !!p.sigma,
    hasTemperature: !!p.temperatureK,
    xRange: [p.x[0], p.x[p.x.length - 1]],
    mapping: d.mapping,
    originalFilename: d.originalFilename,
    originalBytes: d.originalBytes,
    dataHash: d.dataHash,
    createdAt: d.createdAt.toISOString(),
  };
}

export function datasetView(d: Row): DatasetDetail {
  return { ...datasetSummary(d), points: d.points };
}

/** CSV problems become 422 with every issue (row, column, code, message) in details. */
export function csvErrorToApi(err: DatasetCsvError): ApiError {
  return new ApiError("invalid_input", err.message, { issues: err.issues });
}

export interface NewDataset {
  name: string;
  csv: string;
  filename?: string | null;
  mapping: ColumnMapping;
  description?: string | null;
  synthetic?: boolean;
}

/**
 * Parses (unless the caller already did: `parsed`, from the same csv and mapping) and stores;
 * throws ApiError 422 naming row and column on a bad file.
 */
export async function insertDataset(workspaceId: string, userId: string | null, input: NewDataset, parsed?: ParsedDataset) {
  if (!parsed) {
    try {
      parsed = parseDatasetCsv(input.csv, input.mapping);
    } catch (err) {
      if (err instanceof DatasetCsvError) throw csvErrorToApi(err);
      throw err;
    }
  }
  const points: DatasetPoints = { x: parsed.x, y: parsed.y, sigma: parsed.sigma, temperatureK: parsed.temperatureK };
  const [row] = await getDb()
    .insert(datasets)
    .values({
      workspaceId,
      createdBy: userId,
      name: input.name,
      synthetic: input.synthetic ?? false,
      description: input.description ?? null,
      originalFilename: input.filename ?? null,
      originalCsv: input.csv,
      originalBytes: Buffer.byteLength(input.csv, "utf8"),
      dataHash: sha256Hex(input.csv),
      mapping: input.mapping,
      xQuantity: parsed.xQuantity,
      xUnit: parsed.xCanonicalUnit,
      points,
      rows: parsed.rows,
    })
    .returning();
  return row;
}

/** `POST /api/v1/datasets` (multipart): fields file, name, xColumn, xUnit, yColumn, yUnit, sigmaColumn?, temperatureColumn?, yMeasures?. */
export async function createDatasetFromRequest(caller: Caller, req: Request) {
  requirePermission(caller, "work.create");
  const declared = Number(req.headers.get("content-length") ?? "0");
  // A little room over the file limit for the other form fields and the multipart framing.
  if (declared > DATASET_MAX_BYTES + 64 * 1024) {
    throw new ApiError("payload_too_large", `The upload is ${declared} bytes; CSV files may be at most ${DATASET_MAX_BYTES} bytes (5 MB).`, {
      limitBytes: DATASET_MAX_BYTES,
    });
  }
  const type = req.headers.get("content-type") ?? "";
  if (!/^multipart\/form-data/i.test(type)) {
    throw new ApiError(
      "bad_request",
      "Send the dataset as multipart/form-data with fields file, name, xColumn, xUnit, yColumn, yUnit and optionally sigmaColumn.",
      { contentType: type || null },
    );
  }
  // Read at most the limit, however the body is sent (a chunked upload declares no length).
  const body = await readBodyCapped(req, DATASET_MAX_BYTES + 64 * 1024, (bytes) => {
    return new ApiError("payload_too_large", `The upload is over ${bytes} bytes; CSV files may be at most ${DATASET_MAX_BYTES} bytes (5 MB).`, {
      limitBytes: DATASET_MAX_BYTES,
    });
  });
  let form: FormData;
  try {
    form = await new Response(body, { headers: { "content-type": type } }).formData();
  } catch (e) {
    throw new ApiError("bad_request", `The multipart body could not be read: ${(e as Error).message}`);
  }
  const file = form.get("file");
  if (!file || typeof file === "string") throw new ApiError("invalid_input", "file: attach the CSV file in the multipart field `file`.", { field: "file" });
  if (file.size > DATASET_MAX_BYTES)
    throw new ApiError("payload_too_large", `file: ${file.size} bytes; CSV files may be at most ${DATASET_MAX_BYTES} bytes (5 MB).`, {
      field: "file",
      limitBytes: DATASET_MAX_BYTES,
    });
  const fields: Record<string, string> = {};
  for (const key of ["name", "xColumn", "xUnit", "yColumn", "yUnit", "sigmaColumn", "temperatureColumn", "yMeasures", "description"]) {
    const v = form.get(key);
    if (typeof v === "string" && v.trim() !== "") fields[key] = v;
  }
  for (const [key, value] of Object.entries(fields))
    if (value.includes("\u0000")) throw new ApiError("invalid_input", `${key}: must not contain a NUL character (\\u0000).`, { field: key });
  const parsedFields = uploadFields.safeParse(fields);
  if (!parsedFields.success) throw zodToApiError(parsedFields.error);
  const bytes = new Uint8Array(await file.arrayBuffer());
  let csv: string;
  try {
    csv = new TextDecoder("utf-8", { fatal: true }).decode(bytes);
  } catch {
    throw new ApiError("invalid_input", "file: the file is not UTF-8 text; save the CSV as UTF-8.", { field: "file" });
  }
  if (csv.includes("\u0000")) throw new ApiError("invalid_input", "file: the file holds NUL bytes; a CSV is text without them.", { field: "file" });
  const filename = cleanFilename(file.name);
  const f = parsedFields.data;
  const mapping: ColumnMapping = {
    xColumn: f.xColumn,
    xUnit: f.xUnit,
    yColumn: f.yColumn,
    yUnit: f.yUnit,
    ...(f.sigmaColumn ? { sigmaColumn: f.sigmaColumn } : {}),
    ...(f.temperatureColumn ? { temperatureColumn: f.temperatureColumn } : {}),
    ...(f.yMeasures && f.yMeasures !== "twoTerminal" ? { yMeasures: f.yMeasures } : {}),
  };
  // Over the row limit: refused before the parse, when counting lines decides it (countCsvRecords).
  const records = countCsvRecords(bytes);
  if (records !== null && records - 1 > DATASET_MAX_ROWS) {
    throw csvErrorToApi(
      new DatasetCsvError([
        { code: "too_many_rows", row: null, column: null, message: `The file has ${records - 1} rows; at most ${DATASET_MAX_ROWS} are allowed.` },
      ]),
    );
  }
  let parsed: ParsedDataset;
  try {
    parsed = await runAnalysis({ kind: "datasetCsv", csv, mapping }, bytes.byteLength <= INLINE_LIMITS.csvBytes);
  } catch (err) {
    if (err instanceof DatasetCsvError) throw csvErrorToApi(err);
    throw err;
  }
  const row = await insertDataset(caller.workspaceId, caller.userId, { name: f.name, csv, filename, mapping, description: f.description }, parsed);
  return datasetSummary(row);
}

/**
 * The uploaded file's name as the browser sent it, kept for the download: the last path segment,
 * without control characters (NUL cannot be stored; line breaks do not belong in a header), at
 * most 255 characters; null when nothing is left.
 */
export function cleanFilename(raw: string | null | undefined): string | null {
  if (!raw) return null;
  const base = raw.split(/[\\/]/).pop()!;
  // eslint-disable-next-line no-control-regex -- control characters are exactly what is removed
  const name = base.replace(/[\u0000-\u001f\u007f]/g, "").trim();
  return name ? [...name].slice(0, 255).join("") : null;
}

export async function listDatasets(caller: Caller, query: URLSearchParams) {
  requirePermission(caller, "results.view");
  const limit = pageLimit(query.get("limit"));
  const beforeDate = beforeTime(query.get("before"));
  const rows = await getDb()
    .select()
    .from(datasets)
    .where(and(eq(datasets.workspaceId, caller.workspaceId), beforeDate ? lt(datasets.createdAt, beforeDate) : undefined))
    .orderBy(desc(datasets.createdAt), desc(datasets.id))
    .limit(limit + 1);
  const items = rows.slice(0, limit).map(datasetSummary);
  return { items, nextBefore: rows.length > limit ? items[items.length - 1].createdAt : null };
}

const uuidRe = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function loadDataset(caller: Caller, id: string): Promise<Row> {
  requirePermission(caller, "results.view");
  if (!uuidRe.test(id)) throw new ApiError("not_found", `No dataset ${id} in this group.`);
  const [row] = await getDb()
    .select()
    .from(datasets)
    .where(and(eq(datasets.id, id), eq(datasets.workspaceId, caller.workspaceId)));
  if (!row) throw new ApiError("not_found", `No dataset ${id} in this group.`);
  return row;
}

export async function getDataset(caller: Caller, id: string) {
  return datasetView(await loadDataset(caller, id));
}

export async function getOriginalCsv(caller: Caller, id: string) {
  const d = await loadDataset(caller, id);
  return { filename: d.originalFilename ?? `${d.name.replace(/[^A-Za-z0-9._-]+/g, "_")}.csv`, csv: d.originalCsv };
}

export const periodOptions = z
  .object({
    backgroundDegree: z.number().int().min(0).max(8).optional(),
    zeroPadFactor: z.number().int().min(1).max(64).optional(),
    minCyclesInWindow: z.number().gt(0).lt(100).optional(),
  })
  .strict();

/** `POST /api/v1/datasets/{id}/period` */
export async function periodOfDataset(caller: Caller, id: string, body: unknown): Promise<DatasetPeriod> {
  const d = await loadDataset(caller, id);
  const parsed = periodOptions.safeParse(body ?? {});
  if (!parsed.success) throw zodToApiError(parsed.error);
  if (d.xQuantity !== "field") {
    throw new ApiError(
      "invalid_input",
      `The period analysis needs magnetoconductance versus field; this dataset's x is ${d.xQuantity === "gateVoltage" ? "gate voltage" : "carrier density"}.`,
      { field: "xUnit" },
    );
  }
  const p = d.points as DatasetPoints;
  try {
    const inline = periodFftLength(p.x.length, parsed.data.zeroPadFactor) <= INLINE_LIMITS.periodFftLength;
    const a = await runAnalysis({ kind: "period", fieldTesla: p.x, conductance: p.y, options: parsed.data }, inline);
    return { datasetId: d.id, dataHash: d.dataHash, synthetic: d.synthetic, ...a, field: p.x };
  } catch (err) {
    if (err instanceof PeriodAnalysisError) throw new ApiError("invalid_input", err.message, { field: err.field });
    throw err;
  }
}
