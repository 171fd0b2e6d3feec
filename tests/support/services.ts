// What scripts/test.sh exports for the integration and browser tests.
import { readFileSync } from "node:fs";
import { answerValidator, describeCheck } from "./openapi";

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

/**
 * fetch against the running app with a demo member's token; a 429 fails the test (failOnRateLimit),
 * and so does a JSON answer of a known route that does not match the API document (checkAnswer).
 */
export async function api(path: string, init: RequestInit & { as?: DemoTokenKey | null; json?: unknown } = {}): Promise<Response> {
  const headers = new Headers(init.headers);
  if (init.as !== null) headers.set("authorization", `Bearer ${demoTokens()[init.as ?? "researcher"]}`);
  let body = init.body;
  if (init.json !== undefined) {
    headers.set("content-type", "application/json");
    body = JSON.stringify(init.json);
  }
  const sent = `${init.method ?? "GET"} ${path}`;
  const res = failOnRateLimit(await fetch(new URL(path, appUrl()), { ...init, headers, body }), sent);
  await checkAnswer(init.method ?? "GET", path, res, sent);
  return res;
}

let validator: Promise<ReturnType<typeof answerValidator>> | undefined;
/** The checker over the document the running app serves (fetched once per test file). */
export function documentValidator(): Promise<ReturnType<typeof answerValidator>> {
  validator ??= (async () => {
    const res = await fetch(new URL("/api/v1/openapi.json", appUrl()));
    if (res.status !== 200) throw new Error(`GET /api/v1/openapi.json answered ${res.status}: ${await res.text()}`);
    return answerValidator(await res.json());
  })();
  return validator;
}

/** How many answers of this test file were checked against the API document. */
export async function checkedAnswers(): Promise<number> {
  return (await documentValidator()).checkedCount();
}

/**
 * Checks a JSON answer of a route the document knows against its schema for that status (a copy of
 * the body is read; the caller's Response is untouched). A mismatch throws with the route, the
 * status and ajv's errors.
 */
export async function checkAnswer(method: string, path: string, res: Response, sent = `${method} ${path}`): Promise<void> {
  const v = await documentValidator();
  if (!v.routeOf(method, new URL(path, appUrl()).pathname)) return;
  const type = res.headers.get("content-type");
  let body: unknown = undefined;
  if (type?.includes("application/json") && method.toUpperCase() !== "HEAD") {
    const text = await res.clone().text();
    try {
      body = JSON.parse(text);
    } catch {
      throw new Error(`The answer to ${sent} (${res.status}) says application/json but is not JSON: ${text.slice(0, 200)}`);
    }
  }
  const c = v.check(method, new URL(path, appUrl()).pathname, res.status, type, body);
  if (c.problems.length) throw new Error(describeCheck(c, sent));
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
