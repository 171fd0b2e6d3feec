/**
 * The narrowest resonance of a sample with leads, for choosing the thermal quadrature.
 * With the leads open, the amplitudes inside the sample evolve as psi_{k+1} = M psi_k per link
 * traversal (node matrices, then the links' static phases); M is a contraction (what leaves into
 * a lead is lost) and the energy only multiplies it by the common phase e^{i E tau}. An
 * eigenvalue lambda of M is a pole of the scattering matrix at link phase theta with
 * Im theta = -ln |lambda|: a resonance of half-width -ln |lambda| in theta, i.e.
 * -ln |lambda| x hbar v / l in energy. Power iteration from a fixed pseudo-random start gives the
 * slowest decay rate (the narrowest resonance); it is stopped by a work budget, and the rate
 * measured over the last steps (never slower than the true slowest one) is returned.
 */
import { CH_LINK, type NetworkGraph } from "../network/graph";
import { randomStream } from "../rng";

export interface ResonanceEstimate {
  /** Half-width of the narrowest resonance in link phase (radians). */
  widthRad: number;
  /** Steps iterated. */
  steps: number;
}

export function narrowestResonance(g: NetworkGraph, maxWork = 4e7): ResonanceEstimate {
  const n = g.channelCount;
  let re = new Float64Array(n),
    im = new Float64Array(n);
  let nre = new Float64Array(n),
    nim = new Float64Array(n);
  const rand = randomStream(12345);
  const pr = new Float64Array(n),
    pi = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    if (g.chKind[c] !== CH_LINK) continue;
    re[c] = rand() - 0.5;
    im[c] = rand() - 0.5;
    const ph = g.chThetaB[c] + g.chThetaDis[c];
    pr[c] = Math.cos(ph);
    pi[c] = Math.sin(ph);
  }
  let work = 0;
  for (let m = 0; m < g.nodeCount; m++) work += g.slotCount[m] * g.slotCount[m];
  const maxSteps = Math.max(50, Math.min(100000, Math.floor(maxWork / Math.max(1, work))));
  const norm = () => {
    let s = 0;
    for (let c = 0; c < n; c++) s += re[c] * re[c] + im[c] * im[c];
    return s;
  };
  let n0 = norm();
  if (n0 === 0) return { widthRad: Infinity, steps: 0 };
  const history: number[] = [0];
  let logNorm = 0,
    steps = 0;
  while (steps < maxSteps) {
    nre.fill(0);
    nim.fill(0);
    for (let m = 0; m < g.nodeCount; m++) {
      const k = g.slotCount[m],
        so = g.slotOffset[m],
        mo = 2 * g.matrixOffset[m];
      for (let o = 0; o < k; o++) {
        const out = g.outChannel[so + o];
        if (g.chKind[out] !== CH_LINK) continue;
        let ar = 0,
          ai = 0;
        for (let s = 0; s < k; s++) {
          const inc = g.inChannel[so + s];
          if (g.chKind[inc] !== CH_LINK) continue;
          const sr = g.matrices[mo + 2 * (o * k + s)],
            si = g.matrices[mo + 2 * (o * k + s) + 1];
          ar += sr * re[inc] - si * im[inc];
          ai += sr * im[inc] + si * re[inc];
        }
        nre[out] = ar * pr[out] - ai * pi[out];
        nim[out] = ar * pi[out] + ai * pr[out];
      }
    }
    [re, nre] = [nre, re];
    [im, nim] = [nim, im];
    steps++;
    const n1 = norm();
    if (n1 === 0 || n1 < 1e-280) return { widthRad: Infinity, steps };
    // renormalise, keep the log of the norm
    const f = 1 / Math.sqrt(n1);
    for (let c = 0; c < n; c++) {
      re[c] *= f;
      im[c] *= f;
    }
    logNorm += 0.5 * Math.log(n1 / n0);
    n0 = 1;
    history.push(logNorm);
    // all amplitude gone (decay by e^-40 overall): every resonance is broader than the rate so far
    if (logNorm < -40 && steps >= 20) break;
  }
  // decay rate of the amplitude over the last quarter of the steps
  const from = Math.floor((3 * steps) / 4);
  const rate = (history[from] - history[steps]) / Math.max(1, steps - from);
  return { widthRad: Math.max(rate, 1e-12), steps };
}
