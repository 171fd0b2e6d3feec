/**
 * Regenerates src/server/demo/lk07.csv, the synthetic demo dataset, with the real engine:
 *   node_modules/.bin/tsx src/server/demo/lk07-generate.ts
 * Conductance (siemens, which includes the series contact resistance) converted to e2/h, plus
 * Gaussian noise of known sigma from a seeded generator; the header comment records the engine
 * version and every parameter, so the file can be checked and remade.
 */
import { writeFileSync } from "node:fs";
import { join } from "node:path";
import { ENGINE_VERSION, applyParameter, compute, parseComputeInput } from "@/engine";
import { CONDUCTANCE_QUANTUM_S } from "@/engine/constants";
import { LK07_COMPUTATION, LK07_NAME, LK07_NETWORK } from "@/shared/lk07";
import { LK07_FIELD_RANGE_TESLA, LK07_NOISE, LK07_POINTS } from "./lk07";

function gaussian(seed: number) {
  let a = seed >>> 0;
  const u = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  return () => Math.sqrt(-2 * Math.log(u() + 1e-12)) * Math.cos(2 * Math.PI * u());
}

const input = parseComputeInput({ network: LK07_NETWORK, computation: LK07_COMPUTATION });
const noise = gaussian(LK07_NOISE.seed);
const [b0, b1] = LK07_FIELD_RANGE_TESLA;
const lines = [
  `# ${LK07_NAME}: SYNTHETIC, made by the Triskel engine ${ENGINE_VERSION}, not measured.`,
  `# network: ${JSON.stringify(LK07_NETWORK)}`,
  `# computation at every point: ${JSON.stringify(LK07_COMPUTATION)} with fieldTesla from column B`,
  `# G = engine siemens / (e^2/h) (includes contactOhms) + Gaussian noise sigma ${LK07_NOISE.sigmaE2h} e2/h (mulberry32 seed ${LK07_NOISE.seed}).`,
  "B (T),G (e2/h),sigma (e2/h)",
];
for (let i = 0; i < LK07_POINTS; i++) {
  const b = b0 + ((b1 - b0) * i) / (LK07_POINTS - 1);
  const r = compute(applyParameter(input, "fieldTesla", b)) as { siemens: number };
  const g = r.siemens / CONDUCTANCE_QUANTUM_S + LK07_NOISE.sigmaE2h * noise();
  lines.push(`${b.toFixed(6)},${g.toFixed(6)},${LK07_NOISE.sigmaE2h}`);
}
const out = join(import.meta.dirname, "lk07.csv");
writeFileSync(out, lines.join("\n") + "\n");
console.log(`wrote ${out} (${LK07_POINTS} points, engine ${ENGINE_VERSION})`);
