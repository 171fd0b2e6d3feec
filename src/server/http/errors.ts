import { NextResponse } from "next/server";
import { ZodError } from "zod";
import { readBodyCapped } from "./body";

/** Error codes of the public API (product.md: `{"error": {"code", "message", "details"}}`). */
export type ApiErrorCode =
  | "bad_request"
  | "unauthenticated"
  | "payment_required"
  | "forbidden"
  | "not_found"
  | "method_not_allowed"
  | "conflict"
  | "payload_too_large"
  | "invalid_input"
  | "rate_limited"
  | "unavailable"
  | "internal";

/** The HTTP status of each error code (the API document lists them per status). */
export const API_ERROR_STATUS: Record<ApiErrorCode, number> = {
  bad_request: 400,
  unauthenticated: 401,
  payment_required: 402,
  forbidden: 403,
  not_found: 404,
  method_not_allowed: 405,
  conflict: 409,
  payload_too_large: 413,
  invalid_input: 422,
  rate_limited: 429,
  unavailable: 503,
  internal: 500,
};

/** A typed error any server module may throw; route handlers turn it into the JSON error body. */
export class ApiError extends Error {
  readonly status: number;
  constructor(
    readonly code: ApiErrorCode,
    message: string,
    readonly details?: unknown,
    readonly headers?: Record<string, string>,
  ) {
    super(message);
    this.status = API_ERROR_STATUS[code];
  }
}

export function errorBody(code: string, message: string, details?: unknown) {
  return { error: { code, message, ...(details === undefined ? {} : { details }) } };
}

export function zodToApiError(err: ZodError, prefix = ""): ApiError {
  const issues = err.issues.map((i) => ({ field: [prefix, ...i.path.map(String)].filter(Boolean).join("."), message: i.message }));
  const first = issues[0];
  return new ApiError("invalid_input", first ? `${first.field || "body"}: ${first.message}` : "invalid input", { issues });
}

/** Maps anything thrown to a JSON response; unknown errors are logged and answered 500 with a reference. */
export function toResponse(err: unknown, req?: Request): NextResponse {
  if (err instanceof ApiError) {
    return NextResponse.json(errorBody(err.code, err.message, err.details), { status: err.status, headers: err.headers });
  }
  if (err instanceof ZodError) return toResponse(zodToApiError(err));
  const mapped = mapKnownError(err) ?? malformedValue(err);
  if (mapped) return toResponse(mapped);
  const reference = crypto.randomUUID();
  logInternalError(reference, err, req);
  return NextResponse.json(errorBody("internal", `Internal error (reference ${reference}); it has been logged.`, { reference }), { status: 500 });
}

/**
 * One line of JSON for an unexpected error: the error code, the reference the client was given,
 * the method and path (never the query string), and for each error of the cause chain its class,
 * its message and (for PostgreSQL) its SQLSTATE, routine and constraint. Never the failed SQL or
 * its parameters (postgres.js and Drizzle errors carry `query`/`parameters`/`params`, and Drizzle
 * copies the parameters into its message), never a value quoted back by PostgreSQL, never
 * anything that looks like a token, a key or a hash.
 */
export function internalErrorLog(reference: string, err: unknown, req?: Request): Record<string, unknown> {
  const chain: Record<string, unknown>[] = [];
  for (let e: unknown = err, depth = 0; e !== undefined && e !== null && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    if (typeof e !== "object") {
      chain.push({ class: typeof e, message: redactSecrets(String(e)).slice(0, 500) });
      break;
    }
    const x = e as { name?: unknown; message?: unknown; code?: unknown; routine?: unknown; constraint_name?: unknown; stack?: unknown };
    const className =
      (e as object).constructor?.name && (e as object).constructor.name !== "Object" ? (e as object).constructor.name : String(x.name ?? "Error");
    const entry: Record<string, unknown> = { class: className, message: safeMessage(e) };
    if (typeof x.code === "string" && /^[0-9A-Z_]{2,40}$/.test(x.code)) entry.code = x.code;
    if (typeof x.routine === "string") entry.routine = x.routine;
    if (typeof x.constraint_name === "string") entry.constraint = x.constraint_name;
    if (depth === 0 && typeof x.stack === "string")
      entry.stack = x.stack
        .split("\n")
        .filter((line) => /^\s+at /.test(line))
        .slice(0, 12)
        .map((line) => redactSecrets(line.trim()));
    chain.push(entry);
  }
  let path: string | undefined;
  try {
    path = req ? new URL(req.url).pathname : undefined;
  } catch {
    path = undefined;
  }
  return { level: "error", code: "internal", reference, ...(req ? { method: req.method, path } : {}), errors: chain };
}

function logInternalError(reference: string, err: unknown, req?: Request): void {
  console.error(`[api] internal error ${JSON.stringify(internalErrorLog(reference, err, req))}`);
}

/** The message of one error without the SQL parameters or values it may quote. */
function safeMessage(e: object): string {
  let message = typeof (e as { message?: unknown }).message === "string" ? (e as { message: string }).message : "";
  // Drizzle: "Failed query: <sql>\nparams: <values>": keep only that a query failed.
  if (/^Failed query:/.test(message)) message = "Failed query (SQL not logged)";
  // PostgreSQL quotes the offending value: `invalid input syntax for type uuid: "..."`.
  if ("severity" in e || "routine" in e) message = message.replace(/:\s*(["']).*\1\s*$/s, ": [value not logged]");
  return redactSecrets(message.split("\n")[0]).slice(0, 500);
}

/** Blanks API tokens, payment and webhook keys, bearer credentials, passwords in URLs and long hex (hashes). */
export function redactSecrets(text: string): string {
  return text
    .replace(/\b(trk|sk|rk|pk|whsec)_[A-Za-z0-9_]{6,}/g, "$1_[redacted]")
    .replace(/Bearer\s+\S+/gi, "Bearer [redacted]")
    .replace(/(\w+:\/\/[^\s:@/]*:)[^\s@/]+@/g, "$1[redacted]@")
    .replace(/\b[0-9a-f]{32,}\b/gi, "[hex redacted]");
}

/**
 * PostgreSQL refusing a value the request carried (text it cannot store such as NUL, a date out
 * of its range, a number too large for its column, text that is not a uuid): the request was
 * malformed, so 400, never 500. The route handlers check their inputs before this; it is the net
 * under them. (Class 22 "data exception" codes that can only come from input.)
 */
const INPUT_SQLSTATES = new Set(["22001", "22003", "22007", "22008", "22021", "22P02", "22P05", "22025", "22023"]);
function malformedValue(err: unknown): ApiError | undefined {
  for (let e: unknown = err, depth = 0; e && typeof e === "object" && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const code = (e as { code?: unknown }).code;
    if (typeof code === "string" && INPUT_SQLSTATES.has(code) && ("severity" in e || "routine" in e))
      return new ApiError(
        "bad_request",
        "A value in the request is malformed or out of range (the database refused it); check the request's fields and parameters.",
      );
  }
  return undefined;
}

type Mapper = (err: unknown) => ApiError | undefined;
const mappers: Mapper[] = [];
/** Lets a module (e.g. the engine adapter) teach the HTTP layer its own error classes. */
export function registerErrorMapper(mapper: Mapper): void {
  mappers.push(mapper);
}
function mapKnownError(err: unknown): ApiError | undefined {
  for (const m of mappers) {
    const mapped = m(err);
    if (mapped) return mapped;
  }
  return dependencyDown(err);
}

/**
 * PostgreSQL or Redis unreachable (refused, reset, closed, starting up or shutting down): 503
 * with a message instead of a 500, so clients retry; the connection pools reconnect by themselves.
 */
const DOWN_CODES = new Set([
  "ECONNREFUSED",
  "ECONNRESET",
  "EPIPE",
  "ETIMEDOUT",
  "EHOSTUNREACH",
  "CONNECTION_CLOSED",
  "CONNECTION_ENDED",
  "CONNECTION_DESTROYED",
  "CONNECT_TIMEOUT",
  "57P01",
  "57P02",
  "57P03",
  "08000",
  "08001",
  "08003",
  "08004",
  "08006",
]);
const DOWN_MESSAGE =
  /ECONNREFUSED|ECONNRESET|Connection is closed|Stream isn't writeable|connection (terminated|ended|closed|destroyed)|write CONNECTION_|the database system is (starting up|shutting down|in recovery)|terminating connection due to administrator command|Reached the max retries per request limit/i;
function dependencyDown(err: unknown): ApiError | undefined {
  for (let e: unknown = err, depth = 0; e && typeof e === "object" && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    const { code, message, errors } = e as { code?: unknown; message?: unknown; errors?: unknown };
    const isDown =
      (typeof code === "string" && DOWN_CODES.has(code)) ||
      (typeof message === "string" && DOWN_MESSAGE.test(message)) ||
      (Array.isArray(errors) && errors.some((x) => DOWN_CODES.has((x as { code?: string })?.code ?? "")));
    if (isDown)
      return new ApiError(
        "unavailable",
        "A service Triskel depends on (database, queue or mail) is unreachable right now; retry in a few seconds.",
        { retryable: true },
        { "Retry-After": "5" },
      );
  }
  return undefined;
}

/** Wraps a route handler so that every thrown error becomes the typed JSON error. */
export function route<C>(handler: (req: Request, ctx: C) => Promise<Response> | Response) {
  return async (req: Request, ctx: C): Promise<Response> => {
    try {
      assertCleanUrl(req);
      return await handler(req, ctx);
    } catch (err) {
      return toResponse(err, req);
    }
  };
}

/**
 * The path and the query string must decode and hold no NUL (PostgreSQL cannot store it and no
 * identifier or filter contains it): 400 naming the parameter.
 */
function assertCleanUrl(req: Request): void {
  const url = new URL(req.url);
  let path: string;
  try {
    path = decodeURIComponent(url.pathname);
  } catch {
    throw new ApiError("bad_request", "The path is not valid percent-encoding (e.g. `%ZZ`); encode the id with encodeURIComponent.", { field: "path" });
  }
  if (path.includes("\u0000")) throw new ApiError("bad_request", "The path holds a NUL character (\\u0000).", { field: "path" });
  for (const [key, value] of url.searchParams) {
    if (key.includes("\u0000") || value.includes("\u0000"))
      throw new ApiError("bad_request", `${printable(key)}: the query parameter holds a NUL character (\\u0000).`, { field: printable(key) });
  }
}
const printable = (s: string) => s.replaceAll("\u0000", "\\u0000").slice(0, 100);

/** Keys that could reach an object's prototype when a body is merged or copied. */
export const PROTOTYPE_KEYS = new Set(["__proto__", "constructor", "prototype"]);

/** The dotted path of the first string (key or value) holding NUL in a parsed JSON value, or undefined. */
export function findNul(value: unknown, path: string[] = [], depth = 0): string[] | undefined {
  if (typeof value === "string") return value.includes("\u0000") ? path : undefined;
  if (value === null || typeof value !== "object" || depth > 200) return undefined;
  if (Array.isArray(value)) {
    for (let i = 0; i < value.length; i++) {
      const found = findNul(value[i], [...path, String(i)], depth + 1);
      if (found) return found;
    }
    return undefined;
  }
  for (const key of Object.keys(value)) {
    if (key.includes("\u0000")) return [...path, printable(key)];
    const found = findNul((value as Record<string, unknown>)[key], [...path, key], depth + 1);
    if (found) return found;
  }
  return undefined;
}

/** Reads a JSON body with a size limit (bytes), answering 413 / 400 with clear messages. */
export async function readJson(req: Request, limitBytes = 1_000_000): Promise<unknown> {
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > limitBytes) throw new ApiError("payload_too_large", `Request body is ${declared} bytes; the limit is ${limitBytes} bytes.`);
  // Read no more than the limit, whatever the body declares (a chunked body declares no length).
  const bytes = await readBodyCapped(req, limitBytes, (limit) => new ApiError("payload_too_large", `Request body is over the limit of ${limit} bytes.`));
  const text = new TextDecoder("utf-8").decode(bytes);
  if (!text.trim()) throw new ApiError("bad_request", "Request body is empty; send a JSON object.");
  let value: unknown;
  try {
    value = JSON.parse(text);
  } catch (e) {
    throw new ApiError("bad_request", `Request body is not valid JSON: ${(e as Error).message}`);
  }
  // No text field of the API may hold NUL: PostgreSQL stores neither it in text nor \u0000 in jsonb.
  const nul = findNul(value);
  if (nul) {
    const field = nul.join(".") || "body";
    throw new ApiError("invalid_input", `${field}: must not contain a NUL character (\\u0000).`, { field });
  }
  return value;
}
