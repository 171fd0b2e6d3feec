/**
 * The fields a closed periodic sample (a torus) allows. A closed sample is what the trace formula
 * runs on (LDOS maps, and DOS from the sample): the columns wrap, and with periodic rows the
 * sample is a torus. Flux through a closed surface is quantised: the total flux through the torus,
 * B times its area (every elementary plaquette, physics.md section 2), must be a whole number of
 * flux quanta h/e, so the field comes in steps of (h/e) / (plaquettes x plaquette area). With open
 * transverse edges the closed sample is a ring and any field is allowed.
 *
 * Pure (no Node built-in): the schema's parser, the computation and the browser's scan builder
 * all read the rule from here.
 */
import { FLUX_QUANTUM_WB, periodFromTwistNm } from "../constants";
import type { Network } from "../schema";
import { plaquetteArea } from "./lattice";

/** How far from a whole number the total flux may be, in flux quanta. */
export const TORUS_FLUX_TOLERANCE = 1e-6;

/** Whether a computation runs on a closed sample (no leads): LDOS maps, and DOS with source "sample". */
export function runsOnClosedSample(computation: { kind: string; source?: string }): boolean {
  return computation.kind === "ldos" || (computation.kind === "dos" && computation.source === "sample");
}

/** Number of elementary plaquettes of the torus (periodic rows and columns). */
export function torusPlaquettes(net: Pick<Network, "lattice" | "size">): number {
  return net.lattice === "triangular" ? 2 * net.size.columns * net.size.rows : net.size.columns * net.size.rows;
}

/** Area of one elementary plaquette in m^2 (triangle sqrt3/4 l^2, square l^2). */
function plaquetteAreaM2(net: Pick<Network, "lattice" | "periodNm" | "twistDegrees">): number {
  const l = net.periodNm ?? periodFromTwistNm(net.twistDegrees as number);
  return plaquetteArea(net.lattice) * (l * 1e-9) ** 2;
}

/** Total flux through the closed sample, in flux quanta h/e. */
export function torusFluxQuanta(net: Network, fieldTesla: number): number {
  return ((fieldTesla * plaquetteAreaM2(net)) / FLUX_QUANTUM_WB) * torusPlaquettes(net);
}

/** The field step of one flux quantum through the whole torus, tesla; null when the closed sample is a ring (open edges: any field). */
export function torusFieldStepTesla(net: Network): number | null {
  if (net.transverse !== "periodic") return null;
  return FLUX_QUANTUM_WB / plaquetteAreaM2(net) / torusPlaquettes(net);
}

/** Whether the closed sample of `net` allows `fieldTesla` (the rule the computation enforces). */
export function torusAllowsField(net: Network, fieldTesla: number): boolean {
  if (net.transverse !== "periodic" || fieldTesla === 0) return true;
  const total = torusFluxQuanta(net, fieldTesla);
  return Math.abs(total - Math.round(total)) <= TORUS_FLUX_TOLERANCE;
}

/** The allowed fields around `fieldTesla`: `count` multiples of the step at or below it and `count` above it (nearest first); none for a ring. */
export function allowedTorusFields(net: Network, fieldTesla: number, count = 1): { below: number[]; above: number[] } {
  const step = torusFieldStepTesla(net);
  if (step === null) return { below: [], above: [] };
  // fieldTesla / step is the total flux in quanta; an allowed field is its own nearest below
  const n = fieldTesla / step;
  const lo = Math.abs(n - Math.round(n)) <= TORUS_FLUX_TOLERANCE ? Math.round(n) : Math.floor(n);
  const below: number[] = [];
  const above: number[] = [];
  for (let k = 0; k < count; k++) {
    below.push((lo - k) * step);
    above.push((lo + 1 + k) * step);
  }
  return { below, above };
}

/** null when the torus allows the field; otherwise the reason in words, with the step and the nearest allowed fields. */
export function checkTorusField(net: Network, fieldTesla: number): string | null {
  if (torusAllowsField(net, fieldTesla)) return null;
  const step = torusFieldStepTesla(net) as number;
  const total = torusFluxQuanta(net, fieldTesla);
  const near = allowedTorusFields(net, fieldTesla);
  const t = (x: number) => `${Number(x.toPrecision(8))} T`;
  return (
    `a closed periodic sample (a torus) holds a whole number of flux quanta: fieldTesla must be a multiple of ${step.toPrecision(8)} T here ` +
    `(one flux quantum h/e through the whole ${net.size.columns} x ${net.size.rows} sample); got ${fieldTesla} T, ${total.toPrecision(8)} quanta; ` +
    `the nearest allowed fields are ${t(near.below[0])} and ${t(near.above[0])}; or use transverse "open"`
  );
}
