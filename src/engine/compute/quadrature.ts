/** Gauss-Legendre nodes and weights on [-1, 1] (Newton iteration on P_n; Golub-Welsch-free). */
export function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n), w = new Float64Array(n);
  const m = Math.floor((n + 1) / 2);
  for (let i = 0; i < m; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let pp = 1;
    for (let it = 0; it < 100; it++) {
      let p1 = 1, p2 = 0;
      for (let j = 1; j <= n; j++) { const p3 = p2; p2 = p1; p1 = ((2 * j - 1) * z * p2 - (j - 1) * p3) / j; }
      pp = (n * (z * p1 - p2)) / (z * z - 1);
      const z1 = z;
      z = z1 - p1 / pp;
      if (Math.abs(z - z1) < 1e-15) break;
    }
    x[i] = -z; x[n - 1 - i] = z;
    w[i] = 2 / ((1 - z * z) * pp * pp); w[n - 1 - i] = w[i];
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
  const energiesMeV: number[] = [], weights: number[] = [];
  for (let i = 0; i < points; i++) { energiesMeV.push(muMeV + 2 * kTMeV * Math.atanh(x[i])); weights.push(w[i] / 2); }
  return { energiesMeV, weights };
}
