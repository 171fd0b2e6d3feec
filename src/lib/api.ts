/**
 * Client for the Triskel REST API (/api/v1), used by every page through TanStack Query.
 * Same-origin requests carry the session cookie; no token is needed in the browser.
 * Errors arrive as `{ error: { code, message, details } }` and are thrown as ApiClientError.
 */
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

export async function apiFetch<T>(path: string, init: RequestInit & { json?: unknown } = {}): Promise<T> {
  const headers = new Headers(init.headers);
  let body = init.body;
  if (init.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(init.json);
  }
  headers.set("accept", "application/json");
  const res = await fetch(path.startsWith("/") ? path : `/api/v1/${path}`, { ...init, headers, body, credentials: "same-origin" });
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
    const err = (data as { error?: { code?: string; message?: string; details?: unknown } } | null)?.error;
    throw new ApiClientError(res.status, err?.code ?? `http_${res.status}`, err?.message ?? describeStatus(res.status), err?.details);
  }
  return data as T;
}

function describeStatus(status: number): string {
  if (status === 401) return "You are signed out; sign in again.";
  if (status === 403) return "Your role in this workspace does not allow this.";
  if (status === 404) return "Not found in this workspace.";
  if (status >= 500) return `The server failed (HTTP ${status}); try again in a moment.`;
  return `Request failed (HTTP ${status}).`;
}

/** Query string from an object, skipping empty values. */
export function qs(params: Record<string, string | number | boolean | null | undefined>): string {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v !== undefined && v !== null && v !== "") p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : "";
}

// ---- Resource shapes (docs/api.md; the UI reads only what it shows) ----

export type JobStatus = "queued" | "running" | "succeeded" | "failed" | "cancelled";

export interface NetworkRecord {
  id: string;
  name: string;
  version?: number;
  network: Record<string, unknown>;
  createdAt?: string;
  updatedAt?: string;
  createdBy?: string | { id?: string; name?: string; email?: string } | null;
}

export interface Estimate {
  computeSeconds: number;
  costUsd?: number;
  [k: string]: unknown;
}

export interface RunRecord {
  id: string;
  status: JobStatus;
  progress: number;
  computation?: { kind: string; [k: string]: unknown };
  kind?: string;
  networkId?: string | null;
  networkName?: string | null;
  network?: Record<string, unknown> | null;
  result?: Record<string, unknown> | null;
  error?: string | { code?: string; message?: string } | null;
  computeSeconds?: number | null;
  estimate?: Estimate | null;
  createdAt?: string;
  startedAt?: string | null;
  finishedAt?: string | null;
  createdBy?: string | { id?: string; name?: string; email?: string } | null;
}

export interface SweepAxis {
  parameter: string;
  values?: number[];
  from?: number;
  to?: number;
  points?: number;
}

export interface SweepRecord extends Omit<RunRecord, "result"> {
  axes: SweepAxis[];
  ensemble?: { samples: number } | null;
  pointCount?: number;
  pointsDone?: number;
  result?: unknown;
  points?: unknown[];
}

export interface ListPage<T> {
  items: T[];
  nextCursor?: string | null;
  total?: number;
}

/** Lists come back as `{ items, nextCursor }` (or `{ data }` / a bare array); normalise. */
export function asList<T>(data: unknown, key?: string): ListPage<T> {
  if (Array.isArray(data)) return { items: data as T[] };
  const d = (data ?? {}) as Record<string, unknown>;
  const items = (d.items ?? d.data ?? (key ? d[key] : undefined) ?? []) as T[];
  return { items: Array.isArray(items) ? items : [], nextCursor: ((d.nextCursor ?? d.nextBefore) as string | null | undefined) ?? null, total: d.total as number | undefined };
}

export function personName(p: RunRecord["createdBy"]): string {
  if (!p) return "–";
  if (typeof p === "string") return p;
  return p.name || p.email || p.id || "–";
}

export function errorText(e: RunRecord["error"]): string | null {
  if (!e) return null;
  return typeof e === "string" ? e : e.message ?? e.code ?? "failed";
}
