import "@/server/server-only";
import { reply } from "@/server/http/reply";
import { pingDb } from "@/server/db";
import { pingRedis } from "@/server/queue";

export const dynamic = "force-dynamic";

async function check(probe: () => Promise<number>) {
  try {
    return { status: "ok" as const, latencyMs: Math.round((await probe()) * 10) / 10 };
  } catch (err) {
    return { status: "down" as const, message: (err as Error).message || String(err) };
  }
}

/** GET /api/v1/health (no auth): database and queue status; 503 when either is down. */
export async function GET() {
  const [database, queue] = await Promise.all([check(() => pingDb()), check(() => pingRedis())]);
  const ok = database.status === "ok" && queue.status === "ok";
  return reply(
    "GET /api/v1/health",
    { status: ok ? "ok" : "degraded", database, queue, time: new Date().toISOString() },
    { status: ok ? 200 : 503, headers: { "cache-control": "no-store" } },
  );
}
