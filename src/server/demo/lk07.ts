/**
 * The demo dataset "LK-07 magnetoconductance (synthetic)" (product.md demo scenario, invented):
 * the engine's conductance of a small triangular network versus field, with known parameters
 * and seeded Gaussian noise. The CSV beside this file (lk07.csv) was made by
 * `node_modules/.bin/tsx src/server/demo/lk07-generate.ts`; its header comment names the engine
 * version and every parameter. The name, the network, the computation and the fit form's starting
 * guesses are in src/shared/lk07.ts (the browser needs them too).
 */
export const LK07_DESCRIPTION =
  "Synthetic: made by the Triskel engine with known parameters plus seeded noise (not a measurement). " +
  "Conductance of a small 0.11° triangular network versus perpendicular field.";

/** Parameters that made the curve (the fit should find them back within its uncertainties). */
export const LK07_TRUTH = { "node.forward": 0.55, contactOhms: 600 } as const;
export const LK07_FIELD_RANGE_TESLA: [number, number] = [-3, 3];
export const LK07_POINTS = 120;
/** Noise: Gaussian, standard deviation in e2/h, mulberry32 seed. */
export const LK07_NOISE = { sigmaE2h: 0.004, seed: 7 } as const;
