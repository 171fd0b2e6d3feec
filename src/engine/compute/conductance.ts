/**
 * Two-terminal conductance (Landauer): G = (e^2/h) sum over valleys and spins of Tr(t^H t),
 * with t the transmission block of the sample's scattering matrix from the slice composition.
 */
import { CONDUCTANCE_QUANTUM_S, BOLTZMANN_J_PER_K, JOULE_PER_MEV } from "../constants";
import { CH_LEFT_IN, CH_LEFT_OUT, CH_RIGHT_IN, CH_RIGHT_OUT, channelPhases, reverseGraph, type NetworkGraph } from "../network/graph";
import { buildSample } from "../network/lattice";
import type { ConductanceComputation, Network } from "../schema";
import { Absorber } from "../scattering/absorber";
import { blockSchedule } from "../network/blocks";
import { getKernels } from "../linalg/kernels";
import { energyPhase, fluxPerPlaquette, mean, networkScale, std } from "./common";
import { Progress, type ComputeOptions } from "./progress";
import type { TransportPiece } from "./parallel";
import { thermalAverage, thermalPlan, ThermalResolutionError, type ThermalAverage } from "./quadrature";
import { narrowestResonance } from "./resonance";
import { EngineInputError } from "../errors";

/** A thermal average beyond what the rule can resolve is refused (CLI exit 2, API 422), naming the field. */
export function thermalOrRefuse(run: () => ThermalAverage): ThermalAverage {
  try {
    return run();
  } catch (e) {
    if (e instanceof ThermalResolutionError) throw new EngineInputError("computation.temperatureMaxEnergies", e.message);
    throw e;
  }
}

export interface ValleyPair<T> {
  valleyK: T;
  valleyKPrime: T | null;
}
export interface ConductanceFigures {
  valleyK: number;
  valleyKPrime: number | null;
  total: number;
  unit: "e2/h";
}

export interface ConductanceResult {
  kind: "conductance";
  energyMeV: number;
  fieldTesla: number;
  temperatureK: number;
  contactOhms: number;
  fluxPerPlaquette: number;
  energyPeriodMeV: number;
  fieldPeriodTesla: number;
  conductance: ConductanceFigures;
  siemens: number;
  ohms: number | null;
  channels: { valleyK: number; valleyKPrime: number | null; total: number };
  transmissionEigenvalues: ValleyPair<number[]>;
  fano: number | null;
  checks: { currentConservationError: number };
  /** The thermal average (null at T = 0): rule, energies per sample (the largest), estimated relative error (the largest). */
  thermal: {
    method: ThermalAverage["method"];
    domain: ThermalAverage["domain"];
    energiesPerSample: number;
    estimatedRelativeError: number;
    relativeTolerance: number;
    converged: boolean;
    /** Half-width of the narrowest resonance found (meV); the first panels are 8 times as wide. */
    narrowestResonanceMeV: number | null;
  } | null;
  /** Problems a reader must see beside the numbers (empty when there are none). */
  warnings: string[];
  ensemble?: {
    samples: number;
    mean: ConductanceFigures;
    std: ConductanceFigures;
    stderr: ConductanceFigures;
    histogram: { quantity: "conductance.total"; unit: "e2/h"; binEdges: number[]; counts: number[] };
  };
}

export interface SampleTransport {
  transmission: number;
  injected: number;
  conservationError: number;
  eigenvalues: number[] | null;
  /** sum T (1 - T) */
  noise: number;
}

/** Channel lists of a graph, sorted by the y of their segment (bottom to top). */
export function leadChannels(g: NetworkGraph): { leftIn: number[]; leftOut: number[]; rightIn: number[]; rightOut: number[] } {
  const lists: Record<number, number[]> = { [CH_LEFT_IN]: [], [CH_LEFT_OUT]: [], [CH_RIGHT_IN]: [], [CH_RIGHT_OUT]: [] };
  for (let c = 0; c < g.channelCount; c++) lists[g.chKind[c]]?.push(c);
  const y = (c: number) => (g.chSegment[4 * c + 1] + g.chSegment[4 * c + 3]) / 2;
  for (const k of Object.keys(lists)) lists[Number(k)].sort((a, b) => y(a) - y(b) || a - b);
  return { leftIn: lists[CH_LEFT_IN], leftOut: lists[CH_LEFT_OUT], rightIn: lists[CH_RIGHT_IN], rightOut: lists[CH_RIGHT_OUT] };
}

/** Number of lead channels (in and out, both sides): a bound on the transmission eigenvalues of either valley. */
function leadChannelCount(g: NetworkGraph): number {
  let n = 0;
  for (let c = 0; c < g.channelCount; c++) if (g.chKind[c] !== 0) n++;
  return n;
}

/** Full composed scattering matrix of a sample with leads at link phase thetaE (block path by default, `path: "general"` for the groups of unlinked nodes). */
export function composeSample(g: NetworkGraph, thetaE: number, progress?: Progress, withReflection = true, path: "general" | "block" = "block"): Absorber {
  const abs = new Absorber(g, channelPhases(g, thetaE), false, undefined, 16, withReflection ? -1 : CH_LEFT_OUT, path);
  abs.run(progress ? { afterGroup: () => progress.tick(1) } : undefined);
  return abs;
}

/** Transmission of one valley graph at one energy; withCheck = false skips the left-lead output
 * rows (half the work), which only the R + T = N check reads (conservationError is then NaN). */
export function sampleTransport(
  g: NetworkGraph,
  thetaE: number,
  wantEigen: boolean,
  progress?: Progress,
  withCheck = true,
  path: "general" | "block" = "block",
): SampleTransport {
  const abs = composeSample(g, thetaE, progress, withCheck, path);
  const { leftIn, leftOut, rightIn, rightOut } = leadChannels(g);
  const nIn = leftIn.length,
    nOut = rightOut.length;
  const t = new Float64Array(2 * nOut * nIn);
  let T = 0,
    err = 0;
  for (let j = 0; j < nIn; j++) {
    let col = 0;
    for (let i = 0; i < nOut; i++) {
      const [re, im] = abs.entry(rightOut[i], leftIn[j]);
      t[2 * (i * nIn + j)] = re;
      t[2 * (i * nIn + j) + 1] = im;
      col += re * re + im * im;
    }
    T += col;
    for (const o of leftOut) {
      const [re, im] = abs.entry(o, leftIn[j]);
      col += re * re + im * im;
    }
    err = Math.max(err, Math.abs(col - 1));
  }
  if (!withCheck) err = NaN;
  else
    for (const j of rightIn) {
      let col = 0;
      for (const o of [...leftOut, ...rightOut]) {
        const [re, im] = abs.entry(o, j);
        col += re * re + im * im;
      }
      err = Math.max(err, Math.abs(col - 1));
    }
  // t^H t (nIn x nIn)
  const tht = new Float64Array(2 * nIn * nIn);
  for (let a = 0; a < nIn; a++)
    for (let b = a; b < nIn; b++) {
      let re = 0,
        im = 0;
      for (let i = 0; i < nOut; i++) {
        const xr = t[2 * (i * nIn + a)],
          xi = -t[2 * (i * nIn + a) + 1],
          yr = t[2 * (i * nIn + b)],
          yi = t[2 * (i * nIn + b) + 1];
        re += xr * yr - xi * yi;
        im += xr * yi + xi * yr;
      }
      tht[2 * (a * nIn + b)] = re;
      tht[2 * (a * nIn + b) + 1] = im;
      tht[2 * (b * nIn + a)] = re;
      tht[2 * (b * nIn + a) + 1] = -im;
    }
  // sum T(1-T) = Tr(t^H t) - Tr((t^H t)^2) = T - ||t^H t||_F^2
  let fro = 0;
  for (let i = 0; i < tht.length; i++) fro += tht[i] * tht[i];
  let eigenvalues: number[] | null = null;
  if (wantEigen && nIn > 0) {
    const { values } = getKernels().eigHermitian(tht, nIn, false);
    eigenvalues = Array.from(values)
      .map((v) => Math.min(1, Math.max(0, v)))
      .sort((a, b) => b - a);
  }
  return { transmission: T, injected: nIn, conservationError: err, eigenvalues, noise: T - fro };
}

/** Work units of one conductance evaluation (blocks of both valleys), for progress. */
export function conductanceWork(g: NetworkGraph, valleys: number): number {
  return blockSchedule(g).length * valleys;
}

export function computeConductance(net: Network, c: ConductanceComputation, opts: ComputeOptions = {}): ConductanceResult {
  const scale = networkScale(net);
  const phi = fluxPerPlaquette(scale, c.fieldTesla);
  const valleys = net.degeneracy.valley;
  const spin = net.degeneracy.spin;
  const samples = c.ensemble?.samples ?? 1;
  const kTMeV = (BOLTZMANN_J_PER_K * c.temperatureK) / JOULE_PER_MEV;
  const thermalOn = kTMeV > 0;
  const g0 = buildSample(net, { mode: "leads", fluxPerPlaquette: phi, sample: 0 });
  // progress: the adaptive rule's first panels (refinements extend it; progress is capped below 1)
  const expected = thermalOn
    ? (c.temperaturePoints !== undefined
        ? c.temperaturePoints + Math.ceil(c.temperaturePoints / 2)
        : thermalPlan(kTMeV, scale.energyPeriodMeV, scale.energyPeriodMeV / 64).energies) + 1
    : 1;
  const progress = new Progress(samples * expected * conductanceWork(g0, valleys), opts);
  const perSample: { gK: number; gKp: number | null; total: number }[] = [];
  let eigK: number[] = [],
    eigKp: number[] | null = null;
  let noiseSum = 0,
    tSum = 0,
    err = 0;
  let chK = 0,
    chKp: number | null = null;
  let thermal: ConductanceResult["thermal"] = null;
  // The graphs of one sample (built when first asked for; the last sample's are kept).
  let built: { s: number; gK: NetworkGraph; gKp: NetworkGraph | null } | null = null;
  const graphsOf = (s: number) => {
    if (built?.s !== s) {
      const gK = s === 0 ? g0 : buildSample(net, { mode: "leads", fluxPerPlaquette: phi, sample: s });
      // valley K' is absorbed on the block path only: no general schedule
      built = { s, gK, gKp: valleys === 2 ? reverseGraph(gK, false) : null };
    }
    return built;
  };
  const local = (p: TransportPiece): SampleTransport => {
    const gr = graphsOf(p.sample);
    return sampleTransport(p.valley === "K" ? gr.gK : (gr.gKp as NetworkGraph), p.thetaE, p.wantEigen, progress, p.withCheck);
  };
  // Independent pieces (valleys, samples): on the worker's free threads when it offers them
  // (opts.parallel, compute/parallel.ts), else in order here; the results are the same either way.
  const par = opts.parallel;
  const maxEigenvalues = leadChannelCount(g0);
  const runPieces = (list: TransportPiece[]): SampleTransport[] => {
    if (!par || list.length < 2 || g0.nodeCount < par.minNodes) return list.map(local);
    return par.run({ network: net, fluxPerPlaquette: phi, pieces: list, maxEigenvalues }, (i) => local(list[i]), progress);
  };
  // at the chemical potential: transmission, eigenvalues and shot noise (T = 0 quantities); the
  // R + T = N check runs on valley K (K' skips the reflection rows)
  const th0 = energyPhase(scale, c.energyMeV);
  const atMu = (s: number): TransportPiece[] => [
    { sample: s, valley: "K", thetaE: th0, wantEigen: s === 0, withCheck: true },
    ...(valleys === 2 ? [{ sample: s, valley: "K'" as const, thetaE: th0, wantEigen: s === 0, withCheck: false }] : []),
  ];
  // without a thermal average every sample's pieces are independent: one batch
  const allAtMu = thermalOn ? null : runPieces(Array.from({ length: samples }, (_, s) => atMu(s)).flat());
  for (let s = 0; s < samples; s++) {
    const [r0, r0p = null] = allAtMu ? allAtMu.slice(s * valleys, (s + 1) * valleys) : runPieces(atMu(s));
    err = Math.max(err, r0.conservationError);
    noiseSum += r0.noise + (r0p?.noise ?? 0);
    tSum += r0.transmission + (r0p?.transmission ?? 0);
    if (s === 0) {
      eigK = r0.eigenvalues ?? [];
      eigKp = r0p ? (r0p.eigenvalues ?? []) : null;
      chK = r0.injected;
      chKp = r0p ? r0p.injected : null;
    }
    let TK = r0.transmission,
      TKp = r0p?.transmission ?? 0;
    if (thermalOn) {
      const { gK } = graphsOf(s);
      // the R + T = N check runs on valley K at every energy (K' skips the reflection rows)
      const f = (eMeV: number): number[] => {
        const th = energyPhase(scale, eMeV);
        const [rK, rKp = null] = runPieces([
          { sample: s, valley: "K", thetaE: th, wantEigen: false, withCheck: true },
          ...(valleys === 2 ? [{ sample: s, valley: "K'" as const, thetaE: th, wantEigen: false, withCheck: false }] : []),
        ]);
        err = Math.max(err, rK.conservationError);
        return [rK.transmission, rKp ? rKp.transmission : 0];
      };
      const resonance = c.temperaturePoints === undefined ? narrowestResonance(gK) : null;
      const widthMeV = resonance ? resonance.widthRad * scale.energyScaleMeV : null;
      const avg = thermalOrRefuse(() =>
        thermalAverage(f, c.energyMeV, kTMeV, scale.energyPeriodMeV, {
          relativeTolerance: c.temperatureTolerance,
          maxEnergies: c.temperatureMaxEnergies,
          fixedPoints: c.temperaturePoints,
          scale: r0.injected + (r0p?.injected ?? 0),
          panelMeV: widthMeV === null ? scale.energyPeriodMeV : 8 * widthMeV,
        }),
      );
      TK = avg.values[0];
      TKp = avg.values[1];
      const prev = thermal as ConductanceResult["thermal"];
      thermal = {
        method: avg.method,
        domain: avg.domain,
        energiesPerSample: Math.max(prev?.energiesPerSample ?? 0, avg.energies),
        estimatedRelativeError: Math.max(prev?.estimatedRelativeError ?? 0, avg.estimatedRelativeError),
        relativeTolerance: avg.relativeTolerance,
        converged: (prev?.converged ?? true) && avg.converged,
        narrowestResonanceMeV: widthMeV === null ? null : Math.min(prev?.narrowestResonanceMeV ?? Infinity, widthMeV),
      };
    }
    const copies = g0.copies;
    const gk = TK * copies,
      gkp = valleys === 2 ? TKp * copies : null;
    perSample.push({ gK: gk, gKp: gkp, total: spin * (gk + (gkp ?? 0)) });
  }
  const warnings: string[] = [];
  if (thermal && !thermal.converged) {
    warnings.push(
      `The thermal average reached an estimated relative error of ${thermal.estimatedRelativeError.toExponential(1)}, ` +
        `above the tolerance ${thermal.relativeTolerance.toExponential(1)} ` +
        `(${thermal.energiesPerSample} energies per sample` +
        `${thermal.method === "gauss-legendre" ? ", fixed rule of temperaturePoints" : ", limit temperatureMaxEnergies"})` +
        `; the conductance at this temperature is less accurate than asked.`,
    );
  }
  const copies = g0.copies;
  const dup = (xs: number[]) => (copies === 1 ? xs : xs.flatMap((x) => Array(copies).fill(x) as number[]));
  const fig = (f: (xs: number[]) => number): ConductanceFigures => ({
    valleyK: f(perSample.map((p) => p.gK)),
    valleyKPrime: valleys === 2 ? f(perSample.map((p) => p.gKp as number)) : null,
    total: f(perSample.map((p) => p.total)),
    unit: "e2/h",
  });
  const meanFig = fig(mean);
  const gS = meanFig.total * CONDUCTANCE_QUANTUM_S;
  const ohms = gS > 0 ? 1 / gS + c.contactOhms : null;
  const result: ConductanceResult = {
    kind: "conductance",
    energyMeV: c.energyMeV,
    fieldTesla: c.fieldTesla,
    temperatureK: c.temperatureK,
    contactOhms: c.contactOhms,
    fluxPerPlaquette: phi,
    energyPeriodMeV: scale.energyPeriodMeV,
    fieldPeriodTesla: scale.fieldPeriodTesla,
    conductance: meanFig,
    siemens: ohms === null ? 0 : 1 / ohms,
    ohms,
    channels: { valleyK: chK * copies, valleyKPrime: chKp === null ? null : chKp * copies, total: spin * (chK + (chKp ?? 0)) * copies },
    transmissionEigenvalues: { valleyK: dup(eigK), valleyKPrime: eigKp ? dup(eigKp) : null },
    fano: tSum > 0 ? noiseSum / tSum : null,
    checks: { currentConservationError: err },
    thermal,
    warnings,
  };
  if (c.ensemble) {
    const sd = fig(std);
    const se: ConductanceFigures = {
      valleyK: sd.valleyK / Math.sqrt(samples),
      valleyKPrime: sd.valleyKPrime === null ? null : sd.valleyKPrime / Math.sqrt(samples),
      total: sd.total / Math.sqrt(samples),
      unit: "e2/h",
    };
    result.ensemble = {
      samples,
      mean: meanFig,
      std: sd,
      stderr: se,
      histogram: histogram(
        perSample.map((p) => p.total),
        c.histogramBins,
      ),
    };
  }
  progress.finish();
  return result;
}

export function histogram(xs: number[], bins: number): { quantity: "conductance.total"; unit: "e2/h"; binEdges: number[]; counts: number[] } {
  let lo = Math.min(...xs),
    hi = Math.max(...xs);
  if (!(hi > lo)) {
    lo -= 0.5;
    hi += 0.5;
  }
  const edges = Array.from({ length: bins + 1 }, (_, i) => lo + ((hi - lo) * i) / bins);
  const counts = new Array(bins).fill(0) as number[];
  for (const x of xs) counts[Math.min(bins - 1, Math.floor(((x - lo) / (hi - lo)) * bins))]++;
  return { quantity: "conductance.total", unit: "e2/h", binEdges: edges, counts };
}
