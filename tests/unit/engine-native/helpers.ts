/** Helpers for the native-kernel tests: random matrices, comparisons, numpy (Debian python3-numpy). */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { loadNativeKernels } from "@/engine/native/index";
import type { ComplexKernels } from "@/engine/linalg/kernels";

export { relativeDifference, unorderedDifference, eigenvectorResidual } from "@/engine/linalg/select";

/** The native kernels; the tests need them built (npm ci or npm run build:native). */
export function nativeKernels(): ComplexKernels {
  const loaded = loadNativeKernels();
  if (!loaded.ok) throw new Error(`native kernels unavailable: ${loaded.reason}`);
  return loaded.kernels;
}

export function randomComplex(rand: () => number, count: number): Float64Array {
  return Float64Array.from({ length: 2 * count }, () => 2 * rand() - 1);
}

export function randomSquare(rand: () => number, n: number, diagonalShift = 0): Float64Array {
  const a = randomComplex(rand, n * n);
  for (let i = 0; i < n; i++) a[2 * (i * n + i)] += diagonalShift;
  return a;
}

export function randomHermitian(rand: () => number, n: number): Float64Array {
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

export function identity(n: number): Float64Array {
  const id = new Float64Array(2 * n * n);
  for (let i = 0; i < n; i++) id[2 * (i * n + i)] = 1;
  return id;
}

export function realToComplex(x: Float64Array): Float64Array {
  const out = new Float64Array(2 * x.length);
  x.forEach((v, i) => {
    out[2 * i] = v;
  });
  return out;
}

const PY = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";

/**
 * numpy as an independent reference: matrices go as interleaved lists, `code` computes `out`
 * (a complex or real numpy array) from the named inputs. Returns out flattened, interleaved.
 */
export function numpyEval(inputs: Record<string, { data: Float64Array; shape: number[] }>, code: string): Float64Array {
  const payload = Object.fromEntries(Object.entries(inputs).map(([k, v]) => [k, { data: Array.from(v.data), shape: v.shape }]));
  const script = [
    "import json, sys",
    "import numpy as np",
    "req = json.load(sys.stdin)",
    "env = {k: (np.array(v['data'][0::2]) + 1j * np.array(v['data'][1::2])).reshape(v['shape']) for k, v in req.items()}",
    "env['np'] = np",
    `exec(${JSON.stringify(code)}, env)`,
    "out = np.asarray(env['out'], dtype=complex).ravel()",
    "json.dump([float(x) for z in out for x in (z.real, z.imag)], sys.stdout)",
  ].join("\n");
  const r = spawnSync(PY, ["-c", script], { input: JSON.stringify(payload), encoding: "utf8", maxBuffer: 64 * 1024 * 1024 });
  if (r.status !== 0) throw new Error(`numpy failed: ${r.stderr || r.error}`);
  return Float64Array.from(JSON.parse(r.stdout) as number[]);
}
