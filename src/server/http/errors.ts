import { NextResponse } from "next/server";
import { ZodError } from "zod";

/** Error codes of the public API (product.md: `{"error": {"code", "message", "details"}}`). */
export type ApiErrorCode =
  | "bad_request"
  | "unauthenticated"
  | "payment_required"
  | "forbidden"
  | "not_found"
  | "conflict"
  | "payload_too_large"
  | "invalid_input"
  | "rate_limited"
  | "unavailable"
  | "internal";

const STATUS: Record<ApiErrorCode, number> = {
  bad_request: 400,
  unauthenticated: 401,
  payment_required: 402,
  forbidden: 403,
  not_found: 404,
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
    this.status = STATUS[code];
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
export function toResponse(err: unknown): NextResponse {
  if (err instanceof ApiError) {
    return NextResponse.json(errorBody(err.code, err.message, err.details), { status: err.status, headers: err.headers });
  }
  if (err instanceof ZodError) return toResponse(zodToApiError(err));
  const mapped = mapKnownError(err);
  if (mapped) return toResponse(mapped);
  const ref = crypto.randomUUID();
  console.error(`[api] unexpected error ref=${ref}`, err);
  return NextResponse.json(errorBody("internal", `Internal error (reference ${ref}); it has been logged.`), { status: 500 });
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
      return await handler(req, ctx);
    } catch (err) {
      return toResponse(err);
    }
  };
}

/** Reads a JSON body with a size limit (bytes), answering 413 / 400 with clear messages. */
export async function readJson(req: Request, limitBytes = 1_000_000): Promise<unknown> {
  const declared = Number(req.headers.get("content-length") ?? "0");
  if (declared > limitBytes) throw new ApiError("payload_too_large", `Request body is ${declared} bytes; the limit is ${limitBytes} bytes.`);
  const text = await req.text();
  if (Buffer.byteLength(text) > limitBytes) throw new ApiError("payload_too_large", `Request body is over the limit of ${limitBytes} bytes.`);
  if (!text.trim()) throw new ApiError("bad_request", "Request body is empty; send a JSON object.");
  try {
    return JSON.parse(text);
  } catch (e) {
    throw new ApiError("bad_request", `Request body is not valid JSON: ${(e as Error).message}`);
  }
}
