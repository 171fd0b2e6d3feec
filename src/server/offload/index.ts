/**
 * The web server's analysis thread: period analysis, the parsing of large dataset uploads and the
 * per-point checks of sweeps run here, off the event loop that answers every other request
 * (docs/reliability.md "Heavy requests"). One thread (the web server shares its machine with the
 * worker), at most ANALYSIS_QUEUE tasks waiting behind the running one; past that a request
 * answers 503 with Retry-After. Small inputs stay inline (INLINE_LIMITS, measured at about 10-25 ms
 * of CPU each): they answer at once and never wait behind a large one.
 *
 * The thread's entry is ./thread.mjs, found from the project folder (process.cwd()): `next start`,
 * `next dev`, the Docker image (WORKDIR /app holds the source) and Vitest all run there, and a
 * production build bundles the route handlers but not this file, which is loaded by path.
 */
import "@/server/server-only";
import path from "node:path";
import { pathToFileURL } from "node:url";
import { Piscina } from "piscina";
import { ApiError } from "@/server/http/errors";
import runOffloadTask, { reviveTaskError, type OffloadResults, type OffloadTask, type TaskOutcome } from "./tasks";

/** Threads of the analysis pool. */
export const ANALYSIS_THREADS = 1;
/** Tasks that may wait behind the running ones; one more answers 503. */
export const ANALYSIS_QUEUE = 32;
/** Retry-After (seconds) of the 503 answered when the queue is full. */
export const ANALYSIS_RETRY_AFTER_SECONDS = 5;

/**
 * Up to these sizes a task runs inline (each is roughly 10-25 ms of CPU on one core):
 * - period analysis: FFT length (next power of two of the points x zeroPadFactor) up to 16,384,
 *   for example 2,048 points at the default zeroPadFactor 8;
 * - dataset upload: a CSV file up to 32 KiB (about 1,500 rows of two numbers);
 * - sweep: a single point (one point of a 50 x 50 network already costs about 50 ms).
 */
export const INLINE_LIMITS = { periodFftLength: 16_384, csvBytes: 32 * 1024, sweepPoints: 1 } as const;

let pool: Piscina<OffloadTask, TaskOutcome> | null = null;
let inFlight = 0;

function analysisPool(): Piscina<OffloadTask, TaskOutcome> {
  pool ??= new Piscina<OffloadTask, TaskOutcome>({
    filename: pathToFileURL(path.join(process.cwd(), "src/server/offload/thread.mjs")).href,
    minThreads: 0,
    maxThreads: ANALYSIS_THREADS,
    concurrentTasksPerWorker: 1,
    // The thread compiles its TypeScript once when it starts; keep it for a while after use.
    idleTimeout: 10 * 60_000,
    // A runaway task ends its thread (the request answers 500), never the web server.
    resourceLimits: { maxOldGenerationSizeMb: 1024 },
  });
  return pool;
}

/** Tasks running or waiting in the analysis thread now. */
export function analysisTasksInFlight(): number {
  return inFlight;
}

function busy(): ApiError {
  return new ApiError(
    "unavailable",
    `The server is busy with other large analyses (${ANALYSIS_THREADS} running, ${ANALYSIS_QUEUE} waiting, the most it queues); ` +
      `retry in ${ANALYSIS_RETRY_AFTER_SECONDS} seconds.`,
    { retryAfterSeconds: ANALYSIS_RETRY_AFTER_SECONDS, queueLimit: ANALYSIS_QUEUE },
    { "Retry-After": String(ANALYSIS_RETRY_AFTER_SECONDS) },
  );
}

/**
 * Runs a task inline (`inline`: the caller measured it small, see INLINE_LIMITS) or in the analysis
 * thread, and gives its value or throws the error the inline computation would have thrown.
 */
export async function runAnalysis<K extends OffloadTask["kind"]>(task: Extract<OffloadTask, { kind: K }>, inline: boolean): Promise<OffloadResults[K]> {
  let outcome: TaskOutcome;
  if (inline) {
    outcome = runOffloadTask(task);
  } else {
    if (inFlight >= ANALYSIS_THREADS + ANALYSIS_QUEUE) throw busy();
    inFlight++;
    try {
      outcome = await analysisPool().run(task);
    } finally {
      inFlight--;
    }
  }
  if (!outcome.ok) throw reviveTaskError(outcome.error);
  return outcome.value as OffloadResults[K];
}
