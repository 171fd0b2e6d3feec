import type { ComputationKind } from "@/components/runs/computations";

/**
 * Parameters a sweep axis may take for a computation: computation fields and network field
 * paths (the API checks them against the engine's list).
 */
export function sweepParametersFor(kind: ComputationKind, lattice: "triangular" | "square"): string[] {
  const network = lattice === "square" ? ["node.turning", "disorder.linkPhaseWidthRad", "disorder.forwardSpread"] : ["node.forward", "node.phaseRad", "disorder.linkPhaseWidthRad", "disorder.forwardSpread", "twistDegrees", "modeVelocityMps"];
  const byKind: Record<ComputationKind, string[]> = {
    conductance: ["fieldTesla", "energyMeV", "temperatureK", "contactOhms"],
    ldos: ["energyMeV", "fieldTesla"],
    localization: ["energyMeV", "fieldTesla"],
    dos: ["broadeningMeV"],
    spectrum: [],
  };
  return [...byKind[kind], ...network];
}
