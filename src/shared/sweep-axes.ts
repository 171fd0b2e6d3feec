/**
 * Sweep axes and grids (pure; no database). An axis is `{ parameter, values }` or
 * `{ parameter, from, to, points }`; one or two axes make a grid whose points are numbered
 * row-major (the first axis varies slowest). An ensemble (`{ samples }`) is the engine's own:
 * every point averages over that many disorder seeds inside its run.
 */
import { z } from "zod";
import type { SweepAxis } from "@/shared/api";

/** An axis with every value listed (the contract's SweepAxis). */
export type ResolvedAxis = SweepAxis;

const parameterName = z
  .string()
  .min(1, "must name a parameter")
  .max(80)
  .regex(/^[A-Za-z][A-Za-z0-9]*(\.[A-Za-z][A-Za-z0-9]*)*$/, "must be a computation field (e.g. fieldTesla) or a network field path (e.g. node.forward)");

const finite = z.number().refine(Number.isFinite, "must be a finite number");

export const axisSchema = z.union([
  z.object({ parameter: parameterName, values: z.array(finite).min(1, "needs at least one value") }).strict(),
  z.object({ parameter: parameterName, from: finite, to: finite, points: z.number().int().min(1, "must be at least 1").max(1_000_000) }).strict(),
]);

export const axesSchema = z.array(axisSchema).min(1, "needs one or two axes").max(2, "at most two axes");

export const ensembleSchema = z.object({ samples: z.number().int().min(1, "must be at least 1") }).strict();

export type Axis = z.infer<typeof axisSchema>;
export type Ensemble = z.infer<typeof ensembleSchema>;

export function resolveAxis(axis: Axis): ResolvedAxis {
  if ("values" in axis) return { parameter: axis.parameter, values: [...axis.values] };
  const { from, to, points } = axis;
  const values = points === 1 ? [from] : Array.from({ length: points }, (_, i) => (i === points - 1 ? to : from + ((to - from) * i) / (points - 1)));
  return { parameter: axis.parameter, values };
}

export function gridSize(axes: ResolvedAxis[]): number {
  return axes.reduce((n, a) => n * a.values.length, 1);
}

export function gridShape(axes: ResolvedAxis[]): number[] {
  return axes.map((a) => a.values.length);
}

/** Axis indices of a grid point (row-major). */
export function gridIndices(axes: ResolvedAxis[], gridIndex: number): number[] {
  const out = new Array<number>(axes.length);
  let rest = gridIndex;
  for (let k = axes.length - 1; k >= 0; k--) {
    const n = axes[k].values.length;
    out[k] = rest % n;
    rest = Math.floor(rest / n);
  }
  return out;
}

/** The axis values of a sweep point. */
export function pointCoordinates(axes: ResolvedAxis[], pointIndex: number): Record<string, number> {
  const idx = gridIndices(axes, pointIndex);
  const coordinates: Record<string, number> = {};
  axes.forEach((a, k) => (coordinates[a.parameter] = a.values[idx[k]]));
  return coordinates;
}

/**
 * Numeric leaves of a result (nested objects flattened to dotted keys; arrays left out): the
 * quantities a sweep's grid and CSV show per point. The full result stays on the point's run.
 */
export function scalarQuantities(result: unknown, prefix = "", out: Record<string, number> = {}): Record<string, number> {
  if (result && typeof result === "object" && !Array.isArray(result)) {
    for (const [k, v] of Object.entries(result as Record<string, unknown>)) {
      const key = prefix ? `${prefix}.${k}` : k;
      if (typeof v === "number" && Number.isFinite(v)) out[key] = v;
      else if (v && typeof v === "object" && !Array.isArray(v)) scalarQuantities(v, key, out);
    }
  }
  return out;
}
