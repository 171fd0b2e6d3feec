/**
 * Local density of states on every link of a finite closed sample at one energy: the per-link term
 * of the trace formula, (tau/2pi) Re[(1 + U_eta)(1 - U_eta)^-1]_ll = (tau/2pi) Re[2 G_ll - 1],
 * G = (1 - U_eta)^-1. For a partition of the network into a left part A and a right part B, the
 * diagonal of G on the links between them is the diagonal of (1 - S_A S_B)^-1 (Schur complement),
 * with S_A, S_B the composed scattering matrices of the two parts; a forward sweep gives S_A and a
 * backward sweep S_B at every partition (checkpointed: memory ~ 2 sqrt(partitions) matrices).
 */
import type { LdosComputation, Network } from "../schema";
import { channelPhases, reverseGraph, type NetworkGraph } from "../network/graph";
import { Absorber } from "../scattering/absorber";
import { getKernels } from "../linalg/kernels";
import { networkScale, type Scale } from "./common";
import { Progress, type ComputeOptions } from "./progress";
import { buildClosedSample } from "./closed";

export interface LdosResult {
  kind: "ldos";
  energyMeV: number;
  fieldTesla: number;
  broadeningMeV: number;
  /** Link segments in nm (from -> to, in the valley-K direction; a link across a periodic seam is
   * drawn unwrapped, leaving the sample rectangle). edge = 1 for links ending at a virtual edge node. */
  links: { fromXNm: number[]; fromYNm: number[]; toXNm: number[]; toYNm: number[]; edge: number[] };
  /** States per meV on each link: per spin per valley (channels included) and total. */
  ldosPerMeV: { valleyK: number[]; valleyKPrime: number[] | null; total: number[] };
  /** Sum over links (whole sample, all degeneracies), states per meV. */
  totalDosPerMeV: number;
}

/** Per-channel diagonal Re[2 G_ll - 1] of a closed graph at link phase theta, damping eta. */
export function linkResolventDiagonal(g: NetworkGraph, theta: number, eta: number, progress?: Progress): Float64Array {
  const z = channelPhases(g, theta, eta);
  const G = g.schedule.length;
  const reversed = g.schedule.slice().reverse();
  // partitions: after group t where the next group lies at another abscissa
  const parts: number[] = [];
  for (let t = 0; t < G - 1; t++) if (g.nodeX[g.schedule[t][0]] !== g.nodeX[g.schedule[t + 1][0]]) parts.push(t);
  const K = Math.max(1, Math.ceil(Math.sqrt(parts.length)));
  const segEnd = (s: number) => Math.min((s + 1) * K, parts.length) - 1;
  const nSeg = Math.ceil(parts.length / K);
  // pass 1: backward sweep with checkpoints at the last (largest t) partition of each segment
  const checkpoints = new Map<number, Absorber>();
  const back = new Absorber(g, z, false, reversed);
  const wanted = new Map<number, number>(); // steps done -> segment
  for (let s = 0; s < nSeg; s++) wanted.set(G - 1 - parts[segEnd(s)], s);
  if (wanted.has(0)) checkpoints.set(wanted.get(0) as number, back.clone());
  while (!back.done) {
    back.step();
    progress?.tick();
    const s = wanted.get(back.nextGroup);
    if (s !== undefined) checkpoints.set(s, back.clone());
  }
  const out = new Float64Array(g.channelCount).fill(NaN);
  const fwd = new Absorber(g, z, false);
  const kern = getKernels();
  for (let s = 0; s < nSeg; s++) {
    const lo = s * K,
      hi = segEnd(s);
    // states of the backward sweep for partitions hi..lo
    const states = new Map<number, Absorber>();
    const b = (checkpoints.get(s) as Absorber).clone();
    states.set(hi, b.clone());
    for (let i = hi - 1; i >= lo; i--) {
      while (b.nextGroup < G - 1 - parts[i]) {
        b.step();
        progress?.tick();
      }
      states.set(i, b.clone());
    }
    for (let i = lo; i <= hi; i++) {
      while (fwd.nextGroup <= parts[i]) {
        fwd.step();
        progress?.tick();
      }
      const B = states.get(i) as Absorber;
      const f1 = Array.from(fwd.rowCh.subarray(0, fwd.nr)),
        f2 = Array.from(fwd.colCh.subarray(0, fwd.nc));
      const n1 = f1.length,
        n2 = f2.length;
      const SA = new Float64Array(2 * n1 * n2),
        SB = new Float64Array(2 * n2 * n1);
      for (let a = 0; a < n1; a++)
        for (let c = 0; c < n2; c++) {
          const [re, im] = fwd.entry(f1[a], f2[c]);
          SA[2 * (a * n2 + c)] = re;
          SA[2 * (a * n2 + c) + 1] = im;
        }
      for (let c = 0; c < n2; c++)
        for (let a = 0; a < n1; a++) {
          const [re, im] = B.entry(f2[c], f1[a]);
          SB[2 * (c * n1 + a)] = re;
          SB[2 * (c * n1 + a) + 1] = im;
        }
      const diagOf = (X: Float64Array, Y: Float64Array, n: number, m: number, chans: number[]) => {
        if (chans.every((ch) => !Number.isNaN(out[ch]))) return;
        const P = kern.matmul(X, Y, n, m, n);
        for (let k = 0; k < 2 * n * n; k++) P[k] = -P[k];
        for (let k = 0; k < n; k++) P[2 * (k * n + k)] += 1;
        const inv = kern.inverse(P, n);
        for (let k = 0; k < n; k++) if (Number.isNaN(out[chans[k]])) out[chans[k]] = 2 * inv[2 * (k * n + k)] - 1;
      };
      diagOf(SA, SB, n1, n2, f1);
      diagOf(SB, SA, n2, n1, f2);
      states.delete(i);
    }
  }
  for (let c = 0; c < g.channelCount; c++) if (Number.isNaN(out[c])) throw new Error(`internal: link ${c} not covered by any partition`);
  return out;
}

export function computeLdos(net: Network, c: LdosComputation, opts: ComputeOptions = {}): LdosResult {
  const scale: Scale = networkScale(net);
  const broadening = c.broadeningMeV ?? scale.energyPeriodMeV / 100;
  const eta = broadening / scale.energyScaleMeV;
  const gK = buildClosedSample(net, scale, c.fieldTesla, 0, "computation.fieldTesla");
  const valleys = net.degeneracy.valley,
    spin = net.degeneracy.spin;
  const gKp = valleys === 2 ? reverseGraph(gK) : null;
  const progress = new Progress(valleys * 3 * gK.schedule.length, opts);
  const theta = c.energyMeV / scale.energyScaleMeV;
  const f = gK.copies / (2 * Math.PI * scale.energyScaleMeV);
  const dK = Array.from(linkResolventDiagonal(gK, theta, eta, progress), (x) => x * f);
  const dKp = gKp ? Array.from(linkResolventDiagonal(gKp, theta, eta, progress), (x) => x * f) : null;
  const total = dK.map((x, i) => spin * (x + (dKp ? dKp[i] : 0)));
  const l = scale.periodNm;
  const links = { fromXNm: [] as number[], fromYNm: [] as number[], toXNm: [] as number[], toYNm: [] as number[], edge: [] as number[] };
  for (let ch = 0; ch < gK.channelCount; ch++) {
    links.fromXNm.push(gK.chSegment[4 * ch] * l);
    links.fromYNm.push(gK.chSegment[4 * ch + 1] * l);
    links.toXNm.push(gK.chSegment[4 * ch + 2] * l);
    links.toYNm.push(gK.chSegment[4 * ch + 3] * l);
    links.edge.push(gK.nodeReal[gK.chFromNode[ch]] && gK.nodeReal[gK.chToNode[ch]] ? 0 : 1);
  }
  progress.finish();
  return {
    kind: "ldos",
    energyMeV: c.energyMeV,
    fieldTesla: c.fieldTesla,
    broadeningMeV: broadening,
    links,
    ldosPerMeV: { valleyK: dK, valleyKPrime: dKp, total },
    totalDosPerMeV: total.reduce((a, b) => a + b, 0),
  };
}
