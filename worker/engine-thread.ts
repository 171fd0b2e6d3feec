/**
 * One engine computation inside a piscina worker thread, so a long run never blocks the worker's
 * event loop (job locks, progress and cancellation keep flowing). The parent shares a
 * SharedArrayBuffer: Int32 at byte 0 is the cancel flag (1 = stop), Float64 at byte 8 is the
 * progress (0 to 1). CPU time is measured for this thread only (src/server/jobs/cpu-clock.ts).
 *
 * With `helpers` (a MessagePort to the pool's owner, worker/helpers.ts) the independent pieces of
 * a conductance (both valleys, ensemble samples; src/engine/compute/parallel.ts) are published to
 * the pool's free threads, which run the named export `help`; their CPU seconds are added to this
 * run's. Without it (or with no free thread) every piece runs here, with the same results.
 */
import type { MessagePort } from "node:worker_threads";
import { cpuClock, startCpuMeter, type CpuSource } from "@/server/jobs/cpu-clock";
import {
  ENGINE_VERSION,
  EngineCancelledError,
  EngineInputError,
  EngineLimitError,
  compute,
  createBoard,
  helpWithBoard,
  inputHash,
  parseComputeInput,
  releaseGraphs,
  runBoard,
  type ParallelRunner,
  type TransportBoard,
} from "@/engine";

export interface EngineTask {
  input: unknown;
  control: SharedArrayBuffer;
  /** Where to ask for helper threads (transfer it in the task's transferList); absent: this thread alone. */
  helpers?: MessagePort;
  /** Smallest valley graph (nodes) whose pieces are handed to helpers; default PARALLEL_MIN_NODES (tests and the bench set it lower). */
  parallelMinNodes?: number;
}

/** What the engine thread asks the pool's owner for: up to `helpers` threads running `help` on this board. */
export interface HelpRequest {
  board: TransportBoard;
  helpers: number;
}

/** A helper's task (export `help`): the board and the run's control buffer (cancellation). */
export interface HelpTask {
  board: TransportBoard;
  control: SharedArrayBuffer;
}
export interface HelpOutcome {
  pieces: number;
  cpuSeconds: number;
}

/** Pieces of the run that helper threads computed, and their CPU seconds (included in cpuSeconds). */
export interface HelpedFigures {
  pieces: number;
  cpuSeconds: number;
}

export type EngineOutcome =
  | { outcome: "succeeded"; resultJson: string; cpuSeconds: number; cpuSource: CpuSource; engineVersion: string; inputHash: string; helped?: HelpedFigures }
  | {
      outcome: "cancelled" | "failed";
      error: { code: string; message: string; field?: string };
      cpuSeconds: number;
      cpuSource: CpuSource;
      engineVersion: string;
      inputHash: string | null;
      helped?: HelpedFigures;
    };

const clock = cpuClock();

/** Valley graphs smaller than this run on one thread: handing a piece over (rebuilding its graph there) would cost more than it saves. */
export const PARALLEL_MIN_NODES = 2048;

function helperRunner(port: MessagePort, minNodes: number): ParallelRunner & { helped: HelpedFigures } {
  return {
    minNodes,
    helped: { pieces: 0, cpuSeconds: 0 },
    run(job, local, progress) {
      const board = createBoard(job);
      const request: HelpRequest = { board, helpers: job.pieces.length - 1 };
      port.postMessage(request);
      const { results, helperPieces, helperCpuSeconds } = runBoard(board, local, progress);
      this.helped.pieces += helperPieces;
      this.helped.cpuSeconds += helperCpuSeconds;
      return results;
    },
  };
}

export default function runEngine(task: EngineTask): EngineOutcome {
  const cancelFlag = new Int32Array(task.control, 0, 1);
  const progress = new Float64Array(task.control, 8, 1);
  const spent = startCpuMeter(clock);
  const runner = task.helpers ? helperRunner(task.helpers, task.parallelMinNodes ?? PARALLEL_MIN_NODES) : undefined;
  const cpu = () => spent() + (runner?.helped.cpuSeconds ?? 0);
  const helped = runner ? { helped: runner.helped } : {};
  let hash: string | null = null;
  try {
    const input = parseComputeInput(task.input);
    hash = inputHash(input);
    const result = compute(input, {
      onProgress: (fraction: number) => {
        if (Number.isFinite(fraction)) progress[0] = Math.min(1, Math.max(0, fraction));
      },
      shouldCancel: () => Atomics.load(cancelFlag, 0) === 1,
      parallel: runner,
    });
    const resultJson = JSON.stringify(result);
    progress[0] = 1;
    return { outcome: "succeeded", resultJson, cpuSeconds: cpu(), cpuSource: clock.source, engineVersion: ENGINE_VERSION, inputHash: hash, ...helped };
  } catch (err) {
    const base = { cpuSeconds: cpu(), cpuSource: clock.source, engineVersion: ENGINE_VERSION, inputHash: hash, ...helped };
    if (err instanceof EngineCancelledError) return { outcome: "cancelled", error: { code: "cancelled", message: "Cancelled on request." }, ...base };
    if (err instanceof EngineInputError) return { outcome: "failed", error: { code: "invalid_input", message: err.message, field: err.field }, ...base };
    if (err instanceof EngineLimitError) return { outcome: "failed", error: { code: "engine_limit", message: err.message }, ...base };
    const e = err as Error;
    return { outcome: "failed", error: { code: "engine_error", message: `${e?.name ?? "Error"}: ${e?.message ?? String(err)}` }, ...base };
  } finally {
    task.helpers?.close();
  }
}

/** The graphs a helper keeps for the next board of the same run (a thermal average's energies) are dropped after this long idle. */
const RELEASE_GRAPHS_MS = 2000;
let releaseTimer: ReturnType<typeof setTimeout> | null = null;

/** A helper thread's share of another run's pieces (src/engine/compute/parallel.ts): never waits, returns when no piece is open. */
export function help(task: HelpTask): HelpOutcome {
  if (releaseTimer) clearTimeout(releaseTimer);
  const cancelFlag = new Int32Array(task.control, 0, 1);
  const spent = startCpuMeter(clock);
  const pieces = helpWithBoard(
    task.board,
    () => Atomics.load(cancelFlag, 0) === 1,
    () => startCpuMeter(clock),
  );
  // counted from the end of this task: the next board of the same run finds its graphs still here
  releaseTimer = setTimeout(releaseGraphs, RELEASE_GRAPHS_MS);
  releaseTimer.unref();
  return { pieces, cpuSeconds: spent() };
}
