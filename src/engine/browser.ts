/**
 * Browser-safe entry of the engine: schema parsing, types, constants, the cost estimate and the
 * sweepable parameters, with no Node built-in and no native addon anywhere in its import graph
 * (checked by tests/unit/engine/browser-entry.test.ts). Browser code (src/lib, src/components,
 * src/shared) imports the engine through "@/engine/browser" only.
 *
 * The full entry (src/engine/index.ts) re-exports all of this and adds what needs Node: the
 * kernel backend choice (native addon), ENGINE_VERSION, compute, inputHash (node:crypto) and the
 * kernels. See src/engine/README.md.
 */
export {
  networkSchema,
  computationSchema,
  computeInputSchema,
  conductanceComputationSchema,
  spectrumComputationSchema,
  dosComputationSchema,
  ldosComputationSchema,
  localizationComputationSchema,
  hallBarComputationSchema,
  parseComputeInput,
  parseNetwork,
  linkLengthNm,
  type Network,
  type NetworkDefinition,
  type Computation,
  type ComputeInput,
  type ConductanceComputation,
  type SpectrumComputation,
  type DosComputation,
  type LdosComputation,
  type LocalizationComputation,
  type HallBarComputation,
} from "./schema";
export { EngineInputError, EngineLimitError, EngineCancelledError, SingularMatrixError, type EngineIssue } from "./errors";
export { estimateCost, checkResourceLimits, type CostEstimate } from "./cost";
export { COST_CONSTANTS } from "./cost-constants";
export {
  applyParameter,
  nodeWithParameter,
  reachableParameterRanges,
  SWEEPABLE_PARAMETERS,
  type NodeProbabilityParameter,
  type SweepableParameter,
} from "./parameters";
export { checkTriangularNode, isReachableNode, reachableForwardRange } from "./network/node-matrices";
export {
  allowedTorusFields,
  checkTorusField,
  runsOnClosedSample,
  torusAllowsField,
  torusFieldStepTesla,
  torusFluxQuanta,
  torusPlaquettes,
  TORUS_FLUX_TOLERANCE,
} from "./network/torus";
export * as constants from "./constants";
export {
  CONDUCTANCE_QUANTUM_S,
  RESISTANCE_QUANTUM_OHM,
  FLUX_QUANTUM_WB,
  GRAPHENE_LATTICE_NM,
  ELEMENTARY_CHARGE_C,
  PLANCK_JS,
  periodFromTwistNm,
  twistFromPeriodDegrees,
} from "./constants";
// Types only (erased at compile time, so the compute code stays out of the browser bundle).
export type { ComputeResult } from "./compute";
export type { ComputeOptions } from "./compute/progress";
export type { ConductanceResult } from "./compute/conductance";
export type { SpectrumResult } from "./compute/spectrum";
export type { DosResult } from "./compute/dos";
export type { LdosResult } from "./compute/ldos";
export type { LocalizationResult } from "./compute/localization";
export type { HallBarResult } from "./compute/hall-bar";
export { defaultContacts, type HallBarContact } from "./compute/hall-bar-check";
