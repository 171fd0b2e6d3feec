/**
 * Constants of the cost model (calibrated by `npm run bench` on the 2-core development machine;
 * see src/engine/README.md for the measured figures). One "work unit" is one complex
 * multiply-add of the dense kernels.
 */
export const COST_CONSTANTS = {
  /** Complex multiply-adds per second of the TypeScript kernels in the slice composition. */
  sliceMulAddsPerSecond: 3.0e8,
  /** Complex multiply-adds per second in the dense eigen solvers (Hessenberg QR, Householder). */
  eigenMulAddsPerSecond: 2.5e8,
  /** Work of a general complex eigenproblem of size n: this factor times n^3. */
  eigGeneralFactor: 12,
  /** Work of a Hermitian eigenproblem of size n (values only): this factor times n^3. */
  eigHermitianFactor: 3,
  /** Fixed overhead per computation (parsing, graph building), seconds. */
  baseSeconds: 0.05,
  /** Bytes per channel and per node of a network graph (typed arrays). */
  graphBytesPerChannel: 96,
  graphBytesPerNode: 64,
  /** Memory of the Node.js process besides the computation (module code, heap baseline). */
  baselineBytes: 80 * 1024 * 1024,
  /** The peak memory limit of one computation (product.md: 2 GB). */
  memoryLimitBytes: 2 * 1024 * 1024 * 1024,
  /** The compute-time limit of one computation: 6 compute-hours (the Lab plan's largest job). */
  computeSecondsLimit: 6 * 3600,
};
