/**
 * Public API of the Triskel network-model engine (no I/O, no Next/React/database/queue imports).
 * Format and conventions: src/engine/README.md and ../shared/physics.md.
 *
 * Server-side entry (Node): everything of the browser-safe entry (./browser: schema, errors, cost
 * estimate, parameters, constants, types) plus what needs Node or the kernels: the backend choice
 * (native addon), ENGINE_VERSION, compute, inputHash (node:crypto) and the kernels themselves.
 */
import "./linalg/select"; // picks the kernel backend (TRISKEL_KERNELS) before ENGINE_VERSION is read
export * from "./browser";
export { ENGINE_VERSION, ENGINE_BASE_VERSION, engineVersion } from "./version";
export { compute } from "./compute";
export { inputHash, canonicalJson } from "./hash";
export { getKernels, setKernels, tsKernels, type ComplexKernels } from "./linalg/kernels";
export {
  createBoard,
  runBoard,
  helpWithBoard,
  markHelpersLost,
  releaseGraphs,
  type ParallelRunner,
  type TransportBoard,
  type TransportJob,
  type TransportPiece,
} from "./compute/parallel";
