/**
 * Public API of the Triskel network-model engine (no I/O, no Next/React/database/queue imports).
 * Format and conventions: src/engine/README.md and ../shared/physics.md.
 */
import "./linalg/select"; // picks the kernel backend (TRISKEL_KERNELS) before ENGINE_VERSION is read
export { ENGINE_VERSION, ENGINE_BASE_VERSION, engineVersion } from "./version";
export {
  networkSchema, computationSchema, computeInputSchema,
  conductanceComputationSchema, spectrumComputationSchema, dosComputationSchema, ldosComputationSchema, localizationComputationSchema,
  parseComputeInput, parseNetwork, linkLengthNm,
  type Network, type Computation, type ComputeInput,
  type ConductanceComputation, type SpectrumComputation, type DosComputation, type LdosComputation, type LocalizationComputation,
} from "./schema";
export { EngineInputError, EngineLimitError, EngineCancelledError, SingularMatrixError, type EngineIssue } from "./errors";
export { compute, type ComputeResult } from "./compute";
export type { ComputeOptions } from "./compute/progress";
export { inputHash, canonicalJson } from "./hash";
export { estimateCost, checkResourceLimits, type CostEstimate } from "./cost";
export { COST_CONSTANTS } from "./cost-constants";
export { applyParameter, SWEEPABLE_PARAMETERS, type SweepableParameter } from "./parameters";
export { getKernels, setKernels, tsKernels, type ComplexKernels } from "./linalg/kernels";
export * as constants from "./constants";
export type { ConductanceResult } from "./compute/conductance";
export type { SpectrumResult } from "./compute/spectrum";
export type { DosResult } from "./compute/dos";
export type { LdosResult } from "./compute/ldos";
export type { LocalizationResult } from "./compute/localization";
