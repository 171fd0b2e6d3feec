/** Fits (`/api/v1/fits`): model parameters fitted to a measured dataset. */
import type { Computation, Network } from "@/engine/browser";
import type { ColumnMapping } from "../csv";
import type { Estimate, JobError, JobStatus } from "./common";

/** One fitted parameter with its search range. */
export interface FitParameterSpec {
  parameter: string;
  initial: number;
  min: number;
  max: number;
}

export interface FitParameterResult extends FitParameterSpec {
  value: number;
  stderr: number | null;
  /** The best value sits on a bound (its stderr then means little). */
  atBound: boolean;
}

/** The fitter's answer, stored with the fit when it succeeds. */
export interface FitResult {
  parameters: FitParameterResult[];
  chi2: number;
  dof: number;
  chi2PerDof: number;
  /** Whether chi2 used the dataset's sigma column (else unit weights, chi2 in y units squared). */
  weighted: boolean;
  correlation: number[][];
  covariance: number[][];
  /** The model curve at the data's x (x in the dataset's unit, y in e2/h). */
  curve: { x: number[]; y: number[] };
  residuals: number[];
  iterations: number;
  evaluations: number;
  converged: boolean;
  starts: { start: number; initial: Record<string, number>; chi2: number; iterations: number }[];
  warnings: string[];
  engineVersion?: string;
}

/** The last iteration the worker reported while the fit runs. */
export interface FitIteration {
  iteration: number;
  chi2: number;
}

/** What the fit was asked to do: the engine input, the parameter the data's x maps to, the fitted parameters. */
export interface FitSettings {
  network: Network;
  computation: Computation;
  sweepParameter: string;
  fit: FitParameterSpec[];
  /** maxIterations, multiStart, seed as sent. */
  options: { maxIterations?: number; multiStart?: number; seed?: number };
}

interface FitViewBase {
  id: string;
  datasetId: string;
  datasetName: string | null;
  status: JobStatus;
  progress: number;
  lastIteration: FitIteration | null;
  error: JobError | null;
  settings: FitSettings;
  /** Compute-seconds. */
  estimatedComputeSeconds: number;
  computeSeconds: number | null;
  engineVersion: string | null;
  inputHash: string;
  dataHash: string;
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

/** GET /api/v1/fits/{id} and POST /api/v1/fits/{id}/cancel. */
export interface FitDetail extends FitViewBase {
  result: FitResult | null;
  datasetSynthetic: boolean;
}

/** A fit in a list: the result cut to its parameters and chi2 per degree of freedom. */
export interface FitSummary extends FitViewBase {
  result: Pick<FitResult, "parameters" | "chi2PerDof"> | null;
}

export interface FitList {
  items: FitSummary[];
  /** createdAt of the last item: pass as ?before= for the next page. */
  nextBefore: string | null;
}

/** POST /api/v1/fits (202). */
export interface FitCreated {
  id: string;
  status: JobStatus;
  estimate: Estimate & { engineEvaluations: number };
}

/** GET /api/v1/fits/{id}/export: everything needed to reproduce and cite the fit. */
export interface FitExport {
  format: string;
  exportedAt: string;
  fit: { id: string; status: JobStatus; createdAt: string; finishedAt: string | null; computeSeconds: number | null };
  engineVersion: string | null;
  inputHash: string;
  dataset: {
    id: string;
    name: string;
    synthetic: boolean;
    dataHash: string;
    dataHashAlgorithm: string;
    mapping: ColumnMapping;
    rows: number;
    xUnit: string;
    yUnit: string;
    originalFilename: string | null;
  };
  settings: FitSettings;
  algorithm: { method: string; uncertainties: string; model: string };
  result: FitResult | null;
  caution: string;
}
