import { Piscina } from "piscina";
import type { EngineOutcome, EngineTask } from "./engine-thread";

/**
 * The worker thread pool the engine runs in. Threads inherit the process's loader flags, so the
 * TypeScript task file runs as it does under tsx.
 */
export function createEnginePool(threads: number): Piscina<EngineTask, EngineOutcome> {
  return new Piscina<EngineTask, EngineOutcome>({
    filename: new URL("./engine-thread.ts", import.meta.url).href,
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 60_000,
    concurrentTasksPerWorker: 1,
  });
}
