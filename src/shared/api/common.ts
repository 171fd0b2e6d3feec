/**
 * Shapes shared by every resource of the REST API (/api/v1). The route handlers are typed with
 * these (src/server/http/reply.ts) and the browser reads them (src/lib/api.ts), so both agree; the
 * API reference is docs/api.md.
 */

export const JOB_STATUSES = ["queued", "running", "succeeded", "failed", "cancelled"] as const;
/** Status of a calculation, a scan point, a scan or a fit. */
export type JobStatus = (typeof JOB_STATUSES)[number];
/** The statuses a job never leaves. */
export const FINISHED_JOB_STATUSES: readonly JobStatus[] = ["succeeded", "failed", "cancelled"];

/** What a job is expected to cost, shown before it is charged. */
export interface Estimate {
  /** Estimated CPU time, compute-seconds. */
  computeSeconds: number;
  /** At the plan's compute price (0 on Free), US dollars. */
  costUsd: number;
}

/** Why a job failed, as stored with it. */
export interface JobError {
  code: string;
  message: string;
  /** The input the engine refused, as a path into the submitted body (e.g. "computation.temperatureMaxEnergies"), when it named one. */
  field?: string;
  details?: unknown;
}

/** The body of every error response (4xx and 5xx). */
export interface ApiErrorBody {
  error: { code: string; message: string; details?: unknown };
}
