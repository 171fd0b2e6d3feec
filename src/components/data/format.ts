/** Formatting for values with uncertainties: the value rounded to the uncertainty's two significant digits. */
export function withStderr(value: number, stderr: number | null | undefined): { value: string; stderr: string } {
  if (stderr === null || stderr === undefined || !(stderr > 0) || !Number.isFinite(stderr)) return { value: sig(value, 5), stderr: "–" };
  const digits = Math.max(0, 1 - Math.floor(Math.log10(stderr)));
  if (Math.abs(value) >= 1e5 || Math.abs(value) < 1e-3) return { value: value.toExponential(3), stderr: stderr.toExponential(1) };
  return { value: value.toFixed(Math.min(digits, 10)), stderr: stderr.toFixed(Math.min(digits, 10)) };
}

export function sig(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return "–";
  if (x === 0) return "0";
  const a = Math.abs(x);
  if (a >= 1e5 || a < 1e-3) return x.toExponential(digits - 1);
  return Number(x.toPrecision(digits)).toString();
}
