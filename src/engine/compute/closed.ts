/** Closed finite networks (no leads): rings (columns wrap) or tori, for the trace formula. */
import { EngineInputError } from "../errors";
import { buildSample } from "../network/lattice";
import type { NetworkGraph } from "../network/graph";
import type { Network } from "../schema";
import { fluxPerPlaquette, type Scale } from "./common";

export function checkClosedSample(net: Network, fieldField: string): void {
  if (net.lattice === "triangular" && net.size.columns < 2)
    throw new EngineInputError("network.size.columns", "a closed (ring) triangular sample needs at least 2 columns");
  if (net.lattice === "square" && net.size.columns % 2 !== 0)
    throw new EngineInputError(
      "network.size.columns",
      `a closed (ring) square sample needs an even number of columns (got ${net.size.columns}); allowed: 2, 4, 6, ...`,
    );
  void fieldField;
}

/** Number of elementary plaquettes of the torus (periodic rows and columns). */
export function torusPlaquettes(net: Network): number {
  return net.lattice === "triangular" ? 2 * net.size.columns * net.size.rows : net.size.columns * net.size.rows;
}

export function buildClosedSample(net: Network, scale: Scale, fieldTesla: number, sample: number, fieldField: string): NetworkGraph {
  checkClosedSample(net, fieldField);
  const phi = fluxPerPlaquette(scale, fieldTesla);
  if (net.transverse === "periodic" && phi !== 0) {
    const total = phi * torusPlaquettes(net);
    if (Math.abs(total - Math.round(total)) > 1e-6) {
      const step = scale.fieldPeriodTesla / torusPlaquettes(net);
      throw new EngineInputError(
        fieldField,
        `a closed periodic sample (a torus) holds a whole number of flux quanta: fieldTesla must be a multiple of ${step.toPrecision(8)} T here ` +
          `(got ${fieldTesla} T, ${total.toPrecision(8)} quanta); or use transverse "open"`,
      );
    }
  }
  return buildSample(net, { mode: "ring", fluxPerPlaquette: phi, sample });
}

/** Links per real cell of a closed graph (the trace-formula state count per energy period). */
export function linksPerCell(g: NetworkGraph): number {
  let real = 0;
  for (let n = 0; n < g.nodeCount; n++) real += g.nodeReal[n];
  return g.channelCount / real;
}
