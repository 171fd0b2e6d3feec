/** Closed finite networks (no leads): rings (columns wrap) or tori, for the trace formula. */
import { EngineInputError } from "../errors";
import { buildSample } from "../network/lattice";
import type { NetworkGraph } from "../network/graph";
import type { Network } from "../schema";
import { checkTorusField } from "../network/torus";
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

export function buildClosedSample(net: Network, scale: Scale, fieldTesla: number, sample: number, fieldField: string): NetworkGraph {
  checkClosedSample(net, fieldField);
  const problem = checkTorusField(net, fieldTesla);
  if (problem) throw new EngineInputError(fieldField, problem);
  const phi = fluxPerPlaquette(scale, fieldTesla);
  return buildSample(net, { mode: "ring", fluxPerPlaquette: phi, sample });
}

/** Links per real cell of a closed graph (the trace-formula state count per energy period). */
export function linksPerCell(g: NetworkGraph): number {
  let real = 0;
  for (let n = 0; n < g.nodeCount; n++) real += g.nodeReal[n];
  return g.channelCount / real;
}
