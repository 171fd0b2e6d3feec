/**
 * Client for the Triskel REST API (/api/v1), used by every page through TanStack Query.
 * Same-origin requests carry the session cookie; no token is needed in the browser.
 * Every call names its endpoint in the contract table (src/shared/api), so the answer's type is
 * the one the route handler was checked against. Errors arrive as `{ error: { code, message,
 * details } }` and are thrown as ApiClientError.
 */
import { routeRequest, type ApiErrorBody, type ApiResponse, type ApiRoute, type JobError, type RouteParams } from "@/shared/api";

export class ApiClientError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "ApiClientError";
  }
  /** Field-level issues, when the server names them (zod issues or engine input errors). */
  get issues(): { field: string; message: string }[] {
    const d = this.details as { issues?: { field?: string; path?: (string | number)[]; message: string }[]; field?: string } | undefined;
    if (d?.issues) return d.issues.map((i) => ({ field: i.field ?? (i.path ?? []).join("."), message: i.message }));
    if (d?.field) return [{ field: d.field, message: this.message }];
    return [];
  }
}

/**
 * One call of the API, by its name in the contract table (src/shared/api/routes.ts): the method and
 * path come from the name, `{…}` segments from `params`; the answer has the contract's type.
 */
export async function api<R extends ApiRoute>(
  route: R,
  options: { params?: RouteParams<R>; query?: QueryParams; json?: unknown; form?: FormData; signal?: AbortSignal } = {},
): Promise<ApiResponse<R>> {
  const { method, path } = routeRequest(route, options.params as Record<string, string> | undefined);
  return send<ApiResponse<R>>(`${path}${qs(options.query ?? {})}`, { method, json: options.json, form: options.form, signal: options.signal });
}

async function send<T>(path: string, init: { method: string; json?: unknown; form?: FormData; signal?: AbortSignal }): Promise<T> {
  const headers = new Headers({ accept: "application/json" });
  let body: string | FormData | undefined = init.form;
  if (init.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(init.json);
  }
  const res = await fetch(path, { method: init.method, headers, body, signal: init.signal, credentials: "same-origin" });
  const text = await res.text();
  let data: unknown = null;
  if (text) {
    try {
      data = JSON.parse(text);
    } catch {
      data = text;
    }
  }
  if (!res.ok) {
    const err = (data as Partial<ApiErrorBody> | null)?.error;
    throw new ApiClientError(res.status, err?.code ?? `http_${res.status}`, err?.message ?? describeStatus(res.status), err?.details);
  }
  return data as T;
}

function describeStatus(status: number): string {
  if (status === 401) return "You are signed out; sign in again.";
  if (status === 403) return "Your role in this group does not allow this.";
  if (status === 404) return "Not found in this group.";
  if (status >= 500) return `The server failed (HTTP ${status}); try again in a moment.`;
  return `Request failed (HTTP ${status}).`;
}

export type QueryParams = Record<string, string | number | boolean | null | undefined>;

/** Query string from an object, skipping empty values. */
export function qs(params: QueryParams): string {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== "") p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : "";
}

/** The message of a job's stored error. */
export function errorText(e: JobError | null | undefined): string | null {
  return e ? e.message || e.code || "failed" : null;
}
