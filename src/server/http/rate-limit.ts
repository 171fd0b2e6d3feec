import "@/server/server-only";
import { RateLimiterRedis, RateLimiterRes } from "rate-limiter-flexible";
import { Redis } from "ioredis";
import { env } from "@/env";
import { ApiError } from "./errors";
import { clientAddress } from "./client-address";

/**
 * Request rate limits, kept in Redis so that every web process shares one count
 * (rate-limiter-flexible). Two kinds of budget:
 *
 * - per member (`member:<user id>`): every API token of the person and their browser session
 *   count against one budget, so a second token brings no fresh one. Reads and writes have
 *   separate budgets: a script polling run status should never lock out its own submissions.
 * - per client address (`ip:<address>`, src/server/http/client-address.ts) for requests that fail
 *   to authenticate: no credentials, an unknown, revoked or malformed token, a bad webhook
 *   signature. A smaller budget; once it is spent, requests from that address that carry a token
 *   are answered 429 before the token is looked up. Successful requests never count here.
 *
 * The health endpoint and the pages call none of this.
 */
type Kind = "read" | "write" | "failed";
type Budget = { points: number; durationSeconds: number };

/** Budgets per minute (RATE_LIMIT_READS_PER_MINUTE, RATE_LIMIT_WRITES_PER_MINUTE, RATE_LIMIT_FAILED_PER_MINUTE), read when first needed. */
export function rateLimits(): Record<Kind, Budget> {
  const e = env();
  return {
    read: { points: e.RATE_LIMIT_READS_PER_MINUTE, durationSeconds: 60 },
    write: { points: e.RATE_LIMIT_WRITES_PER_MINUTE, durationSeconds: 60 },
    failed: { points: e.RATE_LIMIT_FAILED_PER_MINUTE, durationSeconds: 60 },
  };
}

/** The Redis keys of the budgets (`<QUEUE_PREFIX>:rl:<kind>:<key>`), for the record and the tests. */
export const memberKey = (userId: string) => `member:${userId}`;
export const addressKey = (address: string) => `ip:${address}`;

const globalForLimits = globalThis as unknown as { __triskelLimits?: { redis: Redis; limiters: Record<Kind, RateLimiterRedis> } };

function limiters() {
  if (!globalForLimits.__triskelLimits) {
    // No offline queue: while Redis is down a count fails at once (and the request is allowed).
    const redis = new Redis(env().REDIS_URL, { enableOfflineQueue: false, maxRetriesPerRequest: 1, connectTimeout: 2000 });
    redis.on("error", () => {});
    const limits = rateLimits();
    const make = (kind: Kind) =>
      new RateLimiterRedis({
        storeClient: redis,
        keyPrefix: `${env().QUEUE_PREFIX}:rl:${kind}`,
        points: limits[kind].points,
        duration: limits[kind].durationSeconds,
      });
    globalForLimits.__triskelLimits = { redis, limiters: { read: make("read"), write: make("write"), failed: make("failed") } };
  }
  return globalForLimits.__triskelLimits.limiters;
}

export function rateKindOf(method: string): "read" | "write" {
  return method === "GET" || method === "HEAD" || method === "OPTIONS" ? "read" : "write";
}

function limited(kind: Kind, msBeforeNext: number): ApiError {
  const retryAfter = Math.max(1, Math.ceil(msBeforeNext / 1000));
  const { points, durationSeconds } = rateLimits()[kind];
  const budget = kind === "failed" ? "ip" : "member";
  const message =
    kind === "failed"
      ? `Too many requests without valid credentials from your address: the limit is ${points} per ${durationSeconds} s for requests ` +
        "with no credentials, an unknown, revoked or malformed API token, or a bad webhook signature. " +
        `Check the token (Workspace → API tokens) and retry in ${retryAfter} s.`
      : `Too many ${kind} requests: the limit is ${points} per ${durationSeconds} s for each member, ` +
        `shared by all of the member's API tokens and their browser session. Retry in ${retryAfter} s.`;
  return new ApiError(
    "rate_limited",
    message,
    { limit: points, windowSeconds: durationSeconds, retryAfterSeconds: retryAfter, budget },
    { "Retry-After": String(retryAfter) },
  );
}

/** Counts one point; throws 429 with Retry-After when the budget of the minute is spent. A Redis outage does not block requests. */
async function consume(kind: Kind, key: string): Promise<void> {
  try {
    await limiters()[kind].consume(key, 1);
  } catch (res) {
    if (res instanceof RateLimiterRes) throw limited(kind, res.msBeforeNext);
    // Redis down or slow: fail open (the queue health check reports the outage).
  }
}

/** Counts one request of a member (all their tokens and their session share it). */
export async function consumeMemberBudget(userId: string, method: string): Promise<void> {
  await consume(rateKindOf(method), memberKey(userId));
}

/** The failed-request budget's key for this request's client (TRUSTED_PROXY_HOPS decides what to believe). */
export function clientKeyOf(req: Request): string {
  return addressKey(clientAddress(req.headers, env().TRUSTED_PROXY_HOPS));
}

/**
 * Counts one failed request (no credentials, a bad token, a bad signature) against the client's
 * address. Returns normally while the budget lasts, so the caller throws its own 401/400; throws
 * 429 once it is spent.
 */
export async function countFailedRequest(req: Request): Promise<void> {
  await consume("failed", clientKeyOf(req));
}

/** Throws 429 when the client's failed-request budget is already spent (counts nothing): checked before a token lookup. */
export async function assertFailedBudgetLeft(req: Request): Promise<void> {
  let res: RateLimiterRes | null = null;
  try {
    res = await limiters().failed.get(clientKeyOf(req));
  } catch {
    return; // Redis down: fail open.
  }
  if (res && res.consumedPoints >= rateLimits().failed.points) throw limited("failed", res.msBeforeNext);
}

/** 400 and 401 answers of a handler count as failed requests of the client (webhook signatures, missing headers). */
export async function countingFailures(req: Request, handler: () => Promise<Response>): Promise<Response> {
  try {
    return await handler();
  } catch (err) {
    if (err instanceof ApiError && (err.code === "bad_request" || err.code === "unauthenticated")) await countFailedRequest(req);
    throw err;
  }
}
