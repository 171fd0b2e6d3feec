/** Bloch spectrum of the periodic network: E_{n,b}(k) = (hbar v / l)(2 pi n - alpha_b(k)). */
import type { Network, SpectrumComputation } from "../schema";
import { getKernels } from "../linalg/kernels";
import { FLUX_QUANTUM_WB } from "../constants";
import { blochMatrix, periodicCell, reverseCell, type PeriodicCell } from "./spectrum-cell";
import { networkScale } from "./common";
import { Progress, type ComputeOptions } from "./progress";

export interface SpectrumResult {
  kind: "spectrum";
  flux: { numerator: number; denominator: number };
  /** Field that gives this flux per plaquette. */
  fieldTesla: number;
  energyPeriodMeV: number;
  /** Energies per period per primitive cell: 3 per channel (triangular), 2 (square). */
  bandsPerPrimitiveCell: number;
  magneticCellPrimitiveCells: number;
  kPointsPerNm: [number, number][];
  /** Where the default path passes its corners (index into kPointsPerNm). */
  pathLabels: { index: number; label: string }[] | null;
  /** Valley K: one sorted array per k point, each reduced into [0, energyPeriodMeV). */
  energiesMeV: number[][];
  /** Valley K' (the time-reversed network), same layout; null when the valley degeneracy is 1. */
  valleyKPrimeEnergiesMeV: number[][] | null;
  checks: { maxUnitarityDefect: number };
}

/** Eigenphases alpha in (-pi, pi] of U(k) and the largest | |lambda| - 1 |. */
export function blochPhases(cell: PeriodicCell, kx: number, ky: number): { phases: number[]; defect: number } {
  const L = cell.nodeCount * cell.slots;
  const ev = getKernels().eigGeneral(blochMatrix(cell, kx, ky), L);
  const phases: number[] = [];
  let defect = 0;
  for (let i = 0; i < L; i++) {
    phases.push(Math.atan2(ev[2 * i + 1], ev[2 * i]));
    defect = Math.max(defect, Math.abs(Math.hypot(ev[2 * i], ev[2 * i + 1]) - 1));
  }
  return { phases, defect };
}

/** Energies reduced into [0, period) for eigenphases alpha: E = es * mod(-alpha, 2 pi). */
export function reducedEnergies(phases: number[], energyScaleMeV: number, copies: number): number[] {
  const out: number[] = [];
  for (const a of phases) {
    let x = -a % (2 * Math.PI);
    if (x < 0) x += 2 * Math.PI;
    if (x >= 2 * Math.PI) x -= 2 * Math.PI;
    for (let c = 0; c < copies; c++) out.push(x * energyScaleMeV);
  }
  return out.sort((p, q) => p - q);
}

/** Default path through the Brillouin zone (units 1/l): Gamma-K-M-Gamma or Gamma-X-M-Gamma. */
export function defaultPath(lattice: Network["lattice"], perSegment: number): { points: [number, number][]; labels: { index: number; label: string }[] } {
  let corners: [number, number][], names: string[];
  if (lattice === "triangular") {
    const b1: [number, number] = [2 * Math.PI, (2 * Math.PI) / Math.sqrt(3)],
      b2: [number, number] = [0, (4 * Math.PI) / Math.sqrt(3)];
    // zone corner K = (b1 + b2) / 3: k.a_j = 2 pi / 3 for all three j, |K| = 4 pi / (3 l); M = b1 / 2,
    // the midpoint of the zone edge that ends at K, |M| = 2 pi / (sqrt3 l) (physics.md section 6)
    const K: [number, number] = [(b1[0] + b2[0]) / 3, (b1[1] + b2[1]) / 3];
    const M: [number, number] = [b1[0] / 2, b1[1] / 2];
    corners = [[0, 0], K, M, [0, 0]];
    names = ["Gamma", "K", "M", "Gamma"];
  } else {
    const g = Math.PI / Math.SQRT2;
    corners = [
      [0, 0],
      [g, 0],
      [g, g],
      [0, 0],
    ];
    names = ["Gamma", "X", "M", "Gamma"];
  }
  const points: [number, number][] = [];
  const labels: { index: number; label: string }[] = [];
  for (let s = 0; s < corners.length - 1; s++) {
    labels.push({ index: points.length, label: names[s] });
    for (let i = 0; i < perSegment; i++) {
      const t = i / perSegment;
      points.push([corners[s][0] + t * (corners[s + 1][0] - corners[s][0]), corners[s][1] + t * (corners[s + 1][1] - corners[s][1])]);
    }
  }
  labels.push({ index: points.length, label: names[names.length - 1] });
  points.push(corners[corners.length - 1]);
  return { points, labels };
}

export function computeSpectrum(net: Network, c: SpectrumComputation, opts: ComputeOptions = {}): SpectrumResult {
  const scale = networkScale(net);
  const cellK = periodicCell(net, c.flux.numerator, c.flux.denominator);
  const cellKp = net.degeneracy.valley === 2 ? reverseCell(cellK) : null;
  const l = scale.periodNm;
  let kl: [number, number][];
  let labels: { index: number; label: string }[] | null = null;
  if (c.kPointsPerNm) kl = c.kPointsPerNm.map(([x, y]) => [x * l, y * l]);
  else {
    const p = defaultPath(net.lattice, c.pathPointsPerSegment);
    kl = p.points;
    labels = p.labels;
  }
  const progress = new Progress(kl.length * (cellKp ? 2 : 1), opts);
  const eK: number[][] = [],
    eKp: number[][] = [];
  let defect = 0;
  for (const [kx, ky] of kl) {
    const a = blochPhases(cellK, kx, ky);
    defect = Math.max(defect, a.defect);
    eK.push(reducedEnergies(a.phases, scale.energyScaleMeV, cellK.copies));
    progress.tick();
    if (cellKp) {
      const b = blochPhases(cellKp, kx, ky);
      defect = Math.max(defect, b.defect);
      eKp.push(reducedEnergies(b.phases, scale.energyScaleMeV, cellKp.copies));
      progress.tick();
    }
  }
  progress.finish();
  const slotsPerPrimitive = (cellK.nodeCount * cellK.slots) / cellK.primitiveCells;
  return {
    kind: "spectrum",
    flux: c.flux,
    fieldTesla: ((c.flux.numerator / c.flux.denominator) * FLUX_QUANTUM_WB) / scale.plaquetteAreaM2,
    energyPeriodMeV: scale.energyPeriodMeV,
    bandsPerPrimitiveCell: slotsPerPrimitive * cellK.copies,
    magneticCellPrimitiveCells: cellK.primitiveCells,
    kPointsPerNm: kl.map(([x, y]) => [x / l, y / l]),
    pathLabels: labels,
    energiesMeV: eK,
    valleyKPrimeEnergiesMeV: cellKp ? eKp : null,
    checks: { maxUnitarityDefect: defect },
  };
}
