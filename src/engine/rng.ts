/** Seeded, platform-independent pseudo-random numbers (splitmix32-style mixing + sfc32 stream). */

export function mix32(a: number, b: number): number {
  let h = (Math.imul(a ^ 0x9e3779b9, 0x85ebca6b) ^ Math.imul(b + 0x7f4a7c15, 0xc2b2ae35)) >>> 0;
  h ^= h >>> 16;
  h = Math.imul(h, 0x7feb352d) >>> 0;
  h ^= h >>> 15;
  h = Math.imul(h, 0x846ca68b) >>> 0;
  h ^= h >>> 16;
  return h >>> 0;
}

/** A stream of uniform numbers in [0, 1) from a 32-bit seed. */
export function randomStream(seed: number): () => number {
  let a = mix32(seed, 1),
    b = mix32(seed, 2),
    c = mix32(seed, 3),
    d = 1;
  const next = () => {
    const t = (((a + b) | 0) + d) | 0;
    d = (d + 1) | 0;
    a = b ^ (b >>> 9);
    b = (c + (c << 3)) | 0;
    c = (c << 21) | (c >>> 11);
    c = (c + t) | 0;
    return (t >>> 0) / 4294967296;
  };
  for (let i = 0; i < 12; i++) next();
  return next;
}

/** Seed of ensemble sample i derived from the network's disorder seed. */
export function sampleSeed(seed: number, sample: number): number {
  return sample === 0 ? seed >>> 0 : mix32(seed >>> 0, 0x51ed0000 + sample);
}
