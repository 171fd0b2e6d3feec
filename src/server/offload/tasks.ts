/**
 * The web server's heavy pure computations, as tasks that run either inline or in the analysis
 * thread (./index.ts): the same function in both places, so the answer does not depend on where it
 * ran. A task never throws across the thread boundary: the errors the callers handle (ApiError,
 * DatasetCsvError, PeriodAnalysisError) come back as data and are rebuilt by reviveTaskError.
 */
import { DatasetCsvError, parseDatasetCsv, type ColumnMapping, type CsvIssue, type ParsedDataset } from "@/shared/csv";
import { analysePeriod, PeriodAnalysisError, type PeriodAnalysis, type PeriodOptions } from "@/shared/period";
import { ApiError, type ApiErrorCode } from "@/server/http/errors";
import { checkSweepPoints, type CheckedPoint, type SweepPointsTask } from "./sweep-points";

export type OffloadTask =
  | { kind: "period"; fieldTesla: number[]; conductance: number[]; options: PeriodOptions }
  | { kind: "datasetCsv"; csv: string; mapping: ColumnMapping }
  | ({ kind: "sweepPoints" } & SweepPointsTask);

export interface OffloadResults {
  period: PeriodAnalysis;
  datasetCsv: ParsedDataset;
  sweepPoints: { total: number; points: CheckedPoint[] };
}

/** A thrown error as plain data (structured clone keeps neither the class nor its fields). */
export type TaskError =
  | { type: "api"; code: ApiErrorCode; message: string; details?: unknown; headers?: Record<string, string> }
  | { type: "csv"; issues: CsvIssue[] }
  | { type: "period"; message: string; field?: string };

export type TaskOutcome<K extends OffloadTask["kind"] = OffloadTask["kind"]> = { ok: true; value: OffloadResults[K] } | { ok: false; error: TaskError };

function compute(task: OffloadTask): OffloadResults[OffloadTask["kind"]] {
  switch (task.kind) {
    case "period":
      return analysePeriod(task.fieldTesla, task.conductance, task.options);
    case "datasetCsv":
      return parseDatasetCsv(task.csv, task.mapping);
    case "sweepPoints":
      return checkSweepPoints(task);
  }
}

/** Runs one task; the errors its caller expects are returned, anything else is thrown (a 500 with a logged reference). */
export default function runOffloadTask(task: OffloadTask): TaskOutcome {
  try {
    return { ok: true, value: compute(task) };
  } catch (err) {
    if (err instanceof ApiError) return { ok: false, error: { type: "api", code: err.code, message: err.message, details: err.details, headers: err.headers } };
    if (err instanceof DatasetCsvError) return { ok: false, error: { type: "csv", issues: err.issues } };
    if (err instanceof PeriodAnalysisError) return { ok: false, error: { type: "period", message: err.message, field: err.field } };
    throw err;
  }
}

export function reviveTaskError(e: TaskError): Error {
  switch (e.type) {
    case "api":
      return new ApiError(e.code, e.message, e.details, e.headers);
    case "csv":
      return new DatasetCsvError(e.issues);
    case "period":
      return new PeriodAnalysisError(e.message, e.field);
  }
}
