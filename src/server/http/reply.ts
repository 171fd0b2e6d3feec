import "@/server/server-only";
import { NextResponse } from "next/server";
import type { ApiResponse, ApiRoute } from "@/shared/api";

/**
 * The success answer of a JSON endpoint: `route` names the endpoint in the contract table
 * (src/shared/api/routes.ts) and the body must have the type listed there, so a handler cannot
 * answer with a shape the browser and the API reference do not know.
 */
export function reply<R extends ApiRoute>(route: R, body: ApiResponse<R>, init?: ResponseInit): NextResponse<ApiResponse<R>> {
  void route;
  return NextResponse.json(body, init);
}

/** 204 No Content for an endpoint whose contract body is null (a deletion). */
export function noContent<R extends ApiRoute>(route: ApiResponse<R> extends null ? R : never): Response {
  void route;
  return new Response(null, { status: 204 });
}
