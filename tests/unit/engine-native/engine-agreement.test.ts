/**
 * The engine's own results agree between the two kernel backends (TypeScript and OpenBLAS) to
 * 1e-10 on representative inputs: conductance (periodic and open triangular samples, disorder,
 * field, both valleys, an ensemble, temperature), the square network, the Bloch spectrum with
 * flux, the density of states, the local density of states and the localization length.
 */
import { afterAll, describe, expect, it } from "vitest";
import { compute } from "@/engine/compute";
import { getKernels, setKernels, tsKernels } from "@/engine/linalg/kernels";
import { parseComputeInput } from "@/engine/schema";
import { nativeKernels } from "./helpers";

const nat = nativeKernels();
const before = getKernels();
afterAll(() => {
  setKernels(before);
});

const TOL = 1e-10;

/** Walk two results side by side; collect every number that differs by more than TOL * max(1, |ref|). */
function differences(a: unknown, b: unknown, where = "result", out: string[] = []): string[] {
  if (typeof a === "number" && typeof b === "number") {
    if (Number.isNaN(a) && Number.isNaN(b)) return out;
    if (a === b) return out;
    const scale = Math.max(1, Math.abs(b));
    if (!(Math.abs(a - b) <= TOL * scale)) out.push(`${where}: ${a} vs ${b}`);
    return out;
  }
  if (Array.isArray(a) && Array.isArray(b)) {
    if (a.length !== b.length) {
      out.push(`${where}: length ${a.length} vs ${b.length}`);
      return out;
    }
    a.forEach((x, i) => differences(x, b[i], `${where}[${i}]`, out));
    return out;
  }
  if (a && b && typeof a === "object" && typeof b === "object") {
    const ka = Object.keys(a).sort(),
      kb = Object.keys(b).sort();
    if (ka.join() !== kb.join()) {
      out.push(`${where}: keys ${ka.join()} vs ${kb.join()}`);
      return out;
    }
    for (const k of ka) {
      if (k === "engineVersion") continue; // carries the backend name by design
      differences((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${where}.${k}`, out);
    }
    return out;
  }
  if (a !== b) out.push(`${where}: ${String(a)} vs ${String(b)}`);
  return out;
}

function both(doc: object): { native: unknown; ts: unknown } {
  const input = parseComputeInput(doc);
  setKernels(nat);
  const native = compute(input);
  setKernels(tsKernels);
  const ts = compute(input);
  setKernels(before);
  return { native, ts };
}

const tri = { lattice: "triangular", periodNm: 120, node: { forward: 0.5, left: 0.3, right: 0.2 } };

const cases: [string, object][] = [
  [
    "conductance, periodic triangular 10x8, disorder and field, both valleys",
    {
      network: { ...tri, size: { columns: 10, rows: 8 }, disorder: { linkPhaseWidthRad: 2.5, seed: 7 } },
      computation: { kind: "conductance", energyMeV: 0.8, fieldTesla: 0.35 },
    },
  ],
  [
    "conductance, open triangular 9x5, two channels per link, temperature and contact resistance",
    {
      network: { ...tri, size: { columns: 9, rows: 5 }, transverse: "open", channelsPerLink: 2, node: { forward: 0.3 } },
      computation: { kind: "conductance", energyMeV: -1.1, fieldTesla: 0.1, temperatureK: 4, temperaturePoints: 6, contactOhms: 150 },
    },
  ],
  [
    "conductance ensemble (4 disorder samples) with its histogram",
    {
      network: { ...tri, size: { columns: 6, rows: 6 }, disorder: { linkPhaseWidthRad: 6.28, forwardSpread: 0.2, seed: 11 } },
      computation: { kind: "conductance", energyMeV: 0.3, ensemble: { samples: 4 }, histogramBins: 5 },
    },
  ],
  [
    "conductance, square network near the critical point",
    {
      network: { lattice: "square", size: { columns: 12, rows: 8 }, periodNm: 100, node: { turning: 0.45 }, disorder: { linkPhaseWidthRad: 6.28, seed: 2 } },
      computation: { kind: "conductance", energyMeV: 0.2 },
    },
  ],
  [
    "Bloch spectrum with flux 1/3 along the path",
    {
      network: { ...tri, size: { columns: 4, rows: 4 } },
      computation: { kind: "spectrum", flux: { numerator: 1, denominator: 3 }, pathPointsPerSegment: 4 },
    },
  ],
  [
    "density of states from the Bloch spectrum",
    {
      network: { ...tri, size: { columns: 4, rows: 4 } },
      computation: { kind: "dos", kMesh: 6, energies: { fromMeV: 0, toMeV: 10, points: 12 } },
    },
  ],
  [
    "density of states of a finite closed sample (trace formula), open edges",
    {
      network: { ...tri, size: { columns: 4, rows: 4 }, transverse: "open" },
      computation: { kind: "dos", source: "sample", fieldTesla: 0.2, energies: { fromMeV: 0, toMeV: 5, points: 6 } },
    },
  ],
  [
    "local density of states",
    {
      network: { ...tri, size: { columns: 4, rows: 4 }, transverse: "open", disorder: { linkPhaseWidthRad: 1, seed: 5 } },
      computation: { kind: "ldos", energyMeV: 0.4, fieldTesla: 0.1 },
    },
  ],
  [
    "localization length on a strip",
    {
      network: { ...tri, size: { columns: 16, rows: 4 }, disorder: { linkPhaseWidthRad: 6.28, seed: 3 } },
      computation: { kind: "localization", energyMeV: 0.5, ensemble: { samples: 2 } },
    },
  ],
];

describe("engine results: OpenBLAS backend = TypeScript backend to 1e-10", () => {
  for (const [label, doc] of cases) {
    it(label, () => {
      const { native, ts } = both(doc);
      expect(differences(native, ts)).toEqual([]);
      expect((native as { engineVersion: string }).engineVersion).toMatch(/\+openblas$/);
      expect((ts as { engineVersion: string }).engineVersion).toMatch(/\+ts$/);
    });
  }
});
