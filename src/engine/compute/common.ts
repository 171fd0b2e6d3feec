import { energyScaleMeV, FLUX_QUANTUM_WB } from "../constants";
import { linkLengthNm, type Network } from "../schema";
import { plaquetteArea } from "../network/lattice";

export interface Scale {
  periodNm: number;
  /** hbar v / l in meV: link phase = E / energyScaleMeV. */
  energyScaleMeV: number;
  energyPeriodMeV: number;
  /** Plaquette area in m^2 (triangle sqrt3/4 l^2 or square l^2). */
  plaquetteAreaM2: number;
  /** Field of one flux quantum per plaquette (the period in field), tesla. */
  fieldPeriodTesla: number;
}

export function networkScale(net: Network): Scale {
  const periodNm = linkLengthNm(net);
  const es = energyScaleMeV(periodNm, net.modeVelocityMps);
  const area = plaquetteArea(net.lattice) * (periodNm * 1e-9) ** 2;
  return { periodNm, energyScaleMeV: es, energyPeriodMeV: 2 * Math.PI * es, plaquetteAreaM2: area, fieldPeriodTesla: FLUX_QUANTUM_WB / area };
}

/** Flux per plaquette in units of h/e. */
export function fluxPerPlaquette(scale: Scale, fieldTesla: number): number {
  return (fieldTesla * scale.plaquetteAreaM2) / FLUX_QUANTUM_WB;
}

/** Link phase E tau = E / (hbar v / l). */
export function energyPhase(scale: Scale, energyMeV: number): number {
  return energyMeV / scale.energyScaleMeV;
}

export function mean(xs: number[]): number {
  return xs.reduce((a, b) => a + b, 0) / Math.max(1, xs.length);
}
export function std(xs: number[]): number {
  if (xs.length < 2) return 0;
  const m = mean(xs);
  return Math.sqrt(xs.reduce((a, b) => a + (b - m) * (b - m), 0) / (xs.length - 1));
}
