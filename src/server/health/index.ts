import "@/server/server-only";
import { pingDb } from "@/server/db";
import { pingRedis } from "@/server/queue";

import type { HealthReport, ServiceHealth } from "@/shared/api";

async function check(probe: () => Promise<number>): Promise<ServiceHealth> {
  try {
    return { status: "ok", latencyMs: Math.round((await probe()) * 10) / 10 };
  } catch (err) {
    return { status: "down", message: (err as Error).message || String(err) };
  }
}

/** Database and queue, probed now: what GET /api/v1/health answers in JSON and the /status page says in words. */
export async function healthReport(): Promise<HealthReport> {
  const [database, queue] = await Promise.all([check(() => pingDb()), check(() => pingRedis())]);
  const ok = database.status === "ok" && queue.status === "ok";
  return { status: ok ? "ok" : "degraded", database, queue, time: new Date().toISOString() };
}
