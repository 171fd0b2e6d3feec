/**
 * Localization length on long strips: the transmission T(L) into a perfect lead attached after
 * every column is read off the growing composed matrix (the frontier channels are the lead), so
 * one sweep gives ln T at every length; ln T ~ -2 L / xi, fitted by least squares on the ensemble
 * mean of ln T for L >= fitFrom. Lambda = xi / W with W the strip width.
 */
import type { LocalizationComputation, Network } from "../schema";
import { CH_LEFT_IN, CH_LEFT_OUT, channelPhases, reverseGraph, type NetworkGraph } from "../network/graph";
import { buildSample, sampleGeometryNm } from "../network/lattice";
import { buildSchedule } from "../network/schedule";
import { Absorber } from "../scattering/absorber";
import { fluxPerPlaquette, mean, networkScale, std } from "./common";
import { Progress, type ComputeOptions } from "./progress";

export interface LocalizationLength {
  nm: number;
  inLinkLengths: number;
  stderrNm: number | null;
}

export interface LocalizationResult {
  kind: "localization";
  energyMeV: number;
  fieldTesla: number;
  samples: number;
  rows: number;
  widthNm: number;
  /** Distances from the left lead (nm) at which T was read: after column i, (i + 1) x column pitch. */
  lengthsNm: number[];
  meanLnT: { valleyK: number[]; valleyKPrime: number[] | null };
  stderrLnT: { valleyK: number[]; valleyKPrime: number[] | null };
  fitFromNm: number;
  /** null when ln T does not decrease (no localization within the strip). */
  localizationLength: { valleyK: LocalizationLength | null; valleyKPrime: LocalizationLength | null };
  /** Lambda = xi / W. */
  lambda: { valleyK: number | null; valleyKPrime: number | null };
}

/**
 * Abscissae (units of l) of the clean cuts that follow each column but the last: triangular
 * columns hold nodes at x = i and i + 1/2, so the cut after column i lies at i + 3/4; square
 * columns are l / sqrt2 apart, the cut after column c at (c + 1/2) / sqrt2.
 */
export function columnCutXs(net: Network, columns: number): number[] {
  const xs: number[] = [];
  for (let i = 0; i + 1 < columns; i++) xs.push(net.lattice === "triangular" ? i + 0.75 : (i + 0.5) / Math.SQRT2);
  return xs;
}

/** Column pitch in units of l (triangular l, square l / sqrt2). */
export function columnPitch(net: Network): number {
  return net.lattice === "triangular" ? 1 : 1 / Math.SQRT2;
}

/**
 * ln T read at the clean cuts at `atXs` (and at the end, into the right lead) of one sweep.
 * The graph must have a schedule with clean cuts there (buildSchedule(g, undefined, "columns")).
 */
export function lnTransmissionProfile(g: NetworkGraph, theta: number, progress?: Progress, atXs?: number[]): { xs: number[]; lnT: number[] } {
  // left-lead output rows are not needed for T(L): skipped (exact, half the work)
  const abs = new Absorber(g, channelPhases(g, theta), false, undefined, 16, CH_LEFT_OUT);
  const leftIn: number[] = [];
  for (let c = 0; c < g.channelCount; c++) if (g.chKind[c] === CH_LEFT_IN) leftIn.push(c);
  const xs: number[] = [],
    lnT: number[] = [];
  let cut = 0;
  while (!abs.done) {
    abs.step();
    progress?.tick();
    const t = abs.nextGroup - 1;
    const atCut = cut < g.cutAfter.length && g.cutAfter[cut] === t;
    const wanted = abs.done || (atCut && (!atXs || atXs.some((x) => Math.abs(x - g.cutX[cut]) < 1e-9)));
    if (atCut && !wanted) {
      cut++;
      continue;
    }
    if (wanted) {
      let T = 0;
      for (let r = 0; r < abs.nr; r++) {
        const ch = abs.rowCh[r];
        if (g.chKind[ch] === CH_LEFT_OUT) continue;
        for (const j of leftIn) {
          const [re, im] = abs.entry(ch, j);
          T += re * re + im * im;
        }
      }
      xs.push(abs.done ? Math.max(...Array.from(g.nodeX)) + 0.5 : g.cutX[cut]);
      lnT.push(Math.log(Math.max(T, 1e-300)) + (g.copies > 1 ? Math.log(g.copies) : 0));
      if (!abs.done) cut++;
    }
  }
  return { xs, lnT };
}

function fitSlope(xs: number[], ys: number[]): number {
  const mx = mean(xs),
    my = mean(ys);
  let sxy = 0,
    sxx = 0;
  for (let i = 0; i < xs.length; i++) {
    sxy += (xs[i] - mx) * (ys[i] - my);
    sxx += (xs[i] - mx) ** 2;
  }
  return sxx > 0 ? sxy / sxx : 0;
}

export function computeLocalization(net: Network, c: LocalizationComputation, opts: ComputeOptions = {}): LocalizationResult {
  const scale = networkScale(net);
  const phi = fluxPerPlaquette(scale, c.fieldTesla);
  const valleys = net.degeneracy.valley;
  const samples = c.ensemble.samples;
  const geom = sampleGeometryNm(net, scale.periodNm);
  const l = scale.periodNm;
  const theta = c.energyMeV / scale.energyScaleMeV;
  const g0 = buildSample(net, { mode: "leads", fluxPerPlaquette: phi, sample: 0 });
  const progress = new Progress(samples * valleys * g0.schedule.length, opts);
  const profK: number[][] = [],
    profKp: number[][] = [];
  const cutXs = columnCutXs(net, net.size.columns);
  for (let s = 0; s < samples; s++) {
    const g = s === 0 ? g0 : buildSample(net, { mode: "leads", fluxPerPlaquette: phi, sample: s });
    // left to right, so that a clean cut follows every column (T is read after each column)
    buildSchedule(g, undefined, "columns");
    const a = lnTransmissionProfile(g, theta, progress, cutXs);
    if (a.lnT.length !== net.size.columns) throw new Error(`internal: T read at ${a.lnT.length} cuts, expected one per column (${net.size.columns})`);
    profK.push(a.lnT);
    if (valleys === 2) {
      const gr = reverseGraph(g);
      buildSchedule(gr, undefined, "columns");
      const b = lnTransmissionProfile(gr, theta, progress, cutXs);
      if (b.lnT.length !== a.lnT.length) throw new Error("internal: valley profiles do not align");
      profKp.push(b.lnT);
    }
  }
  const pitch = columnPitch(net);
  const lengthsNm = Array.from({ length: net.size.columns }, (_, i) => (i + 1) * pitch * l);
  const xs = lengthsNm;
  const fitFromColumns = c.fitFromColumns ?? Math.max(net.size.rows, Math.floor(net.size.columns / 4));
  const fitFromNm = Math.min(fitFromColumns * (geom.lengthNm / net.size.columns), lengthsNm[Math.max(0, lengthsNm.length - 2)] ?? 0);
  const stats = (prof: number[][]) => {
    const m = xs.map((_, i) => mean(prof.map((p) => p[i])));
    const se = xs.map((_, i) => std(prof.map((p) => p[i])) / Math.sqrt(prof.length));
    const idx = lengthsNm.map((L, i) => (L >= fitFromNm - 1e-9 ? i : -1)).filter((i) => i >= 0);
    const X = idx.map((i) => lengthsNm[i]);
    const slope = fitSlope(
      X,
      idx.map((i) => m[i]),
    );
    let xi: LocalizationLength | null = null;
    if (slope < -1e-12 && X.length >= 2) {
      const nm = -2 / slope;
      let stderrNm: number | null = null;
      if (prof.length >= 2) {
        const slopes = prof.map((p) =>
          fitSlope(
            X,
            idx.map((i) => p[i]),
          ),
        );
        const sse = std(slopes) / Math.sqrt(prof.length);
        stderrNm = (2 * sse) / (slope * slope);
      }
      xi = { nm, inLinkLengths: nm / l, stderrNm };
    }
    return { m, se, xi };
  };
  const K = stats(profK);
  const Kp = valleys === 2 ? stats(profKp) : null;
  progress.finish();
  return {
    kind: "localization",
    energyMeV: c.energyMeV,
    fieldTesla: c.fieldTesla,
    samples,
    rows: net.size.rows,
    widthNm: geom.widthNm,
    lengthsNm,
    meanLnT: { valleyK: K.m, valleyKPrime: Kp ? Kp.m : null },
    stderrLnT: { valleyK: K.se, valleyKPrime: Kp ? Kp.se : null },
    fitFromNm,
    localizationLength: { valleyK: K.xi, valleyKPrime: Kp ? Kp.xi : null },
    lambda: { valleyK: K.xi ? K.xi.nm / geom.widthNm : null, valleyKPrime: Kp?.xi ? Kp.xi.nm / geom.widthNm : null },
  };
}
