import "@/server/server-only";
import { reply } from "@/server/http/reply";
import { healthReport } from "@/server/health";

export const dynamic = "force-dynamic";

/** GET /api/v1/health (no auth): database and queue status; 503 when either is down. The /status page says the same in words. */
export async function GET() {
  const report = await healthReport();
  return reply("GET /api/v1/health", report, { status: report.status === "ok" ? 200 : 503, headers: { "cache-control": "no-store" } });
}
