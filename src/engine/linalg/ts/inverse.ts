/** Matrix inverse (TypeScript kernels): the solve against the identity. */
import { solve } from "./solve";

export function inverse(a: Float64Array, n: number): Float64Array {
  const id = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) id[2 * (i * n + i)] = 1;
  return solve(a, id, n, n);
}
