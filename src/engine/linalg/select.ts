/**
 * Choice of the dense-kernel backend, made once when the engine is loaded (src/engine/index.ts
 * imports this module first, so ENGINE_VERSION carries the backend's name).
 *
 * TRISKEL_KERNELS = ts | openblas | auto (default auto):
 * - ts: the TypeScript kernels;
 * - openblas: the native kernels; throws when they cannot load or fail the self-test;
 * - auto: the native kernels when they load AND pass the self-test against the TypeScript
 *   kernels, else the TypeScript kernels with one log line saying why.
 */
import { SingularMatrixError } from "../errors";
import { loadNativeKernels, type NativeInfo, type NativeLoad } from "../native/index";
import { setKernels, tsKernels, type ComplexKernels } from "./kernels";

export type KernelMode = "ts" | "openblas" | "auto";

export interface KernelSelection {
  /** What TRISKEL_KERNELS asked for (auto when unset or not understood). */
  mode: KernelMode;
  /** Backend in use: "ts" or "openblas". */
  backend: string;
  /** Why this backend. */
  reason: string;
  /** Facts about the native library when it was loaded. */
  native: NativeInfo | null;
}

/** Agreement required between backends, relative to the size of the reference result. */
export const SELF_TEST_TOLERANCE = 1e-10;

/** Deterministic generator for the self-test matrices (mulberry32). */
function generator(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function randomComplex(rand: () => number, count: number): Float64Array {
  const out = new Float64Array(2 * count);
  for (let i = 0; i < out.length; i++) out[i] = 2 * rand() - 1;
  return out;
}

/** Random n x n matrix with `shift` added on the diagonal (well conditioned for the solves). */
function randomSquare(rand: () => number, n: number, shift: number): Float64Array {
  const a = randomComplex(rand, n * n);
  for (let i = 0; i < n; i++) a[2 * (i * n + i)] += shift;
  return a;
}

function randomHermitian(rand: () => number, n: number): Float64Array {
  const a = randomComplex(rand, n * n);
  for (let i = 0; i < n; i++) {
    a[2 * (i * n + i) + 1] = 0;
    for (let j = 0; j < i; j++) {
      a[2 * (j * n + i)] = a[2 * (i * n + j)];
      a[2 * (j * n + i) + 1] = -a[2 * (i * n + j) + 1];
    }
  }
  return a;
}

function maxAbs(x: Float64Array): number {
  let m = 0;
  for (let i = 0; i < x.length; i += 2) m = Math.max(m, Math.hypot(x[i], x[i + 1]));
  return m;
}

/** max |x - y| / max(1, max |y|) over complex entries (Infinity on a length mismatch). */
export function relativeDifference(x: Float64Array, y: Float64Array): number {
  if (x.length !== y.length) return Infinity;
  let d = 0;
  for (let i = 0; i < x.length; i += 2) d = Math.max(d, Math.hypot(x[i] - y[i], x[i + 1] - y[i + 1]));
  return d / Math.max(1, maxAbs(y));
}

/** Distance between two unordered lists of complex numbers (greedy nearest matching), relative. */
export function unorderedDifference(x: Float64Array, y: Float64Array): number {
  if (x.length !== y.length) return Infinity;
  const n = y.length / 2;
  const used = new Uint8Array(n);
  let d = 0;
  for (let i = 0; i < n; i++) {
    let best = -1,
      bestD = Infinity;
    for (let j = 0; j < n; j++) {
      if (used[j]) continue;
      const dd = Math.hypot(x[2 * i] - y[2 * j], x[2 * i + 1] - y[2 * j + 1]);
      if (dd < bestD) {
        bestD = dd;
        best = j;
      }
    }
    used[best] = 1;
    d = Math.max(d, bestD);
  }
  return d / Math.max(1, maxAbs(y));
}

/** Residual of Hermitian eigenvectors: max |A v - w v| and max |V^H V - I|, relative to max |A|. */
export function eigenvectorResidual(a: Float64Array, n: number, values: Float64Array, vectors: Float64Array): number {
  let r = 0;
  for (let c = 0; c < n; c++) {
    for (let i = 0; i < n; i++) {
      let sr = 0,
        si = 0;
      for (let j = 0; j < n; j++) {
        const ar = a[2 * (i * n + j)],
          ai = a[2 * (i * n + j) + 1];
        const vr = vectors[2 * (j * n + c)],
          vi = vectors[2 * (j * n + c) + 1];
        sr += ar * vr - ai * vi;
        si += ar * vi + ai * vr;
      }
      sr -= values[c] * vectors[2 * (i * n + c)];
      si -= values[c] * vectors[2 * (i * n + c) + 1];
      r = Math.max(r, Math.hypot(sr, si));
    }
    for (let c2 = 0; c2 < n; c2++) {
      let sr = 0,
        si = 0;
      for (let j = 0; j < n; j++) {
        const xr = vectors[2 * (j * n + c)],
          xi = vectors[2 * (j * n + c) + 1];
        const yr = vectors[2 * (j * n + c2)],
          yi = vectors[2 * (j * n + c2) + 1];
        sr += xr * yr + xi * yi;
        si += xr * yi - xi * yr;
      }
      r = Math.max(r, Math.hypot(sr - (c === c2 ? 1 : 0), si));
    }
  }
  return r / Math.max(1, maxAbs(a));
}

/**
 * Compare `k` with the reference kernels on small random matrices (every method, offsets and
 * leading dimensions, several right-hand sides, eigenvectors, a singular matrix, a short array).
 * Returns null when all agree to `tolerance`, else a one-line description of the first failure.
 */
export function selfTest(k: ComplexKernels, ref: ComplexKernels = tsKernels, tolerance = SELF_TEST_TOLERANCE): string | null {
  const rand = generator(0x7a1c5);
  const fail = (what: string, d: number) => `${what} differs from the ${ref.name} kernels by ${d.toExponential(2)}`;
  try {
    for (const [m, kk, n] of [
      [1, 1, 1],
      [3, 5, 4],
      [8, 8, 8],
      [13, 7, 11],
    ]) {
      const a = randomComplex(rand, m * kk),
        b = randomComplex(rand, kk * n);
      const d = relativeDifference(k.matmul(a, b, m, kk, n), ref.matmul(a, b, m, kk, n));
      if (!(d <= tolerance)) return fail(`matmul ${m}x${kk}x${n}`, d);
    }
    {
      // 5x3 times 3x6 added into a 7x9 block, all inside larger arrays.
      const m = 5,
        n = 6,
        kk = 3,
        lda = 4,
        ldb = 8,
        ldc = 9;
      const a = randomComplex(rand, 2 + m * lda),
        b = randomComplex(rand, 3 + kk * ldb),
        c0 = randomComplex(rand, 1 + 7 * ldc);
      const c1 = c0.slice(),
        c2 = c0.slice();
      k.gemmAccumulate(m, n, kk, a, 4, lda, b, 6, ldb, c1, 2, ldc);
      ref.gemmAccumulate(m, n, kk, a, 4, lda, b, 6, ldb, c2, 2, ldc);
      const d = relativeDifference(c1, c2);
      if (!(d <= tolerance)) return fail("gemmAccumulate with offsets", d);
    }
    for (const [n, nrhs] of [
      [1, 1],
      [5, 3],
      [12, 7],
      [9, 1],
    ]) {
      const a = randomSquare(rand, n, 2),
        b = randomComplex(rand, n * nrhs);
      const d = relativeDifference(k.solve(a, b, n, nrhs), ref.solve(a, b, n, nrhs));
      if (!(d <= tolerance)) return fail(`solve ${n}x${n} with ${nrhs} right-hand sides`, d);
    }
    {
      const a = randomSquare(rand, 6, 2);
      const d = relativeDifference(k.inverse(a, 6), ref.inverse(a, 6));
      if (!(d <= tolerance)) return fail("inverse 6x6", d);
    }
    for (const n of [1, 6, 10]) {
      const a = randomHermitian(rand, n);
      const mine = k.eigHermitian(a, n, true),
        theirs = ref.eigHermitian(a, n, false);
      const d = relativeDifference(toComplex(mine.values), toComplex(theirs.values));
      if (!(d <= tolerance)) return fail(`eigHermitian ${n}x${n} eigenvalues`, d);
      if (!mine.vectors) return `eigHermitian ${n}x${n} returned no eigenvectors`;
      const r = eigenvectorResidual(a, n, mine.values, mine.vectors);
      if (!(r <= tolerance)) return `eigHermitian ${n}x${n} eigenvectors have residual ${r.toExponential(2)}`;
      if (k.eigHermitian(a, n, false).vectors !== null) return "eigHermitian returned eigenvectors that were not asked for";
    }
    for (const n of [1, 7, 12]) {
      const a = randomComplex(rand, n * n);
      const d = unorderedDifference(k.eigGeneral(a, n), ref.eigGeneral(a, n));
      if (!(d <= tolerance)) return fail(`eigGeneral ${n}x${n}`, d);
    }
    {
      const s = new Float64Array([1, 0, 2, 0, 2, 0, 4, 0]);
      let thrown: unknown = null;
      try {
        k.solve(s, new Float64Array([1, 0, 1, 0]), 2, 1);
      } catch (e) {
        thrown = e;
      }
      if (!(thrown instanceof SingularMatrixError)) return "solve of a singular matrix did not throw SingularMatrixError";
    }
    {
      let thrown: unknown = null;
      try {
        k.matmul(new Float64Array(6), new Float64Array(8), 2, 2, 2);
      } catch (e) {
        thrown = e;
      }
      if (!(thrown instanceof RangeError)) return "matmul with a short array did not throw RangeError";
    }
  } catch (e) {
    return `self-test threw: ${e instanceof Error ? e.message.split("\n")[0] : String(e)}`;
  }
  return null;
}

function toComplex(re: Float64Array): Float64Array {
  const out = new Float64Array(2 * re.length);
  for (let i = 0; i < re.length; i++) out[2 * i] = re[i];
  return out;
}

/** Read TRISKEL_KERNELS. */
export function kernelMode(value: string | undefined): { mode: KernelMode; note: string | null } {
  const v = (value ?? "").trim().toLowerCase();
  if (v === "" || v === "auto") return { mode: "auto", note: null };
  if (v === "ts" || v === "openblas") return { mode: v, note: null };
  return { mode: "auto", note: `TRISKEL_KERNELS=${value} is not ts, openblas or auto; using auto` };
}

/** Pick, install (setKernels) and describe the backend. */
export function selectKernels(
  env: Record<string, string | undefined> = process.env,
  log: (line: string) => void = (l) => console.warn(l),
  load: () => NativeLoad = loadNativeKernels,
): KernelSelection {
  const { mode, note } = kernelMode(env.TRISKEL_KERNELS);
  if (note) log(`triskel engine: ${note}`);
  if (mode === "ts") {
    setKernels(tsKernels);
    return { mode, backend: tsKernels.name, reason: "TRISKEL_KERNELS=ts", native: null };
  }
  const loaded = load();
  let problem: string | null = loaded.ok ? selfTest(loaded.kernels) : loaded.reason;
  if (loaded.ok && problem) problem = `self-test failed: ${problem}`;
  if (loaded.ok && !problem) {
    setKernels(loaded.kernels);
    const why = mode === "openblas" ? "TRISKEL_KERNELS=openblas" : "native kernels loaded and passed the self-test";
    return { mode, backend: loaded.kernels.name, reason: `${why} (OpenBLAS core ${loaded.info.coreName})`, native: loaded.info };
  }
  if (mode === "openblas") throw new Error(`TRISKEL_KERNELS=openblas, but the native kernels are unusable: ${problem}`);
  setKernels(tsKernels);
  const reason = `native kernels unusable: ${problem}`;
  log(`triskel engine: using the TypeScript kernels (${reason})`);
  return { mode, backend: tsKernels.name, reason, native: loaded.ok ? loaded.info : null };
}

/** The selection made when the engine was loaded. */
export const kernelSelection: KernelSelection = selectKernels();
