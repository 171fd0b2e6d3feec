/**
 * Multi-terminal transport of a Hall bar (Landauer-Buettiker; physics.md section 6): the two face
 * leads (terminals "source" on the left, "drain" on the right) and side contacts on the open top
 * and bottom edges. From the composed scattering matrix of each valley, T_ij = sum |S_ab|^2 over
 * the out channels a of terminal i and the in channels b of terminal j; the conductance matrix
 * G_ii = N_i - T_ii, G_ij = -T_ij (i != j), in e^2/h, totals over valleys, spins and channel
 * copies, so that I_i = (e^2/h) sum_j G_ij V_j. Every row and column of G sums to zero (current
 * conservation and gauge invariance; checked and reported). Resistances: a current I from m to n
 * with n grounded, the reduced system solved for the voltages, R_mn,kl = (V_k - V_l) / I.
 */
import { BOLTZMANN_J_PER_K, CONDUCTANCE_QUANTUM_S, JOULE_PER_MEV } from "../constants";
import {
  CH_CONTACT_IN,
  CH_CONTACT_OUT,
  CH_LEFT_IN,
  CH_LEFT_OUT,
  CH_RIGHT_IN,
  CH_RIGHT_OUT,
  channelPhases,
  reverseGraph,
  type NetworkGraph,
} from "../network/graph";
import { buildSample } from "../network/lattice";
import { checkHallBar, checkWindowsHoldChannels, DRAIN, SOURCE } from "./hall-bar-check";
import type { HallBarComputation, Network } from "../schema";
import { Absorber } from "../scattering/absorber";
import { energyPhase, fluxPerPlaquette, mean, networkScale, std } from "./common";
import { Progress, type ComputeOptions } from "./progress";
import { thermalAverage, type ThermalAverage } from "./quadrature";
import { thermalOrRefuse } from "./conductance";
import { narrowestResonance } from "./resonance";

/** h / e^2 in ohms (the von Klitzing constant, exact in SI since 2019). */
export const KLITZING_OHMS = 1 / CONDUCTANCE_QUANTUM_S;

export { checkHallBar, defaultContacts, DRAIN, SOURCE, type HallBarContact } from "./hall-bar-check";

export interface HallBarTerminal {
  name: string;
  edge: "left" | "right" | "top" | "bottom";
  /** The window of a side contact (columns, inclusive); null for the face leads. */
  fromColumn: number | null;
  toColumn: number | null;
  /** Channels from the terminal into the sample and back, per valley (channel copies included). */
  channels: { valleyK: { in: number; out: number }; valleyKPrime: { in: number; out: number } | null };
}

export interface HallBarResistances {
  /** R_xx = (V_top1 - V_top2) / I for a current from source to drain; null without top1 and top2 or when the voltages are undetermined. */
  longitudinalOhms: number | null;
  /** R_xy = (V_top1 - V_bottom1) / I; null without top1 and bottom1 or when undetermined. */
  hallOhms: number | null;
  /** (V_source - V_drain) / I plus contactOhms (the series contact resistance of the current path). */
  twoTerminalOhms: number | null;
  unit: "ohm";
}

export interface HallBarResult {
  kind: "hallBar";
  energyMeV: number;
  fieldTesla: number;
  temperatureK: number;
  contactOhms: number;
  fluxPerPlaquette: number;
  energyPeriodMeV: number;
  fieldPeriodTesla: number;
  terminals: HallBarTerminal[];
  conductanceMatrix: {
    unit: "e2/h";
    terminals: string[];
    /** G_ij, totals over valleys and spin (mean over the ensemble). I_i = (e^2/h) sum_j G_ij V_j. */
    values: number[][];
    /** One valley, one spin, channel copies included. */
    perValley: { valleyK: number[][]; valleyKPrime: number[][] | null };
  };
  resistances: HallBarResistances;
  fourTerminalOhms: { current: [string, string]; voltage: [string, string]; ohms: number | null }[];
  checks: {
    /** Largest |sum_j G_ij| over rows, e2/h (valleys separately, every sample and energy). */
    rowSumError: number;
    /** Largest |sum_i G_ij| over columns. */
    columnSumError: number;
    /** Largest deviation of sum_a |S_ab|^2 from 1 over the in channels b. */
    unitarityError: number;
  };
  thermal: {
    method: ThermalAverage["method"];
    domain: ThermalAverage["domain"];
    energiesPerSample: number;
    estimatedRelativeError: number;
    relativeTolerance: number;
    converged: boolean;
  } | null;
  warnings: string[];
  ensemble?: {
    samples: number;
    mean: Omit<HallBarResistances, "unit">;
    std: Omit<HallBarResistances, "unit">;
    stderr: Omit<HallBarResistances, "unit">;
    unit: "ohm";
    /** Samples whose resistances were undetermined (left out of the statistics). */
    undetermined: number;
  };
}

/** Terminals whose in and out channel counts differ, per valley (for the warning). */
function terminals0(channels: { nIn: number[]; nOut: number[] }[], names: string[]) {
  return channels.flatMap((c, v) => names.map((name, t) => ({ name, valley: v === 0 ? "K" : "K'", in: c.nIn[t], out: c.nOut[t], diff: c.nIn[t] - c.nOut[t] })));
}

/** Terminal of each channel: 0 source (left lead), 1 drain (right lead), 2 + k side contact k; -1 for links. */
function terminalOf(g: NetworkGraph): Int32Array {
  const t = new Int32Array(g.channelCount).fill(-1);
  for (let c = 0; c < g.channelCount; c++) {
    const k = g.chKind[c];
    if (k === CH_LEFT_IN || k === CH_LEFT_OUT) t[c] = 0;
    else if (k === CH_RIGHT_IN || k === CH_RIGHT_OUT) t[c] = 1;
    else if (k === CH_CONTACT_IN || k === CH_CONTACT_OUT) t[c] = 2 + g.chContact![c];
  }
  return t;
}

interface ValleyTransport {
  /** T_ij from j into i (i = j: reflection), one valley, one copy, flattened row-major. */
  T: Float64Array;
  /** In and out channels per terminal. */
  nIn: number[];
  nOut: number[];
  unitarityError: number;
}

/** T_ij of one valley graph at one energy (the general path: side contacts are channels like any lead). */
export function terminalTransmissions(g: NetworkGraph, terminals: number, thetaE: number, progress?: Progress): ValleyTransport {
  const abs = new Absorber(g, channelPhases(g, thetaE), false, undefined, 16, -1, "general");
  abs.run(progress ? { afterGroup: () => progress.tick(1) } : undefined);
  const term = terminalOf(g);
  const ins: number[] = [],
    outs: number[] = [];
  for (let c = 0; c < g.channelCount; c++) {
    if (term[c] < 0) continue;
    if (g.chFromNode[c] < 0) ins.push(c);
    else outs.push(c);
  }
  const nIn = new Array<number>(terminals).fill(0),
    nOut = new Array<number>(terminals).fill(0);
  for (const c of ins) nIn[term[c]]++;
  for (const c of outs) nOut[term[c]]++;
  const T = new Float64Array(terminals * terminals);
  let unitarityError = 0;
  for (const b of ins) {
    let col = 0;
    const j = term[b];
    for (const a of outs) {
      const [re, im] = abs.entry(a, b);
      const p = re * re + im * im;
      T[term[a] * terminals + j] += p;
      col += p;
    }
    unitarityError = Math.max(unitarityError, Math.abs(col - 1));
  }
  return { T, nIn, nOut, unitarityError };
}

/** G = diag(N) - T (e2/h) from T and the in channels per terminal. */
function conductanceFromT(T: ArrayLike<number>, nIn: number[], scale: number): number[][] {
  const n = nIn.length;
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => scale * ((i === j ? nIn[i] : 0) - T[i * n + j])));
}

function sumErrors(G: number[][]): { row: number; column: number } {
  let row = 0,
    column = 0;
  for (let i = 0; i < G.length; i++) {
    row = Math.max(row, Math.abs(G[i].reduce((a, b) => a + b, 0)));
    column = Math.max(column, Math.abs(G.reduce((a, r) => a + r[i], 0)));
  }
  return { row, column };
}

/**
 * Terminal voltages (in units of I h/e^2 per e2/h of G, i.e. V in volts for I in amperes times
 * h/e^2 when G is in e2/h) for a current I = 1 from terminal m to terminal n, n grounded: the
 * reduced system G' V' = I' solved by Gaussian elimination with partial pivoting. Null when it
 * is singular (a terminal cut off from the rest, or an insulating sample).
 */
export function terminalVoltages(G: number[][], m: number, n: number): number[] | null {
  const size = G.length;
  const keep = Array.from({ length: size }, (_, i) => i).filter((i) => i !== n);
  const k = keep.length;
  const A = keep.map((i) => keep.map((j) => G[i][j]));
  const b: number[] = keep.map((i) => (i === m ? 1 : 0));
  const scale = Math.max(1e-300, ...A.flat().map(Math.abs));
  for (let c = 0; c < k; c++) {
    let p = c;
    for (let r = c + 1; r < k; r++) if (Math.abs(A[r][c]) > Math.abs(A[p][c])) p = r;
    if (Math.abs(A[p][c]) < 1e-12 * scale) return null;
    [A[c], A[p]] = [A[p], A[c]];
    [b[c], b[p]] = [b[p], b[c]];
    for (let r = c + 1; r < k; r++) {
      const f = A[r][c] / A[c][c];
      if (f === 0) continue;
      for (let q = c; q < k; q++) A[r][q] -= f * A[c][q];
      b[r] -= f * b[c];
    }
  }
  const x = new Array<number>(k).fill(0);
  for (let r = k - 1; r >= 0; r--) {
    let s = b[r];
    for (let q = r + 1; q < k; q++) s -= A[r][q] * x[q];
    x[r] = s / A[r][r];
  }
  const V = new Array<number>(size).fill(0);
  keep.forEach((i, idx) => (V[i] = x[idx]));
  return V;
}

/** R_mn,kl = (V_k - V_l) / I in ohms for G in e2/h; null when the voltages are undetermined. */
export function fourTerminalOhms(G: number[][], m: number, n: number, k: number, l: number): number | null {
  const V = terminalVoltages(G, m, n);
  return V === null ? null : (V[k] - V[l]) * KLITZING_OHMS;
}

export function computeHallBar(net: Network, c: HallBarComputation, opts: ComputeOptions = {}): HallBarResult {
  // The windows are checked on the sample graph this computation builds anyway (not on a second one).
  const contacts = checkHallBar(net, c, { windows: false });
  const scale = networkScale(net);
  const phi = fluxPerPlaquette(scale, c.fieldTesla);
  const valleys = net.degeneracy.valley;
  const spin = net.degeneracy.spin;
  const samples = c.ensemble?.samples ?? 1;
  const kTMeV = (BOLTZMANN_J_PER_K * c.temperatureK) / JOULE_PER_MEV;
  const names = [SOURCE, DRAIN, ...contacts.map((k) => k.name)];
  const nT = names.length;
  const index = (name: string) => names.indexOf(name);
  const g0 = buildSample(net, { mode: "leads", fluxPerPlaquette: phi, sample: 0, contacts });
  if (contacts.length > 0) checkWindowsHoldChannels(net, contacts, g0);
  const progress = new Progress(samples * (kTMeV > 0 ? 24 : 1) * g0.schedule.length * valleys, opts);
  const copies = g0.copies;

  let unitarityError = 0,
    rowSumError = 0,
    columnSumError = 0;
  let thermal: HallBarResult["thermal"] = null;
  let channels0: { nIn: number[]; nOut: number[] }[] = [];
  const perSample: { K: number[][]; Kp: number[][] | null; total: number[][] }[] = [];
  for (let s = 0; s < samples; s++) {
    const gK = s === 0 ? g0 : buildSample(net, { mode: "leads", fluxPerPlaquette: phi, sample: s, contacts });
    const gKp = valleys === 2 ? reverseGraph(gK) : null;
    const graphs = gKp ? [gK, gKp] : [gK];
    const nInOf: number[][] = [];
    const at = (eMeV: number): number[] => {
      const th = energyPhase(scale, eMeV);
      const out: number[] = [];
      graphs.forEach((g, v) => {
        const r = terminalTransmissions(g, nT, th, progress);
        unitarityError = Math.max(unitarityError, r.unitarityError);
        nInOf[v] = r.nIn;
        if (s === 0 && channels0.length < graphs.length) channels0 = [...channels0, { nIn: r.nIn, nOut: r.nOut }];
        out.push(...r.T);
      });
      return out;
    };
    let values: number[];
    if (kTMeV > 0) {
      const resonance = c.temperaturePoints === undefined ? narrowestResonance(gK) : null;
      const widthMeV = resonance ? resonance.widthRad * scale.energyScaleMeV : null;
      const avg = thermalOrRefuse(() =>
        thermalAverage(at, c.energyMeV, kTMeV, scale.energyPeriodMeV, {
          relativeTolerance: c.temperatureTolerance,
          maxEnergies: c.temperatureMaxEnergies,
          fixedPoints: c.temperaturePoints,
          scale: nT * nT,
          panelMeV: widthMeV === null ? scale.energyPeriodMeV : 8 * widthMeV,
        }),
      );
      values = avg.values;
      const prev = thermal as HallBarResult["thermal"];
      thermal = {
        method: avg.method,
        domain: avg.domain,
        energiesPerSample: Math.max(prev?.energiesPerSample ?? 0, avg.energies),
        estimatedRelativeError: Math.max(prev?.estimatedRelativeError ?? 0, avg.estimatedRelativeError),
        relativeTolerance: avg.relativeTolerance,
        converged: (prev?.converged ?? true) && avg.converged,
      };
    } else values = at(c.energyMeV);
    const GK = conductanceFromT(values.slice(0, nT * nT), nInOf[0], copies);
    const GKp = gKp ? conductanceFromT(values.slice(nT * nT), nInOf[1], copies) : null;
    const total = GK.map((row, i) => row.map((v, j) => spin * (v + (GKp ? GKp[i][j] : 0))));
    // The checks read the total: one valley alone may carry a net edge current from lead to lead
    // (a face lead that injects one channel fewer than it receives), which the other valley returns.
    const e = sumErrors(total);
    rowSumError = Math.max(rowSumError, e.row);
    columnSumError = Math.max(columnSumError, e.column);
    perSample.push({ K: GK, Kp: GKp, total });
  }

  const avgMatrix = (pick: (p: (typeof perSample)[number]) => number[][]) =>
    Array.from({ length: nT }, (_, i) => Array.from({ length: nT }, (_, j) => mean(perSample.map((p) => pick(p)[i][j]))));
  const Gmean = avgMatrix((p) => p.total);
  const resistancesOf = (G: number[][]): Omit<HallBarResistances, "unit"> => {
    const src = 0,
      drn = 1;
    const V = terminalVoltages(G, src, drn);
    const t1 = index("top1"),
      t2 = index("top2"),
      b1 = index("bottom1");
    return {
      longitudinalOhms: V && t1 >= 0 && t2 >= 0 ? (V[t1] - V[t2]) * KLITZING_OHMS : null,
      hallOhms: V && t1 >= 0 && b1 >= 0 ? (V[t1] - V[b1]) * KLITZING_OHMS : null,
      twoTerminalOhms: V ? (V[src] - V[drn]) * KLITZING_OHMS + c.contactOhms : null,
    };
  };
  const warnings: string[] = [];
  if (thermal && !thermal.converged)
    warnings.push(
      `The thermal average reached an estimated relative error of ${thermal.estimatedRelativeError.toExponential(1)}, ` +
        `above the tolerance ${thermal.relativeTolerance.toExponential(1)}; the conductance matrix at this temperature is less accurate than asked.`,
    );
  if (rowSumError > 1e-8) {
    const unbalanced = terminals0(channels0, names).filter((t) => t.diff !== 0);
    warnings.push(
      `The rows of the conductance matrix do not sum to zero (largest |sum| ${rowSumError.toExponential(2)} e2/h): ` +
        `${unbalanced.map((t) => `${t.name} injects ${t.in} and receives ${t.out} channels in valley ${t.valley}`).join("; ")}` +
        `. With one valley the sample carries an edge current from lead to lead even at equal voltages, so the resistances are not those of a measurement; use both valleys.`,
    );
  }
  const resistances = { ...resistancesOf(Gmean), unit: "ohm" as const };
  if (resistances.twoTerminalOhms === null)
    warnings.push(
      "The terminal voltages are undetermined: the conductance matrix with the drain grounded is singular (no current path from the source, e.g. an insulating sample); the resistances are null.",
    );
  const ch = (v: number, t: number) => (channels0[v] ? { in: channels0[v].nIn[t] * copies, out: channels0[v].nOut[t] * copies } : { in: 0, out: 0 });
  const terminals: HallBarTerminal[] = names.map((name, t) => ({
    name,
    edge: t === 0 ? "left" : t === 1 ? "right" : contacts[t - 2].edge,
    fromColumn: t < 2 ? null : contacts[t - 2].fromColumn,
    toColumn: t < 2 ? null : contacts[t - 2].toColumn,
    channels: { valleyK: ch(0, t), valleyKPrime: valleys === 2 ? ch(1, t) : null },
  }));
  const result: HallBarResult = {
    kind: "hallBar",
    energyMeV: c.energyMeV,
    fieldTesla: c.fieldTesla,
    temperatureK: c.temperatureK,
    contactOhms: c.contactOhms,
    fluxPerPlaquette: phi,
    energyPeriodMeV: scale.energyPeriodMeV,
    fieldPeriodTesla: scale.fieldPeriodTesla,
    terminals,
    conductanceMatrix: {
      unit: "e2/h",
      terminals: names,
      values: Gmean,
      perValley: { valleyK: avgMatrix((p) => p.K), valleyKPrime: valleys === 2 ? avgMatrix((p) => p.Kp as number[][]) : null },
    },
    resistances,
    fourTerminalOhms: c.measurements.map((m) => ({
      current: m.current,
      voltage: m.voltage,
      ohms: fourTerminalOhms(Gmean, index(m.current[0]), index(m.current[1]), index(m.voltage[0]), index(m.voltage[1])),
    })),
    checks: { rowSumError, columnSumError, unitarityError },
    thermal,
    warnings,
  };
  if (c.ensemble) {
    const each = perSample.map((p) => resistancesOf(p.total));
    const keys = ["longitudinalOhms", "hallOhms", "twoTerminalOhms"] as const;
    const determined = each.filter((r) => r.twoTerminalOhms !== null);
    const stat = (f: (xs: number[]) => number) =>
      Object.fromEntries(keys.map((k) => [k, determined.length && determined[0][k] !== null ? f(determined.map((r) => r[k] as number)) : null])) as Omit<
        HallBarResistances,
        "unit"
      >;
    const sd = stat(std);
    result.ensemble = {
      samples,
      mean: stat(mean),
      std: sd,
      stderr: Object.fromEntries(keys.map((k) => [k, sd[k] === null ? null : (sd[k] as number) / Math.sqrt(determined.length)])) as Omit<
        HallBarResistances,
        "unit"
      >,
      unit: "ohm",
      undetermined: samples - determined.length,
    };
    if (determined.length < samples)
      warnings.push(`${samples - determined.length} of ${samples} samples had undetermined voltages and are left out of the ensemble statistics.`);
  }
  progress.finish();
  return result;
}
