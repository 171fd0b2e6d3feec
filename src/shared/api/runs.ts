/** Calculations (`/api/v1/runs`): one engine computation of one network. */
import type { ComputeInput, ComputeResult } from "@/engine/browser";
import type { Estimate, JobError, JobStatus } from "./common";

/** A calculation in a list (GET /api/v1/runs) and the common part of every calculation answer. */
export interface RunSummary {
  id: string;
  /** The computation's kind: conductance, spectrum, dos, ldos, localization (fit for a fit's ledger row). */
  kind: string;
  status: JobStatus;
  /** 0-1. */
  progress: number;
  networkId: string | null;
  networkVersion: number | null;
  /** Set when the calculation is one point of a scan. */
  sweepId: string | null;
  sweepPointIndex: number | null;
  estimate: Estimate;
  /** Measured CPU time once finished, compute-seconds. */
  computeSeconds: number | null;
  engineVersion: string | null;
  inputHash: string;
  attempts: number;
  createdBy: string | null;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
  cancelRequestedAt: string | null;
  error: JobError | null;
}

/**
 * A fit's compute is metered through a companion calculation of kind "fit" (one usage-ledger row
 * per fit); its input names the fit and its result carries the fit's chi2 per degree of freedom.
 */
export type FitLedgerInput = { fitId: string } & Record<string, unknown>;
export interface FitLedgerResult {
  fitId: string;
  chi2PerDof?: number | null;
}

/** GET /api/v1/runs/{id} and POST /api/v1/runs/{id}/cancel: with the engine input and result. */
export interface RunDetail extends RunSummary {
  /** `{ network, computation }` as the engine takes it (kind "fit": the fit's companion row). */
  input: ComputeInput | FitLedgerInput;
  /** The engine's result, null until the calculation succeeds. */
  result: ComputeResult | FitLedgerResult | null;
}

export interface RunList {
  runs: RunSummary[];
  nextCursor: string | null;
}

/** POST /api/v1/runs (202). */
export interface RunCreated {
  id: string;
  status: JobStatus;
  estimate: Estimate;
  kind: string;
  inputHash: string;
  createdAt: string;
}

/** POST /api/v1/runs?dryRun=true: every check passed and the estimate; nothing was written. */
export interface RunDryRun {
  dryRun: true;
  kind: string;
  inputHash: string;
  estimate: Estimate;
  /** The input as the engine will read it (defaults filled in). */
  input: ComputeInput;
}
