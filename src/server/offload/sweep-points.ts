/**
 * The per-point checks of a sweep (schema, engine limits, plan limits, the estimate), pure: no
 * database, no queue, so they can run in the web server's analysis thread (src/server/offload/)
 * when a sweep has many points. About a millisecond per point of a 10 x 10 network, more for
 * larger ones: a 20,000-point sweep is tens of seconds of CPU.
 */
import type { PlanId } from "@/shared/plans";
import { assertEnsembleWithinPlan, assertJobComputeWithinPlan, assertNetworkWithinPlan } from "@/server/billing/limits";
import { applyParameter, estimateSeconds, inputHash, networkSize, parseInput, type ComputeInput } from "@/server/engine";
import { ApiError } from "@/server/http/errors";
import { pointCoordinates, type ResolvedAxis } from "@/shared/sweep-axes";

/** The input of one sweep point: the base input with the axes' values applied. */
export function pointInput(base: ComputeInput, axes: ResolvedAxis[], pointIndex: number): ComputeInput {
  const coordinates = pointCoordinates(axes, pointIndex);
  let input = structuredClone(base) as ComputeInput;
  for (const a of axes) input = applyParameter(input, a.parameter, coordinates[a.parameter]) as ComputeInput;
  return input;
}

export interface CheckedPoint {
  input: ComputeInput;
  estimate: number;
  hash: string;
}

export interface SweepPointsTask {
  plan: PlanId;
  base: ComputeInput;
  axes: ResolvedAxis[];
  pointCount: number;
  /** Return every point's input, estimate and hash (a submission writes them); a dry run needs the total only. */
  keepPoints: boolean;
}

/** Validates every point (first failure throws ApiError naming the point); the sum of the estimates and, if asked, the points. */
export function checkSweepPoints(task: SweepPointsTask): { total: number; points: CheckedPoint[] } {
  const { plan, base, axes, pointCount } = task;
  const points: CheckedPoint[] = [];
  let total = 0;
  for (let i = 0; i < pointCount; i++) {
    let input: ComputeInput;
    const coordinates = pointCoordinates(axes, i);
    const where = `scan point ${i} (${Object.entries(coordinates)
      .map(([k, v]) => `${k} = ${v}`)
      .join(", ")})`;
    try {
      input = parseInput(pointInput(base, axes, i));
    } catch (err) {
      if (err instanceof ApiError) throw new ApiError(err.code, `${where}: ${err.message}`, err.details);
      const mapped = err as Error;
      if (mapped?.name === "EngineInputError" || mapped?.name === "EngineLimitError") {
        throw new ApiError("invalid_input", `${where}: ${mapped.message}`, { pointIndex: i, coordinates });
      }
      throw err;
    }
    assertNetworkWithinPlan(plan, networkSize(input.network), `${where}: network.size`);
    assertEnsembleWithinPlan(plan, input);
    const estimate = estimateSeconds(input);
    assertJobComputeWithinPlan(plan, estimate, where);
    total += estimate;
    if (task.keepPoints) points.push({ input, estimate, hash: inputHash(input) });
  }
  return { total, points };
}
