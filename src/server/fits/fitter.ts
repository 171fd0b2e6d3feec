/**
 * Least-squares fit of model parameters to a measured curve. Pure (no I/O): the model is a
 * function from parameter values to the model curve at the data's x values.
 *
 * Two stages (docs/data-and-fits.md, "Method"):
 * 1. Global stage (on by default): `globalStarts` points spread over the bounds of every fitted
 *    parameter by a seeded Latin hypercube (the user's initial values are one of them), the
 *    model curve and chi2 evaluated at each. The chi2 landscape of coherent conductance is
 *    rugged, so one local descent from one start is not a fit.
 * 2. Local stage: Levenberg-Marquardt from the `multiStart` best distinct global points (default
 *    3); with the global stage off, from the initial values plus (multiStart - 1) seeded random
 *    points, as before. The best chi2 wins.
 *
 * Levenberg-Marquardt: each damped Gauss-Newton step is taken by ml-levenberg-marquardt (one
 * iteration per call, forward-difference Jacobian, on residuals pre-divided by sigma); this
 * module drives the damping (down by 9 after an accepted step, up by 11 after a rejected one),
 * the stopping rule, progress per iteration and cancellation. Parameters are fitted in
 * coordinates scaled to their bounds (u = (p - min) / (max - min) in [0, 1]) so that
 * modeVelocityMps ~ 1e6 and node.forward ~ 0.5 are treated alike.
 *
 * Stopping rule: a descent has converged when, after at least one accepted step, two iterations
 * in a row change chi2 by less than `tolerance` (relative; an accepted step with a tiny gain, or a
 * rejected one with a tiny change or the damping at its ceiling), or chi2 is 0. Rejected steps
 * before any accepted one never count: a descent that cannot leave its start stops when the
 * damping reaches its ceiling and reports not converged (flag "not_moved").
 *
 * Uncertainties: covariance C = (J^T W J)^-1 * chi2/dof, J the Jacobian of the model in
 * physical units (central differences at the optimum), W = diag(1/sigma^2) (W = 1 without a
 * sigma column), i.e. the usual scaling by the residual variance. Standard errors are sqrt(C_ii).
 * The inverse is taken of J^T W J scaled to unit diagonal, whose condition number is also the
 * test for parameters the data cannot determine.
 *
 * The outcome is judged by the checks in FIT_CHECKS (one table, documented in
 * docs/data-and-fits.md): every problem gives a flag code and a warning, and any flag makes the
 * fit's quality "poor".
 */
import { levenbergMarquardt } from "ml-levenberg-marquardt";
import { EigenvalueDecomposition, Matrix, pseudoInverse } from "ml-matrix";
import type { FitFlag, FitParameterResult, FitParameterSpec, FitProfile, FitResult, FitStart } from "@/shared/api";
export type { FitFlag, FitParameterResult, FitParameterSpec, FitProfile, FitResult, FitStart };

export interface FitData {
  x: number[];
  y: number[];
  sigma?: number[] | null;
}

/** Model curve at every x of the data for the given parameter values (keyed by parameter name). */
export type CurveModel = (values: Record<string, number>) => number[];

export interface FitOptions {
  /** Iterations per local descent (default 40). */
  maxIterations?: number;
  /**
   * Number of local Levenberg-Marquardt descents. Global stage on: from the best distinct global
   * points (default 3). Global stage off: the initial values plus (n - 1) seeded random points
   * in the bounds (default 1).
   */
  multiStart?: number;
  /** Points of the global stage, the initial values included (default defaultGlobalStarts(k)); 0 or 1 turns it off. */
  globalStarts?: number;
  seed?: number;
  /**
   * Points of the chi2 profile of each fitted parameter, spread evenly across its bounds (default
   * DEFAULT_PROFILE_POINTS; 0 turns the profiles off). The best value is added to each profile.
   */
  profilePoints?: number;
  /** Levenberg-Marquardt iterations of the refit of the other parameters at each profile point (default 2). */
  profileIterations?: number;
  /** Relative change of chi2 below which an iteration counts as quiet (default 1e-7). */
  tolerance?: number;
  onIteration?: (info: FitIterationInfo) => void;
  shouldCancel?: () => boolean;
  /**
   * The model curves at the global stage's points (globalStartPoints, same order), computed
   * elsewhere (in parallel on the worker's threads); the fit then evaluates only the rest.
   */
  globalCurves?: number[][];
}

export interface FitIterationInfo {
  /** "profile": the chi2 profiles after the fit (start = the profiled parameter's number, iteration = the profile point). */
  stage: "global" | "local" | "profile";
  /** Local descent number (1-based); 0 in the global stage. */
  start: number;
  starts: number;
  /** Iteration of the local descent; in the global stage the number of points evaluated. */
  iteration: number;
  maxIterations: number;
  /** The best chi2 so far in this descent (global stage: over the points evaluated). */
  chi2: number;
  values: Record<string, number>;
  /** Estimated fraction of the whole fit done, 0-1. */
  progress: number;
}

/** Most points of the global stage (also the API's limit). */
export const MAX_GLOBAL_STARTS = 256;
/** Most local descents (also the API's limit). */
export const MAX_LOCAL_STARTS = 16;
/** Default points of each chi2 profile (bounds included; the best value is added). */
export const DEFAULT_PROFILE_POINTS = 9;
/** Most points of a chi2 profile (also the API's limit). */
export const MAX_PROFILE_POINTS = 41;
/** Default refit iterations at each profile point. */
export const DEFAULT_PROFILE_ITERATIONS = 2;

/**
 * Thresholds of the outcome checks, in one place (docs/data-and-fits.md, "Warnings and their
 * thresholds", lists the same numbers).
 */
export const FIT_CHECKS = {
  /** chi2/dof above this with a sigma column: the model does not describe the data (or sigma is too small). */
  chi2PerDofHigh: 3,
  /** chi2/dof below this with a sigma column: sigma too large, or the model over-fits. */
  chi2PerDofLow: 0.2,
  /**
   * Without a sigma column: the residual variance over the noise variance estimated from the
   * residuals' second differences (white noise gives about 1); above this the residuals carry
   * structure the model misses.
   */
  residualStructureHigh: 3,
  /** Fewest points for the structure check without a sigma column. */
  residualStructureMinPoints: 10,
  /** A scaled coordinate (0 at min, 1 at max) within this of 0 or 1 is on a bound. */
  boundTolerance: 1e-6,
  /** The best values within this (scaled, every coordinate) of their start: the fit did not move. */
  notMovedTolerance: 1e-6,
  /** Condition number of J^T W J scaled to unit diagonal above which a combination of parameters is undetermined. */
  conditionNumberMax: 1e8,
  /** A parameter whose eigenvector component in such a null direction exceeds this is named. */
  nullDirectionComponent: 0.3,
  /** stderr above this many bound widths: the data do not determine the parameter. */
  stderrOverWidthMax: 1,
  /** Competing minima, weighted: chi2 within this many units (times max(1, chi2/dof)) of the best. */
  competingChi2Units: 4,
  /** Competing minima, unweighted: chi2 within this fraction of the best. */
  competingChi2Fraction: 0.1,
  /** ... and some parameter further from the best than this many of its stderr ... */
  competingStderrs: 3,
  /** ... and than this fraction of its bound width. */
  competingWidthFraction: 0.02,
} as const;

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

/** Default number of global points for k fitted parameters: 8k + 8, at most 64. */
export function defaultGlobalStarts(parameters: number): number {
  return Math.min(64, 8 * parameters + 8);
}

/** The stages' sizes as the fitter will run them (also used for the estimate). */
export function fitStages(
  parameters: number,
  options: Pick<FitOptions, "globalStarts" | "multiStart" | "maxIterations" | "profilePoints" | "profileIterations"> = {},
) {
  const requested = Math.floor(options.globalStarts ?? defaultGlobalStarts(parameters));
  const globalStarts = requested <= 1 ? 0 : Math.min(MAX_GLOBAL_STARTS, requested);
  const localDefault = globalStarts > 0 ? 3 : 1;
  let localStarts = Math.max(1, Math.min(MAX_LOCAL_STARTS, Math.floor(options.multiStart ?? localDefault)));
  if (globalStarts > 0) localStarts = Math.min(localStarts, globalStarts);
  const requestedProfile = Math.floor(options.profilePoints ?? DEFAULT_PROFILE_POINTS);
  const profilePoints = requestedProfile < 2 ? 0 : Math.min(MAX_PROFILE_POINTS, requestedProfile);
  const profileIterations = Math.max(1, Math.min(20, Math.floor(options.profileIterations ?? DEFAULT_PROFILE_ITERATIONS)));
  return { globalStarts, localStarts, maxIterations: options.maxIterations ?? 40, profilePoints, profileIterations };
}

/**
 * Model curves the chi2 profiles take at most: with one parameter one per point; with k > 1, per
 * point its start and, per refit iteration, k curves (the step and the Jacobian of the k - 1 others).
 */
export function profileCurves(parameters: number, profilePoints: number, profileIterations: number): number {
  if (profilePoints === 0) return 0;
  return parameters === 1 ? profilePoints : parameters * profilePoints * (1 + profileIterations * parameters);
}

/**
 * The global stage's points as fitCurve will draw them for these specs and options (the initial
 * values first, then the seeded Latin hypercube), in the parameters' own units: for computing
 * their curves elsewhere and passing them back as options.globalCurves.
 */
export function globalStartPoints(specs: FitParameterSpec[], options: Pick<FitOptions, "globalStarts" | "multiStart" | "maxIterations" | "seed"> = {}) {
  const { globalStarts } = fitStages(specs.length, options);
  if (globalStarts === 0) return [];
  const random = rng(options.seed ?? 1);
  const scaled = latinHypercube(globalStarts - 1, specs.length, random);
  return [
    Object.fromEntries(specs.map((s) => [s.parameter, s.initial])),
    ...scaled.map((u) => Object.fromEntries(specs.map((s, j) => [s.parameter, s.min + Math.min(1, Math.max(0, u[j])) * (s.max - s.min)]))),
  ];
}

/** Share of a fit's expected model curves that the global stage takes (for progress shown while it runs elsewhere). */
export function globalStageShare(
  parameters: number,
  options: Pick<FitOptions, "globalStarts" | "multiStart" | "maxIterations" | "profilePoints" | "profileIterations"> = {},
) {
  const st = fitStages(parameters, options);
  const total = st.globalStarts + st.localStarts * st.maxIterations * (parameters + 1) + profileCurves(parameters, st.profilePoints, st.profileIterations);
  return total > 0 ? st.globalStarts / total : 0;
}

/** Deterministic generator for the start points (mulberry32). */
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

/** Latin hypercube of `count` points in [0, 1]^k: in every coordinate each of the count strata holds exactly one point. */
export function latinHypercube(count: number, k: number, random: () => number): number[][] {
  const columns = Array.from({ length: k }, () => {
    const perm = Array.from({ length: count }, (_, i) => i);
    for (let i = count - 1; i > 0; i--) {
      const j = Math.floor(random() * (i + 1));
      [perm[i], perm[j]] = [perm[j], perm[i]];
    }
    return perm.map((stratum) => (stratum + random()) / count);
  });
  return Array.from({ length: count }, (_, i) => columns.map((c) => c[i]));
}

const maxAbsDiff = (a: number[], b: number[]) => a.reduce((m, v, i) => Math.max(m, Math.abs(v - b[i])), 0);

interface Descent {
  index: number;
  u0: number[];
  u: number[];
  chi2: number;
  iterations: number;
  converged: boolean;
  accepted: number;
}

export function fitCurve(model: CurveModel, data: FitData, specs: FitParameterSpec[], options: FitOptions = {}): FitResult {
  const n = data.x.length;
  validateSpecs(specs, n);
  if (data.y.length !== n) throw new FitInputError("x and y must have the same length.", "data");
  const k = specs.length;
  const { globalStarts, localStarts, maxIterations, profilePoints, profileIterations } = fitStages(k, options);
  const tolerance = options.tolerance ?? 1e-7;
  const weighted = !!data.sigma;
  const sigma = data.sigma ?? new Array<number>(n).fill(1);
  const initial = specs.map((s) => (s.initial - s.min) / (s.max - s.min));
  const toValues = (u: ArrayLike<number>) => {
    const v: Record<string, number> = {};
    // The initial point in the user's own numbers (scaling there and back may change the last digit).
    if (Array.from(u).every((ui, i) => ui === initial[i])) return Object.fromEntries(specs.map((s) => [s.parameter, s.initial]));
    specs.forEach((s, i) => (v[s.parameter] = s.min + Math.min(1, Math.max(0, u[i])) * (s.max - s.min)));
    return v;
  };

  // One-entry-per-point cache keyed by the scaled parameter vector: the library asks for the
  // same vector more than once per iteration.
  let evaluations = 0;
  const cache = new Map<string, number[]>();
  const keyOf = (u: ArrayLike<number>) => Array.from(u, (v) => v.toPrecision(15)).join(",");
  const remember = (key: string, y: number[]) => {
    if (y.length !== n) throw new Error(`model returned ${y.length} values for ${n} points`);
    if (cache.size > 64) cache.delete(cache.keys().next().value!);
    cache.set(key, y);
  };
  const curveAt = (u: ArrayLike<number>): number[] => {
    const key = keyOf(u);
    const hit = cache.get(key);
    if (hit) return hit;
    if (options.shouldCancel?.()) throw new FitCancelled();
    const y = model(toValues(u));
    evaluations++;
    remember(key, y);
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
  // Progress: the global points' share of the expected evaluations, then the descents', then the profiles'.
  const perDescent = maxIterations * (k + 1);
  const profileTotal = profileCurves(k, profilePoints, profileIterations);
  const expectedTotal = globalStarts + localStarts * perDescent + profileTotal || 1;
  const globalShare = globalStarts / expectedTotal;
  const localShare = (localStarts * perDescent) / expectedTotal;

  const random = rng(options.seed ?? 1);
  const allStarts: FitStart[] = [];

  // Global stage. The points are independent: evaluated here one after another (each a model
  // curve), unless their curves were computed elsewhere in parallel (options.globalCurves).
  let globalPoints: { u: number[]; chi2: number }[] = [];
  if (globalStarts > 0) {
    const points = [initial, ...latinHypercube(globalStarts - 1, k, random)];
    const given = options.globalCurves;
    if (given && given.length !== points.length) throw new Error(`globalCurves holds ${given.length} curves for ${points.length} global points`);
    let bestSoFar = Infinity;
    globalPoints = points.map((u, i) => {
      if (given) {
        remember(keyOf(u), given[i]);
        evaluations++;
      }
      const chi2 = chi2Of(curveAt(u));
      if (chi2 < bestSoFar) bestSoFar = chi2;
      options.onIteration?.({
        stage: "global",
        start: 0,
        starts: localStarts,
        iteration: i + 1,
        maxIterations,
        chi2: bestSoFar,
        values: toValues(u),
        progress: (globalShare * (i + 1)) / points.length,
      });
      return { u, chi2 };
    });
    globalPoints.forEach((g, i) =>
      allStarts.push({ start: i + 1, stage: "global", initial: toValues(g.u), final: toValues(g.u), chi2: g.chi2, iterations: 0, converged: false }),
    );
  }

  // The local stage's starts: the best distinct global points, or the initial values plus random points.
  const localFrom: number[][] = [];
  if (globalStarts > 0) {
    const order = globalPoints.map((g, i) => ({ g, i })).sort((a, b) => a.g.chi2 - b.g.chi2 || a.i - b.i);
    for (const { g } of order) {
      if (localFrom.length >= localStarts) break;
      if (localFrom.some((u) => maxAbsDiff(u, g.u) < FIT_CHECKS.notMovedTolerance)) continue;
      localFrom.push(g.u);
    }
  } else {
    localFrom.push(initial);
    for (let s = 1; s < localStarts; s++) localFrom.push(specs.map(() => 0.05 + 0.9 * random()));
  }

  // The library calls f(params)(x) per point; x here is the point index. Data and model are
  // pre-whitened (divided by sigma) and the library's own weights left at 1.
  const indices = Array.from({ length: n }, (_, i) => i);
  const lmData = { x: indices, y: data.y.map((v, i) => v / sigma[i]) };
  const everyIndex = specs.map((_, j) => j);

  /**
   * One Levenberg-Marquardt descent from u0, at most `limit` iterations. With `fixed` set, that
   * coordinate stays at u0's value and the others are refitted (a point of a chi2 profile).
   */
  const descend = (u0: number[], index: number, limit = maxIterations, fixed: number | null = null, report = true): Descent => {
    const free = fixed === null ? everyIndex : everyIndex.filter((j) => j !== fixed);
    const expand = (r: ArrayLike<number>) => {
      const full = u0.slice();
      free.forEach((j, i) => (full[j] = r[i]));
      return full;
    };
    const parameterized = (r: number[]) => {
      const y = curveAt(expand(r));
      return (i: number) => y[i] / sigma[i];
    };
    let u = u0.slice();
    let chi2 = chi2Of(curveAt(u));
    let damping = 1e-2;
    let iterations = 0;
    let accepted = 0;
    let converged = chi2 === 0;
    let quiet = 0;
    while (!converged && iterations < limit) {
      iterations++;
      const r = levenbergMarquardt(lmData, parameterized, {
        initialValues: free.map((j) => u[j]),
        damping,
        maxIterations: 1,
        minValues: new Array(free.length).fill(0),
        maxValues: new Array(free.length).fill(1),
        gradientDifference: 1e-4,
        errorTolerance: 0,
      });
      const next = expand(r.parameterValues);
      const nextChi2 = chi2Of(curveAt(next));
      let stalled = false;
      if (nextChi2 < chi2) {
        const rel = (chi2 - nextChi2) / Math.max(chi2, 1e-300);
        u = next;
        chi2 = nextChi2;
        accepted++;
        damping = Math.max(damping / 9, 1e-7);
        quiet = rel < tolerance ? quiet + 1 : 0;
      } else {
        damping = Math.min(damping * 11, 1e7);
        // Only after an accepted step does a rejected step with a tiny change (or the damping at
        // its ceiling) mean there is nothing left to gain; before one, the descent is stuck.
        if (accepted > 0) quiet = damping >= 1e6 || (nextChi2 - chi2) / Math.max(chi2, 1e-300) < tolerance ? quiet + 1 : quiet;
        else stalled = damping >= 1e6;
      }
      if (report)
        options.onIteration?.({
          stage: "local",
          start: index + 1,
          starts: localFrom.length,
          iteration: iterations,
          maxIterations,
          chi2,
          values: toValues(u),
          progress: Math.min(1, globalShare + (localShare * Math.min(localFrom.length, index + iterations / maxIterations)) / localFrom.length),
        });
      if (quiet >= 2 || chi2 === 0) converged = true;
      if (stalled) break;
    }
    return { index, u0, u, chi2, iterations, converged, accepted };
  };

  const descents = localFrom.map((u0, i) => descend(u0, i));
  const recordDescent = (d: Descent, stage: FitStart["stage"]) =>
    allStarts.push({
      start: allStarts.length + 1,
      stage,
      initial: toValues(d.u0),
      final: toValues(d.u),
      chi2: d.chi2,
      iterations: d.iterations,
      converged: d.converged,
    });
  descents.forEach((d) => recordDescent(d, "local"));
  let b = descents.reduce((best, d) => (d.chi2 < best.chi2 ? d : best));

  /**
   * The chi2 profile of every fitted parameter around the best point: the parameter stepped across
   * its bounds, outward from the best value, the others refitted at each point from their values
   * at the neighbouring point (a short descent; with one fitted parameter, chi2 is evaluated).
   */
  let profilePass = 0;
  const takeProfiles = (center: Descent) => {
    profilePass++;
    const grid = Array.from({ length: profilePoints }, (_, i) => i / (profilePoints - 1));
    let done = 0;
    return specs.map((_, j) => {
      const points: { u: number[]; chi2: number }[] = [{ u: center.u.slice(), chi2: center.chi2 }];
      const up = grid.filter((g) => g > center.u[j] + 1e-12);
      const down = grid.filter((g) => g < center.u[j] - 1e-12).reverse();
      for (const side of [up, down]) {
        let from = center.u;
        for (const g of side) {
          const u0 = from.slice();
          u0[j] = g;
          const at = k === 1 ? { u: u0, chi2: chi2Of(curveAt(u0)) } : descend(u0, j, profileIterations, j, false);
          points.push({ u: at.u.slice(), chi2: at.chi2 });
          from = at.u;
          done++;
          options.onIteration?.({
            stage: "profile",
            start: j + 1,
            starts: k,
            iteration: done,
            maxIterations: profilePoints * k,
            chi2: center.chi2,
            values: toValues(at.u),
            progress: Math.min(1, globalShare + localShare + ((1 - globalShare - localShare) * done) / (profilePoints * k * profilePass)),
          });
        }
      }
      return points.sort((p, q) => p.u[j] - q.u[j]);
    });
  };
  let profileRaw: { u: number[]; chi2: number }[][] = [];
  let profileImproved = false;
  if (profilePoints > 0) {
    profileRaw = takeProfiles(b);
    // A profile point below the best: the descents missed a lower minimum. Descend from the lowest
    // such point once; if it ends lower, it is the fit, and the profiles are taken again around it.
    const lowest = profileRaw.flat().reduce((m, p) => (p.chi2 < m.chi2 ? p : m));
    if (lowest.chi2 < b.chi2 * (1 - 1e-6)) {
      const again = descend(lowest.u, descents.length);
      recordDescent(again, "profile");
      descents.push(again);
      if (again.chi2 < b.chi2) {
        b = again;
        profileImproved = true;
        profileRaw = takeProfiles(b);
      }
    }
  }

  const totalIterations = descents.reduce((s, d) => s + d.iterations, 0);
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
  // Scaled to unit diagonal (a parameter the model ignores keeps a zero row and column).
  const d = specs.map((_, j) => (JtJ.get(j, j) > 0 ? 1 / Math.sqrt(JtJ.get(j, j)) : 0));
  const N = new Matrix(k, k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) N.set(i, j, JtJ.get(i, j) * d[i] * d[j]);
  const ignored = specs.map((_, j) => d[j] === 0);
  const nullDirection = new Array<boolean>(k).fill(false);
  // Condition number over the parameters the model depends on at all (the others are flagged on their own).
  const active = specs.map((_, j) => j).filter((j) => !ignored[j]);
  let conditionNumber: number | null = null;
  if (active.length > 0) {
    const sub = new Matrix(active.length, active.length);
    active.forEach((a, i) => active.forEach((c, j) => sub.set(i, j, N.get(a, c))));
    const eig = new EigenvalueDecomposition(sub, { assumeSymmetric: true });
    const lambda = eig.realEigenvalues;
    const lmax = Math.max(...lambda);
    const lmin = Math.min(...lambda);
    conditionNumber = lmin > 0 ? lmax / lmin : null;
    lambda.forEach((l, c) => {
      if (l > lmax / FIT_CHECKS.conditionNumberMax) return;
      active.forEach((j, i) => {
        if (Math.abs(eig.eigenvectorMatrix.get(i, c)) > FIT_CHECKS.nullDirectionComponent) nullDirection[j] = true;
      });
    });
  }
  const Ninv = pseudoInverse(N, 1e-14);
  const cov = new Matrix(k, k);
  for (let i = 0; i < k; i++) for (let j = 0; j < k; j++) cov.set(i, j, Ninv.get(i, j) * d[i] * d[j] * s2);

  const flags = new Set<FitFlag>();
  const warnings: string[] = [];
  const parameters: FitParameterResult[] = specs.map((s, j) => {
    const v = cov.get(j, j);
    const value = values[s.parameter];
    const width = s.max - s.min;
    const atBound = b.u[j] <= FIT_CHECKS.boundTolerance || b.u[j] >= 1 - FIT_CHECKS.boundTolerance;
    if (atBound) {
      flags.add("on_bound");
      warnings.push(`${s.parameter} ended on a bound (${value}); widen [${s.min}, ${s.max}] or fix it.`);
    }
    let stderr: number | null = v > 0 ? Math.sqrt(v) : null;
    if (ignored[j] || stderr === null) {
      flags.add("undetermined");
      warnings.push(`${s.parameter} is not determined by the data (the model does not change with it here).`);
      stderr = null;
    } else if (nullDirection[j]) {
      flags.add("undetermined");
      warnings.push(
        `${s.parameter} is not determined by the data: with the other fitted parameters it changes the model along one combination only ` +
          `(condition number above ${FIT_CHECKS.conditionNumberMax.toExponential(0)}); fix one of them.`,
      );
      stderr = null;
    } else if (stderr > FIT_CHECKS.stderrOverWidthMax * width) {
      flags.add("undetermined");
      warnings.push(`${s.parameter} is hardly determined by the data: its standard error (${stderr.toPrecision(3)}) exceeds its range [${s.min}, ${s.max}].`);
    }
    return { parameter: s.parameter, value, stderr, initial: s.initial, min: s.min, max: s.max, atBound };
  });
  const correlation = specs.map((_, i) =>
    specs.map((__, j) => {
      const dd = Math.sqrt(cov.get(i, i) * cov.get(j, j));
      return i === j ? 1 : dd > 0 ? Math.max(-1, Math.min(1, cov.get(i, j) / dd)) : 0;
    }),
  );

  // Goodness of fit.
  let residualStructure: number | null = null;
  if (weighted) {
    if (s2 > FIT_CHECKS.chi2PerDofHigh) {
      flags.add("chi2_high");
      warnings.push(
        `chi2/dof is ${s2.toPrecision(3)} (above ${FIT_CHECKS.chi2PerDofHigh}): the model does not describe the data within their uncertainties, or the uncertainties are too small.`,
      );
    } else if (s2 < FIT_CHECKS.chi2PerDofLow) {
      flags.add("chi2_low");
      warnings.push(
        `chi2/dof is ${s2.toPrecision(3)} (below ${FIT_CHECKS.chi2PerDofLow}): the uncertainty column looks too large for the scatter of the data.`,
      );
    }
  } else if (n >= FIT_CHECKS.residualStructureMinPoints) {
    residualStructure = residualStructureRatio(data.x, residuals, dof);
    if (residualStructure !== null && residualStructure > FIT_CHECKS.residualStructureHigh) {
      flags.add("chi2_high");
      warnings.push(
        `The residuals are ${residualStructure.toPrecision(3)} times the point-to-point noise estimated from them (above ${FIT_CHECKS.residualStructureHigh}): ` +
          `the model misses structure in the data. Without an uncertainty column chi2/dof is in (e2/h)^2 and is judged this way.`,
      );
    }
  }

  // Did the fit move?
  const stuck = b.accepted === 0 || (globalStarts === 0 && maxAbsDiff(b.u, b.u0) < FIT_CHECKS.notMovedTolerance);
  if (stuck) {
    flags.add("not_moved");
    warnings.push(
      globalStarts === 0
        ? "The fit did not move from its start: the values are the initial values. Turn the global stage on (globalStarts) or start elsewhere."
        : "The best local descent could not improve on its start point; the values are a point of the global stage.",
    );
  }
  if (!b.converged) {
    flags.add("not_converged");
    if (b.accepted > 0) warnings.push(`The fit stopped after ${b.iterations} iterations without meeting the convergence rule; the values may still move.`);
    else warnings.push("The fit did not converge: no step lowered chi2 from its start.");
  }

  // Competing minima: another descent that ended as well (similar chi2) far from the best.
  const similar = (chi2: number) =>
    weighted ? chi2 - b.chi2 <= FIT_CHECKS.competingChi2Units * Math.max(1, s2) : chi2 - b.chi2 <= FIT_CHECKS.competingChi2Fraction * b.chi2;
  const rivals = descents.filter(
    (o) =>
      o !== b &&
      similar(o.chi2) &&
      specs.some((s, j) => {
        const delta = Math.abs(o.u[j] - b.u[j]) * (s.max - s.min);
        const se = parameters[j].stderr;
        // A parameter without a stderr is already flagged undetermined; its spread is not a second minimum.
        return se !== null && delta > FIT_CHECKS.competingWidthFraction * (s.max - s.min) && delta > FIT_CHECKS.competingStderrs * se;
      }),
  );
  if (rivals.length > 0) {
    flags.add("competing_minima");
    const o = rivals[0];
    const where = specs.map((s) => `${s.parameter} = ${toValues(o.u)[s.parameter].toPrecision(4)}`).join(", ");
    warnings.push(
      `${rivals.length} other start${rivals.length > 1 ? "s" : ""} ended in a different minimum of similar chi2 (e.g. ${where}, chi2 ${o.chi2.toPrecision(4)} against ${b.chi2.toPrecision(4)}): ` +
        `the data do not choose between them.`,
    );
  }

  // The profiles in physical units, with the one-standard-error level chi2 + chi2/dof (the
  // scaling of the standard errors) and where each profile crosses it.
  const deltaChi2 = s2 > 0 ? s2 : 1;
  const profiles: FitProfile[] = profileRaw.map((raw, j) => {
    const s = specs[j];
    const points = raw.map((p) => {
      const all = toValues(p.u);
      const others = Object.fromEntries(Object.entries(all).filter(([name]) => name !== s.parameter));
      return { value: all[s.parameter], chi2: p.chi2, others };
    });
    return { parameter: s.parameter, points, refitted: k > 1, deltaChi2, interval: profileInterval(points, values[s.parameter], b.chi2 + deltaChi2) };
  });

  const flagList = [...flags];
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
    starts: allStarts,
    warnings,
    quality: flagList.length ? "poor" : "good",
    flags: flagList,
    profiles,
    diagnostics: { globalStarts, localStarts: descents.length, conditionNumber, residualStructure, profilePoints, profileImproved },
  };
}

/**
 * Where a chi2 profile crosses `level` on either side of the best value, by linear interpolation
 * between its points; null on a side where it stays below the level up to the bound.
 */
export function profileInterval(points: { value: number; chi2: number }[], best: number, level: number): { low: number | null; high: number | null } {
  const at = points.findIndex((p) => p.value === best);
  const i0 = at >= 0 ? at : points.reduce((m, p, i) => (Math.abs(p.value - best) < Math.abs(points[m].value - best) ? i : m), 0);
  const cross = (step: 1 | -1): number | null => {
    for (let i = i0; i + step >= 0 && i + step < points.length; i += step) {
      const a = points[i],
        c = points[i + step];
      if (c.chi2 >= level) {
        if (a.chi2 >= level) return a.value;
        return a.value + ((level - a.chi2) / (c.chi2 - a.chi2)) * (c.value - a.value);
      }
    }
    return null;
  };
  return { low: cross(-1), high: cross(1) };
}

/**
 * Without a sigma column: residual variance (chi2/dof) over the noise variance estimated from the
 * second differences of the residuals in x order, sum (r[i+1] - 2 r[i] + r[i-1])^2 / (6 (n - 2))
 * (for white noise of variance s^2 each second difference has variance 6 s^2). About 1 when the
 * residuals are noise; large when they follow a smooth misfit. Structure on the scale of the
 * point spacing is not seen (the check is then lenient).
 */
export function residualStructureRatio(x: number[], residuals: number[], dof: number): number | null {
  const order = x.map((_, i) => i).sort((a, b) => x[a] - x[b]);
  const r = order.map((i) => residuals[i]);
  const n = r.length;
  if (n < 3) return null;
  let s = 0;
  for (let i = 1; i < n - 1; i++) {
    const d2 = r[i + 1] - 2 * r[i] + r[i - 1];
    s += d2 * d2;
  }
  const noise = s / (6 * (n - 2));
  const variance = r.reduce((t, v) => t + v * v, 0) / dof;
  if (!(noise > 0)) return variance > 0 ? Infinity : null;
  return variance / noise;
}
