import { Piscina } from "piscina";
import type { EngineOutcome, EngineTask } from "./engine-thread";

/**
 * The worker thread pool the engine runs in. Threads inherit the process's loader flags, so the
 * TypeScript task file runs as it does under tsx; `execArgv` gives them others (tests running
 * under Vitest, which has no loader flags, pass `["--import", "tsx"]`).
 */
export function createEnginePool(threads: number, opts: { execArgv?: string[] } = {}): Piscina<EngineTask, EngineOutcome> {
  return new Piscina<EngineTask, EngineOutcome>({
    filename: new URL("./engine-thread.ts", import.meta.url).href,
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 60_000,
    concurrentTasksPerWorker: 1,
    ...(opts.execArgv ? { execArgv: opts.execArgv } : {}),
  });
}
