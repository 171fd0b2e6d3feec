/**
 * Loader of the OpenBLAS/LAPACK backend of the engine's complex kernels (see README.md here).
 *
 * Before the kernels addon is loaded (loading it loads OpenBLAS, which reads its environment once):
 * - OPENBLAS_CORETYPE: kept if already set; otherwise chosen from /proc/cpuinfo (AVX-512 ->
 *   SkylakeX, AVX2 -> Haswell), because Debian's OpenBLAS 0.3.21 may not recognise a newer
 *   processor and would then run its slow generic code;
 * - OPENBLAS_NUM_THREADS=1 and OMP_NUM_THREADS=1 inside worker threads (the worker's pool supplies
 *   the parallelism, and compute-seconds are measured per engine thread).
 * Inside a worker thread Node's process.env is a private copy that OpenBLAS never sees, so both are
 * set in the real process environment through the tiny triskel_env addon.
 *
 * loadNativeKernels() never throws: it returns the kernels or the reason they are unavailable.
 */
import { readFileSync, existsSync } from "node:fs";
import { createRequire } from "node:module";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { isMainThread } from "node:worker_threads";
import { SingularMatrixError } from "../errors";
import type { ComplexKernels } from "../linalg/kernels";

/**
 * The functions exported by build/Release/triskel_kernels.node (src/kernels.cc): the kernels of
 * ComplexKernels, with the same signatures, and a few about OpenBLAS itself.
 */
export interface NativeAddon extends Omit<ComplexKernels, "name"> {
  coreName(): string;
  config(): string;
  getThreads(): number;
  setThreads(count: number): void;
  /** Whether the addon raised glibc's trim and mmap thresholds (see src/kernels.cc). */
  mallocTuned(): boolean;
}

interface EnvAddon {
  getenv(name: string): string | null;
  setenv(name: string, value: string): void;
}

export interface NativeInfo {
  /** OpenBLAS kernel set in use (openblas_get_corename). */
  coreName: string;
  /** OpenBLAS build description (openblas_get_config). */
  config: string;
  /** OpenBLAS threads for this process. */
  threads: number;
  /** OPENBLAS_CORETYPE at load, and whether the loader chose it ("cpuinfo") or found it ("environment"). */
  coreType: string | null;
  coreTypeSource: "environment" | "cpuinfo" | "none";
  /** The addon file that was loaded. */
  file: string;
  /** glibc malloc keeps freed result buffers for reuse (TRISKEL_MALLOC_TUNING=0 turns it off). */
  mallocTuned: boolean;
}

export type NativeLoad = { ok: true; kernels: ComplexKernels; addon: NativeAddon; info: NativeInfo } | { ok: false; reason: string };

/**
 * The OpenBLAS core type for a /proc/cpuinfo text: "SkylakeX" with AVX-512 (F, DQ, BW and VL, the
 * ones its kernels use), "Haswell" with AVX2 and FMA, null otherwise (let OpenBLAS decide).
 */
export function chooseCoreType(cpuinfo: string): string | null {
  const line = /^flags\s*:(.*)$/m.exec(cpuinfo);
  if (!line) return null;
  const flags = new Set(line[1].trim().split(/\s+/));
  if (["avx512f", "avx512dq", "avx512bw", "avx512vl"].every((f) => flags.has(f))) return "SkylakeX";
  if (flags.has("avx2") && flags.has("fma")) return "Haswell";
  return null;
}

const ADDON = "triskel_kernels.node";
const ENV_ADDON = "triskel_env.node";

/** Folders that may hold the built addons: beside this file (or the bundle), then from the working directory. */
function addonFolders(): string[] {
  const folders: string[] = [];
  if (process.env.TRISKEL_NATIVE_DIR) folders.push(process.env.TRISKEL_NATIVE_DIR);
  try {
    const here = path.dirname(fileURLToPath(import.meta.url));
    folders.push(path.join(here, "build", "Release"));
    // the command line's bundle (dist/engine-cli.mjs, scripts/build-cli.mjs): from the repository root
    folders.push(path.join(here, "..", "src", "engine", "native", "build", "Release"));
  } catch {
    // not a file: URL (bundled): fall through to the working directory
  }
  folders.push(path.join(process.cwd(), "src", "engine", "native", "build", "Release"));
  return folders;
}

function requireFrom(file: string): unknown {
  const req = createRequire(file);
  return req(file);
}

function errorText(e: unknown): string {
  const msg = e instanceof Error ? e.message : String(e);
  return msg.split("\n")[0];
}

let cached: NativeLoad | null = null;

/** Load (once per thread) the native kernels; never throws. */
export function loadNativeKernels(): NativeLoad {
  if (cached) return cached;
  cached = load();
  return cached;
}

function load(): NativeLoad {
  const folder = addonFolders().find((f) => existsSync(path.join(f, ADDON)));
  if (!folder) return { ok: false, reason: `addon not built (${ADDON} not found; run npm run build:native)` };
  const file = path.join(folder, ADDON);
  // 1. Environment of OpenBLAS, in the real process environment.
  let env: EnvAddon | null = null;
  try {
    env = requireFrom(path.join(folder, ENV_ADDON)) as EnvAddon;
  } catch {
    env = null; // without it: process.env (real on the main thread)
  }
  const getenv = (name: string): string | null => {
    const v = env ? env.getenv(name) : null;
    return v ?? process.env[name] ?? null;
  };
  const setenv = (name: string, value: string): void => {
    process.env[name] = value;
    if (env) env.setenv(name, value);
  };
  let coreType = getenv("OPENBLAS_CORETYPE");
  let coreTypeSource: NativeInfo["coreTypeSource"] = coreType ? "environment" : "none";
  if (!coreType) {
    let cpuinfo = "";
    try {
      cpuinfo = readFileSync("/proc/cpuinfo", "utf8");
    } catch {
      cpuinfo = "";
    }
    const chosen = chooseCoreType(cpuinfo);
    if (chosen) {
      setenv("OPENBLAS_CORETYPE", chosen);
      coreType = chosen;
      coreTypeSource = "cpuinfo";
    }
  }
  if (!isMainThread) {
    setenv("OPENBLAS_NUM_THREADS", "1");
    setenv("OMP_NUM_THREADS", "1");
  }
  // 2. The kernels addon (loads OpenBLAS and LAPACKE).
  let addon: NativeAddon;
  try {
    addon = requireFrom(file) as NativeAddon;
  } catch (e) {
    return { ok: false, reason: `addon failed to load: ${errorText(e)}` };
  }
  try {
    if (!isMainThread) addon.setThreads(1); // OpenBLAS was maybe loaded earlier by another thread
    const info: NativeInfo = {
      coreName: addon.coreName(),
      config: addon.config(),
      threads: addon.getThreads(),
      coreType,
      coreTypeSource,
      file,
      mallocTuned: addon.mallocTuned(),
    };
    return { ok: true, kernels: wrap(addon), addon, info };
  } catch (e) {
    return { ok: false, reason: `addon misbehaves: ${errorText(e)}` };
  }
}

function singular(e: unknown, what: string): unknown {
  if (e && typeof e === "object" && (e as { code?: unknown }).code === "TRISKEL_SINGULAR") return new SingularMatrixError(what);
  return e;
}

/** The ComplexKernels object over the addon (errors mapped to the engine's classes). */
export function wrap(addon: NativeAddon): ComplexKernels {
  return {
    name: "openblas",
    matmul: (a, b, m, k, n) => addon.matmul(a, b, m, k, n),
    gemmAccumulate: (m, n, k, a, aOffset, lda, b, bOffset, ldb, c, cOffset, ldc) =>
      addon.gemmAccumulate(m, n, k, a, aOffset, lda, b, bOffset, ldb, c, cOffset, ldc),
    solve(a, b, n, nrhs) {
      try {
        return addon.solve(a, b, n, nrhs);
      } catch (e) {
        throw singular(e, "solve");
      }
    },
    inverse(a, n) {
      try {
        return addon.inverse(a, n);
      } catch (e) {
        throw singular(e, "inverse");
      }
    },
    eigHermitian: (a, n, wantVectors) => addon.eigHermitian(a, n, wantVectors),
    eigGeneral: (a, n) => addon.eigGeneral(a, n),
  };
}
