/**
 * Least-squares fit of model parameters to a measured curve. Pure (no I/O): the model is a
 * function from parameter values to the model curve at the data's x values.
 *
 * Algorithm: Levenberg-Marquardt. Each damped Gauss-Newton step is taken by
 * ml-levenberg-marquardt (one iteration per call, forward-difference Jacobian, on residuals
 * pre-divided by sigma); this module
 * drives the damping (down by 9 after an accepted step, up by 11 after a rejected one), the
 * stopping rule, progress per iteration and cancellation. Parameters are fitted in coordinates
 * scaled to their bounds (u = (p - min) / (max - min) in [0, 1]) so that modeVelocityMps ~ 1e6
 * and node.forward ~ 0.5 are treated alike.
 *
 * Uncertainties: covariance C = (J^T W J)^-1 * chi2/dof, J the Jacobian of the model in
 * physical units (central differences at the optimum), W = diag(1/sigma^2) (W = 1 without a
 * sigma column), i.e. the usual scaling by the residual variance. Standard errors are sqrt(C_ii).
 */
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { Matrix, pseudoInverse } from "ml-matrix";
import type { FitParameterResult, FitParameterSpec, FitResult } from "@/shared/api";
export type { FitParameterResult, FitParameterSpec, FitResult };

export interface FitData {
  x: number[];
  y: number[];
  sigma?: number[] | null;
}

/** Model curve at every x of the data for the given parameter values (keyed by parameter name). */
export type CurveModel = (values: Record<string, number>) => number[];

export interface FitOptions {
  /** Iterations per start (default 40). */
  maxIterations?: number;
  /** Number of starts: the given initial values plus (n - 1) seeded random points in the bounds. */
  multiStart?: number;
  seed?: number;
  /** Relative change of chi2 below which an accepted step counts as converged (default 1e-7). */
  tolerance?: number;
  onIteration?: (info: FitIterationInfo) => void;
  shouldCancel?: () => boolean;
}

export interface FitIterationInfo {
  start: number;
  starts: number;
  iteration: number;
  maxIterations: number;
  chi2: number;
  values: Record<string, number>;
  /** Estimated fraction of the whole fit done, 0-1. */
  progress: number;
}

export class FitCancelled extends Error {
  constructor() {
    super("The fit was cancelled.");
    this.name = "FitCancelled";
  }
}

export class FitInputError extends Error {
  constructor(
    message: string,
    readonly field: string,
  ) {
    super(message);
    this.name = "FitInputError";
  }
}

export function validateSpecs(specs: FitParameterSpec[], points: number): void {
  if (specs.length === 0) throw new FitInputError("fit: list at least one parameter to fit.", "fit");
  const seen = new Set<string>();
  specs.forEach((s, i) => {
    const f = `fit.${i}`;
    if (seen.has(s.parameter)) throw new FitInputError(`${f}.parameter: "${s.parameter}" is listed twice.`, `${f}.parameter`);
    seen.add(s.parameter);
    if (![s.initial, s.min, s.max].every(Number.isFinite)) throw new FitInputError(`${f}: initial, min and max must be finite numbers.`, f);
    if (!(s.min < s.max)) throw new FitInputError(`${f}: min (${s.min}) must be below max (${s.max}).`, `${f}.min`);
    if (s.initial < s.min || s.initial > s.max) throw new FitInputError(`${f}.initial: ${s.initial} is outside [${s.min}, ${s.max}].`, `${f}.initial`);
  });
  if (points <= specs.length)
    throw new FitInputError(`The dataset has ${points} points; fitting ${specs.length} parameters needs more points than parameters.`, "fit");
}

/** Deterministic generator for the multi-start points (mulberry32). */
function rng(seed: number) {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

export function fitCurve(model: CurveModel, data: FitData, specs: FitParameterSpec[], options: FitOptions = {}): FitResult {
  const n = data.x.length;
  validateSpecs(specs, n);
  if (data.y.length !== n) throw new FitInputError("x and y must have the same length.", "data");
  const maxIterations = options.maxIterations ?? 40;
  const starts = Math.max(1, Math.min(16, Math.floor(options.multiStart ?? 1)));
  const tolerance = options.tolerance ?? 1e-7;
  const weighted = !!data.sigma;
  const sigma = data.sigma ?? new Array<number>(n).fill(1);
  const k = specs.length;
  const toValues = (u: ArrayLike<number>) => {
    const v: Record<string, number> = {};
    specs.forEach((s, i) => (v[s.parameter] = s.min + Math.min(1, Math.max(0, u[i])) * (s.max - s.min)));
    return v;
  };

  // One-entry-per-point cache keyed by the scaled parameter vector: the library asks for the
  // same vector more than once per iteration.
  let evaluations = 0;
  const cache = new Map<string, number[]>();
  const curveAt = (u: ArrayLike<number>): number[] => {
    const key = Array.from(u, (v) => v.toPrecision(15)).join(",");
    const hit = cache.get(key);
    if (hit) return hit;
    if (options.shouldCancel?.()) throw new FitCancelled();
    const y = model(toValues(u));
    evaluations++;
    if (y.length !== n) throw new Error(`model returned ${y.length} values for ${n} points`);
    if (cache.size > 64) cache.delete(cache.keys().next().value!);
    cache.set(key, y);
    return y;
  };
  const chi2Of = (y: number[]) => {
    let s = 0;
    for (let i = 0; i < n; i++) {
      const r = (data.y[i] - y[i]) / sigma[i];
      s += r * r;
    }
    return s;
  };
  // The library calls f(params)(x) per point; x here is the point index. Data and model are
  // pre-whitened (divided by sigma) and the library's own weights left at 1.
  const indices = Array.from({ length: n }, (_, i) => i);
  const lmData = { x: indices, y: data.y.map((v, i) => v / sigma[i]) };
  const parameterized = (u: number[]) => {
    const y = curveAt(u);
    return (i: number) => y[i] / sigma[i];
  };

  const random = rng(options.seed ?? 1);
  const startPoints: number[][] = [specs.map((s) => (s.initial - s.min) / (s.max - s.min))];
  for (let s = 1; s < starts; s++) startPoints.push(specs.map(() => 0.05 + 0.9 * random()));

  const startSummaries: FitResult["starts"] = [];
  let best: { u: number[]; chi2: number; iterations: number; converged: boolean } | null = null;
  let totalIterations = 0;
  startPoints.forEach((u0, startIndex) => {
    let u = u0.slice();
    let chi2 = chi2Of(curveAt(u));
    let damping = 1e-2;
    let iterations = 0;
    let converged = false;
    let quiet = 0;
    while (iterations < maxIterations) {
      iterations++;
      const r = levenbergMarquardt(lmData, parameterized, {
        initialValues: u,
        damping,
        maxIterations: 1,
        minValues: new Array(k).fill(0),
        maxValues: new Array(k).fill(1),
        gradientDifference: 1e-4,
        errorTolerance: 0,
      });
      const next = r.parameterValues;
      const nextChi2 = chi2Of(curveAt(next));
      if (nextChi2 < chi2) {
        const rel = (chi2 - nextChi2) / Math.max(chi2, 1e-300);
        u = next.slice();
        chi2 = nextChi2;
        damping = Math.max(damping / 9, 1e-7);
        quiet = rel < tolerance ? quiet + 1 : 0;
      } else {
        damping = Math.min(damping * 11, 1e7);
        // A rejected step that changes chi2 by less than the tolerance: nothing left to gain.
        quiet = damping >= 1e6 || (nextChi2 - chi2) / Math.max(chi2, 1e-300) < tolerance ? quiet + 1 : quiet;
      }
      options.onIteration?.({
        start: startIndex + 1,
        starts,
        iteration: iterations,
        maxIterations,
        chi2,
        values: toValues(u),
        progress: Math.min(1, (startIndex + iterations / maxIterations) / starts),
      });
      if (quiet >= 2 || chi2 === 0) {
        converged = true;
        break;
      }
    }
    totalIterations += iterations;
    startSummaries.push({ start: startIndex + 1, initial: toValues(u0), chi2, iterations });
    if (!best || chi2 < best.chi2) best = { u, chi2, iterations, converged };
  });
  const b = best!;
  const values = toValues(b.u);
  const curve = curveAt(b.u);
  const residuals = data.y.map((y, i) => y - curve[i]);
  const dof = n - k;

  // Jacobian in physical units by central differences in the scaled coordinates (one-sided at a bound).
  const J = new Matrix(n, k);
  const h = 1e-4;
  for (let j = 0; j < k; j++) {
    const up = b.u.slice();
    const dn = b.u.slice();
    up[j] = Math.min(1, b.u[j] + h);
    dn[j] = Math.max(0, b.u[j] - h);
    const yu = curveAt(up);
    const yd = curveAt(dn);
    const dp = (up[j] - dn[j]) * (specs[j].max - specs[j].min);
    for (let i = 0; i < n; i++) J.set(i, j, (yu[i] - yd[i]) / dp / sigma[i]);
  }
  const JtJ = J.transpose().mmul(J);
  const s2 = b.chi2 / dof;
  const cov = pseudoInverse(JtJ).mul(s2);
  const warnings: string[] = [];
  const parameters: FitParameterResult[] = specs.map((s, j) => {
    const v = cov.get(j, j);
    const value = values[s.parameter];
    const atBound = b.u[j] <= 1e-6 || b.u[j] >= 1 - 1e-6;
    if (atBound) warnings.push(`${s.parameter} ended on a bound (${value}); widen [${s.min}, ${s.max}] or fix it.`);
    const undetermined = !(v > 0) || JtJ.get(j, j) === 0;
    if (undetermined) warnings.push(`${s.parameter} is not determined by the data (the model does not change with it here).`);
    return { parameter: s.parameter, value, stderr: undetermined ? null : Math.sqrt(v), initial: s.initial, min: s.min, max: s.max, atBound };
  });
  const correlation = specs.map((_, i) =>
    specs.map((__, j) => {
      const d = Math.sqrt(cov.get(i, i) * cov.get(j, j));
      return i === j ? 1 : d > 0 ? Math.max(-1, Math.min(1, cov.get(i, j) / d)) : 0;
    }),
  );
  if (!b.converged) warnings.push(`The fit stopped after ${maxIterations} iterations without meeting the convergence rule; the values may still move.`);
  return {
    parameters,
    chi2: b.chi2,
    dof,
    chi2PerDof: s2,
    weighted,
    correlation,
    covariance: cov.to2DArray(),
    curve: { x: data.x.slice(), y: curve },
    residuals,
    iterations: totalIterations,
    evaluations,
    converged: b.converged,
    starts: startSummaries,
    warnings,
  };
}
