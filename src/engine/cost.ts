/**
 * Cost model: estimated compute-seconds (CPU time on one core) and peak memory of a computation,
 * before running it. The time is a sum of modelled pieces, each with figures measured on the
 * development machine (src/engine/cost-constants.ts, calibrated by scripts/bench-cost.ts):
 * - slice composition: the absorption schedule of a 3- and a 6-column piece of the sample is
 *   replayed with integer bookkeeping, group by group, exactly as scattering/absorber.ts splits
 *   the work (rank-q update and product to the kernel backend above its size thresholds, the rest
 *   in TypeScript), with per-group and per-slot bookkeeping; extrapolated linearly in columns;
 * - the kernels' own figures per backend (per call, per entry, per multiply-add), so that the
 *   rate grows with the frontier size and saturates, as the native BLAS rate does;
 * - per-node graph building, per-evaluation bookkeeping, per-k-point Bloch overhead;
 * - thermal averages: the adaptive rule's energies follow the narrowest resonance, estimated from
 *   the classical escape rate of the sample (a cheap power iteration on a small piece), and the
 *   resonance search itself.
 * The figures are per backend: native OpenBLAS (what the worker runs) or the TypeScript kernels,
 * chosen from getKernels().name, or passed in; where no backend was selected (the browser, which
 * only estimates) the native figures are used.
 */
import { COST_CONSTANTS as K, KERNEL_FIGURES, type CostBackend, type KernelFigures } from "./cost-constants";
import { EngineLimitError } from "./errors";
import { buildSample } from "./network/lattice";
import { buildSchedule } from "./network/schedule";
import { CH_LEFT_IN, CH_LEFT_OUT, CH_LINK, reverseGraph, type NetworkGraph } from "./network/graph";
import type { ComputeInput, Network } from "./schema";
import { gcd, magneticCellSize } from "./compute/spectrum-cell";
import { thermalPlan } from "./compute/quadrature";
import { networkScale } from "./compute/common";
import { BOLTZMANN_J_PER_K, JOULE_PER_MEV } from "./constants";
import type { ConductanceComputation } from "./schema";
import { getKernels } from "./linalg/kernels";

export type { CostBackend } from "./cost-constants";

export interface CostOptions {
  /** Kernel backend whose figures to use (default: the selected kernels, see costBackend). */
  backend?: CostBackend;
}

/**
 * The backend the estimate is for: the kernels selected in this process (getKernels().name:
 * "ts" gives the TypeScript figures, anything else the native ones). In a browser no backend is
 * selected (the kernels module keeps its TypeScript default) and the computation runs in the
 * worker on the native kernels, so the native figures are used there.
 */
export function costBackend(): CostBackend {
  const g = globalThis as { window?: unknown; document?: unknown };
  if (typeof g.window !== "undefined" && typeof g.document !== "undefined") return "openblas";
  return getKernels().name === "ts" ? "ts" : "openblas";
}

export interface CostEstimate {
  computeSeconds: number;
  peakMemoryBytes: number;
  breakdown: { item: string; count: number; workUnits: number; seconds: number }[];
}

/** Per-sweep figures (seconds for the chosen backend; work in complex multiply-adds). */
export interface SweepProfile {
  /** Multiply-adds of the dense updates (the rank-q products and the new rows and columns). */
  work: number;
  seconds: number;
  /** The terms of `seconds`: kernel seconds (with the in-situ factors; before them, the calls
   * that went to the native backend and those that stayed in the TypeScript kernels), groups,
   * node slots, multiply-adds of the scalar loops and of the q x q systems (scripts/bench-cost.ts
   * fits the absorber's figures on these). */
  kernelSeconds: number;
  nativeCallSeconds: number;
  tsCallSeconds: number;
  groups: number;
  slots: number;
  scalarMulAdds: number;
  smallMulAdds: number;
  maxRows: number;
  maxCols: number;
  /** LDOS: seconds of the per-partition blocks (read-out, two products, two inverses) and partitions. */
  partSeconds: number;
  parts: number;
}

/**
 * Replays an absorption order with integer bookkeeping only: the work of every group and its
 * time on `backend`, split as scattering/absorber.ts splits it (the rank-q update S += X W and
 * the product G S[rho, :] go to the backend above the absorber's size thresholds, else to the
 * TypeScript kernels; new rows and columns and the q x q system are TypeScript loops).
 * `trackDeterminant` adds the small determinant per group; `parts` adds LDOS partition blocks;
 * `figures` replaces the kernel figures (scripts/bench-cost.ts --calibrate).
 */
export function simulateSweep(
  g: NetworkGraph,
  skipKind = -1,
  backend: CostBackend = "openblas",
  opts: { order?: Int32Array[]; trackDeterminant?: boolean; parts?: boolean; figures?: Record<CostBackend, KernelFigures> } = {},
): SweepProfile {
  const figures = opts.figures ?? KERNEL_FIGURES;
  const F = figures[backend],
    T = figures.ts;
  const order = opts.order ?? g.schedule;
  const absorbed = new Uint8Array(g.nodeCount);
  let nr = 0,
    nc = 0,
    work = 0,
    maxR = 0,
    maxC = 0,
    onBackend = 0,
    onTs = 0,
    totalSlots = 0,
    scalar = 0,
    small = 0,
    partSeconds = 0,
    parts = 0;
  const big = backend !== "ts";
  for (let t = 0; t < order.length; t++) {
    const group = order[t];
    let p = 0,
      q = 0,
      nx = 0,
      ny = 0,
      slots = 0;
    for (const m of group) {
      for (let s = g.slotOffset[m]; s < g.slotOffset[m] + g.slotCount[m]; s++) {
        slots++;
        const from = g.chFromNode[g.inChannel[s]];
        if (from >= 0 && absorbed[from]) p++;
        else nx++;
        const out = g.outChannel[s],
          to = g.chToNode[out];
        if (to >= 0 && absorbed[to]) q++;
        else if (g.chKind[out] !== skipKind) ny++;
      }
    }
    totalSlots += slots;
    if (q > 0 && p > 0 && nc > 0) {
      const bigProduct = big && nc > K.absorberBigProductColumns,
        bigUpdate = big && nr * nc > K.absorberBigUpdateEntries;
      const fm = bigProduct ? F : T,
        fu = bigUpdate ? F : T;
      const product = fm.matmulCallSeconds + q * p * nc * fm.matmulMulAddSeconds;
      const update = fu.gemmCallSeconds + nr * nc * (fu.gemmEntrySeconds + q * fu.gemmMulAddSeconds);
      if (bigProduct) onBackend += product;
      else onTs += product;
      if (bigUpdate) onBackend += update;
      else onTs += update;
    }
    scalar += nx * nr * q + ny * p * (nc + nx) + 2 * q * nr;
    small += q * q * (q + 2 * p + nx) + p * q * nx + (opts.trackDeterminant ? q * q * q : 0);
    work += q * nr * nc + q * p * nc + ny * p * nc + nr * q * nx + 4 * q * q * (p + nx);
    maxR = Math.max(maxR, nr + ny);
    maxC = Math.max(maxC, nc + nx);
    nr += ny - p;
    nc += nx - q;
    for (const m of group) absorbed[m] = 1;
    if (opts.parts && t + 1 < order.length && g.nodeX[group[0]] !== g.nodeX[order[t + 1][0]]) {
      // compute/ldos.ts at a partition: S_A and S_B read entry by entry, then for both orders
      // (1 - X Y)^-1 with X Y an n x m x n product (a full-size product: the gemm figures)
      parts++;
      partSeconds +=
        2 * nr * nc * K.entryReadSeconds +
        2 * F.gemmCallSeconds +
        (nr * nr + nc * nc) * F.gemmEntrySeconds +
        (nr * nc * nr + nc * nr * nc) * F.gemmMulAddSeconds +
        2 * F.inverseCallSeconds +
        (nr ** 3 + nc ** 3) * F.inverseCubeSeconds;
    }
  }
  const kernelSeconds = onBackend * F.absorberKernelFactor + onTs * T.absorberKernelFactor;
  const seconds =
    kernelSeconds +
    order.length * K.absorberGroupSeconds +
    totalSlots * K.absorberSlotSeconds +
    scalar * K.absorberScalarSeconds +
    small * K.absorberSmallSeconds;
  return {
    work,
    seconds,
    kernelSeconds,
    nativeCallSeconds: onBackend,
    tsCallSeconds: onTs,
    groups: order.length,
    slots: totalSlots,
    scalarMulAdds: scalar,
    smallMulAdds: small,
    maxRows: maxR,
    maxCols: maxC,
    partSeconds,
    parts,
  };
}

interface SweepCost {
  /** One sweep of valley K (all rows) and of valley K' (all rows or without the reflection rows). */
  sweepK: SweepProfile;
  sweepKp: SweepProfile;
  /** LDOS: the backward sweep of each valley. */
  backK: SweepProfile | null;
  backKp: SweepProfile | null;
  nodes: number;
  channels: number;
  leadChannels: number;
  slotsPerNode: number;
  peakMatrixBytes: number;
  compactMatrixBytes: number;
  graphBytes: number;
}

type SweepKind = "conductance" | "localization" | "closed" | "ldos";

function extrapolate(a: SweepProfile, b: SweepProfile | null, small: number, smaller: number, C: number): SweepProfile {
  if (!b) return a;
  const x = (u: number, v: number) => u + ((u - v) / (small - smaller)) * (C - small);
  return {
    work: x(a.work, b.work),
    seconds: x(a.seconds, b.seconds),
    kernelSeconds: x(a.kernelSeconds, b.kernelSeconds),
    nativeCallSeconds: x(a.nativeCallSeconds, b.nativeCallSeconds),
    tsCallSeconds: x(a.tsCallSeconds, b.tsCallSeconds),
    groups: x(a.groups, b.groups),
    slots: x(a.slots, b.slots),
    scalarMulAdds: x(a.scalarMulAdds, b.scalarMulAdds),
    smallMulAdds: x(a.smallMulAdds, b.smallMulAdds),
    maxRows: a.maxRows,
    maxCols: a.maxCols,
    partSeconds: x(a.partSeconds, b.partSeconds),
    parts: x(a.parts, b.parts),
  };
}

/** Cost of one sweep through the sample (one valley, one energy), extrapolated from short pieces. */
function sweepCost(net: Network, kind: SweepKind, backend: CostBackend): SweepCost {
  const mode = kind === "closed" || kind === "ldos" ? "ring" : "leads";
  const C = net.size.columns;
  // a closed square sample needs an even number of columns (compute/closed.ts)
  const small = Math.min(C, 6),
    smaller = Math.min(C, mode === "ring" && net.lattice === "square" ? 4 : 3);
  const pieces = [buildSample(net, { mode, fluxPerPlaquette: 0, sample: 0, columns: small })];
  if (C > small) pieces.push(buildSample(net, { mode, fluxPerPlaquette: 0, sample: 0, columns: smaller }));
  const gA = pieces[0];
  // memory from the piece's default schedule (the estimate of peak memory is unchanged)
  const mem = simulateSweep(gA, -1, backend);
  const profiles = pieces.map((gK) => {
    const gKp = reverseGraph(gK);
    if (kind === "localization") {
      buildSchedule(gK, undefined, "columns");
      buildSchedule(gKp, undefined, "columns");
    }
    switch (kind) {
      case "conductance":
        return { k: simulateSweep(gK, -1, backend), kp: simulateSweep(gKp, CH_LEFT_OUT, backend), bk: null, bkp: null };
      case "localization":
        return { k: simulateSweep(gK, CH_LEFT_OUT, backend), kp: simulateSweep(gKp, CH_LEFT_OUT, backend), bk: null, bkp: null };
      case "closed":
        return {
          k: simulateSweep(gK, -1, backend, { trackDeterminant: true }),
          kp: simulateSweep(gKp, -1, backend, { trackDeterminant: true }),
          bk: null,
          bkp: null,
        };
      case "ldos":
        return {
          k: simulateSweep(gK, -1, backend, { parts: true }),
          kp: simulateSweep(gKp, -1, backend, { parts: true }),
          bk: simulateSweep(gK, -1, backend, { order: gK.schedule.slice().reverse() }),
          bkp: simulateSweep(gKp, -1, backend, { order: gKp.schedule.slice().reverse() }),
        };
    }
  });
  const [pa, pb] = [profiles[0], profiles[1] ?? null];
  const ex = (f: (p: (typeof profiles)[number]) => SweepProfile | null) => {
    const a = f(pa);
    return a ? extrapolate(a, pb ? f(pb) : null, small, smaller, C) : null;
  };
  const perColumnChannels = gA.channelCount / small,
    perColumnNodes = gA.nodeCount / small;
  let leads = 0,
    slots = 0;
  for (let c = 0; c < gA.channelCount; c++) if (gA.chKind[c] === CH_LEFT_IN) leads++;
  for (let m = 0; m < gA.nodeCount; m++) slots += gA.slotCount[m];
  return {
    sweepK: ex((p) => p.k) as SweepProfile,
    sweepKp: ex((p) => p.kp) as SweepProfile,
    backK: ex((p) => p.bk),
    backKp: ex((p) => p.bkp),
    nodes: perColumnNodes * C,
    channels: perColumnChannels * C,
    leadChannels: leads,
    slotsPerNode: slots / Math.max(1, gA.nodeCount),
    peakMatrixBytes: 16 * (mem.maxRows * 1.5 + 16) * (mem.maxCols * 1.5 + 16),
    compactMatrixBytes: 16 * mem.maxRows * mem.maxCols,
    graphBytes: C * (perColumnChannels * K.graphBytesPerChannel + perColumnNodes * K.graphBytesPerNode),
  };
}

/**
 * Slowest decay rate per link traversal of the classical probabilities |S|^2 of a sample with
 * leads (power iteration from the uniform distribution on the links; the leads absorb).
 */
export function classicalDecayRate(g: NetworkGraph, maxSteps = 20000): number {
  const n = g.channelCount;
  let p = new Float64Array(n),
    np = new Float64Array(n);
  for (let c = 0; c < n; c++) if (g.chKind[c] === CH_LINK) p[c] = 1;
  const w = new Float64Array(g.matrices.length / 2);
  for (let i = 0; i < w.length; i++) w[i] = g.matrices[2 * i] ** 2 + g.matrices[2 * i + 1] ** 2;
  let logMass = 0,
    prevLog = 0,
    prevRate = Infinity;
  const every = 25;
  for (let step = 1; step <= maxSteps; step++) {
    np.fill(0);
    for (let m = 0; m < g.nodeCount; m++) {
      const k = g.slotCount[m],
        so = g.slotOffset[m],
        mo = g.matrixOffset[m];
      for (let o = 0; o < k; o++) {
        const out = g.outChannel[so + o];
        if (g.chKind[out] !== CH_LINK) continue;
        let a = 0;
        for (let s = 0; s < k; s++) {
          const inc = g.inChannel[so + s];
          if (g.chKind[inc] === CH_LINK) a += w[mo + o * k + s] * p[inc];
        }
        np[out] = a;
      }
    }
    let mass = 0;
    for (let c = 0; c < n; c++) mass += np[c];
    if (!(mass > 1e-300)) return Infinity;
    for (let c = 0; c < n; c++) np[c] /= mass;
    [p, np] = [np, p];
    logMass += Math.log(mass);
    if (step % every === 0) {
      const rate = (prevLog - logMass) / every;
      prevLog = logMass;
      if (step >= 4 * every && Math.abs(rate - prevRate) <= 1e-3 * rate) return Math.max(rate, 0);
      prevRate = rate;
    }
  }
  return Math.max(prevRate, 0);
}

/**
 * Estimated half-width (link phase, radians) of the narrowest resonance of a sample with leads,
 * which sets the adaptive thermal rule's first panels (compute/resonance.ts finds the true one
 * only when the computation runs): resonanceClassicalRatio times half the classical decay rate,
 * from pieces of at most 16 columns and 16 rows; for longer samples the rate is extrapolated
 * as 1 / (columns + d)^2 (diffusion between absorbing leads), d from pieces of 8 and 16 columns.
 */
export function estimatedResonanceWidth(net: Network): number {
  const key = JSON.stringify(net);
  const known = widthMemo.get(key);
  if (known !== undefined) return known;
  const C = net.size.columns,
    R = Math.min(net.size.rows, 16);
  const rate = (columns: number) => classicalDecayRate(buildSample(net, { mode: "leads", fluxPerPlaquette: 0, sample: 0, columns, rows: R }));
  let r: number;
  if (C <= 16) r = rate(C);
  else {
    const r16 = rate(16),
      r8 = rate(8);
    const rho = Math.sqrt(r8 / r16);
    const d = rho > 1.0001 ? Math.min(8, Math.max(0, (16 - 8 * rho) / (rho - 1))) : 0;
    r = r16 * ((16 + d) / (C + d)) ** 2;
  }
  const width = Math.max(1e-12, (K.resonanceClassicalRatio * r) / 2);
  // a few networks remembered: forms, sweeps and compute() itself estimate the same one again
  if (widthMemo.size >= 16) widthMemo.delete(widthMemo.keys().next().value as string);
  widthMemo.set(key, width);
  return width;
}
const widthMemo = new Map<string, number>();

/**
 * Energies per sample of a conductance: 1 at T = 0; a fixed rule: n + max(2, ceil(n/2)) (its
 * error estimate) + 1; the adaptive rule: its first panels for the estimated narrowest resonance
 * (panels 8 half-widths wide), times the refinements, at most temperatureMaxEnergies, + 1. The
 * + 1 is the evaluation at the chemical potential (eigenvalues, noise).
 */
export function conductanceEnergyEvaluations(net: Network, c: ConductanceComputation, widthRad?: number): number {
  if (!(c.temperatureK > 0)) return 1;
  if (c.temperaturePoints !== undefined) return c.temperaturePoints + Math.max(2, Math.ceil(c.temperaturePoints / 2)) + 1;
  const scale = networkScale(net);
  const kT = (BOLTZMANN_J_PER_K * c.temperatureK) / JOULE_PER_MEV;
  const width = widthRad ?? estimatedResonanceWidth(net);
  const plan = thermalPlan(kT, scale.energyPeriodMeV, 8 * width * scale.energyScaleMeV);
  return Math.min(c.temperatureMaxEnergies, Math.round(plan.energies * K.adaptiveRefinementFactor)) + 1;
}

/** Seconds of the narrowest-resonance search of one sample (compute/resonance.ts). */
function resonanceSeconds(s: SweepCost, widthRad: number): number {
  const work = s.nodes * s.slotsPerNode * s.slotsPerNode;
  const maxSteps = Math.max(50, Math.min(100000, Math.floor(K.resonanceWorkBudget / Math.max(1, work))));
  const steps = Math.min(maxSteps, Math.max(20, Math.ceil(40 / widthRad)));
  return steps * work * K.resonanceUnitSeconds;
}

/** One Bloch k point: U(k) built, its general eigenproblem, the eigenphases. */
function blochSeconds(F: KernelFigures, n: number): number {
  return F.blochPointSeconds + F.blochSquareSeconds * n * n + F.blochCubeSeconds * n ** 3;
}

export function estimateCost(input: ComputeInput, options: CostOptions = {}): CostEstimate {
  const backend = options.backend ?? costBackend();
  const F = KERNEL_FIGURES[backend];
  const { network: net, computation: c } = input;
  const valleys = net.degeneracy.valley;
  const breakdown: CostEstimate["breakdown"] = [];
  let peak = K.baselineBytes;
  const add = (item: string, count: number, workUnits: number, secondsEach: number) => {
    breakdown.push({ item, count, workUnits: count * workUnits, seconds: count * secondsEach });
  };
  const graphs = (s: SweepCost, samples: number, extraSchedules = 0) => {
    add(
      "sample graphs with schedules (per sample)",
      samples,
      s.nodes,
      s.nodes * (K.graphNodeSeconds + (valleys - 1) * K.reverseNodeSeconds + extraSchedules * valleys * K.scheduleNodeSeconds),
    );
  };
  switch (c.kind) {
    case "conductance": {
      const s = sweepCost(net, "conductance", backend);
      const width = c.temperatureK > 0 && c.temperaturePoints === undefined ? estimatedResonanceWidth(net) : undefined;
      const points = conductanceEnergyEvaluations(net, c, width);
      const samples = c.ensemble?.samples ?? 1;
      const nIn = s.leadChannels;
      graphs(s, samples);
      add("slice composition, valley K with reflection (one energy)", samples * points, s.sweepK.work, s.sweepK.seconds);
      if (valleys === 2) add("slice composition, valley K' transmission only (one energy)", samples * points, s.sweepKp.work, s.sweepKp.seconds);
      // link phases and lead lists per channel; t, the R + T = N check and t^H t per evaluation
      const perEval = s.channels * K.evaluationChannelSeconds + 4 * nIn * nIn * K.entryReadSeconds + (nIn ** 3 / 2) * K.scalarSeconds;
      add("per-evaluation bookkeeping (channels, t, t^H t)", samples * points * valleys, nIn ** 3 / 2, perEval);
      add("transmission eigenvalues (first sample)", valleys, nIn ** 3, F.eigHermitianCallSeconds + nIn ** 3 * F.eigHermitianCubeSeconds);
      if (width !== undefined) add("narrowest-resonance search (per sample)", samples, s.nodes, resonanceSeconds(s, width));
      peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes;
      break;
    }
    case "hallBar": {
      // Both valleys with every lead row kept (the side contacts' channels stay in the frontier
      // until the end): the conductance sweep of valley K with reflection, for each valley.
      const s = sweepCost(net, "conductance", backend);
      const width = c.temperatureK > 0 && c.temperaturePoints === undefined ? estimatedResonanceWidth(net) : undefined;
      const points = conductanceEnergyEvaluations(net, c as unknown as ConductanceComputation, width);
      const samples = c.ensemble?.samples ?? 1;
      const nIn = s.leadChannels + 2 * net.size.columns;
      graphs(s, samples, 1);
      add(
        "slice composition with every terminal's rows (per valley, one energy)",
        samples * points * valleys,
        s.sweepK.work,
        s.sweepK.seconds * K.hallBarSweepFactor,
      );
      add("terminal transmissions T_ij (per valley and energy)", samples * points * valleys, nIn * nIn, nIn * nIn * K.entryReadSeconds);
      if (width !== undefined) add("narrowest-resonance search (per sample)", samples, s.nodes, resonanceSeconds(s, width));
      peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes;
      break;
    }
    case "localization": {
      const s = sweepCost(net, "localization", backend);
      const samples = c.ensemble.samples;
      graphs(s, samples, 1);
      add("slice composition, transmission only (valley K, one sample)", samples, s.sweepK.work, s.sweepK.seconds);
      if (valleys === 2) add("slice composition, transmission only (valley K', one sample)", samples, s.sweepKp.work, s.sweepKp.seconds);
      // T read after every column: every row against every injected channel
      const nIn = s.leadChannels;
      add(
        "T read at every column",
        samples * valleys,
        net.size.columns * s.sweepK.maxRows * nIn,
        net.size.columns * s.sweepK.maxRows * nIn * K.entryReadSeconds,
      );
      peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes;
      break;
    }
    case "dos": {
      const points = c.energies?.points ?? 201; // compute/dos.ts energyGrid: one period in 201 points
      if (c.source === "sample") {
        const s = sweepCost(net, "closed", backend);
        graphs(s, 1);
        add(
          "closed-network determinant sweeps, valley K (4 per energy)",
          4 * points,
          s.sweepK.work,
          s.sweepK.seconds + s.channels * K.evaluationChannelSeconds,
        );
        if (valleys === 2)
          add(
            "closed-network determinant sweeps, valley K' (4 per energy)",
            4 * points,
            s.sweepKp.work,
            s.sweepKp.seconds + s.channels * K.evaluationChannelSeconds,
          );
        peak += 2 * s.peakMatrixBytes + 2 * s.graphBytes + 64 * 1024;
      } else {
        const n = blochSize(net, c.flux.denominator, c.flux.numerator),
          nm = blochSize(net, c.flux.denominator);
        const kpts = c.kMesh * c.kMesh;
        add("Bloch eigenproblems (U(k) built, eigenphases)", kpts * valleys, n ** 3, blochSeconds(F, n));
        add("broadened sum and sum-rule check (per k point)", kpts * valleys, n * points, n * (points * K.blochPhaseEnergySeconds + K.blochPhaseCheckSeconds));
        peak += 16 * 6 * nm * nm + 8 * kpts * nm * valleys + 8 * (c.energies?.points ?? 200) * 8;
      }
      break;
    }
    case "spectrum": {
      const n = blochSize(net, c.flux.denominator, c.flux.numerator),
        nm = blochSize(net, c.flux.denominator);
      const kpts = c.kPointsPerNm ? c.kPointsPerNm.length : 3 * c.pathPointsPerSegment + 1;
      add("Bloch eigenproblems (U(k) built, eigenphases)", kpts * valleys, n ** 3, blochSeconds(F, n));
      peak += 16 * 6 * nm * nm + 8 * kpts * nm;
      break;
    }
    case "ldos": {
      const s = sweepCost(net, "ldos", backend);
      graphs(s, 1);
      const sweeps = [
        [s.sweepK, s.backK as SweepProfile],
        [s.sweepKp, s.backKp as SweepProfile],
      ].slice(0, valleys);
      sweeps.forEach(([fwd, back], v) => {
        const name = v === 0 ? "K" : "K'";
        // backward sweep twice (checkpoints, then each segment again), forward sweep once
        add(
          `closed-network sweeps, valley ${name} (forward once, backward twice)`,
          1,
          fwd.work + 2 * back.work,
          fwd.seconds + 2 * back.seconds + 3 * s.channels * K.evaluationChannelSeconds,
        );
        add(`per-partition resolvent blocks, valley ${name}`, fwd.parts, 0, fwd.parts > 0 ? fwd.partSeconds / fwd.parts : 0);
        // checkpoint copies (channel maps of the whole graph): one per partition, three per segment
        add(`checkpoint copies, valley ${name}`, fwd.parts + 3 * Math.sqrt(fwd.parts), s.channels, s.channels * K.cloneChannelSeconds);
      });
      const cuts = 2 * net.size.columns;
      const stored = Math.ceil(Math.sqrt(cuts)) * 2 + 2;
      // checkpoints are compact copies; two working matrices; the per-cut products and inverse
      peak +=
        stored * s.compactMatrixBytes + 2 * s.peakMatrixBytes + 4 * s.compactMatrixBytes + 2 * s.graphBytes + 8 * 8 * 3 * net.size.columns * net.size.rows;
      break;
    }
  }
  const computeSeconds = K.baseSeconds + breakdown.reduce((a, b) => a + b.seconds, 0);
  return { computeSeconds, peakMemoryBytes: Math.round(peak), breakdown };
}

/**
 * Size of the Bloch operator: slots per node times nodes of the magnetic cell. With the numerator,
 * the cell compute/spectrum-cell.ts builds (the fraction reduced, one cell at flux 0); without,
 * the denominator as given (what the memory estimate has always used, kept unchanged).
 */
function blochSize(net: Network, denominator: number, numerator?: number): number {
  const d = numerator === undefined ? 1 : gcd(numerator, denominator) || 1;
  const cell = numerator === 0 ? 1 : magneticCellSize(net.lattice, denominator / d);
  const slots = net.lattice === "triangular" ? 3 * ("matrix" in net.node && (net.node as { matrix: unknown[] }).matrix.length === 6 ? 2 : 1) : 4;
  return cell * slots;
}

/** Refuse up front a computation whose estimated peak memory exceeds the limit (2 GB) or whose
 * estimated compute time exceeds the engine's limit (6 compute-hours, the largest plan's cap). */
export function checkResourceLimits(input: ComputeInput, options: CostOptions = {}): CostEstimate {
  const est = estimateCost(input, options);
  if (est.peakMemoryBytes > K.memoryLimitBytes) {
    const gb = (b: number) => (b / 1024 ** 3).toFixed(2);
    throw new EngineLimitError(
      `the ${input.computation.kind} computation on a ${input.network.size.columns} x ${input.network.size.rows} ${input.network.lattice} network ` +
        `needs an estimated ${gb(est.peakMemoryBytes)} GB of memory, ` +
        `over the ${gb(K.memoryLimitBytes)} GB limit per computation; use a smaller network`,
      est.peakMemoryBytes,
      K.memoryLimitBytes,
    );
  }
  if (est.computeSeconds > K.computeSecondsLimit) {
    const h = (x: number) => (x / 3600).toPrecision(3);
    throw new EngineLimitError(
      `the ${input.computation.kind} computation on a ${input.network.size.columns} x ${input.network.size.rows} ${input.network.lattice} network ` +
        `needs an estimated ${Math.round(est.computeSeconds).toLocaleString("en-US")} compute-seconds ` +
        `(${h(est.computeSeconds)} compute-hours), ` +
        `over the limit of ${h(K.computeSecondsLimit)} compute-hours per computation` +
        `; use a smaller network or fewer points`,
      est.peakMemoryBytes,
      K.memoryLimitBytes,
      { estimatedComputeSeconds: est.computeSeconds, limitComputeSeconds: K.computeSecondsLimit },
    );
  }
  return est;
}
