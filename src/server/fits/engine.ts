/**
 * The fits' door to the physics engine (src/engine): the pieces a fit needs, typed loosely so the
 * fit modules stay pure and testable with a stand-in engine.
 */
import { ENGINE_VERSION, EngineCancelledError, EngineInputError, applyParameter, compute, estimateCost, inputHash, parseComputeInput } from "@/engine";
import type { EngineLike } from "./model";

export { ENGINE_VERSION, EngineCancelledError, EngineInputError, inputHash, parseComputeInput };

export const engine: EngineLike = {
  compute: (input, options) => compute(input as never, options as never),
  applyParameter: (input, parameter, value) => applyParameter(input as never, parameter as never, value),
};

/** Estimated compute-seconds of one engine computation of this input. */
export function secondsPerEvaluation(input: unknown): number {
  const e = estimateCost(input as never) as unknown as { computeSeconds?: number } | number;
  const s = typeof e === "number" ? e : Number(e?.computeSeconds);
  return Number.isFinite(s) && s > 0 ? s : 0.01;
}
