/**
 * The model a fit adjusts: the engine's two-terminal conductance (e^2/h, with thermal smearing
 * when the computation has temperatureK > 0) at every x of the dataset. The engine is passed in
 * (the contract of src/engine: applyParameter + compute), so this module stays pure and testable.
 */
import { CONDUCTANCE_QUANTUM_S } from "@/engine/constants";
import { fitCurve, FitInputError, fitStages, profileCurves, type FitOptions, type FitParameterSpec, type FitResult } from "./fitter";

/** The part of the engine's API a fit uses. */
export interface EngineLike {
  compute(input: never, options?: { onProgress?: (f: number) => void; shouldCancel?: () => boolean }): unknown;
  applyParameter(input: never, parameter: string, value: number): unknown;
}

export { FIT_PARAMETERS, FITTABLE, SWEEP_FOR_QUANTITY } from "@/shared/fit-parameters";
import { FITTABLE } from "@/shared/fit-parameters";

/**
 * The two-terminal conductance in e^2/h from an engine conductance result, including the series
 * contact resistance: the engine's `siemens` (and `ohms`) include contactOhms while
 * `conductance.total` is the network alone, so `siemens` is used when present.
 */
export function conductanceOf(result: unknown): number {
  const r = result as { siemens?: unknown; conductance?: { total?: unknown }; ensemble?: { mean?: { total?: unknown } } };
  if (typeof r?.siemens === "number" && Number.isFinite(r.siemens) && !r.ensemble) return r.siemens / CONDUCTANCE_QUANTUM_S;
  const total = r?.ensemble?.mean?.total ?? r?.conductance?.total;
  if (typeof total !== "number" || !Number.isFinite(total)) throw new Error("the engine result has no conductance.total");
  return total;
}

export function checkFitSpecs(specs: FitParameterSpec[]): void {
  specs.forEach((s, i) => {
    if (!FITTABLE.includes(s.parameter)) {
      throw new FitInputError(`fit.${i}.parameter: "${s.parameter}" cannot be fitted; choose from ${FITTABLE.join(", ")}.`, `fit.${i}.parameter`);
    }
  });
  const names = specs.map((s) => s.parameter);
  if (names.includes("periodNm") && names.includes("twistDegrees")) {
    throw new FitInputError("fit: periodNm and twistDegrees describe the same length (l = a / (2 sin(theta/2))); fit one of them.", "fit");
  }
}

export interface FitJobInput {
  /** `{ network, computation }` as the engine takes it, already parsed. */
  input: unknown;
  sweepParameter: string;
  x: number[];
  y: number[];
  sigma: number[] | null;
  fit: FitParameterSpec[];
  options?: Pick<FitOptions, "maxIterations" | "multiStart" | "globalStarts" | "seed" | "profilePoints" | "profileIterations" | "globalCurves">;
}

/**
 * The engine input with every fitted value applied. The engine re-validates after each parameter,
 * and parameters can constrain one another (node.forward +- forwardSpread / 2 must stay a valid
 * probability), so a valid combination can pass through an invalid intermediate in one order:
 * then the reverse order is tried before the first error is reported.
 */
export function applyValues(engine: EngineLike, base: unknown, values: Record<string, number>): unknown {
  const entries = Object.entries(values);
  const apply = (list: [string, number][]) => list.reduce<unknown>((input, [p, v]) => engine.applyParameter(input as never, p, v), base);
  try {
    return apply(entries);
  } catch (err) {
    if (entries.length < 2) throw err;
    try {
      return apply(entries.slice().reverse());
    } catch {
      throw err;
    }
  }
}

/** The model curve for given parameter values: one engine computation per data point. */
export function engineCurve(
  engine: EngineLike,
  base: unknown,
  sweepParameter: string,
  x: number[],
  values: Record<string, number>,
  shouldCancel?: () => boolean,
): number[] {
  const input = applyValues(engine, base, values);
  return x.map((xi) => conductanceOf(engine.compute(engine.applyParameter(input as never, sweepParameter, xi) as never, { shouldCancel })));
}

export function runFit(engine: EngineLike, job: FitJobInput, hooks: Pick<FitOptions, "onIteration" | "shouldCancel"> = {}): FitResult {
  checkFitSpecs(job.fit);
  const model = (values: Record<string, number>) => engineCurve(engine, job.input, job.sweepParameter, job.x, values, hooks.shouldCancel);
  return fitCurve(model, { x: job.x, y: job.y, sigma: job.sigma }, job.fit, { ...job.options, ...hooks });
}

/**
 * Engine evaluations (model curves) a fit is expected to need, for the estimate shown before it
 * starts: one per global point, then per local descent up to 8 iterations of k + 1 curves (the
 * step and its forward-difference Jacobian; a descent from the initial values or a random point
 * also evaluates its start), then 2k + 1 for the Jacobian at the optimum, then the chi2 profiles
 * (profileCurves). A profile point below the best adds one more descent and a second set of
 * profiles; that rare case is not in the estimate (the compute-seconds used are what is charged).
 */
export function expectedEvaluations(
  parameters: number,
  options: { maxIterations?: number; multiStart?: number; globalStarts?: number; profilePoints?: number; profileIterations?: number } = {},
): number {
  const { globalStarts, localStarts, maxIterations, profilePoints, profileIterations } = fitStages(parameters, options);
  const iterations = Math.min(maxIterations, 8);
  const startCost = globalStarts > 0 ? 0 : 1;
  return (
    globalStarts + localStarts * (startCost + iterations * (parameters + 1)) + 2 * parameters + 1 + profileCurves(parameters, profilePoints, profileIterations)
  );
}
