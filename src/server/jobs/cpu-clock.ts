/**
 * The CPU clock every compute thread bills by (worker/engine-thread.ts for runs and sweep
 * points, src/server/fits/fit-thread.ts for fits). Linux: the calling thread's CPU time from
 * /proc/thread-self/schedstat (nanoseconds). The kernel brings a running thread's total up to
 * date only when it is scheduled, so each reading first sleeps for a millisecond (sleeping costs
 * no CPU) — the settle: short jobs then read their true figure instead of 0. Elsewhere the
 * process's CPU counts other threads too, so wall time of a busy thread is the closer figure.
 * Import this file directly (not through src/server/jobs/index.ts): threads need no database.
 */
import { readFileSync } from "node:fs";

export type CpuSource = "thread" | "process" | "wall";

export interface CpuClock {
  source: CpuSource;
  /** Seconds on this clock (only differences mean anything). */
  read: () => number;
}

const SCHEDSTAT = "/proc/thread-self/schedstat";
const sleeper = new Int32Array(new SharedArrayBuffer(4));

export function cpuClock(): CpuClock {
  try {
    readFileSync(SCHEDSTAT, "utf8");
    return {
      source: "thread",
      read: () => {
        Atomics.wait(sleeper, 0, 0, 1);
        return Number(readFileSync(SCHEDSTAT, "utf8").split(" ")[0]) / 1e9;
      },
    };
  } catch {
    return { source: "wall", read: () => Number(process.hrtime.bigint()) / 1e9 };
  }
}

/** Starts measuring now; the returned function gives the CPU seconds spent since (never negative). */
export function startCpuMeter(clock: CpuClock): () => number {
  const started = clock.read();
  return () => Math.max(0, clock.read() - started);
}
