/**
 * The engine's schema and estimates, imported into the browser (the engine is pure TypeScript),
 * so the forms validate with exactly what the API validates with. Issues come back keyed by
 * dotted field path ("node.forward", "size.columns") for inline messages.
 */
// The schema module is pure (zod only); importing it, not the engine's index, keeps worker and
// thread-pool code out of the browser bundle.
import { computationSchema, networkSchema } from "@/engine/schema";

export type Issues = Record<string, string>;

function collect(error: { issues: { path: PropertyKey[]; message: string }[] }, prefix = ""): Issues {
  const out: Issues = {};
  for (const i of error.issues) {
    const key = [prefix, ...i.path.map(String)].filter(Boolean).join(".") || prefix || "network";
    if (!out[key]) out[key] = i.message;
  }
  return out;
}

export function validateNetwork(network: unknown): { ok: true; data: Record<string, unknown> } | { ok: false; issues: Issues } {
  const r = networkSchema.safeParse(network);
  if (r.success) return { ok: true, data: r.data as unknown as Record<string, unknown> };
  return { ok: false, issues: collect(r.error) };
}

export function validateComputation(computation: unknown): { ok: true; data: Record<string, unknown> } | { ok: false; issues: Issues } {
  const r = computationSchema.safeParse(computation);
  if (r.success) return { ok: true, data: r.data as unknown as Record<string, unknown> };
  return { ok: false, issues: collect(r.error) };
}

/**
 * Estimated compute-seconds of one input, from the engine's cost model (the figure the API
 * answers with). Null while the input is invalid.
 */
export function estimateInput(input: { network: unknown; computation: unknown }): number | null {
  const n = networkSchema.safeParse(input.network);
  const c = computationSchema.safeParse(input.computation);
  if (!n.success || !c.success) return null;
  return engineEstimate({ network: n.data, computation: c.data });
}

type EstimateFn = (input: { network: unknown; computation: unknown }) => number | null;
let engineEstimate: EstimateFn = () => null;
/** Lets the estimate module register the engine's cost model (see estimate.ts). */
export function registerEstimate(fn: EstimateFn) {
  engineEstimate = fn;
}
