import { route } from "@/server/http/errors";
import { openApiDocument } from "@/server/openapi/document";

export const dynamic = "force-dynamic";

/** GET /api/v1/openapi.json (no auth): the OpenAPI 3.1 document of every endpoint (src/server/openapi/document.ts). */
export const GET = route(async () => {
  return new Response(JSON.stringify(openApiDocument()), {
    headers: { "content-type": "application/json; charset=utf-8", "cache-control": "public, max-age=300" },
  });
});
