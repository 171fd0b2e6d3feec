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

/** One start of a fit and where it ended. */
export interface FitStart {
  /** 1-based, in the order run. */
  start: number;
  /**
   * "global": a point of the global stage (evaluated only: final = initial, iterations 0); "local": a
   * Levenberg-Marquardt descent; "profile": a descent from a chi2-profile point that lay below the best.
   */
  stage: "global" | "local" | "profile";
  initial: Record<string, number>;
  final: Record<string, number>;
  /** chi2 at final. */
  chi2: number;
  iterations: number;
  /** The descent met the convergence rule (always false for a global point). */
  converged: boolean;
}

export type FitQuality = "good" | "poor";

/**
 * Problems a fit can have (thresholds in docs/data-and-fits.md): chi2_high (chi2/dof above 3 with
 * sigma; without sigma, residuals with structure above 3 times their point-to-point noise),
 * chi2_low (chi2/dof below 0.2 with sigma), not_moved (the result is its start), on_bound,
 * undetermined (a parameter the data cannot determine), competing_minima (starts that ended
 * in different minima of similar chi2), not_converged.
 */
export type FitFlag = "chi2_high" | "chi2_low" | "not_moved" | "on_bound" | "undetermined" | "competing_minima" | "not_converged";

export interface FitDiagnostics {
  /** Points of the global stage (0: off). */
  globalStarts: number;
  /** Local descents run. */
  localStarts: number;
  /** Condition number of J^T W J scaled to unit diagonal, over the parameters the model depends on; null when singular. */
  conditionNumber: number | null;
  /** Without sigma: residual variance over the point-to-point noise estimated from the residuals (about 1 for noise); null with sigma. */
  residualStructure: number | null;
  /** Points per chi2 profile (0: off). Absent on fits made before profiles existed. */
  profilePoints?: number;
  /** A profile point lay below the descents' best; a descent from it gave the reported fit and the profiles were taken again. */
  profileImproved?: boolean;
}

/** One point of a chi2 profile. */
export interface FitProfilePoint {
  /** The profiled parameter's value, in its unit. */
  value: number;
  /** chi2 with the parameter held at value and the others refitted. */
  chi2: number;
  /** The other fitted parameters at this point (after their refit). */
  others: Record<string, number>;
}

/** chi2 along one fitted parameter: stepped evenly across its bounds (the best value added), the others refitted. */
export interface FitProfile {
  parameter: string;
  /** In ascending value; one of them is the best fit. */
  points: FitProfilePoint[];
  /** Whether the other parameters were refitted at each point (false with one fitted parameter). */
  refitted: boolean;
  /** chi2 + deltaChi2 marks one standard error: deltaChi2 = chi2/dof, the scaling the standard errors use. */
  deltaChi2: number;
  /** Where the profile crosses chi2 + deltaChi2 (linear between points; null: not within the bounds). Coarse: as fine as the points. */
  interval: { low: number | null; high: number | null };
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
  /** Every start: the global stage's points first (evaluated, not refined), then the local descents. */
  starts: FitStart[];
  /** One sentence per problem found (empty for a good fit). */
  warnings: string[];
  /** "poor" when any flag is raised: the UI shows a "poor fit" mark. */
  quality: FitQuality;
  /** Machine-readable codes of the problems, one per kind (see FitFlag). */
  flags: FitFlag[];
  /** chi2 profile of each fitted parameter (empty when turned off; absent on fits made before profiles existed). */
  profiles?: FitProfile[];
  /** How the fit ran and the numbers its checks used. */
  diagnostics: FitDiagnostics;
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
  /** maxIterations, multiStart, globalStarts, seed, profilePoints, profileIterations as sent. */
  options: { maxIterations?: number; multiStart?: number; globalStarts?: number; seed?: number; profilePoints?: number; profileIterations?: number };
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
  result: Pick<FitResult, "parameters" | "chi2PerDof" | "quality" | "flags"> | null;
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

/** POST /api/v1/fits?dryRun=true: every check passed and the estimate, with the stages as they would run; nothing was written. */
export interface FitDryRun {
  dryRun: true;
  estimate: Estimate & { engineEvaluations: number };
  /** The global stage's points (0: off), the local descents and their iteration limit, the points per chi2 profile (0: off) and their refit iterations. */
  stages: { globalStarts: number; localStarts: number; maxIterations: number; profilePoints: number; profileIterations: number };
  /** Data points: one engine computation per point and model curve. */
  points: number;
  /** Model curves the estimate counts (engineEvaluations / points). */
  modelCurves: number;
  inputHash: string;
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
