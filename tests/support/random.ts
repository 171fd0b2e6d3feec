// The tests' one seeded pseudo-random generator: mulberry32 (a 32-bit state advanced by a Weyl
// step, then mixed), uniform in [0, 1), and Gaussian numbers drawn from it by Box-Muller. The same
// seed gives the same numbers on every platform and every run, so a failing seed can be replayed.
//
//   import { seededGaussian, seededRandom, seededUniform } from "../support/random";
//   const rand = seededUniform(7);          // random matrices, random parameters
//   const noise = seededGaussian(3);        // measurement noise of unit standard deviation
//   const r = seededRandom(11);             // both from one stream: r.uniform(), r.gaussian()
//
// (The product has its own generators: src/engine/rng.ts for disorder; tests do not share them
// unless they test them.)

export interface SeededRandom {
  /** Uniform in [0, 1). */
  uniform: () => number;
  /** Standard normal (mean 0, standard deviation 1); each call takes two uniforms from the stream. */
  gaussian: () => number;
}

export function seededRandom(seed: number): SeededRandom {
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  // Box-Muller; the 1e-12 keeps the logarithm finite when uniform() gives exactly 0.
  const gaussian = () => Math.sqrt(-2 * Math.log(uniform() + 1e-12)) * Math.cos(2 * Math.PI * uniform());
  return { uniform, gaussian };
}

/** A stream of uniform numbers in [0, 1) from a seed. */
export const seededUniform = (seed: number): (() => number) => seededRandom(seed).uniform;

/** A stream of standard normal numbers from a seed. */
export const seededGaussian = (seed: number): (() => number) => seededRandom(seed).gaussian;
