/**
 * The engine's schema and estimates, imported into the browser (the engine is pure TypeScript),
 * so the forms validate with exactly what the API validates with. Issues come back keyed by
 * dotted field path ("node.forward", "size.columns") for inline messages.
 */
// The engine's browser-safe entry (no Node built-ins, no native addon, no compute code); the
// engine's index would bring the kernel backend and node:crypto into the browser bundle.
import {
  checkTorusField,
  computationSchema,
  estimateCost,
  networkSchema,
  runsOnClosedSample,
  SWEEPABLE_PARAMETERS,
  type Computation,
  type Network,
} from "@/engine/browser";

export type Issues = Record<string, string>;

function collect(error: { issues: { path: PropertyKey[]; message: string }[] }, prefix = ""): Issues {
  const out: Issues = {};
  for (const i of error.issues) {
    const key = [prefix, ...i.path.map(String)].filter(Boolean).join(".") || prefix || "network";
    if (!out[key]) out[key] = i.message;
  }
  return out;
}

export function validateNetwork(network: unknown): { ok: true; data: Network } | { ok: false; issues: Issues } {
  const r = networkSchema.safeParse(network);
  if (r.success) return { ok: true, data: r.data };
  return { ok: false, issues: collect(r.error) };
}

export function validateComputation(computation: unknown): { ok: true; data: Computation } | { ok: false; issues: Issues } {
  const r = computationSchema.safeParse(computation);
  if (r.success) return { ok: true, data: r.data };
  return { ok: false, issues: collect(r.error) };
}

/**
 * A computation checked on its network too: the schema's rules that need both (a closed periodic
 * sample, a torus, allows only whole flux quanta: the engine's checkTorusField) join the
 * computation's own issues under the field they concern.
 */
export function validateComputationOn(network: unknown, computation: unknown): { ok: true; data: Computation } | { ok: false; issues: Issues } {
  const c = validateComputation(computation);
  if (!c.ok || !runsOnClosedSample(c.data)) return c;
  const n = networkSchema.safeParse(network);
  if (!n.success) return c;
  const problem = checkTorusField(n.data, (c.data as { fieldTesla: number }).fieldTesla);
  return problem ? { ok: false, issues: { fieldTesla: problem } } : c;
}

/**
 * Estimated compute-seconds of one input, from the engine's cost model (the figure the API
 * answers with). Null while the input is invalid or the model refuses it.
 */
export function estimateInput(input: { network: unknown; computation: unknown }): number | null {
  const n = networkSchema.safeParse(input.network);
  const c = computationSchema.safeParse(input.computation);
  if (!n.success || !c.success) return null;
  try {
    return estimateCost({ network: n.data, computation: c.data }).computeSeconds;
  } catch {
    return null;
  }
}

/** Sweepable parameters for a computation kind (the engine's list, the one the API checks). */
export function sweepableFor(kind: string, lattice: "triangular" | "square"): { name: string; unit: string; description: string }[] {
  return SWEEPABLE_PARAMETERS.filter((p) => {
    if (p.appliesTo === "computation") return !p.kinds || p.kinds.includes(kind);
    if (lattice === "square") return !["node.forward", "node.left", "node.right", "node.phaseRad"].includes(p.name);
    return p.name !== "node.turning";
  });
}
