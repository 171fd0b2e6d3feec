/**
 * The dense complex kernels of the engine, behind ONE small interface so that a native backend
 * (OpenBLAS / LAPACK, issue 10) can replace the TypeScript one without touching the physics.
 *
 * Layout (every method): a complex matrix is a Float64Array of interleaved (re, im) pairs in
 * row-major order. Element (i, j) of an m x n matrix with leading dimension ld (in COMPLEX elements,
 * ld >= n) sits at re = data[offset + 2 * (i * ld + j)], im = the next double. Methods that take
 * no leading dimension use ld = number of columns and offset 0 (a packed matrix).
 *
 * Semantics:
 * - Inputs are never modified unless the method says "in place".
 * - Shapes are checked (length of the arrays against the given sizes); a mismatch throws RangeError.
 * - A singular matrix in solve/inverse (a zero pivot, or a pivot below 1e-300 in magnitude) throws
 *   SingularMatrixError. No scaling or iterative refinement is done.
 * - eigHermitian reads the full matrix and assumes it is Hermitian (it uses the lower triangle);
 *   eigenvalues come back in ascending order; vectors (if asked) are the columns of an n x n packed
 *   complex matrix, orthonormal.
 * - eigGeneral returns the n eigenvalues (interleaved complex, in no particular order) of a general
 *   complex matrix; throws Error("eigGeneral: no convergence") if the QR iteration stalls.
 * Backends must agree with the TypeScript kernels to 1e-10 (relative to the matrix norm).
 */
export interface ComplexKernels {
  /** Backend name, appended to ENGINE_VERSION ("ts", "openblas", ...). */
  readonly name: string;
  /** C = A (m x k) * B (k x n), packed; returns a new packed m x n matrix. */
  matmul(a: Float64Array, b: Float64Array, m: number, k: number, n: number): Float64Array;
  /**
   * In place on c: C[m x n] += A[m x k] * B[k x n], all three with offsets and leading dimensions
   * (complex elements). c must not overlap a or b. This is the hot loop of the slice composition.
   */
  gemmAccumulate(
    m: number,
    n: number,
    k: number,
    a: Float64Array,
    aOffset: number,
    lda: number,
    b: Float64Array,
    bOffset: number,
    ldb: number,
    c: Float64Array,
    cOffset: number,
    ldc: number,
  ): void;
  /** X with A X = B; A packed n x n, B packed n x nrhs; returns X packed n x nrhs. */
  solve(a: Float64Array, b: Float64Array, n: number, nrhs: number): Float64Array;
  /** A^-1, packed n x n. */
  inverse(a: Float64Array, n: number): Float64Array;
  /** Eigenvalues (ascending) and optionally orthonormal eigenvectors of a Hermitian matrix. */
  eigHermitian(a: Float64Array, n: number, wantVectors: boolean): { values: Float64Array; vectors: Float64Array | null };
  /** Eigenvalues (interleaved complex) of a general complex matrix. */
  eigGeneral(a: Float64Array, n: number): Float64Array;
}

import { tsKernels } from "./ts-kernels";

let current: ComplexKernels = tsKernels;

/** The kernels in use (TypeScript by default). */
export function getKernels(): ComplexKernels {
  return current;
}

/** Select a backend (for example the native one after its self-test); returns the previous one. */
export function setKernels(kernels: ComplexKernels): ComplexKernels {
  const previous = current;
  current = kernels;
  return previous;
}

export { tsKernels };
