/**
 * One engine computation inside a piscina worker thread, so a long run never blocks the worker's
 * event loop (job locks, progress and cancellation keep flowing). The parent shares a
 * SharedArrayBuffer: Int32 at byte 0 is the cancel flag (1 = stop), Float64 at byte 8 is the
 * progress (0 to 1). CPU time is measured for this thread only (src/server/jobs/cpu-clock.ts).
 */
import { cpuClock, startCpuMeter, type CpuSource } from "@/server/jobs/cpu-clock";
import { ENGINE_VERSION, EngineCancelledError, EngineInputError, EngineLimitError, compute, inputHash, parseComputeInput } from "@/engine";

export interface EngineTask {
  input: unknown;
  control: SharedArrayBuffer;
}

export type EngineOutcome =
  | { outcome: "succeeded"; resultJson: string; cpuSeconds: number; cpuSource: CpuSource; engineVersion: string; inputHash: string }
  | {
      outcome: "cancelled" | "failed";
      error: { code: string; message: string; field?: string };
      cpuSeconds: number;
      cpuSource: CpuSource;
      engineVersion: string;
      inputHash: string | null;
    };

const clock = cpuClock();

export default function runEngine(task: EngineTask): EngineOutcome {
  const cancelFlag = new Int32Array(task.control, 0, 1);
  const progress = new Float64Array(task.control, 8, 1);
  const spent = startCpuMeter(clock);
  let hash: string | null = null;
  try {
    const input = parseComputeInput(task.input);
    hash = inputHash(input);
    const result = compute(input, {
      onProgress: (fraction: number) => {
        if (Number.isFinite(fraction)) progress[0] = Math.min(1, Math.max(0, fraction));
      },
      shouldCancel: () => Atomics.load(cancelFlag, 0) === 1,
    });
    const resultJson = JSON.stringify(result);
    progress[0] = 1;
    return { outcome: "succeeded", resultJson, cpuSeconds: spent(), cpuSource: clock.source, engineVersion: ENGINE_VERSION, inputHash: hash };
  } catch (err) {
    const base = { cpuSeconds: spent(), cpuSource: clock.source, engineVersion: ENGINE_VERSION, inputHash: hash };
    if (err instanceof EngineCancelledError) return { outcome: "cancelled", error: { code: "cancelled", message: "Cancelled on request." }, ...base };
    if (err instanceof EngineInputError) return { outcome: "failed", error: { code: "invalid_input", message: err.message, field: err.field }, ...base };
    if (err instanceof EngineLimitError) return { outcome: "failed", error: { code: "engine_limit", message: err.message }, ...base };
    const e = err as Error;
    return { outcome: "failed", error: { code: "engine_error", message: `${e?.name ?? "Error"}: ${e?.message ?? String(err)}` }, ...base };
  }
}
