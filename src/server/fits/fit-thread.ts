/**
 * One fit inside a worker thread (piscina), so the worker's event loop keeps renewing job locks
 * and writing progress. Shared control block: Int32 [0] cancel flag (1 = stop), Int32 [1]
 * iteration, Float64 at byte 8 progress 0-1, Float64 at byte 16 current chi2.
 *
 * Two kinds of task: "curves" computes the model curves of a share of the global stage's points
 * (worker/fits.ts runs one per thread, in parallel; Int32 [0] of `counter` counts the curves
 * done), and the fit itself, given those curves as globalCurves.
 */
import { cpuClock, startCpuMeter, type CpuSource } from "@/server/jobs/cpu-clock";
import { ENGINE_VERSION, EngineCancelledError, EngineInputError, engine, parseComputeInput } from "./engine";
import { FitCancelled, FitInputError } from "./fitter";
import { engineCurve, runFit, type FitJobInput } from "./model";

export interface FitTask {
  input: Record<string, unknown>;
  points: { x: number[]; y: number[]; sigma: number[] | null };
  control: SharedArrayBuffer;
  /** The global stage's curves, computed by "curves" tasks. */
  globalCurves?: number[][];
}

export interface CurvesTask {
  kind: "curves";
  input: Record<string, unknown>;
  x: number[];
  values: Record<string, number>[];
  control: SharedArrayBuffer;
  counter: SharedArrayBuffer;
}

export type CurvesOutcome =
  | { outcome: "curves"; curves: number[][]; cpuSeconds: number; cpuSource: CpuSource }
  | {
      outcome: "cancelled" | "failed";
      error: { code: string; message: string; field?: string };
      cpuSeconds: number;
      cpuSource: CpuSource;
      engineVersion: string;
    };

export type FitTaskOutcome =
  | { outcome: "succeeded"; result: unknown; cpuSeconds: number; cpuSource: CpuSource; engineVersion: string }
  | {
      outcome: "cancelled" | "failed";
      error: { code: string; message: string; field?: string };
      cpuSeconds: number;
      cpuSource: CpuSource;
      engineVersion: string;
    };

const clock = cpuClock();

/** Model curves at the given parameter values (a share of the global stage). */
function runCurves(task: CurvesTask): CurvesOutcome {
  const flags = new Int32Array(task.control, 0, 2);
  const counter = new Int32Array(task.counter, 0, 1);
  const spent = startCpuMeter(clock);
  try {
    const { network, computation, sweepParameter } = task.input as { network: unknown; computation: unknown; sweepParameter: string };
    const input = parseComputeInput({ network, computation });
    const shouldCancel = () => Atomics.load(flags, 0) === 1;
    const curves = task.values.map((v) => {
      if (shouldCancel()) throw new FitCancelled();
      const curve = engineCurve(engine, input, sweepParameter, task.x, v, shouldCancel);
      Atomics.add(counter, 0, 1);
      return curve;
    });
    return { outcome: "curves", curves, cpuSeconds: spent(), cpuSource: clock.source };
  } catch (err) {
    const base = { cpuSeconds: spent(), cpuSource: clock.source, engineVersion: ENGINE_VERSION };
    if (err instanceof FitCancelled || err instanceof EngineCancelledError)
      return { outcome: "cancelled", error: { code: "cancelled", message: "The fit was cancelled." }, ...base };
    const e = err as Error & { field?: string };
    return { outcome: "failed", error: { code: err instanceof EngineInputError ? "invalid_input" : "fit_failed", message: e.message }, ...base };
  }
}

export default function runFitTask(task: FitTask | CurvesTask): FitTaskOutcome | CurvesOutcome {
  if ("kind" in task && task.kind === "curves") return runCurves(task);
  return runOneFit(task as FitTask);
}

function runOneFit(task: FitTask): FitTaskOutcome {
  const flags = new Int32Array(task.control, 0, 2);
  const floats = new Float64Array(task.control, 8, 2);
  const spent = startCpuMeter(clock);
  try {
    const { network, computation, sweepParameter, fit, options } = task.input as {
      network: unknown;
      computation: unknown;
      sweepParameter: string;
      fit: FitJobInput["fit"];
      options?: FitJobInput["options"];
    };
    const input = parseComputeInput({ network, computation });
    const result = runFit(
      engine,
      { input, sweepParameter, x: task.points.x, y: task.points.y, sigma: task.points.sigma, fit, options: { ...options, globalCurves: task.globalCurves } },
      {
        shouldCancel: () => Atomics.load(flags, 0) === 1,
        onIteration: (i) => {
          // Iterations of Levenberg-Marquardt so far (0 during the global stage).
          Atomics.store(flags, 1, i.stage === "global" ? 0 : (i.start - 1) * i.maxIterations + i.iteration);
          floats[0] = i.progress;
          floats[1] = i.chi2;
        },
      },
    );
    return {
      outcome: "succeeded",
      result: { ...result, engineVersion: ENGINE_VERSION },
      cpuSeconds: spent(),
      cpuSource: clock.source,
      engineVersion: ENGINE_VERSION,
    };
  } catch (err) {
    const base = { cpuSeconds: spent(), cpuSource: clock.source, engineVersion: ENGINE_VERSION };
    if (err instanceof FitCancelled) return { outcome: "cancelled", error: { code: "cancelled", message: err.message }, ...base };
    if (err instanceof EngineCancelledError) return { outcome: "cancelled", error: { code: "cancelled", message: "The fit was cancelled." }, ...base };
    const e = err as Error & { field?: string };
    const code = err instanceof FitInputError || err instanceof EngineInputError ? "invalid_input" : "fit_failed";
    return { outcome: "failed", error: { code, message: e.message, ...(e.field ? { field: e.field } : {}) }, ...base };
  }
}
