import { mkdirSync, writeFileSync } from "node:fs";
import { join } from "node:path";
import type { Env } from "../src/env";

/**
 * Fault-drill hook (npm run test:soak, docs/reliability.md "Drill hooks"): after the engine has
 * finished a job and before the job's finishing transaction, the worker waits, so a drill can
 * SIGKILL it in exactly that window. It announces each hold with a log line and a marker file
 * (`<TRISKEL_DRILL_DIR>/hold-<kind>-<id>.json`) so the drill knows when to kill.
 *
 * Off unless TRISKEL_DRILLS=1 and TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS > 0 are both set; in
 * production mode it also needs TRISKEL_STAND_INS=1 (a process against the local stand-ins), and
 * src/env.ts refuses to start a production process with TRISKEL_DRILLS=1 without it, so a real
 * deployment can neither start with it nor hold a job.
 */
export function drillHoldMs(e: Pick<Env, "NODE_ENV" | "TRISKEL_STAND_INS" | "TRISKEL_DRILLS" | "TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS">): number {
  if (!e.TRISKEL_DRILLS || e.TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS <= 0) return 0;
  if (e.NODE_ENV === "production" && !e.TRISKEL_STAND_INS) return 0;
  return e.TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS;
}

export type HoldBeforeFinish = (kind: "run" | "fit", id: string, detail: { outcome: string; cpuSeconds: number }) => Promise<void>;

/** The hook for one worker process: a no-op unless drillHoldMs(e) > 0. */
export function makeHoldBeforeFinish(e: Env): HoldBeforeFinish {
  const ms = drillHoldMs(e);
  if (ms === 0) return async () => {};
  const dir = e.TRISKEL_DRILL_DIR;
  if (dir) mkdirSync(dir, { recursive: true });
  console.warn(`[worker] DRILL HOOK ON: every job waits ${ms} ms before its finishing transaction (TRISKEL_DRILLS=1; never in a deployment)`);
  return async (kind, id, detail) => {
    const at = new Date().toISOString();
    if (dir) writeFileSync(join(dir, `hold-${kind}-${id}.json`), JSON.stringify({ kind, id, pid: process.pid, at, holdMs: ms, ...detail }) + "\n");
    console.warn(`[worker] drill: ${kind} ${id} computed (${detail.outcome}), holding ${ms} ms before its finishing transaction`);
    await new Promise((r) => setTimeout(r, ms));
  };
}
