/**
 * The one place the web app and the worker reach the physics engine (src/engine). Teaches the
 * HTTP layer the engine's typed errors (422 with the field and the message) and answers the
 * questions the submission rules ask: which kind of computation, how large a network.
 * Its own folder below networks, runs and sweeps, which all use it.
 */
import {
  ENGINE_VERSION,
  EngineInputError,
  EngineLimitError,
  applyParameter,
  canonicalJson,
  checkResourceLimits,
  estimateCost,
  inputHash,
  parseComputeInput,
  parseNetwork,
  SWEEPABLE_PARAMETERS,
  type ComputeInput,
  type Network,
} from "@/engine";
import { ApiError, registerErrorMapper } from "@/server/http/errors";

export { ENGINE_VERSION, applyParameter, canonicalJson, estimateCost, inputHash };
export type { ComputeInput };

registerErrorMapper((err) => {
  if (err instanceof EngineInputError) {
    const e = err as EngineInputError & { field?: string; issues?: unknown };
    return new ApiError("invalid_input", err.message, { field: e.field, issues: e.issues });
  }
  if (err instanceof EngineLimitError) {
    return new ApiError("invalid_input", err.message, {
      limit: "engine",
      resource: err.resource,
      estimatedPeakMemoryBytes: err.estimatedPeakMemoryBytes,
      limitBytes: err.limitBytes,
      ...(err.resource === "computeTime" ? { estimatedComputeSeconds: err.estimatedComputeSeconds, limitComputeSeconds: err.limitComputeSeconds } : {}),
    });
  }
  return undefined;
});

/** Parses `{ network, computation }` with the engine's schema; prefix names where it sits in the request. */
export function parseInput(json: unknown, prefix = ""): ComputeInput {
  try {
    const input = parseComputeInput(json);
    checkResourceLimits(input);
    return input;
  } catch (err) {
    if (prefix && err instanceof EngineInputError) {
      const e = err as EngineInputError & { field?: string; issues?: unknown };
      throw new ApiError("invalid_input", `${prefix}: ${err.message}`, { field: e.field ? `${prefix}.${e.field}` : prefix, issues: e.issues });
    }
    throw err;
  }
}

/** Validates a network description alone (errors name fields under `network.`). */
export function parseNetworkDefinition(json: unknown) {
  return parseNetwork(json);
}

/** Computation kind as stored on the run: the schema's discriminator (conductance, spectrum, dos, ldos, localization). */
export function kindOf(input: ComputeInput): ComputeInput["computation"]["kind"] {
  return input.computation.kind;
}

/** Cells along the network's sides (columns and rows), for the plan's largest-network rule. */
export function networkSize(network: Network): { columns: number; rows: number } {
  return { columns: network.size.columns, rows: network.size.rows };
}

/** Estimated compute-seconds of one input (the engine's cost model). */
export function estimateSeconds(input: ComputeInput): number {
  const e = estimateCost(input) as { computeSeconds: number };
  return Math.max(0, Number(e.computeSeconds) || 0);
}

/** Parameter names a sweep axis may take (the engine's list). */
export function sweepableParameters(): string[] {
  const p = SWEEPABLE_PARAMETERS as unknown;
  if (Array.isArray(p))
    return p.map((x) => (typeof x === "string" ? x : String((x as { name?: string; parameter?: string }).name ?? (x as { parameter?: string }).parameter)));
  if (p && typeof p === "object") return Object.keys(p);
  return [];
}
