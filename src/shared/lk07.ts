/**
 * The demo dataset "LK-07 magnetoconductance (synthetic)" (invented): what the fit form proposes
 * for it (src/components/data/FitForm.tsx recognises it by name) and what made its curve (the
 * network and the computation at every field). How the curve was made (the true parameters, the
 * field range, the noise) is in src/server/demo/lk07.ts, beside the CSV and its generator.
 */
import { triangularNetwork } from "./networks";

export const LK07_NAME = "LK-07 magnetoconductance (synthetic)";

/** The network the curve was made with (engine schema v1); small, so fits are quick. */
export const LK07_NETWORK = triangularNetwork({ columns: 4, rows: 4 }, { forward: 0.55, left: 0.225, right: 0.225 });

export const LK07_COMPUTATION = { kind: "conductance", energyMeV: 1.7, fieldTesla: 0, temperatureK: 1.5, temperaturePoints: 6, contactOhms: 600 } as const;

/** Starting guesses the fit form proposes for this dataset (deliberately off the truth). */
export const LK07_FIT_START = [
  { parameter: "node.forward", initial: 0.5, min: 0.2, max: 0.9 },
  { parameter: "contactOhms", initial: 300, min: 0, max: 3000 },
];
