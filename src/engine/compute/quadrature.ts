/** Gauss-Legendre nodes and weights on [-1, 1] (Newton iteration on P_n; Golub-Welsch-free). */
export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n),
    w = new Float64Array(n);
  const m = Math.floor((n + 1) / 2);
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 1;
    for (let it = 0; it < 100; it++) {
      let p1 = 1,
        p2 = 0;
      for (let j = 1; j <= n; j++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j;
      }
      pp = (n * (z * p1 - p2)) / (z * z - 1);
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) < 1e-15) break;
    }
    x[i] = -z;
    x[n - 1 - i] = z;
    w[i] = 2 / ((1 - z * z) * pp * pp);
    w[n - 1 - i] = w[i];
  }
  return { x, w };
}

/**
 * Thermal average  G(T) = integral G(E) (-df/dE) dE  with the substitution u = tanh((E - mu)/(2kT)),
 * for which (-df/dE) dE = du / 2 exactly; Gauss-Legendre in u. Returns energies and weights
 * (summing to 1).
 */
export function thermalNodes(muMeV: number, kTMeV: number, points: number): { energiesMeV: number[]; weights: number[] } {
  if (kTMeV <= 0) return { energiesMeV: [muMeV], weights: [1] };
  const { x, w } = gaussLegendre(points);
  const energiesMeV: number[] = [],
    weights: number[] = [];
  for (let i = 0; i < points; i++) {
    energiesMeV.push(muMeV + 2 * kTMeV * Math.atanh(x[i]));
    weights.push(w[i] / 2);
  }
  return { energiesMeV, weights };
}

/**
 * Gauss-Kronrod 15-point rule with its embedded 7-point Gauss rule on [-1, 1] (the QUADPACK qk15
 * abscissae and weights, Piessens et al. 1983, each written as the nearest double). Nodes are listed
 * from the end point inwards; the Gauss rule uses the odd-indexed Kronrod nodes. Tested by exactness
 * on polynomials.
 */
export const KRONROD_15 = {
  x: [0.9914553711208126, 0.9491079123427585, 0.8648644233597691, 0.7415311855993945, 0.5860872354676911, 0.4058451513773972, 0.20778495500789848, 0],
  wK: [
    0.022935322010529224, 0.06309209262997856, 0.10479001032225019, 0.14065325971552592, 0.1690047266392679, 0.19035057806478542, 0.20443294007529889,
    0.20948214108472782,
  ],
  /** Gauss weights at x[1], x[3], x[5], x[7]. */
  wG: [0.1294849661688697, 0.27970539148927664, 0.3818300505051189, 0.4179591836734694],
} as const;

/** One Gauss-Kronrod panel of a vector integrand: Kronrod estimate and |Kronrod - Gauss| per component. */
export function kronrodPanel(h: (t: number) => number[], a: number, b: number): { value: number[]; error: number[] } {
  const c = (a + b) / 2,
    r = (b - a) / 2;
  let value: number[] | null = null,
    gauss: number[] | null = null;
  const acc = (y: number[], wk: number, wg: number) => {
    if (!value || !gauss) {
      value = y.map(() => 0);
      gauss = y.map(() => 0);
    }
    for (let i = 0; i < y.length; i++) {
      value[i] += wk * y[i];
      gauss[i] += wg * y[i];
    }
  };
  for (let i = 0; i < 8; i++) {
    const wg = i % 2 === 1 ? KRONROD_15.wG[(i - 1) / 2] : 0;
    if (i === 7) {
      acc(h(c), KRONROD_15.wK[7], KRONROD_15.wG[3]);
      continue;
    }
    acc(h(c - r * KRONROD_15.x[i]), KRONROD_15.wK[i], wg);
    acc(h(c + r * KRONROD_15.x[i]), KRONROD_15.wK[i], wg);
  }
  const v = (value as unknown as number[]).map((x) => x * r),
    g = (gauss as unknown as number[]).map((x) => x * r);
  return { value: v, error: v.map((x, i) => Math.abs(x - g[i])) };
}

/** -df/dE at x = E - mu (per meV), and its sum over images x + n P (the periodized kernel). */
export function fermiKernel(xMeV: number, kTMeV: number): number {
  const c = Math.cosh(xMeV / (2 * kTMeV));
  return 1 / (4 * kTMeV * c * c);
}
export function periodizedFermiKernel(xMeV: number, kTMeV: number, periodMeV: number): number {
  if (kTMeV < periodMeV / 4) {
    // direct sum of images: terms fall off like exp(-|n| P / kT), below 1e-17 after a few
    let s = fermiKernel(xMeV, kTMeV);
    for (let n = 1; n < 1000; n++) {
      const t = fermiKernel(xMeV + n * periodMeV, kTMeV) + fermiKernel(xMeV - n * periodMeV, kTMeV);
      s += t;
      if (t < 1e-18 * s) break;
    }
    return s;
  }
  // Poisson summation: (1/P) sum_m w^(2 pi m / P) e^{i 2 pi m x / P}, w^(w) = pi kT w / sinh(pi kT w),
  // terms fall off like exp(-2 pi^2 m kT / P)
  let s = 1;
  for (let m = 1; m < 1000; m++) {
    const om = (2 * Math.PI * m) / periodMeV;
    const t = 2 * ((Math.PI * kTMeV * om) / Math.sinh(Math.PI * kTMeV * om)) * Math.cos(om * xMeV);
    s += t;
    if (Math.abs(t) < 1e-18) break;
  }
  return s / periodMeV;
}

export interface ThermalAverageOptions {
  /** Relative accuracy to reach (default 1e-4). */
  relativeTolerance: number;
  /** Most energies the adaptive rule may evaluate. */
  maxEnergies: number;
  /** Fixed Gauss-Legendre rule with this many points (in u = tanh((E - mu) / 2kT)) instead of the adaptive one. */
  fixedPoints?: number;
  /** Scale of the integrand (e.g. injected channels): accuracy never asked below relTol x 1e-6 x scale. */
  scale: number;
  /** Widest first panel in meV (a few widths of the narrowest resonance), so that structure of that scale is seen from the start. */
  panelMeV: number;
}

export interface ThermalAverage {
  values: number[];
  /** Energies at which the integrand was evaluated. */
  energies: number;
  method: "none" | "adaptive-gauss-kronrod" | "gauss-legendre";
  /** Interval: the Fermi window mu +- 20 kT, or one energy period with the periodized kernel. */
  domain: "none" | "fermi-window" | "one-period";
  /** Estimated error of the total, relative to the total (sum of components). */
  estimatedRelativeError: number;
  relativeTolerance: number;
  converged: boolean;
}

/** Half-width of the Fermi window in units of kT: the weight outside is 2 / (1 + e^X) = 4e-9. */
export const FERMI_WINDOW_KT = 20;
/** Panels at least this many in the Fermi window (each 5 kT: the kernel itself is resolved). */
const MIN_WINDOW_PANELS = 8;
const MIN_PERIOD_PANELS = 4;

/** Domain and first panels of the adaptive thermal rule (also used by the cost estimate). */
export function thermalPlan(kTMeV: number, periodMeV: number, panelMeV: number): { windowed: boolean; widthMeV: number; panels: number; energies: number } {
  const windowed = 2 * FERMI_WINDOW_KT * kTMeV <= periodMeV;
  const widthMeV = windowed ? 2 * FERMI_WINDOW_KT * kTMeV : periodMeV;
  const panels = Math.max(windowed ? MIN_WINDOW_PANELS : MIN_PERIOD_PANELS, Math.ceil(widthMeV / Math.max(panelMeV, 1e-300)));
  return { windowed, widthMeV, panels, energies: 15 * panels };
}

/** Thrown when the structure to resolve needs more energies than allowed (before any is evaluated). */
export class ThermalResolutionError extends Error {
  constructor(
    message: string,
    readonly neededEnergies: number,
    readonly maxEnergies: number,
  ) {
    super(message);
    this.name = "ThermalResolutionError";
  }
}

/**
 * Thermal average  integral f(E) (-df/dE) dE  of a vector integrand that is periodic in E with
 * period P (every link has the same length, physics.md section 6), to a relative accuracy.
 * - kT <= P / (2 X), X = 20: the Fermi window mu +- X kT with the kernel -df/dE; the weight
 *   outside the window (2 / (1 + e^X) = 4e-9) times the scale is added to the error estimate.
 * - larger kT: one period mu +- P/2 with the periodized kernel sum_n w(E + n P) (exact, since f is
 *   P-periodic), by images or by its Fourier series.
 * Adaptive Gauss-Kronrod (G7-K15) panels uniform in E, at most `panelMeV` wide at the start (a
 * few widths of the narrowest resonance, so that no resonance falls between the nodes), the
 * panel with the largest |K15 - G7| split first, until the summed error is below relTol x |total|.
 * `fixedPoints` keeps the earlier fixed rule (Gauss-Legendre in u = tanh((E - mu)/2kT)) and
 * estimates its error against the rule with half the points.
 */
export function thermalAverage(
  f: (energyMeV: number) => number[],
  muMeV: number,
  kTMeV: number,
  periodMeV: number,
  opts: ThermalAverageOptions,
): ThermalAverage {
  const tol = opts.relativeTolerance;
  if (!(kTMeV > 0))
    return { values: f(muMeV), energies: 1, method: "none", domain: "none", estimatedRelativeError: 0, relativeTolerance: tol, converged: true };
  const total = (v: number[]) => v.reduce((a, b) => a + b, 0);
  const floor = tol * 1e-6 * Math.max(1, opts.scale);
  if (opts.fixedPoints !== undefined) {
    const rule = (n: number) => {
      const { energiesMeV, weights } = thermalNodes(muMeV, kTMeV, n);
      let acc: number[] = [];
      energiesMeV.forEach((e, i) => {
        const y = f(e);
        acc = i === 0 ? y.map((v) => weights[i] * v) : acc.map((a, j) => a + weights[i] * y[j]);
      });
      return acc;
    };
    const n = opts.fixedPoints,
      half = Math.max(2, Math.ceil(n / 2));
    const a = rule(n),
      b = rule(half);
    const err = Math.abs(total(a) - total(b)) / Math.max(Math.abs(total(a)), floor / tol);
    return {
      values: a,
      energies: n + half,
      method: "gauss-legendre",
      domain: "fermi-window",
      estimatedRelativeError: err,
      relativeTolerance: tol,
      converged: err <= tol,
    };
  }
  const plan = thermalPlan(kTMeV, periodMeV, opts.panelMeV);
  if (plan.energies > opts.maxEnergies) {
    throw new ThermalResolutionError(
      `the thermal average needs at least ${plan.energies} energies ` +
        `to resolve resonances about ${(opts.panelMeV / 8).toPrecision(3)} meV wide over ${plan.widthMeV.toPrecision(4)} meV, ` +
        `over the limit of ${opts.maxEnergies} (temperatureMaxEnergies)` +
        `; raise temperatureMaxEnergies (up to 100000), ` +
        `or give temperaturePoints for a fixed rule whose estimated error is reported`,
      plan.energies,
      opts.maxEnergies,
    );
  }
  const lo = plan.windowed ? muMeV - FERMI_WINDOW_KT * kTMeV : muMeV - periodMeV / 2;
  const hi = lo + plan.widthMeV;
  const kernel = plan.windowed ? (x: number) => fermiKernel(x, kTMeV) : (x: number) => periodizedFermiKernel(x, kTMeV, periodMeV);
  const h = (e: number) => {
    const w = kernel(e - muMeV);
    return f(e).map((y) => y * w);
  };
  const tailError = plan.windowed ? (2 / (1 + Math.exp(FERMI_WINDOW_KT))) * Math.max(1, opts.scale) : 0;
  type Panel = { a: number; b: number; value: number[]; error: number[] };
  const list: Panel[] = [];
  let energies = 0;
  const evalPanel = (a: number, b: number): Panel => {
    energies += 15;
    return { a, b, ...kronrodPanel(h, a, b) };
  };
  for (let i = 0; i < plan.panels; i++) list.push(evalPanel(lo + ((hi - lo) * i) / plan.panels, lo + ((hi - lo) * (i + 1)) / plan.panels));
  const sumValues = () =>
    list.reduce<number[]>(
      (acc, p) => acc.map((x, i) => x + p.value[i]),
      list[0].value.map(() => 0),
    );
  const panelError = (p: Panel) => p.error.reduce((a, b) => a + b, 0);
  let values = sumValues();
  let error = list.reduce((a, p) => a + panelError(p), 0) + tailError;
  while (error > tol * Math.max(Math.abs(total(values)), floor / tol) && energies + 30 <= opts.maxEnergies) {
    let worst = 0;
    for (let i = 1; i < list.length; i++) if (panelError(list[i]) > panelError(list[worst])) worst = i;
    const p = list[worst],
      mid = (p.a + p.b) / 2;
    list.splice(worst, 1, evalPanel(p.a, mid), evalPanel(mid, p.b));
    values = sumValues();
    error = list.reduce((a, q) => a + panelError(q), 0) + tailError;
  }
  const rel = error / Math.max(Math.abs(total(values)), floor / tol);
  return {
    values,
    energies,
    method: "adaptive-gauss-kronrod",
    domain: plan.windowed ? "fermi-window" : "one-period",
    estimatedRelativeError: rel,
    relativeTolerance: tol,
    converged: rel <= tol,
  };
}
