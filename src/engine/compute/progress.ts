import { EngineCancelledError } from "../errors";
import type { ParallelRunner } from "./parallel";

export interface ComputeOptions {
  onProgress?: (fraction: number) => void;
  shouldCancel?: () => boolean;
  /** Other threads for the independent pieces of a conductance (both valleys, ensemble samples): see parallel.ts. Absent: one thread. */
  parallel?: ParallelRunner;
}

/** Work counter: reports progress (throttled to ~10 per second, at least every 0.2 s of work)
 * and checks cancellation. */
export class Progress {
  private done = 0;
  private lastReport = 0;
  private lastCheck = 0;
  constructor(
    private readonly total: number,
    private readonly opts: ComputeOptions = {},
  ) {
    opts.onProgress?.(0);
    this.lastReport = Date.now();
  }
  tick(units = 1): void {
    this.done += units;
    const now = Date.now();
    if (now - this.lastCheck >= 20) {
      this.lastCheck = now;
      if (this.opts.shouldCancel?.()) throw new EngineCancelledError();
    }
    if (now - this.lastReport >= 100) {
      this.lastReport = now;
      this.opts.onProgress?.(Math.min(0.999, this.done / Math.max(1, this.total)));
    }
  }
  finish(): void {
    if (this.opts.shouldCancel?.()) throw new EngineCancelledError();
    this.opts.onProgress?.(1);
  }
}
