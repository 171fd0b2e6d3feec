import "@/server/server-only";
import { RateLimiterRedis, RateLimiterRes } from "rate-limiter-flexible";
import { Redis } from "ioredis";
import { env } from "@/env";
import { ApiError } from "./errors";

/**
 * Request rate limits per API token and per signed-in member, kept in Redis so that every web
 * process shares one count (rate-limiter-flexible). Reads and writes have separate budgets: a
 * script polling run status should never lock out its own submissions.
 */
type Kind = "read" | "write";

/** Budgets per minute (RATE_LIMIT_READS_PER_MINUTE, RATE_LIMIT_WRITES_PER_MINUTE), read when first needed. */
export function rateLimits(): Record<Kind, { points: number; durationSeconds: number }> {
  const e = env();
  return {
    read: { points: e.RATE_LIMIT_READS_PER_MINUTE, durationSeconds: 60 },
    write: { points: e.RATE_LIMIT_WRITES_PER_MINUTE, durationSeconds: 60 },
  };
}

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
    globalForLimits.__triskelLimits = { redis, limiters: { read: make("read"), write: make("write") } };
  }
  return globalForLimits.__triskelLimits.limiters;
}

export function rateKindOf(method: string): Kind {
  return method === "GET" || method === "HEAD" || method === "OPTIONS" ? "read" : "write";
}

/**
 * Counts one request for `key` (e.g. `token:<id>` or `user:<id>`); throws 429 with Retry-After
 * when the budget of the minute is spent. A Redis outage does not block requests.
 */
export async function consumeRateLimit(key: string, method: string): Promise<void> {
  const kind = rateKindOf(method);
  try {
    await limiters()[kind].consume(key, 1);
  } catch (res) {
    if (res instanceof RateLimiterRes) {
      const retryAfter = Math.max(1, Math.ceil(res.msBeforeNext / 1000));
      const { points, durationSeconds } = rateLimits()[kind];
      throw new ApiError(
        "rate_limited",
        `Too many ${kind === "read" ? "read" : "write"} requests: the limit is ${points} ` +
          `per ${durationSeconds} s for each API token and member. Retry in ${retryAfter} s.`,
        { limit: points, windowSeconds: durationSeconds, retryAfterSeconds: retryAfter },
        { "Retry-After": String(retryAfter) },
      );
    }
    // Redis down or slow: fail open (the queue health check reports the outage).
  }
}
