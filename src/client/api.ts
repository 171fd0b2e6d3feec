/**
 * A small typed client of the REST API (/api/v1) over fetch, for scripts and the remote command
 * line (src/client/commands.ts). Every call names its endpoint in the contract table
 * (src/shared/api/routes.ts), so answers have the types the route handlers were checked against.
 * Authentication is an API token (`Authorization: Bearer trk_...`). Answers 429 and 503 are waited
 * out as their `Retry-After` header says (a few times), every other error is thrown as
 * RemoteApiError with the API's code and message.
 */
import { routeRequest, type ApiErrorBody, type ApiResponse, type ApiRoute, type FILE_ROUTES, type RouteParams } from "@/shared/api";

/** The command line's exit codes and what each means (the usage text, docs/scripts.md and the manual show this table). */
export const EXIT_CODES = [
  { name: "done", code: 0, meaning: "done: the job succeeded (or the request was answered)" },
  { name: "fault", code: 1, meaning: "a fault of the command line itself" },
  { name: "invalid", code: 2, meaning: "invalid input: the file, the usage, or the API's 400, 404, 409, 413 and 422" },
  { name: "refused", code: 3, meaning: "refused by the plan, the free quota or the spend cap (402)" },
  { name: "jobFailed", code: 4, meaning: "the job failed or was cancelled" },
  { name: "auth", code: 5, meaning: "authentication or permission: no token, 401, 403" },
  { name: "unreachable", code: 6, meaning: "the service is unreachable or failed: no answer, 5xx, or 429 and 503 still after waiting" },
  { name: "interrupted", code: 130, meaning: "Ctrl-C while waiting without a terminal: the job goes on, its id is printed" },
] as const;

type ExitName = (typeof EXIT_CODES)[number]["name"];
export const EXIT = Object.fromEntries(EXIT_CODES.map((e) => [e.name, e.code])) as {
  readonly [K in ExitName]: Extract<(typeof EXIT_CODES)[number], { name: K }>["code"];
};

/** An error answer of the API (or no answer at all: status 0). */
export class RemoteApiError extends Error {
  constructor(
    /** HTTP status; 0 when the service could not be reached. */
    readonly status: number,
    readonly code: string,
    message: string,
    readonly details?: unknown,
  ) {
    super(message);
    this.name = "RemoteApiError";
  }
  /** The command line's exit code for this error. */
  get exitCode(): number {
    return exitCodeOf(this.status);
  }
}

/** The exit code for an HTTP status (0: unreachable). */
export function exitCodeOf(status: number): number {
  if (status === 0 || status >= 500 || status === 429) return EXIT.unreachable;
  if (status === 401 || status === 403) return EXIT.auth;
  if (status === 402) return EXIT.refused;
  return EXIT.invalid;
}

/** The client was given something it cannot use (an address that is not http(s)); nothing was sent. */
export class ClientSetupError extends Error {
  override name = "ClientSetupError";
}

export interface ClientOptions {
  /** The app's address, e.g. http://127.0.0.1:3000 (a trailing /api/v1 is accepted too). */
  url: string;
  /** An API token, trk_... */
  token: string;
  /** How often a 429 or 503 answer is waited out before it is thrown (default 5). */
  busyRetries?: number;
  /** Longest wait for one Retry-After, seconds (default 60). */
  maxRetryAfterSeconds?: number;
  /** Told before each wait for a 429/503 (for a progress line). */
  onBusy?: (status: number, seconds: number, message: string) => void;
}

type FileRoute = (typeof FILE_ROUTES)[number];

export type Query = Record<string, string | number | boolean | undefined>;

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** The base address without a trailing slash or /api/v1; refuses what is not http(s). */
export function normaliseBaseUrl(url: string): string {
  let u: URL;
  try {
    u = new URL(url);
  } catch {
    throw new ClientSetupError(`the service address "${url}" is not a URL; give one like http://127.0.0.1:3000 (--url or TRISKEL_URL)`);
  }
  if (u.protocol !== "http:" && u.protocol !== "https:")
    throw new ClientSetupError(`the service address "${url}" must start with http:// or https:// (--url or TRISKEL_URL)`);
  return u.href.replace(/\/+$/, "").replace(/\/api\/v1$/, "");
}

export class TriskelClient {
  readonly baseUrl: string;
  private readonly token: string;
  private readonly busyRetries: number;
  private readonly maxRetryAfterSeconds: number;
  private readonly onBusy?: ClientOptions["onBusy"];

  constructor(options: ClientOptions) {
    this.baseUrl = normaliseBaseUrl(options.url);
    this.token = options.token;
    this.busyRetries = options.busyRetries ?? 5;
    this.maxRetryAfterSeconds = options.maxRetryAfterSeconds ?? 60;
    this.onBusy = options.onBusy;
  }

  /** One JSON endpoint of the contract table; the answer has the contract's type. */
  async call<R extends ApiRoute>(route: R, options: { params?: RouteParams<R>; query?: Query; json?: unknown } = {}): Promise<ApiResponse<R>> {
    const res = await this.send(route, options.params as Record<string, string> | undefined, options.query, options.json);
    const text = await res.text();
    return (text ? JSON.parse(text) : null) as ApiResponse<R>;
  }

  /** A file endpoint (result.json, results.csv, ...): its text, exactly as served. */
  async file(route: FileRoute, params: { id: string }): Promise<string> {
    return (await this.send(route, params)).text();
  }

  private async send(route: string, params?: Record<string, string>, query?: Query, json?: unknown): Promise<Response> {
    const rp = route.indexOf("?");
    const { method, path } = routeRequest(rp < 0 ? route : route.slice(0, rp), params);
    const search = new URLSearchParams(rp < 0 ? "" : route.slice(rp + 1));
    for (const [k, v] of Object.entries(query ?? {})) if (v !== undefined) search.set(k, String(v));
    const url = `${this.baseUrl}${path}${search.toString() ? `?${search}` : ""}`;
    const headers: Record<string, string> = { authorization: `Bearer ${this.token}`, accept: "application/json" };
    if (json !== undefined) headers["content-type"] = "application/json";
    for (let attempt = 0; ; attempt++) {
      let res: Response;
      try {
        res = await fetch(url, { method, headers, body: json === undefined ? undefined : JSON.stringify(json) });
      } catch (e) {
        const cause = (e as { cause?: { code?: string; message?: string } }).cause;
        throw new RemoteApiError(0, "unreachable", `cannot reach ${this.baseUrl}: ${cause?.code ?? cause?.message ?? (e as Error).message}`);
      }
      if (res.ok) return res;
      const err = await errorOf(res);
      if ((res.status === 429 || res.status === 503) && attempt < this.busyRetries) {
        const seconds = Math.min(retryAfterSeconds(res.headers.get("retry-after"), attempt), this.maxRetryAfterSeconds);
        this.onBusy?.(res.status, seconds, err.message);
        await sleep(seconds * 1000);
        continue;
      }
      throw err;
    }
  }
}

/** Seconds to wait from a Retry-After header (seconds or an HTTP date); without one, 1, 2, 4, ... s. */
export function retryAfterSeconds(header: string | null, attempt: number, now = Date.now()): number {
  if (header) {
    const s = Number(header);
    if (Number.isFinite(s) && s >= 0) return s;
    const at = Date.parse(header);
    if (Number.isFinite(at)) return Math.max(0, (at - now) / 1000);
  }
  return Math.min(2 ** attempt, 30);
}

async function errorOf(res: Response): Promise<RemoteApiError> {
  const text = await res.text().catch(() => "");
  let body: Partial<ApiErrorBody> | null = null;
  try {
    body = JSON.parse(text) as Partial<ApiErrorBody>;
  } catch {
    body = null;
  }
  const e = body?.error;
  const message = e?.message ?? `HTTP ${res.status} ${res.statusText}${text && !text.startsWith("<") ? `: ${text.slice(0, 200)}` : ""}`;
  return new RemoteApiError(res.status, e?.code ?? `http_${res.status}`, message, e?.details);
}
