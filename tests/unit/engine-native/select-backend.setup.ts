/**
 * Vitest setup of the unit projects: make the kernel choice the engine makes when it is loaded
 * (TRISKEL_KERNELS, default auto), also for test files that import engine modules directly rather
 * than through src/engine/index.ts. The engine-ts project sets TRISKEL_KERNELS=ts.
 */
import "@/engine/linalg/select";
