/**
 * Job kinds: what the shared pipeline (src/server/jobs) needs to know about each kind of work a
 * member submits. A kind names its queue (QUEUES, defined once in src/server/queue), the table
 * that is its system of record, the key its BullMQ job data carries the row id under, and which
 * rows of that table are its jobs. A new kind is one more entry here plus its processor in worker/.
 */
import "@/server/server-only";
import type { JobsOptions } from "bullmq";
import { sql, type SQL } from "drizzle-orm";
import { QUEUES, type QueueName } from "@/server/queue";

/** Run kinds the engine computes on the `runs` queue (other modules may keep companion rows of their own kinds). */
export const ENGINE_RUN_KINDS = ["conductance", "spectrum", "dos", "ldos", "localization", "hallBar"] as const;

export interface JobKind {
  /** The BullMQ job name, and the kind's name in logs. */
  name: string;
  queue: QueueName;
  /** The table holding the job's row (status, attempts, result, error, cancel_requested_at). */
  table: "runs" | "fits";
  /** Key of the row id in the BullMQ job data. */
  idKey: string;
  /** Condition on the table that selects this kind's rows (true when every row is one). */
  scope: SQL;
  /** The row has `priority`; otherwise the queue priority comes from the workspace's plan. */
  storesPriority: boolean;
  /** The row has `heartbeat_at` and `worker_id`: a silent `running` row whose job is gone can be put back to `queued`. */
  heartbeats: boolean;
  /** Error code written when the queue gives up on the job (retries exhausted, stalled too often). */
  workerFailedCode: string;
  /** Completed jobs BullMQ keeps (by count) for inspection. */
  keepCompleted: number;
}

export const JOB_KINDS = {
  /** Calculations and the points of scans (sweeps): one run row each. */
  run: {
    name: "run",
    queue: QUEUES.runs,
    table: "runs",
    idKey: "runId",
    scope: sql.raw(`kind in (${ENGINE_RUN_KINDS.map((k) => `'${k}'`).join(", ")})`),
    storesPriority: true,
    heartbeats: true,
    workerFailedCode: "worker_error",
    keepCompleted: 5000,
  },
  /** Fits of a dataset: one fits row each, metered through a companion run of kind "fit" written when it finishes. */
  fit: {
    name: "fit",
    queue: QUEUES.fits,
    table: "fits",
    idKey: "fitId",
    scope: sql.raw("true"),
    storesPriority: false,
    heartbeats: false,
    workerFailedCode: "worker_failed",
    keepCompleted: 2000,
  },
} as const satisfies Record<string, JobKind>;

export type JobKindName = keyof typeof JOB_KINDS;

export interface JobItem {
  id: string;
  priority: number;
}

/** Job id = row id, so adding the same job twice is harmless. */
export function jobOptions(kind: JobKind, id: string, priority: number): JobsOptions {
  return {
    jobId: id,
    priority,
    // Engine errors are recorded on the row and do not throw; a throw means the database or
    // Redis failed, worth a retry.
    attempts: 3,
    backoff: { type: "exponential", delay: 2000 },
    removeOnComplete: { age: 3600, count: kind.keepCompleted },
    removeOnFail: { age: 24 * 3600 },
  };
}

export function jobData(kind: JobKind, id: string): Record<string, string> {
  return { [kind.idKey]: id };
}

/** The row id a job stands for (its data, else its job id). */
export function rowIdOf(kind: JobKind, job: { id?: string; data?: unknown }): string {
  const v = (job.data as Record<string, unknown> | undefined)?.[kind.idKey];
  return typeof v === "string" ? v : job.id!;
}
