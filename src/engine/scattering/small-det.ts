/** Determinant of a small packed complex matrix (LU with partial pivoting). */
export function smallDet(aIn: Float64Array, n: number): [number, number] {
  const a = aIn.slice(0, 2 * n * n);
  let dr = 1,
    di = 0;
  for (let k = 0; k < n; k++) {
    let best = k,
      bestAbs = -1;
    for (let i = k; i < n; i++) {
      const ab = Math.hypot(a[2 * (i * n + k)], a[2 * (i * n + k) + 1]);
      if (ab > bestAbs) {
        bestAbs = ab;
        best = i;
      }
    }
    if (bestAbs === 0) return [0, 0];
    if (best !== k) {
      for (let j = 0; j < 2 * n; j++) {
        const t = a[2 * k * n + j];
        a[2 * k * n + j] = a[2 * best * n + j];
        a[2 * best * n + j] = t;
      }
      dr = -dr;
      di = -di;
    }
    const pr = a[2 * (k * n + k)],
      pi = a[2 * (k * n + k) + 1];
    const nr = dr * pr - di * pi,
      ni = dr * pi + di * pr;
    dr = nr;
    di = ni;
    const den = pr * pr + pi * pi;
    for (let i = k + 1; i < n; i++) {
      const xr = a[2 * (i * n + k)],
        xi = a[2 * (i * n + k) + 1];
      const fr = (xr * pr + xi * pi) / den,
        fi = (xi * pr - xr * pi) / den;
      for (let j = k + 1; j < n; j++) {
        const yr = a[2 * (k * n + j)],
          yi = a[2 * (k * n + j) + 1];
        a[2 * (i * n + j)] -= fr * yr - fi * yi;
        a[2 * (i * n + j) + 1] -= fr * yi + fi * yr;
      }
    }
  }
  return [dr, di];
}
