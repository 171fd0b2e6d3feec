/**
 * Period analysis of a magnetoconductance curve (cheap, no fit): remove a smooth polynomial
 * background, resample onto a uniform field grid, apply a Hann window, zero-pad, Fourier
 * transform, take the strongest peak and refine it by parabolic interpolation of the log
 * magnitude. Then dB -> area A = (h/e)/dB -> moire period and twist angle.
 *
 * Geometry (physics.md sections 2 and 4): triangle area A_triangle = (sqrt3/4) l^2, unit cell
 * (two triangles) A_cell = (sqrt3/2) l^2, l = a / (2 sin(theta/2)) with the graphene lattice
 * constant a. The constants and the twist/period conversion are the engine's (src/engine/constants.ts).
 */
import { FLUX_QUANTUM_WB, GRAPHENE_LATTICE_NM, twistFromPeriodDegrees } from "@/engine/browser";
import type { PeriodAnalysis, PeriodOptions, PeriodReading } from "@/shared/api";
export type { PeriodAnalysis, PeriodOptions, PeriodReading };

export class PeriodAnalysisError extends Error {
  constructor(
    message: string,
    readonly field?: string,
  ) {
    super(message);
    this.name = "PeriodAnalysisError";
  }
}

/** The twist angle (degrees) of a moire period (nm), or null when no angle gives it (l < a/2). */
export function twistDegreesFromPeriodNm(periodNm: number): number | null {
  if (!(Number.isFinite(periodNm) && periodNm >= GRAPHENE_LATTICE_NM / 2)) return null;
  return twistFromPeriodDegrees(periodNm);
}

/** Area (nm^2) enclosing one flux quantum when the field period is dB (tesla): A = (h/e)/dB. */
export function areaNm2FromFieldPeriod(periodTesla: number): number {
  return (FLUX_QUANTUM_WB / periodTesla) * 1e18;
}

export function readingsFromArea(areaNm2: number): { perTriangle: PeriodReading; perUnitCell: PeriodReading } {
  const lTri = Math.sqrt((4 * areaNm2) / Math.sqrt(3));
  const lCell = Math.sqrt((2 * areaNm2) / Math.sqrt(3));
  return {
    perTriangle: {
      assumption:
        "One flux quantum h/e through each triangle of the network: A_triangle = (sqrt3/4) l^2 " +
        "(the smallest loop of the triangular network; the model manual describes it under Geometry and direction, /manual#geometry).",
      areaNm2,
      periodNm: lTri,
      twistDegrees: twistDegreesFromPeriodNm(lTri),
    },
    perUnitCell: {
      assumption: "One flux quantum h/e through each moire unit cell (two triangles): A_cell = (sqrt3/2) l^2.",
      areaNm2,
      periodNm: lCell,
      twistDegrees: twistDegreesFromPeriodNm(lCell),
    },
  };
}

/** Least-squares polynomial of the given degree on x scaled to [-1, 1]; returns the fitted values. */
export function polynomialBackground(x: number[], y: number[], degree: number): number[] {
  const n = x.length;
  const d = Math.min(degree, n - 1);
  const x0 = x[0];
  const span = x[n - 1] - x[0] || 1;
  const t = x.map((v) => (2 * (v - x0)) / span - 1);
  const m = d + 1;
  // Normal equations on Legendre-like scaled monomials (well conditioned for d <= 8 on [-1, 1]).
  const A = Array.from({ length: m }, () => new Array<number>(m).fill(0));
  const b = new Array<number>(m).fill(0);
  const pow = new Array<number>(m);
  for (let i = 0; i < n; i++) {
    pow[0] = 1;
    for (let k = 1; k < m; k++) pow[k] = pow[k - 1] * t[i];
    for (let r = 0; r < m; r++) {
      b[r] += pow[r] * y[i];
      for (let c = 0; c < m; c++) A[r][c] += pow[r] * pow[c];
    }
  }
  const coef = solveSmall(A, b);
  return t.map((tv) => {
    let s = 0;
    for (let k = m - 1; k >= 0; k--) s = s * tv + coef[k];
    return s;
  });
}

function solveSmall(A: number[][], b: number[]): number[] {
  const n = b.length;
  const M = A.map((row, i) => [...row, b[i]]);
  for (let col = 0; col < n; col++) {
    let piv = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(M[r][col]) > Math.abs(M[piv][col])) piv = r;
    [M[col], M[piv]] = [M[piv], M[col]];
    const p = M[col][col];
    if (Math.abs(p) < 1e-300) continue;
    for (let r = 0; r < n; r++) {
      if (r === col) continue;
      const f = M[r][col] / p;
      if (f === 0) continue;
      for (let c = col; c <= n; c++) M[r][c] -= f * M[col][c];
    }
  }
  return M.map((row, i) => (Math.abs(row[i]) < 1e-300 ? 0 : row[n] / row[i]));
}

/** In-place iterative radix-2 FFT (length a power of two). */
export function fft(re: Float64Array, im: Float64Array): void {
  const n = re.length;
  for (let i = 1, j = 0; i < n; i++) {
    let bit = n >> 1;
    for (; j & bit; bit >>= 1) j ^= bit;
    j ^= bit;
    if (i < j) {
      [re[i], re[j]] = [re[j], re[i]];
      [im[i], im[j]] = [im[j], im[i]];
    }
  }
  for (let len = 2; len <= n; len <<= 1) {
    const ang = (-2 * Math.PI) / len;
    const wr = Math.cos(ang);
    const wi = Math.sin(ang);
    for (let i = 0; i < n; i += len) {
      let cr = 1;
      let ci = 0;
      for (let k = 0; k < len / 2; k++) {
        const a = i + k;
        const b = a + len / 2;
        const tr = re[b] * cr - im[b] * ci;
        const ti = re[b] * ci + im[b] * cr;
        re[b] = re[a] - tr;
        im[b] = im[a] - ti;
        re[a] += tr;
        im[a] += ti;
        const ncr = cr * wr - ci * wi;
        ci = cr * wi + ci * wr;
        cr = ncr;
      }
    }
  }
}

const nextPow2 = (n: number) => 2 ** Math.ceil(Math.log2(Math.max(1, n)));

const DEFAULT_ZERO_PAD_FACTOR = 8;

/** The FFT length analysePeriod uses for a curve of `points` points: the work grows with it (about L log L). */
export function periodFftLength(points: number, zeroPadFactor = DEFAULT_ZERO_PAD_FACTOR): number {
  return nextPow2(nextPow2(points)) * zeroPadFactor;
}

/** Linear interpolation of (x, y) (x ascending) at the points xs. */
export function resampleLinear(x: number[], y: number[], xs: number[]): number[] {
  const out = new Array<number>(xs.length);
  let j = 0;
  for (let i = 0; i < xs.length; i++) {
    const v = xs[i];
    while (j < x.length - 2 && x[j + 1] < v) j++;
    const t = (v - x[j]) / (x[j + 1] - x[j]);
    out[i] = y[j] + (y[j + 1] - y[j]) * t;
  }
  return out;
}

export function analysePeriod(fieldTesla: number[], conductance: number[], options: PeriodOptions = {}): PeriodAnalysis {
  const backgroundDegree = options.backgroundDegree ?? 3;
  const zeroPadFactor = options.zeroPadFactor ?? DEFAULT_ZERO_PAD_FACTOR;
  const minCyclesInWindow = options.minCyclesInWindow ?? 1.5;
  if (!Number.isInteger(backgroundDegree) || backgroundDegree < 0 || backgroundDegree > 8)
    throw new PeriodAnalysisError("backgroundDegree must be an integer from 0 to 8.", "backgroundDegree");
  if (!Number.isInteger(zeroPadFactor) || zeroPadFactor < 1 || zeroPadFactor > 64)
    throw new PeriodAnalysisError("zeroPadFactor must be an integer from 1 to 64.", "zeroPadFactor");
  if (!(minCyclesInWindow > 0 && minCyclesInWindow < 100))
    throw new PeriodAnalysisError("minCyclesInWindow must be above 0 and below 100.", "minCyclesInWindow");
  const n = fieldTesla.length;
  if (n < 16) throw new PeriodAnalysisError(`The period analysis needs at least 16 points; this curve has ${n}.`);
  const x = fieldTesla;
  const span = x[n - 1] - x[0];
  if (!(span > 0)) throw new PeriodAnalysisError("The field range is empty; x must increase.");

  const background = polynomialBackground(x, conductance, backgroundDegree);
  const oscillation = conductance.map((g, i) => g - background[i]);

  // Uniform grid with as many points as the data (a power of two at least), spanning the data.
  const steps = x.slice(1).map((v, i) => v - x[i]);
  const minStep = Math.min(...steps);
  const maxStep = Math.max(...steps);
  const resampled = maxStep - minStep > 1e-6 * (span / (n - 1));
  const m = resampled ? nextPow2(n) : n;
  const dx = span / (m - 1);
  const xs = Array.from({ length: m }, (_, i) => x[0] + i * dx);
  const ys = resampled ? resampleLinear(x, oscillation, xs) : oscillation;

  const L = nextPow2(m) * zeroPadFactor; // = periodFftLength(n, zeroPadFactor): m is n or nextPow2(n)
  const re = new Float64Array(L);
  const im = new Float64Array(L);
  let wsum = 0;
  for (let i = 0; i < m; i++) {
    const w = m === 1 ? 1 : 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / (m - 1));
    re[i] = ys[i] * w;
    wsum += w;
  }
  fft(re, im);
  const half = L / 2;
  const df = 1 / (L * dx); // 1/T per bin
  // Amplitude normalised so that a pure cosine of amplitude A gives a peak of about A.
  const amp = new Float64Array(half + 1);
  for (let k = 0; k <= half; k++) amp[k] = (2 * Math.hypot(re[k], im[k])) / wsum;
  const kMin = Math.max(1, Math.ceil(minCyclesInWindow / span / df));
  let kPeak = -1;
  for (let k = kMin; k < half; k++) if (kPeak < 0 || amp[k] > amp[kPeak]) kPeak = k;
  if (kPeak < 0 || !(amp[kPeak] > 0)) throw new PeriodAnalysisError("No oscillation was found after removing the background: the spectrum is flat.");
  // Parabolic interpolation of ln|F| around the peak (exact for a Gaussian peak shape).
  let shift = 0;
  if (kPeak > kMin && kPeak < half - 1) {
    const a = Math.log(amp[kPeak - 1] + 1e-300);
    const b = Math.log(amp[kPeak] + 1e-300);
    const c = Math.log(amp[kPeak + 1] + 1e-300);
    const den = a - 2 * b + c;
    if (den < 0) shift = Math.max(-0.5, Math.min(0.5, (0.5 * (a - c)) / den));
  }
  const fPeak = (kPeak + shift) * df;
  const sorted = Array.from(amp.slice(kMin, half)).sort((p, q) => p - q);
  const median = sorted[Math.floor(sorted.length / 2)] || 1e-300;
  const periodTesla = 1 / fPeak;
  const areaNm2 = areaNm2FromFieldPeriod(periodTesla);
  const { perTriangle, perUnitCell } = readingsFromArea(areaNm2);

  // Spectrum for display: up to 4x the peak frequency or the Nyquist limit, at most ~600 points.
  const kShow = Math.min(half, Math.max(kPeak * 4, kMin * 8));
  const stride = Math.max(1, Math.ceil(kShow / 600));
  const fs: number[] = [];
  const as: number[] = [];
  for (let k = 0; k <= kShow; k += stride) {
    fs.push(k * df);
    as.push(amp[k]);
  }
  return {
    peak: { frequencyPerTesla: fPeak, amplitude: amp[kPeak], prominence: amp[kPeak] / median },
    periodTesla,
    fluxQuantumWeber: FLUX_QUANTUM_WB,
    areaNm2,
    perTriangle,
    perUnitCell,
    spectrum: { frequencyPerTesla: fs, amplitude: as },
    background,
    oscillation,
    settings: { backgroundDegree, zeroPadFactor, minCyclesInWindow, uniformPoints: m, fftLength: L, resampled, window: "hann" },
    fieldRangeTesla: [x[0], x[n - 1]],
  };
}
