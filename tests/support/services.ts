// What scripts/test.sh exports for the integration and browser tests.
import { readFileSync } from "node:fs";

function required(name: string): string {
  const v = process.env[name];
  if (!v) throw new Error(`${name} is not set: run integration and browser tests through \`npm test\` (scripts/test.sh starts the services)`);
  return v;
}

export const appUrl = () => required("APP_URL");
export const databaseUrl = () => required("DATABASE_URL");
export const redisUrl = () => required("REDIS_URL");

export type DemoTokenKey = "owner" | "billingAdmin" | "researcher" | "viewer" | "student";
export function demoTokens(): Record<DemoTokenKey, string> {
  return JSON.parse(readFileSync(required("DEMO_TOKENS_FILE"), "utf8"));
}

/**
 * Throws on a 429. Test instances get request budgets no test reaches (scripts/env.d/ratelimit.sh:
 * 1,000,000 reads and writes a minute), so outside tests/integration/rate-limit.test.ts a 429 means
 * the rate limiter is wrong: the test fails here, loudly, instead of waiting it out and retrying.
 */
export function failOnRateLimit(res: Response, what: string): Response {
  if (res.status === 429) {
    throw new Error(
      `${what}: 429 Too Many Requests (Retry-After: ${res.headers.get("retry-after") ?? "none"}). Test instances have budgets no test ` +
        "reaches (scripts/env.d/ratelimit.sh), so this is a rate-limiter bug; it is not waited out or retried.",
    );
  }
  return res;
}

/** fetch against the running app with a demo member's token; a 429 fails the test (failOnRateLimit). */
export async function api(path: string, init: RequestInit & { as?: DemoTokenKey | null; json?: unknown } = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  if (init.as !== null) headers.set("authorization", `Bearer ${demoTokens()[init.as ?? "researcher"]}`);
  let body = init.body;
  if (init.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(init.json);
  }
  return failOnRateLimit(await fetch(new URL(path, appUrl()), { ...init, headers, body }), `${init.method ?? "GET"} ${path}`);
}

/**
 * The demo lab's Billing admin buys seats so that `free` of them are open (for tests that invite
 * people into the demo lab: each member and open invitation takes a seat). Only ever raises them.
 */
export async function ensureFreeSeats(free: number): Promise<void> {
  const now = (await (await api("/api/v1/billing/seats", { as: "billingAdmin" })).json()) as { seats: number; minimumSeats: number };
  const want = now.minimumSeats + free;
  if (now.seats >= want) return;
  const res = await api("/api/v1/billing/seats", { method: "PUT", as: "billingAdmin", json: { seats: want } });
  if (res.status !== 200) throw new Error(`the demo lab could not buy seats: ${res.status} ${await res.text()}`);
}
