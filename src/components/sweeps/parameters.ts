import type { ComputationKind } from "@/components/runs/computations";
import { sweepableFor } from "@/lib/engineClient";

/** Parameters a sweep axis may take for a computation: the engine's list (the API checks the same). */
export function sweepParametersFor(kind: ComputationKind, lattice: "triangular" | "square"): string[] {
  return sweepableFor(kind, lattice).map((p) => p.name);
}
