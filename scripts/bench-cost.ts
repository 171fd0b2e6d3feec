/**
 * `npm run bench` (third part): the cost model against what computations use on this machine.
 * For each computation kind, a few inputs (synthetic networks) are estimated (src/engine/cost.ts)
 * and then computed, and the CPU time is measured with process.cpuUsage after a warm-up run of the
 * same kind, and the least of up to four runs is kept. Prints estimate / measured per case and the range per kind; the target is every
 * ratio within [0.5, 2] (a factor of 2 either way). Exit code 1 when a case is out of range and
 * `--strict` is given. Figures are recorded in src/engine/README.md.
 */
import { compute, estimateCost, getKernels, parseComputeInput, type ComputeInput } from "../src/engine/index";

type Case = { kind: string; label: string; input: unknown };

const tri = (columns: number, rows: number, extra: Record<string, unknown> = {}) => ({
  lattice: "triangular", size: { columns, rows }, transverse: "periodic", twistDegrees: 0.11,
  node: { forward: 0.6, left: 0.25, right: 0.15 }, disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 1 }, ...extra,
});
const sq = (columns: number, rows: number) => ({
  lattice: "square", size: { columns, rows }, transverse: "periodic", periodNm: 60, node: { turning: 0.5 }, disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 2 },
});

const CASES: Case[] = [
  { kind: "conductance", label: "triangular 32 x 32, T = 0", input: { network: tri(32, 32), computation: { kind: "conductance", energyMeV: 1, fieldTesla: 0.2 } } },
  { kind: "conductance", label: "triangular 64 x 64, T = 0", input: { network: tri(64, 64), computation: { kind: "conductance", energyMeV: 1, fieldTesla: 0.2 } } },
  { kind: "conductance", label: "triangular 96 x 96, T = 0", input: { network: tri(96, 96), computation: { kind: "conductance", energyMeV: 1, fieldTesla: 0.2 } } },
  { kind: "conductance", label: "square 64 x 64, T = 0", input: { network: sq(64, 64), computation: { kind: "conductance", energyMeV: 1 } } },
  { kind: "conductance", label: "triangular 24 x 24, 32 samples", input: { network: tri(24, 24), computation: { kind: "conductance", energyMeV: 1, ensemble: { samples: 32 } } } },
  { kind: "conductance", label: "triangular 16 x 16, T = 2 K (adaptive)", input: { network: tri(16, 16), computation: { kind: "conductance", energyMeV: 1, temperatureK: 2 } } },
  { kind: "conductance", label: "triangular 16 x 16, T = 20 K (adaptive)", input: { network: tri(16, 16), computation: { kind: "conductance", energyMeV: 1, temperatureK: 20 } } },
  { kind: "conductance", label: "triangular 24 x 24, T = 5 K, 40-point rule", input: { network: tri(24, 24), computation: { kind: "conductance", energyMeV: 1, temperatureK: 5, temperaturePoints: 40 } } },
  { kind: "localization", label: "triangular 96 x 8, 8 samples", input: { network: tri(96, 8), computation: { kind: "localization", energyMeV: 1, ensemble: { samples: 8 } } } },
  { kind: "localization", label: "triangular 128 x 16, 4 samples", input: { network: tri(128, 16), computation: { kind: "localization", energyMeV: 1, ensemble: { samples: 4 } } } },
  { kind: "dos", label: "bloch, flux 0, k mesh 48", input: { network: tri(4, 4), computation: { kind: "dos", source: "bloch", kMesh: 48 } } },
  { kind: "dos", label: "bloch, flux 1/6, k mesh 24", input: { network: tri(4, 4), computation: { kind: "dos", source: "bloch", kMesh: 24, flux: { numerator: 1, denominator: 6 } } } },
  { kind: "dos", label: "sample 16 x 16, 100 energies", input: { network: tri(16, 16), computation: { kind: "dos", source: "sample", energies: { fromMeV: 0, toMeV: 30, points: 100 } } } },
  { kind: "spectrum", label: "flux 1/8, 24 points per segment", input: { network: tri(4, 4), computation: { kind: "spectrum", flux: { numerator: 1, denominator: 8 } } } },
  { kind: "spectrum", label: "flux 1/16, 24 points per segment", input: { network: tri(4, 4), computation: { kind: "spectrum", flux: { numerator: 1, denominator: 16 } } } },
  { kind: "ldos", label: "triangular 24 x 24", input: { network: tri(24, 24), computation: { kind: "ldos", energyMeV: 1 } } },
  { kind: "ldos", label: "triangular 48 x 48", input: { network: tri(48, 48), computation: { kind: "ldos", energyMeV: 1 } } },
];

function cpuSeconds(input: ComputeInput): number {
  const c0 = process.cpuUsage();
  compute(input);
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1e6;
}

const only = process.argv.find((a) => a.startsWith("--kind="))?.slice(7);
const strict = process.argv.includes("--strict");
const warmed = new Set<string>();
const byKind = new Map<string, number[]>();
console.log(`cost model against measured CPU time (kernels: ${getKernels().name}; target: estimate / measured in [0.5, 2])`);
let outside = 0;
for (const c of CASES) {
  if (only && c.kind !== only) continue;
  const input = parseComputeInput(c.input);
  if (!warmed.has(c.kind)) {
    cpuSeconds(input); // JIT and caches warm on the first case of each kind
    warmed.add(c.kind);
  }
  // The least of a few runs (short cases run more often): the time the work itself takes.
  let measured = cpuSeconds(input);
  for (let i = 0; i < 3 && measured < 1.5; i++) measured = Math.min(measured, cpuSeconds(input));
  const estimate = estimateCost(input).computeSeconds;
  const ratio = estimate / measured;
  const ok = ratio >= 0.5 && ratio <= 2;
  if (!ok) outside++;
  byKind.set(c.kind, [...(byKind.get(c.kind) ?? []), ratio]);
  console.log(`  ${ok ? "ok " : "OUT"} ${c.kind.padEnd(12)} ${c.label.padEnd(44)} estimate ${estimate.toFixed(3).padStart(8)} s  measured ${measured.toFixed(3).padStart(8)} s  ratio ${ratio.toFixed(2)}`);
}
console.log("ratio estimate / measured per kind:");
for (const [kind, rs] of byKind) console.log(`  ${kind.padEnd(12)} ${Math.min(...rs).toFixed(2)} .. ${Math.max(...rs).toFixed(2)} (${rs.length} cases)`);
console.log(outside ? `${outside} case(s) outside [0.5, 2]` : "every case within a factor of 2");
if (strict && outside) process.exitCode = 1;
