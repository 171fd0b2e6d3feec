/**
 * Requests Next.js cannot answer with the JSON error body, answered at the Node HTTP server
 * before Next sees them (installed once by src/instrumentation.ts):
 * - a method Next does not route (TRACE and any other besides GET, HEAD, OPTIONS, POST, PUT,
 *   PATCH, DELETE): the Fetch `Request` refuses to exist for TRACE, so Next answered a 500 page;
 * - a standard method an /api/v1 endpoint does not have (DELETE /api/v1/runs): Next answers an
 *   empty 405;
 * - an /api path that is not valid percent-encoding (`/api/v1/runs/%ZZ`): Next answered a page.
 * The endpoints and their methods come from the API contract (src/shared/api/routes.ts), which
 * tests/unit/api-contract.test.ts keeps equal to the route files.
 * It also stamps every request with the socket's address (PEER_HEADER), which route handlers
 * cannot see otherwise.
 */
import http from "node:http";
import { FILE_ROUTES, JSON_ROUTES } from "@/shared/api/routes";
import { PEER_HEADER } from "./client-address";

const NEXT_METHODS = new Set(["GET", "HEAD", "OPTIONS", "POST", "PUT", "PATCH", "DELETE"]);
/** Routes outside /api/v1 (signed webhooks), not in the contract table. */
const OTHER_ROUTES = ["POST /api/webhooks/clerk", "POST /api/webhooks/stripe"];

interface Endpoint {
  template: string;
  pattern: RegExp;
  params: number;
  methods: string[];
}

function buildEndpoints(routes: readonly string[]): Endpoint[] {
  const byTemplate = new Map<string, Set<string>>();
  for (const r of routes) {
    const [method, rest] = r.split(" ");
    const template = rest.replace(/\?.*$/, "");
    if (!byTemplate.has(template)) byTemplate.set(template, new Set());
    byTemplate.get(template)!.add(method);
  }
  return [...byTemplate].map(([template, methods]) => {
    const allowed = new Set(methods);
    if (allowed.has("GET")) allowed.add("HEAD");
    allowed.add("OPTIONS");
    const source = template
      .split("/")
      .map((segment) => (/^\{\w+\}$/.test(segment) ? "[^/]+" : segment.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")))
      .join("/");
    return { template, pattern: new RegExp(`^${source}/?$`), params: (template.match(/\{/g) ?? []).length, methods: [...allowed].sort() };
  });
}

const ENDPOINTS = buildEndpoints([...JSON_ROUTES, ...FILE_ROUTES, ...OTHER_ROUTES]);

/** The endpoint a path names (a static segment wins over a `{…}` one, as in Next's router), if any. */
export function endpointFor(path: string): Endpoint | undefined {
  return ENDPOINTS.filter((e) => e.pattern.test(path)).sort((a, b) => a.params - b.params)[0];
}

export interface GuardAnswer {
  status: number;
  headers: Record<string, string>;
  body: string;
}

function json(status: number, code: string, message: string, headers: Record<string, string> = {}): GuardAnswer {
  return {
    status,
    headers: { "content-type": "application/json", "cache-control": "no-store", "x-content-type-options": "nosniff", ...headers },
    body: JSON.stringify({ error: { code, message } }),
  };
}

/** What to answer for this method and raw path, or undefined to let Next route the request. */
export function guard(method: string, rawUrl: string): GuardAnswer | undefined {
  const rawPath = rawUrl.split("?")[0];
  const isApi = rawPath === "/api" || rawPath.startsWith("/api/");
  const upper = method.toUpperCase();
  if (!isApi) {
    if (NEXT_METHODS.has(upper)) return undefined;
    return { status: 405, headers: { "content-type": "text/plain; charset=utf-8", allow: "GET, HEAD, OPTIONS, POST" }, body: "Method Not Allowed\n" };
  }
  let path: string;
  try {
    path = decodeURIComponent(rawPath);
  } catch {
    return json(400, "bad_request", "The path is not valid percent-encoding (e.g. `%ZZ`); encode ids with encodeURIComponent.");
  }
  const endpoint = endpointFor(rawPath);
  if (endpoint && !endpoint.methods.includes(upper)) {
    return json(405, "method_not_allowed", `${upper.slice(0, 20)} is not allowed on ${endpoint.template}; allowed: ${endpoint.methods.join(", ")}.`, {
      allow: endpoint.methods.join(", "),
    });
  }
  if (!endpoint && !NEXT_METHODS.has(upper)) {
    const shown = path.length > 200 ? `${path.slice(0, 200)}…` : path;
    return json(404, "not_found", `No API endpoint ${upper.slice(0, 20)} ${shown}; see docs/api.md for the endpoints under /api/v1.`);
  }
  return undefined;
}

let installed = false;
/** Puts the guard in front of every request of every HTTP server of this process (once). */
export function installMethodGuard(): void {
  if (installed) return;
  installed = true;
  const emit = http.Server.prototype.emit;
  http.Server.prototype.emit = function (this: http.Server, event: string | symbol, ...args: unknown[]) {
    if (event === "request") {
      const [req, res] = args as [http.IncomingMessage, http.ServerResponse];
      // The socket's address, for the failed-request budget (client-address.ts): set here, where
      // the socket is known, over anything a client sent under the same name.
      req.headers[PEER_HEADER] = req.socket?.remoteAddress ?? "";
      const answer = guard(req.method ?? "GET", req.url ?? "/");
      if (answer) {
        res.writeHead(answer.status, { ...answer.headers, "content-length": Buffer.byteLength(answer.body) });
        res.end(req.method === "HEAD" ? undefined : answer.body);
        req.resume();
        return true;
      }
    }
    return emit.apply(this, [event, ...args] as Parameters<typeof emit>);
  } as typeof emit;
}
