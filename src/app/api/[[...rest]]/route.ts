import { NextResponse } from "next/server";
import { errorBody } from "@/server/http/errors";

export const dynamic = "force-dynamic";

/**
 * Any path under /api that no route file serves: 404 with the JSON error body, never the HTML
 * page. Static and dynamic routes (everything under /api/v1, /api/webhooks/*) always win over
 * this catch-all, so it answers only what would otherwise be Next's not-found page.
 */
function notFound(req: Request): Response {
  let path = new URL(req.url).pathname;
  try {
    path = decodeURIComponent(path);
  } catch {
    // shown as sent
  }
  const shown = path.length > 200 ? `${path.slice(0, 200)}…` : path;
  return NextResponse.json(errorBody("not_found", `No API endpoint ${req.method} ${shown}; see docs/api.md for the endpoints under /api/v1.`), {
    status: 404,
    headers: { "cache-control": "no-store" },
  });
}

export const GET = notFound;
export const POST = notFound;
export const PUT = notFound;
export const PATCH = notFound;
export const DELETE = notFound;
