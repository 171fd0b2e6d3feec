/**
 * Density of states. Periodic network: from the Bloch eigenphases on a k mesh, each level
 * broadened by the periodic Lorentzian (Poisson kernel) P_r(x) = (1 - r^2)/(1 - 2 r cos x + r^2),
 * r = exp(-eta), eta = broadening / (hbar v / l); this is exactly the trace formula
 * rho = sum_l (tau/2pi) Re[(1 + U_eta)(1 - U_eta)^-1]_ll evaluated in the Bloch basis, so one energy
 * period holds exactly one state per eigenphase (3 per channel per cell, physics.md check 6).
 * Finite closed sample: the same trace formula via rho = (tau/2pi) [L - 2 d/dtheta arg det(1 - U_eta)],
 * with det(1 - U_eta) from the slice composition (product of the loop determinants).
 */
import type { DosComputation, Network } from "../schema";
import { channelPhases, reverseGraph, type NetworkGraph } from "../network/graph";
import { Absorber } from "../scattering/absorber";
import { networkScale, type Scale } from "./common";
import { Progress, type ComputeOptions } from "./progress";
import { periodicCell, reverseCell, type PeriodicCell } from "./spectrum-cell";
import { blochPhases } from "./spectrum";
import { sampleGeometryNm } from "../network/lattice";
import { buildClosedSample, linksPerCell } from "./closed";

export interface DosResult {
  kind: "dos";
  source: "bloch" | "sample";
  energiesMeV: number[];
  broadeningMeV: number;
  energyPeriodMeV: number;
  /** States per meV per moire cell (triangular: per node; square: per node = per plaquette):
   * valleyK and valleyKPrime per spin (channels included), total with spin and valley degeneracy. */
  dosPerMeVPerCell: { valleyK: number[]; valleyKPrime: number[] | null; total: number[] };
  /** Total density of states per meV per nm^2. */
  dosPerMeVPerNm2: number[];
  /** Carrier density (total, all degeneracies) per cm^2, counted from carrierDensityFromMeV. */
  carrierDensityPerCm2: number[];
  carrierDensityFromMeV: number;
  cellAreaNm2: number;
  checks: { statesPerCellPerPeriod: number };
}

export function energyGrid(c: DosComputation, scale: Scale): number[] {
  const g = c.energies ?? { fromMeV: 0, toMeV: scale.energyPeriodMeV, points: 201 };
  if (g.points === 1) return [g.fromMeV];
  return Array.from({ length: g.points }, (_, i) => g.fromMeV + ((g.toMeV - g.fromMeV) * i) / (g.points - 1));
}

/** Poisson kernel and its integral Phi(x) = x + 2 atan2(r sin x, 1 - r cos x). */
const poisson = (x: number, r: number) => (1 - r * r) / (1 - 2 * r * Math.cos(x) + r * r);
const poissonIntegral = (x: number, r: number) => x + 2 * Math.atan2(r * Math.sin(x), 1 - r * Math.cos(x));

/** Bloch DOS per cell per meV (per spin, channels included) and states per cell from 0 to E. */
export function blochDos(
  cell: PeriodicCell,
  scale: Scale,
  energies: number[],
  eta: number,
  kMesh: number,
  progress?: Progress,
): { dos: number[]; count: number[]; perPeriod: number } {
  const r = Math.exp(-eta);
  const dos = new Array(energies.length).fill(0) as number[];
  const count = new Array(energies.length).fill(0) as number[];
  // reciprocal vectors of the supercell
  const [a, b] = cell.A1,
    [c, d] = cell.A2;
  const det = a * d - b * c;
  const B1: [number, number] = [(2 * Math.PI * d) / det, (-2 * Math.PI * c) / det];
  const B2: [number, number] = [(-2 * Math.PI * b) / det, (2 * Math.PI * a) / det];
  const norm = cell.copies / (kMesh * kMesh * cell.primitiveCells);
  const check = new Array(256).fill(0) as number[];
  for (let i = 0; i < kMesh; i++)
    for (let j = 0; j < kMesh; j++) {
      const u = (i + 0.5) / kMesh,
        v = (j + 0.5) / kMesh;
      const { phases } = blochPhases(cell, u * B1[0] + v * B2[0], u * B1[1] + v * B2[1]);
      for (const al of phases) {
        for (let e = 0; e < energies.length; e++) {
          const th = energies[e] / scale.energyScaleMeV;
          dos[e] += (norm * poisson(th + al, r)) / (2 * Math.PI * scale.energyScaleMeV);
          count[e] += (norm * (poissonIntegral(th + al, r) - poissonIntegral(al, r))) / (2 * Math.PI);
        }
        for (let e = 0; e < check.length; e++) check[e] += (norm * poisson((2 * Math.PI * e) / check.length + al, r)) / check.length;
      }
      progress?.tick();
    }
  // periodic trapezoid over one period (spectrally accurate for the smooth kernel)
  const perPeriod = check.reduce((x, y) => x + y, 0);
  return { dos, count, perPeriod };
}

/** d/dtheta arg det(1 - U_eta(theta)) of a closed graph by Richardson-extrapolated central differences. */
export function argDetDerivative(g: NetworkGraph, theta: number, eta: number, progress?: Progress): number {
  const h = Math.max(1e-7, eta * 0.02);
  const diff = (hh: number): number => {
    const plus = new Absorber(g, channelPhases(g, theta + hh, eta), true);
    plus.run(progress ? { afterGroup: () => progress.tick() } : undefined);
    const minus = new Absorber(g, channelPhases(g, theta - hh, eta), true);
    minus.run(progress ? { afterGroup: () => progress.tick() } : undefined);
    const dp = plus.stepDet as Float64Array,
      dm = minus.stepDet as Float64Array;
    let s = 0;
    for (let i = 0; i < dp.length / 2; i++) {
      const ar = dp[2 * i],
        ai = dp[2 * i + 1],
        br = dm[2 * i],
        bi = dm[2 * i + 1];
      // arg(a / b) = arg(a conj(b))
      s += Math.atan2(ai * br - ar * bi, ar * br + ai * bi);
    }
    return s / (2 * hh);
  };
  return (4 * diff(h / 2) - diff(h)) / 3;
}

/** Trace-formula DOS of a closed graph (per meV, whole sample, per spin, one valley). */
export function sampleDos(g: NetworkGraph, scale: Scale, energyMeV: number, eta: number, progress?: Progress): number {
  const th = energyMeV / scale.energyScaleMeV;
  const L = g.channelCount;
  return ((L - 2 * argDetDerivative(g, th, eta, progress)) / (2 * Math.PI * scale.energyScaleMeV)) * g.copies;
}

export function computeDos(net: Network, c: DosComputation, opts: ComputeOptions = {}): DosResult {
  const scale = networkScale(net);
  const energies = energyGrid(c, scale);
  const broadening = c.broadeningMeV ?? scale.energyPeriodMeV / 100;
  const eta = broadening / scale.energyScaleMeV;
  const valleys = net.degeneracy.valley,
    spin = net.degeneracy.spin;
  const geom = sampleGeometryNm(net, scale.periodNm);
  let dK: number[],
    dKp: number[] | null = null,
    nK: number[],
    nKp: number[] | null = null,
    perPeriod: number,
    from: number;
  if (c.source === "bloch") {
    const cell = periodicCell(net, c.flux.numerator, c.flux.denominator);
    const progress = new Progress(c.kMesh * c.kMesh * valleys, opts);
    const a = blochDos(cell, scale, energies, eta, c.kMesh, progress);
    dK = a.dos;
    nK = a.count;
    perPeriod = a.perPeriod;
    if (valleys === 2) {
      const b = blochDos(reverseCell(cell), scale, energies, eta, c.kMesh, progress);
      dKp = b.dos;
      nKp = b.count;
    }
    progress.finish();
    from = 0;
  } else {
    const gK = buildClosedSample(net, scale, c.fieldTesla, 0, "computation.fieldTesla");
    const gKp = valleys === 2 ? reverseGraph(gK) : null;
    let cells = 0;
    for (let n = 0; n < gK.nodeCount; n++) cells += gK.nodeReal[n];
    const progress = new Progress(energies.length * valleys * 4 * gK.schedule.length, opts);
    dK = energies.map((e) => sampleDos(gK, scale, e, eta, progress) / cells);
    if (gKp) dKp = energies.map((e) => sampleDos(gKp, scale, e, eta, progress) / cells);
    const integrate = (d: number[]) => {
      const out = [0];
      for (let i = 1; i < d.length; i++) out.push(out[i - 1] + ((d[i] + d[i - 1]) / 2) * (energies[i] - energies[i - 1]));
      return out;
    };
    nK = integrate(dK);
    nKp = dKp ? integrate(dKp) : null;
    perPeriod = linksPerCell(gK) * gK.copies;
    from = energies[0];
    progress.finish();
  }
  const total = dK.map((x, i) => spin * (x + (dKp ? dKp[i] : 0)));
  const totalCount = nK.map((x, i) => spin * (x + (nKp ? nKp[i] : 0)));
  const cellCm2 = geom.cellAreaNm2 * 1e-14;
  return {
    kind: "dos",
    source: c.source,
    energiesMeV: energies,
    broadeningMeV: broadening,
    energyPeriodMeV: scale.energyPeriodMeV,
    dosPerMeVPerCell: { valleyK: dK, valleyKPrime: dKp, total },
    dosPerMeVPerNm2: total.map((x) => x / geom.cellAreaNm2),
    carrierDensityPerCm2: totalCount.map((x) => x / cellCm2),
    carrierDensityFromMeV: from,
    cellAreaNm2: geom.cellAreaNm2,
    checks: { statesPerCellPerPeriod: perPeriod },
  };
}
