/**
 * Pure TypeScript implementation of ComplexKernels (see kernels.ts for the exact semantics), one
 * kernel per file under ./ts/: gemm.ts (matmul, gemmAccumulate), solve.ts, inverse.ts,
 * eig-hermitian.ts, eig-general.ts.
 */
import type { ComplexKernels } from "./kernels";
import { gemmAccumulate, matmul } from "./ts/gemm";
import { solve } from "./ts/solve";
import { inverse } from "./ts/inverse";
import { eigHermitian } from "./ts/eig-hermitian";
import { eigGeneral } from "./ts/eig-general";

export { gemmAccumulate, matmul, solve, inverse, eigHermitian, eigGeneral };

export const tsKernels: ComplexKernels = {
  name: "ts",
  matmul,
  gemmAccumulate,
  solve,
  inverse,
  eigHermitian,
  eigGeneral,
};
