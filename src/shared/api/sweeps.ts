/** Scans (`/api/v1/sweeps`): one calculation per point of a grid of parameter values. */
import type { ComputeInput } from "@/engine/browser";
import type { Estimate, JobError, JobStatus } from "./common";

/** An axis as stored: the parameter and every value it takes (a from/to/points axis is expanded). */
export interface SweepAxis {
  parameter: string;
  values: number[];
}

/** An axis as sent in POST /api/v1/sweeps: listed values, or `points` values evenly from `from` to `to`. */
export type SweepAxisRequest = SweepAxis | { parameter: string; from: number; to: number; points: number };

/** Seeds of disorder averaged at every point. */
export interface SweepEnsemble {
  samples: number;
}

/** How many points are in each state. */
export interface SweepCounts {
  queued: number;
  running: number;
  succeeded: number;
  failed: number;
  cancelled: number;
}

/** A scan in a list (GET /api/v1/sweeps) and the common part of every scan answer. */
export interface SweepSummary {
  id: string;
  name: string | null;
  status: JobStatus;
  /** 0-1. */
  progress: number;
  pointCount: number;
  axes: SweepAxis[];
  ensemble: SweepEnsemble | null;
  networkId: string | null;
  networkVersion: number | null;
  /** For all points together. */
  estimate: Estimate;
  /** Measured CPU time of the points so far, compute-seconds. */
  computeSeconds: number;
  engineVersion: string | null;
  createdBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  cancelRequestedAt: string | null;
}

/** One point of a scan. */
export interface SweepPoint {
  index: number | null;
  /** The value of every axis parameter at this point. */
  coordinates: Record<string, number>;
  /** The point's calculation (GET /api/v1/runs/{runId} for its full result). */
  runId: string;
  status: JobStatus;
  progress: number;
  computeSeconds: number | null;
  /** The scalar quantities of the point's result (null until it succeeds). */
  quantities: Record<string, number> | null;
  error: JobError | null;
}

/**
 * The result grid: for each scalar quantity, its values in point order (row-major over the axes,
 * the first axis slowest), null where a point has not succeeded (yet).
 */
export interface SweepGrid {
  shape: number[];
  parameters: string[];
  quantities: Record<string, (number | null)[]>;
}

/** GET /api/v1/sweeps/{id} and POST /api/v1/sweeps/{id}/cancel: live progress and partial results. */
export interface SweepDetail extends SweepSummary {
  counts: SweepCounts;
  /** The saved network's name (null for a network given inline). */
  networkName: string | null;
  /** sha256 (hex) of the canonical JSON of `{ input, axes, ensemble }`: the scan's inputs, for citing and reproducing it. */
  inputHash: string;
  /** The base input every point starts from. */
  input: ComputeInput;
  grid: SweepGrid;
  points: SweepPoint[];
}

export interface SweepList {
  sweeps: SweepSummary[];
  nextCursor: string | null;
}

/** POST /api/v1/sweeps (202). */
export interface SweepCreated {
  id: string;
  name: string | null;
  status: JobStatus;
  pointCount: number;
  axes: SweepAxis[];
  ensemble: SweepEnsemble | null;
  estimate: Estimate;
  createdAt: string;
}

/** POST /api/v1/sweeps?dryRun=true: every check passed and the estimate; nothing was written. */
export interface SweepDryRun {
  dryRun: true;
  pointCount: number;
  axes: SweepAxis[];
  ensemble: SweepEnsemble | null;
  estimate: Estimate;
}
