/**
 * Backend selection: TRISKEL_KERNELS, the start-up self-test, the single log line of a fall-back,
 * the OpenBLAS core type chosen from /proc/cpuinfo before the library loads (on the main thread
 * and inside a worker thread), and the backend's name in the engine version.
 */
import { spawnSync } from "node:child_process";
import { readFileSync } from "node:fs";
import path from "node:path";
import { afterEach, describe, expect, it } from "vitest";
import { SingularMatrixError } from "@/engine/errors";
import { getKernels, setKernels, tsKernels, type ComplexKernels } from "@/engine/linalg/kernels";
import { kernelMode, kernelSelection, selectKernels, selfTest } from "@/engine/linalg/select";
import { chooseCoreType, loadNativeKernels, type NativeLoad } from "@/engine/native/index";
import { engineVersion } from "@/engine/version";
import { nativeKernels } from "./helpers";

const nat = nativeKernels();
const before = getKernels();
afterEach(() => {
  setKernels(before);
});

const FLAGS_SPR = "fpu vme sse sse2 ssse3 sse4_1 sse4_2 avx f16c fma avx2 bmi2 avx512f avx512dq avx512ifma avx512cd avx512bw avx512vl avx512_bf16 avx512_fp16";
const cpuinfo = (flags: string) =>
  `processor\t: 0\nvendor_id\t: GenuineIntel\nmodel name\t: Some Xeon\nflags\t\t: ${flags}\nbugs\t\t: spectre_v1\n\nprocessor\t: 1\nflags\t\t: ${flags}\n`;

describe("OpenBLAS core type from /proc/cpuinfo", () => {
  it("AVX-512 (F, DQ, BW, VL) -> SkylakeX", () => {
    expect(chooseCoreType(cpuinfo(FLAGS_SPR))).toBe("SkylakeX");
  });
  it("AVX2 with FMA, no AVX-512 -> Haswell", () => {
    expect(chooseCoreType(cpuinfo("fpu sse sse2 avx fma avx2 bmi2"))).toBe("Haswell");
  });
  it("AVX-512F without VL is not enough for SkylakeX kernels -> Haswell", () => {
    expect(chooseCoreType(cpuinfo("sse2 avx fma avx2 avx512f avx512cd"))).toBe("Haswell");
  });
  it("older processors and texts without flags -> null (OpenBLAS decides)", () => {
    expect(chooseCoreType(cpuinfo("fpu sse sse2 ssse3 avx"))).toBeNull();
    expect(chooseCoreType("processor : 0\nFeatures : fp asimd\n")).toBeNull();
    expect(chooseCoreType("")).toBeNull();
  });
});

describe("TRISKEL_KERNELS", () => {
  it("reads ts, openblas and auto (default), and calls anything else auto with a note", () => {
    expect(kernelMode(undefined)).toEqual({ mode: "auto", note: null });
    expect(kernelMode(" OpenBLAS ")).toEqual({ mode: "openblas", note: null });
    expect(kernelMode("ts").mode).toBe("ts");
    const odd = kernelMode("cuda");
    expect(odd.mode).toBe("auto");
    expect(odd.note).toMatch(/TRISKEL_KERNELS=cuda is not ts, openblas or auto/);
  });

  it("ts forces the TypeScript kernels without loading anything", () => {
    const lines: string[] = [];
    let loads = 0;
    const sel = selectKernels(
      { TRISKEL_KERNELS: "ts" },
      (l) => lines.push(l),
      () => {
        loads++;
        return loadNativeKernels();
      },
    );
    expect(sel.backend).toBe("ts");
    expect(getKernels()).toBe(tsKernels);
    expect(engineVersion()).toMatch(/\+ts$/);
    expect(loads).toBe(0);
    expect(lines).toEqual([]);
  });

  it("openblas forces the native kernels", () => {
    const sel = selectKernels({ TRISKEL_KERNELS: "openblas" }, () => {
      throw new Error("no log expected");
    });
    expect(sel.backend).toBe("openblas");
    expect(getKernels().name).toBe("openblas");
    expect(engineVersion()).toMatch(/\+openblas$/);
    expect(sel.native?.coreName).toBeTruthy();
  });

  it("openblas throws (does not fall back) when the native kernels cannot load", () => {
    expect(() =>
      selectKernels(
        { TRISKEL_KERNELS: "openblas" },
        () => {},
        () => ({ ok: false, reason: "addon not built" }),
      ),
    ).toThrow(/TRISKEL_KERNELS=openblas, but the native kernels are unusable: addon not built/);
  });
});

describe("auto: native when it loads and passes the self-test, else TypeScript with one log line", () => {
  it("on this machine (addon built): native, silently", () => {
    const lines: string[] = [];
    const sel = selectKernels({}, (l) => lines.push(l));
    expect(sel.mode).toBe("auto");
    expect(sel.backend).toBe("openblas");
    expect(sel.reason).toMatch(/passed the self-test/);
    expect(lines).toEqual([]);
    expect(engineVersion()).toMatch(/\+openblas$/);
  });

  it("the unit projects' setup selected the backend before this file ran (auto here: native)", () => {
    expect(before.name).toBe(process.env.TRISKEL_KERNELS === "ts" ? "ts" : "openblas");
  });

  it("the engine picked its backend at load: the default (auto) selection is the native one here", () => {
    const expected = process.env.TRISKEL_KERNELS === "ts" ? "ts" : "openblas";
    expect(kernelSelection.backend).toBe(expected);
  });

  it("addon missing: TypeScript kernels and exactly one line saying why", () => {
    const lines: string[] = [];
    const sel = selectKernels(
      { TRISKEL_KERNELS: "auto" },
      (l) => lines.push(l),
      () => ({ ok: false, reason: "addon not built (triskel_kernels.node not found)" }),
    );
    expect(sel.backend).toBe("ts");
    expect(getKernels()).toBe(tsKernels);
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^triskel engine: using the TypeScript kernels \(native kernels unusable: addon not built/);
    expect(lines[0]).not.toContain("\n");
  });

  it("a backend that disagrees with the TypeScript kernels is refused by the self-test", () => {
    const loaded = loadNativeKernels();
    if (!loaded.ok) throw new Error(loaded.reason);
    const skewed: ComplexKernels = {
      ...nat,
      matmul: (a, b, m, k, n) => {
        const c = nat.matmul(a, b, m, k, n);
        c[0] += 1e-8;
        return c;
      },
    };
    const lines: string[] = [];
    const fake: NativeLoad = { ...loaded, kernels: skewed };
    const sel = selectKernels(
      {},
      (l) => lines.push(l),
      () => fake,
    );
    expect(sel.backend).toBe("ts");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/self-test failed: matmul 1x1x1 differs from the ts kernels by 1\.00e-8/);
  });
});

describe("selfTest", () => {
  it("passes for the native kernels and for the TypeScript kernels against themselves", () => {
    expect(selfTest(nat)).toBeNull();
    expect(selfTest(tsKernels)).toBeNull();
  });

  it("catches wrong eigenvectors, a missed singular matrix, a wrong gemm offset and a throwing method", () => {
    const badVectors: ComplexKernels = {
      ...nat,
      eigHermitian: (a, n, v) => {
        const r = nat.eigHermitian(a, n, v);
        if (r.vectors && n > 1) r.vectors.reverse();
        return r;
      },
    };
    expect(selfTest(badVectors)).toMatch(/eigHermitian \d+x\d+ eigenvectors have residual/);
    const noSingular: ComplexKernels = {
      ...nat,
      solve: (a, b, n, r) => {
        try {
          return nat.solve(a, b, n, r);
        } catch (e) {
          if (e instanceof SingularMatrixError) return new Float64Array(2 * n * r);
          throw e;
        }
      },
    };
    expect(selfTest(noSingular)).toMatch(/singular matrix did not throw SingularMatrixError/);
    const ignoresOffset: ComplexKernels = {
      ...nat,
      gemmAccumulate: (m, n, k, a, _ao, lda, b, bo, ldb, c, co, ldc) => nat.gemmAccumulate(m, n, k, a, 0, lda, b, bo, ldb, c, co, ldc),
    };
    expect(selfTest(ignoresOffset)).toMatch(/gemmAccumulate with offsets differs/);
    const throws: ComplexKernels = {
      ...nat,
      eigGeneral: () => {
        throw new Error("boom\nsecond line");
      },
    };
    expect(selfTest(throws)).toBe("self-test threw: boom");
  });
});

describe("OpenBLAS environment is set before the library loads (fresh processes)", () => {
  const root = path.resolve(import.meta.dirname, "../../..");
  const fixture = path.join(import.meta.dirname, "fixtures", "load-report.ts");
  const run = (args: string[], env: Record<string, string | undefined>) => {
    const childEnv: Record<string, string> = {};
    for (const [k, v] of Object.entries({ ...process.env, ...env })) if (v !== undefined) childEnv[k] = v;
    const r = spawnSync(path.join(root, "node_modules", ".bin", "tsx"), [fixture, ...args], {
      cwd: root,
      env: childEnv as NodeJS.ProcessEnv,
      encoding: "utf8",
      timeout: 60_000,
    });
    if (r.status !== 0) throw new Error(`fixture failed: ${r.stderr}`);
    return JSON.parse(r.stdout.trim().split("\n").pop()!) as {
      ok: boolean;
      isMainThread: boolean;
      coreName: string;
      coreType: string | null;
      coreTypeSource: string;
      threads: number;
      mallocTuned: boolean;
      product: number[];
    };
  };
  const chosen = chooseCoreType(readFileSync("/proc/cpuinfo", "utf8"));

  it("inside a worker thread (process.env there is a private copy): core type from cpuinfo reaches OpenBLAS, one thread", () => {
    const r = run(["worker"], { OPENBLAS_CORETYPE: undefined, OPENBLAS_NUM_THREADS: undefined });
    expect(r.ok).toBe(true);
    expect(r.isMainThread).toBe(false);
    expect(r.coreType).toBe(chosen);
    expect(r.coreTypeSource).toBe(chosen ? "cpuinfo" : "none");
    if (chosen) expect(r.coreName.toLowerCase()).toBe(chosen.toLowerCase());
    expect(r.threads).toBe(1);
    expect(r.product).toEqual([5, 5]); // (1 + 2i)(3 - i)
  });

  it("on the main thread: the same core type, OpenBLAS's own thread count", () => {
    const r = run([], { OPENBLAS_CORETYPE: undefined, OPENBLAS_NUM_THREADS: undefined });
    expect(r.isMainThread).toBe(true);
    expect(r.coreType).toBe(chosen);
    if (chosen) expect(r.coreName.toLowerCase()).toBe(chosen.toLowerCase());
    expect(r.threads).toBeGreaterThanOrEqual(1);
  });

  it("glibc malloc keeps freed result buffers (page faults per product) unless TRISKEL_MALLOC_TUNING=0", () => {
    expect(
      run([], { TRISKEL_MALLOC_TUNING: undefined, GLIBC_TUNABLES: undefined, MALLOC_TRIM_THRESHOLD_: undefined, MALLOC_MMAP_THRESHOLD_: undefined })
        .mallocTuned,
    ).toBe(true);
    expect(run([], { TRISKEL_MALLOC_TUNING: "0" }).mallocTuned).toBe(false);
  });

  it("an OPENBLAS_CORETYPE already set is respected", () => {
    const r = run(["worker"], { OPENBLAS_CORETYPE: "Haswell" });
    expect(r.coreTypeSource).toBe("environment");
    expect(r.coreType).toBe("Haswell");
    expect(r.coreName).toBe("Haswell");
    expect(r.product).toEqual([5, 5]);
  });
});
