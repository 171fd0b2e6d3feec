import { getKernels } from "./linalg/kernels";

/** Version of the engine's numbers (schema v1, conventions of physics.md incl. section 6). */
export const ENGINE_BASE_VERSION = "2.1.0";

/** Engine version with the kernel backend in use, e.g. "1.0.0+ts". */
export function engineVersion(): string {
  return `${ENGINE_BASE_VERSION}+${getKernels().name}`;
}

/** The engine version at load time (TypeScript kernels unless a backend was selected before). */
export const ENGINE_VERSION: string = engineVersion();
