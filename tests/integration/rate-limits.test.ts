// Rate limits per member across tokens, per client address for requests that fail to authenticate,
// and the cap on API tokens per member (src/server/http/rate-limit.ts, src/server/auth/index.ts,
// src/server/auth/apiTokens.ts). The test instance's budgets are large (scripts/env.d/ratelimit.sh),
// so counts are brought to one below the budget in Redis and real requests cross it. The instance
// trusts one proxy hop (TRUSTED_PROXY_HOPS=1 there), so each case names its own client in
// X-Forwarded-For (addresses of the documentation ranges) and spends no other test's budget; every
// count set here is removed again. The person is signed up fresh, so no other test shares their budget
// or their tokens.
import { createHmac, randomBytes, randomUUID } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Redis } from "ioredis";
import Stripe from "stripe";
import { parseEnv } from "@/env";
import { api, appUrl, redisUrl } from "../support/services";
import { createStandInUser, sessionFetch, type Credentials } from "../support/session";

const {
  RATE_LIMIT_READS_PER_MINUTE: READS,
  RATE_LIMIT_FAILED_PER_MINUTE: FAILED,
  API_TOKENS_PER_MEMBER: CAP,
  QUEUE_PREFIX: PREFIX,
  TRUSTED_PROXY_HOPS: HOPS,
} = parseEnv(process.env);
const redis = new Redis(redisUrl(), { maxRetriesPerRequest: 2 });
const touched: string[] = [];
const memberKey = (kind: "read" | "write", userId: string) => `${PREFIX}:rl:${kind}:member:${userId}`;
const failedKey = (address: string) => `${PREFIX}:rl:failed:ip:${address}`;
/** Brings a count to `value`, keeping the window its first request opened. */
async function setCount(key: string, value: number) {
  touched.push(key);
  expect(await redis.exists(key), `${key} exists`).toBe(1);
  await redis.set(key, String(value), "KEEPTTL");
}

let person: Credentials;
let userId = "";
const tokens: { id: string; secret: string }[] = [];

async function newToken(name: string) {
  const res = await sessionFetch(person, "/api/v1/tokens", { method: "POST", json: { name } });
  expect(res.status, await res.clone().text()).toBe(201);
  const body = await res.json();
  return { id: body.token.id as string, secret: body.secret as string };
}
const get = (path: string, headers: Record<string, string> = {}) => fetch(new URL(path, appUrl()), { headers });
const asClient = (address: string, extra: Record<string, string> = {}) => ({ "x-forwarded-for": address, ...extra });
const bearer = (secret: string) => ({ authorization: `Bearer ${secret}` });
const unknownToken = () => `trk_${randomBytes(32).toString("base64url")}`;

async function expect429(res: Response, budget: "member" | "ip", limit: number) {
  expect(res.status).toBe(429);
  const retryAfter = Number(res.headers.get("retry-after"));
  expect(Number.isInteger(retryAfter) && retryAfter >= 1 && retryAfter <= 60, `Retry-After ${retryAfter}`).toBe(true);
  const body = await res.json();
  expect(body.error.code).toBe("rate_limited");
  expect(body.error.details).toEqual({ limit, windowSeconds: 60, retryAfterSeconds: retryAfter, budget });
  expect(body.error.message).toMatch(
    budget === "ip" ? /without valid credentials from your address/ : /for each member, shared by all of the member's API tokens/,
  );
  return body;
}

beforeAll(async () => {
  expect(HOPS).toBe(1);
  person = await createStandInUser({ email: `rate-limits-${randomUUID().slice(0, 8)}@limits.example`, name: "Rhea Ratelimit" });
  const ws = await sessionFetch(person, "/api/v1/workspace");
  expect(ws.status).toBe(200);
  userId = (await ws.json()).member.id;
  tokens.push(await newToken("first script"), await newToken("second script"));
});

afterAll(async () => {
  if (touched.length) await redis.del(...touched);
  redis.disconnect();
});

describe("per member, across tokens and the session", () => {
  it("a member's second token and their browser session share the first token's budget", async () => {
    const key = memberKey("read", userId);
    await redis.del(key);
    const [a, b] = tokens;
    expect((await get("/api/v1/runs?limit=1", bearer(a.secret))).status).toBe(200);
    expect((await get("/api/v1/runs?limit=1", bearer(b.secret))).status).toBe(200);
    expect((await sessionFetch(person, "/api/v1/runs?limit=1")).status).toBe(200);
    expect(Number(await redis.get(key))).toBe(3); // one count for the three credentials
    await setCount(key, READS - 1);
    expect((await get("/api/v1/runs?limit=1", bearer(a.secret))).status).toBe(200); // the last read of the minute
    await expect429(await get("/api/v1/runs?limit=1", bearer(b.secret)), "member", READS);
    await expect429(await sessionFetch(person, "/api/v1/runs?limit=1", { rateLimitExpected: true }), "member", READS);
    // A token created now has no fresh budget either.
    const c = await newToken("third script"); // a write: the write budget is apart
    tokens.push(c);
    await expect429(await get("/api/v1/runs?limit=1", bearer(c.secret)), "member", READS);
    // Another member is not affected.
    expect((await api("/api/v1/runs?limit=1", { as: "researcher" })).status).toBe(200);
    await redis.del(key);
    expect((await get("/api/v1/runs?limit=1", bearer(b.secret))).status).toBe(200);
  });
});

describe("per client address, for requests that fail to authenticate", () => {
  it("unknown, revoked and malformed tokens and no credentials spend one budget; once spent: 429 before any lookup", async () => {
    const client = "203.0.113.10";
    const key = failedKey(client);
    await redis.del(key);
    const first = await get("/api/v1/runs", asClient(client, bearer(unknownToken())));
    expect(first.status).toBe(401);
    expect((await first.json()).error.message).toBe("Unknown API token.");
    expect(Number(await redis.get(key))).toBe(1);
    // Each kind of failure counts.
    const revoked = await newToken("revoked at once");
    expect((await sessionFetch(person, `/api/v1/tokens/${revoked.id}`, { method: "DELETE" })).status).toBe(200);
    expect((await get("/api/v1/runs", asClient(client, bearer(revoked.secret)))).status).toBe(401);
    expect((await get("/api/v1/runs", asClient(client, { authorization: "Basic abc" }))).status).toBe(401);
    expect((await get("/api/v1/runs", asClient(client, bearer("not-a-token")))).status).toBe(401);
    expect((await get("/api/v1/runs", asClient(client))).status).toBe(401);
    expect(Number(await redis.get(key))).toBe(5);
    // Successful requests from the same address count nothing here.
    expect((await get("/api/v1/runs?limit=1", asClient(client, bearer(tokens[0].secret)))).status).toBe(200);
    expect(Number(await redis.get(key))).toBe(5);

    await setCount(key, FAILED - 1);
    expect((await get("/api/v1/runs", asClient(client, bearer(unknownToken())))).status).toBe(401); // the last one
    await expect429(await get("/api/v1/runs", asClient(client, bearer(unknownToken()))), "ip", FAILED);
    await expect429(await get("/api/v1/runs", asClient(client, bearer(revoked.secret))), "ip", FAILED);
    await expect429(await get("/api/v1/runs", asClient(client)), "ip", FAILED);
    await expect429(await get("/api/v1/runs", asClient(client, { authorization: "Basic abc" })), "ip", FAILED);
    // A valid token never used yet is refused before its lookup (its last use stays unset) ...
    const fresh = await newToken("never used");
    await expect429(await get("/api/v1/runs?limit=1", asClient(client, bearer(fresh.secret))), "ip", FAILED);
    const listed = (await (await sessionFetch(person, "/api/v1/tokens")).json()).tokens.find((t: { id: string }) => t.id === fresh.id);
    expect(listed.lastUsedAt).toBeNull();
    // ... while a token that has worked goes on: someone else's failures behind the same address do not lock out a working script.
    expect((await get("/api/v1/runs?limit=1", asClient(client, bearer(tokens[0].secret)))).status).toBe(200);
    // The health endpoint and the pages are not limited.
    expect((await get("/api/v1/health", asClient(client))).status).toBe(200);
    expect((await get("/", asClient(client))).status).toBe(200);
    // Other addresses have budgets of their own, and the refused token works from them.
    expect((await get("/api/v1/runs", asClient("203.0.113.11", bearer(unknownToken())))).status).toBe(401);
    expect((await get("/api/v1/runs?limit=1", asClient("203.0.113.11", bearer(fresh.secret)))).status).toBe(200);
    // The client is the last X-Forwarded-For entry (one trusted hop): an entry the client put before it changes nothing.
    await expect429(await get("/api/v1/runs", { "x-forwarded-for": `198.51.100.77, ${client}` }), "ip", FAILED);
    await sessionFetch(person, `/api/v1/tokens/${fresh.id}`, { method: "DELETE" });
  });

  it("bad webhook signatures (both endpoints) spend the same budget; a good signature is never refused for it", async () => {
    const client = "203.0.113.20";
    const key = failedKey(client);
    await redis.del(key);
    const payload = JSON.stringify({
      id: `evt_rate_limits_${randomUUID()}`,
      object: "event",
      type: "product.created",
      created: Math.floor(Date.now() / 1000),
      data: { object: {} },
    });
    const stripeBad = () =>
      fetch(new URL("/api/webhooks/stripe", appUrl()), {
        method: "POST",
        headers: asClient(client, { "stripe-signature": "t=1,v1=deadbeef", "content-type": "application/json" }),
        body: payload,
      });
    const clerkBody = JSON.stringify({ type: "session.created", object: "event", data: {} });
    const clerk = (signature: string) => {
      const id = `msg_${randomUUID()}`;
      const ts = String(Math.floor(Date.now() / 1000));
      return fetch(new URL("/api/webhooks/clerk", appUrl()), {
        method: "POST",
        headers: asClient(client, {
          "content-type": "application/json",
          "svix-id": id,
          "svix-timestamp": ts,
          "svix-signature": signature || clerkSignature(id, ts, clerkBody),
        }),
        body: clerkBody,
      });
    };
    expect((await stripeBad()).status).toBe(400);
    expect((await clerk("v1,AAAA")).status).toBe(400);
    expect(Number(await redis.get(key))).toBe(2);
    await setCount(key, FAILED - 1);
    expect((await stripeBad()).status).toBe(400);
    await expect429(await stripeBad(), "ip", FAILED);
    await expect429(await clerk("v1,AAAA"), "ip", FAILED);
    // Correctly signed deliveries from the same address are applied as before.
    const good = await clerk("");
    expect(good.status, await good.clone().text()).toBe(200);
    const stripe = new Stripe("sk_test_unused");
    const header = stripe.webhooks.generateTestHeaderString({ payload, secret: process.env.STRIPE_WEBHOOK_SECRET! });
    const stripeGood = await fetch(new URL("/api/webhooks/stripe", appUrl()), {
      method: "POST",
      headers: asClient(client, { "stripe-signature": header, "content-type": "application/json" }),
      body: payload,
    });
    expect(stripeGood.status, await stripeGood.clone().text()).toBe(200);
  });
});

function clerkSignature(id: string, ts: string, body: string): string {
  const secret = process.env.CLERK_WEBHOOK_SECRET;
  if (!secret) throw new Error("CLERK_WEBHOOK_SECRET is not set: run through `npm test`");
  const sig = createHmac("sha256", Buffer.from(secret.replace(/^whsec_/, ""), "base64"))
    .update(`${id}.${ts}.${body}`)
    .digest("base64");
  return `v1,${sig}`;
}

describe("API tokens per member", () => {
  it(`a member holds at most API_TOKENS_PER_MEMBER active tokens in a workspace: one more is 409 naming the cap; revoking frees a place`, async () => {
    const active = async () =>
      ((await (await sessionFetch(person, "/api/v1/tokens")).json()).tokens as { id: string; revokedAt: string | null }[]).filter((t) => !t.revokedAt);
    const before = (await active()).length;
    expect(before).toBeGreaterThanOrEqual(1);
    expect(before).toBeLessThan(CAP);
    for (let i = before; i < CAP; i++) await newToken(`filler ${i}`);
    expect((await active()).length).toBe(CAP);
    const refused = await sessionFetch(person, "/api/v1/tokens", { method: "POST", json: { name: "one too many" } });
    expect(refused.status).toBe(409);
    const body = await refused.json();
    expect(body.error.code).toBe("conflict");
    expect(body.error.message).toContain(`(${CAP})`);
    expect(body.error.message).toMatch(/revoke one you no longer use first/);
    expect(body.error.details).toEqual({ limit: CAP, active: CAP });
    expect((await active()).length).toBe(CAP);
    // Revoked tokens do not count: revoke two, then five creations at once: exactly two get through.
    const [x, y] = await active();
    for (const t of [x, y]) expect((await sessionFetch(person, `/api/v1/tokens/${t.id}`, { method: "DELETE" })).status).toBe(200);
    const statuses = await Promise.all(
      Array.from({ length: 5 }, (_, i) => sessionFetch(person, "/api/v1/tokens", { method: "POST", json: { name: `at once ${i}` } }).then((r) => r.status)),
    );
    expect(statuses.sort()).toEqual([201, 201, 409, 409, 409]);
    expect((await active()).length).toBe(CAP);
  });
});
