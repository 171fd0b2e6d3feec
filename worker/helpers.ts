import { MessageChannel, type MessagePort } from "node:worker_threads";
import type { Piscina } from "piscina";
// the board module alone (not the engine entry, which would load the kernels into this thread)
import { markHelpersLost } from "@/engine/compute/parallel";
import type { EngineOutcome, EngineTask, HelpOutcome, HelpRequest, HelpTask } from "./engine-thread";

/**
 * The pool's owner side of one run's helper threads: a port the run's engine thread asks on
 * (worker/engine-thread.ts, `EngineTask.helpers`); each request queues up to the pool's other
 * threads' worth of `help` tasks on the same pool, unless tasks are already waiting there. A helper
 * that finds every piece taken returns at once, so a busy pool costs at most a queued no-op.
 * `close()` when the run is done.
 */
export function offerHelpers(pool: Piscina<EngineTask, EngineOutcome>, control: SharedArrayBuffer): { port: MessagePort; close: () => void } {
  const { port1, port2 } = new MessageChannel();
  const helpPool = pool as unknown as Piscina<HelpTask, HelpOutcome>;
  port1.on("message", (request: HelpRequest) => {
    // tasks already waiting mean no thread is free: more helpers would only wait behind them
    // (and find the board done), so none are queued then
    const n = pool.queueSize > 0 ? 0 : Math.min(request.helpers, Math.max(0, pool.options.maxThreads - 1));
    for (let i = 0; i < n; i++) {
      helpPool.run({ board: request.board, control }, { name: "help" }).catch((err: unknown) => {
        // the helper's thread died (or the pool is closing): the run computes whatever that helper held itself
        markHelpersLost(request.board);
        const message = (err as Error)?.message ?? String(err);
        if (!/terminating worker thread/i.test(message)) console.error(`[worker] engine helper failed: ${message}`);
      });
    }
  });
  return { port: port2, close: () => port1.close() };
}
