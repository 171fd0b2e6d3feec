/**
 * The demo dataset "LK-07 magnetoconductance (synthetic)" (product.md demo scenario, invented):
 * the engine's conductance of a small triangular network versus field, with known parameters
 * and seeded Gaussian noise. The CSV beside this file (lk07.csv) was made by
 * `node_modules/.bin/tsx src/server/demo/lk07-generate.ts`; its header comment names the engine
 * version and every parameter. Client-safe (no Node imports): the fit form proposes these settings.
 */
export const LK07_NAME = "LK-07 magnetoconductance (synthetic)";
export const LK07_DESCRIPTION =
  "Synthetic: made by the Triskel engine with known parameters plus seeded noise (not a measurement). Conductance of a small 0.11° triangular network versus perpendicular field.";

/** The network the curve was made with (engine schema v1); small, so fits are quick. */
export const LK07_NETWORK = {
  lattice: "triangular",
  size: { columns: 4, rows: 4 },
  transverse: "periodic",
  twistDegrees: 0.11,
  modeVelocityMps: 1.0e6,
  channelsPerLink: 1,
  degeneracy: { spin: 2, valley: 2 },
  node: { forward: 0.55, left: 0.225, right: 0.225, branch: 1, phaseRad: 0 },
} as const;

export const LK07_COMPUTATION = { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 1.5, temperaturePoints: 6, contactOhms: 600 } as const;

/** Parameters that made the curve (the fit should find them back within its uncertainties). */
export const LK07_TRUTH = { "node.forward": 0.55, contactOhms: 600 } as const;
export const LK07_FIELD_RANGE_TESLA: [number, number] = [-3, 3];
export const LK07_POINTS = 120;
/** Noise: Gaussian, standard deviation in e2/h, mulberry32 seed. */
export const LK07_NOISE = { sigmaE2h: 0.004, seed: 7 } as const;

/** Starting guesses the fit form proposes for this dataset (deliberately off the truth). */
export const LK07_FIT_START = [
  { parameter: "node.forward", initial: 0.5, min: 0.2, max: 0.9 },
  { parameter: "contactOhms", initial: 300, min: 0, max: 3000 },
];
