/** Cost model: estimated compute-seconds and peak memory of a computation, before running it. */
import { COST_CONSTANTS as K } from "./cost-constants";
import { EngineLimitError } from "./errors";
import { buildSample } from "./network/lattice";
import { CH_LEFT_OUT, type NetworkGraph } from "./network/graph";
import type { ComputeInput, Network } from "./schema";
import { magneticCellSize } from "./compute/spectrum-cell";
import { thermalPlan } from "./compute/quadrature";
import { networkScale } from "./compute/common";
import { BOLTZMANN_J_PER_K, JOULE_PER_MEV } from "./constants";
import type { ConductanceComputation } from "./schema";

/**
 * Energies per sample of a conductance: 1 at T = 0; a fixed rule: n + n/2 (its error estimate)
 * + 1; the adaptive rule: its first panels for resonances of a 64th of the period (the real count
 * follows the narrowest resonance of the sample, found only when it runs), + 1.
 */
export function conductanceEnergyEvaluations(net: Network, c: ConductanceComputation): number {
  if (!(c.temperatureK > 0)) return 1;
  if (c.temperaturePoints !== undefined) return c.temperaturePoints + Math.ceil(c.temperaturePoints / 2) + 1;
  const period = networkScale(net).energyPeriodMeV;
  const kT = (BOLTZMANN_J_PER_K * c.temperatureK) / JOULE_PER_MEV;
  return Math.min(c.temperatureMaxEnergies, thermalPlan(kT, period, period / 64).energies) + 1;
}

export interface CostEstimate {
  computeSeconds: number;
  peakMemoryBytes: number;
  breakdown: { item: string; count: number; workUnits: number; seconds: number }[];
}

interface SweepCost { work: number; workWithoutReflection: number; peakMatrixBytes: number; compactMatrixBytes: number; graphBytes: number }

/** Replays an absorption schedule with integer bookkeeping only. */
export function simulateSweep(g: NetworkGraph, skipKind = -1): { work: number; maxRows: number; maxCols: number } {
  const absorbed = new Uint8Array(g.nodeCount);
  let nr = 0, nc = 0, work = 0, maxR = 0, maxC = 0;
  for (const group of g.schedule) {
    let p = 0, q = 0, nx = 0, ny = 0;
    for (const m of group) {
      for (let s = g.slotOffset[m]; s < g.slotOffset[m] + g.slotCount[m]; s++) {
        const from = g.chFromNode[g.inChannel[s]];
        if (from >= 0 && absorbed[from]) p++; else nx++;
        const out = g.outChannel[s], to = g.chToNode[out];
        if (to >= 0 && absorbed[to]) q++; else if (g.chKind[out] !== skipKind) ny++;
      }
    }
    work += q * nr * nc + q * p * nc + ny * p * nc + nr * q * nx + 4 * q * q * (p + nx);
    maxR = Math.max(maxR, nr + ny); maxC = Math.max(maxC, nc + nx);
    nr += ny - p; nc += nx - q;
    for (const m of group) absorbed[m] = 1;
  }
  return { work, maxRows: maxR, maxCols: maxC };
}

/** Cost of one sweep through the sample (one valley, one energy), extrapolated from short pieces. */
function sweepCost(net: Network, mode: "leads" | "ring"): SweepCost {
  const C = net.size.columns;
  const small = Math.min(C, 6), smaller = Math.min(C, 3);
  const gA = buildSample(net, { mode, fluxPerPlaquette: 0, sample: 0, columns: small });
  const a = simulateSweep(gA), a2 = simulateSweep(gA, CH_LEFT_OUT);
  let work = a.work, work2 = a2.work;
  if (C > small) {
    const gB = buildSample(net, { mode, fluxPerPlaquette: 0, sample: 0, columns: smaller });
    const b = simulateSweep(gB), b2 = simulateSweep(gB, CH_LEFT_OUT);
    work = a.work + ((a.work - b.work) / (small - smaller)) * (C - small);
    work2 = a2.work + ((a2.work - b2.work) / (small - smaller)) * (C - small);
  }
  const perColumnChannels = gA.channelCount / small, perColumnNodes = gA.nodeCount / small;
  return {
    work,
    workWithoutReflection: work2,
    peakMatrixBytes: 16 * (a.maxRows * 1.5 + 16) * (a.maxCols * 1.5 + 16),
    compactMatrixBytes: 16 * a.maxRows * a.maxCols,
    graphBytes: C * (perColumnChannels * K.graphBytesPerChannel + perColumnNodes * K.graphBytesPerNode),
  };
}

export function estimateCost(input: ComputeInput): CostEstimate {
  const { network: net, computation: c } = input;
  const valleys = net.degeneracy.valley;
  const breakdown: CostEstimate["breakdown"] = [];
  let peak = K.baselineBytes;
  const add = (item: string, count: number, unitWork: number, rate: number) => {
    const workUnits = count * unitWork;
    breakdown.push({ item, count, workUnits, seconds: workUnits / rate });
  };
  switch (c.kind) {
    case "conductance": {
      const s = sweepCost(net, "leads");
      const points = conductanceEnergyEvaluations(net, c);
      const samples = c.ensemble?.samples ?? 1;
      add("slice composition, valley K with reflection (one energy)", samples * points, s.work, K.sliceMulAddsPerSecond);
      if (valleys === 2) add("slice composition, valley K' transmission only (one energy)", samples * points, s.workWithoutReflection, K.sliceMulAddsPerSecond);
      const nIn = net.size.rows * 2;
      add("transmission eigenvalues", samples * valleys, K.eigHermitianFactor * nIn ** 3, K.eigenMulAddsPerSecond);
      peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes;
      break;
    }
    case "localization": {
      const s = sweepCost(net, "leads");
      add("slice composition, transmission only (one valley, one sample)", c.ensemble.samples * valleys, s.workWithoutReflection, K.sliceMulAddsPerSecond);
      peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes;
      break;
    }
    case "dos": {
      const points = c.energies?.points ?? 200;
      if (c.source === "sample") {
        const s = sweepCost(net, "ring");
        add("closed-network determinant sweeps (one valley, one energy)", 4 * points * valleys, s.work, K.sliceMulAddsPerSecond);
        peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes + 64 * 1024;
      } else {
        const n = blochSize(net, c.flux.denominator);
        const kpts = c.kMesh * c.kMesh;
        add("Bloch eigenproblems", kpts * valleys, K.eigGeneralFactor * n ** 3, K.eigenMulAddsPerSecond);
        add("broadened sum", kpts * valleys * n * points, 0.05, K.sliceMulAddsPerSecond);
        peak += 16 * 6 * n * n + 8 * kpts * n * valleys + 8 * points * 8;
      }
      break;
    }
    case "spectrum": {
      const n = blochSize(net, c.flux.denominator);
      const kpts = c.kPointsPerNm ? c.kPointsPerNm.length : 3 * c.pathPointsPerSegment + 1;
      add("Bloch eigenproblems", kpts, K.eigGeneralFactor * n ** 3, K.eigenMulAddsPerSecond);
      peak += 16 * 6 * n * n + 8 * kpts * n;
      break;
    }
    case "ldos": {
      const s = sweepCost(net, "ring");
      const cuts = 2 * net.size.columns;
      const frontier = Math.sqrt(s.peakMatrixBytes / 16) / 1.5;
      // backward sweep twice (checkpoints), forward sweep once, one inverse per cut
      add("closed-network sweeps (one valley)", 3 * valleys, s.work, K.sliceMulAddsPerSecond);
      add("per-cut resolvent inverses", cuts * valleys, (8 / 3) * frontier ** 3, K.sliceMulAddsPerSecond);
      const stored = Math.ceil(Math.sqrt(cuts)) * 2 + 2;
      // checkpoints are compact copies; two working matrices; the per-cut products and inverse
      peak += stored * s.compactMatrixBytes + 2 * s.peakMatrixBytes + 4 * s.compactMatrixBytes + 2 * s.graphBytes + 8 * 8 * 3 * net.size.columns * net.size.rows;
      break;
    }
  }
  const computeSeconds = K.baseSeconds + breakdown.reduce((a, b) => a + b.seconds, 0);
  return { computeSeconds, peakMemoryBytes: Math.round(peak), breakdown };
}

function blochSize(net: Network, denominator: number): number {
  const cell = magneticCellSize(net.lattice, denominator);
  const slots = net.lattice === "triangular" ? 3 * ("matrix" in net.node && (net.node as { matrix: unknown[] }).matrix.length === 6 ? 2 : 1) : 4;
  return cell * slots;
}

/** Refuse up front a computation whose estimated peak memory exceeds the limit (2 GB) or whose
 * estimated compute time exceeds the engine's limit (6 compute-hours, the largest plan's cap). */
export function checkResourceLimits(input: ComputeInput): CostEstimate {
  const est = estimateCost(input);
  if (est.peakMemoryBytes > K.memoryLimitBytes) {
    const gb = (b: number) => (b / 1024 ** 3).toFixed(2);
    throw new EngineLimitError(
      `the ${input.computation.kind} computation on a ${input.network.size.columns} x ${input.network.size.rows} ${input.network.lattice} network needs an estimated ${gb(est.peakMemoryBytes)} GB of memory, over the ${gb(K.memoryLimitBytes)} GB limit per computation; use a smaller network`,
      est.peakMemoryBytes,
      K.memoryLimitBytes,
    );
  }
  if (est.computeSeconds > K.computeSecondsLimit) {
    const h = (x: number) => (x / 3600).toPrecision(3);
    throw new EngineLimitError(
      `the ${input.computation.kind} computation on a ${input.network.size.columns} x ${input.network.size.rows} ${input.network.lattice} network needs an estimated ${Math.round(est.computeSeconds).toLocaleString("en-US")} compute-seconds (${h(est.computeSeconds)} compute-hours), over the limit of ${h(K.computeSecondsLimit)} compute-hours per computation; use a smaller network or fewer points`,
      est.peakMemoryBytes,
      K.memoryLimitBytes,
      { estimatedComputeSeconds: est.computeSeconds, limitComputeSeconds: K.computeSecondsLimit },
    );
  }
  return est;
}
