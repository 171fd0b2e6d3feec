// Request rate limits (src/server/http/rate-limit.ts, wired into getCaller): per member (all their
// API tokens and their session share one budget), separate read and write budgets in Redis. The
// test instance's budgets are large (scripts/env.d/ratelimit.sh) so no other test meets them; here a
// member's write count is brought to one below the budget, then real requests cross it, and the
// count is removed again so later files are not limited. Per-address budgets for failed requests,
// a second token and the token cap: rate-limits.test.ts.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Redis } from "ioredis";
import { parseEnv } from "@/env";
import { api, appUrl, redisUrl } from "../support/services";
import { sessionFetch } from "../support/session";

// The budgets the web app runs with: the same variables and defaults (src/env.ts).
const { RATE_LIMIT_WRITES_PER_MINUTE: WRITES, RATE_LIMIT_READS_PER_MINUTE: READS, QUEUE_PREFIX: PREFIX } = parseEnv(process.env);
const redis = new Redis(redisUrl(), { maxRetriesPerRequest: 2 });

let token: { id: string; secret: string };
let other: { id: string; secret: string };
let researcherId = "";

async function newToken(name: string) {
  const res = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name } });
  expect(res.status).toBe(201);
  const body = await res.json();
  return { id: body.token.id as string, secret: body.secret as string };
}
const bearer = (secret: string) => ({ authorization: `Bearer ${secret}`, "content-type": "application/json" });
/** A write that needs no state: creating a token named after the call. */
const write = (secret: string) =>
  fetch(new URL("/api/v1/tokens", appUrl()), { method: "POST", headers: bearer(secret), body: JSON.stringify({ name: "rate limit probe" }) });
const read = (secret: string) => fetch(new URL("/api/v1/runs?limit=1", appUrl()), { headers: bearer(secret) });

beforeAll(async () => {
  token = await newToken("rate limit test");
  other = await newToken("rate limit bystander");
  researcherId = (await (await api("/api/v1/workspace", { as: "researcher" })).json()).member.id;
  expect(researcherId).toMatch(/^[0-9a-f-]{36}$/);
});
/** Active tokens made by the probe writes. */
async function probes(): Promise<{ id: string }[]> {
  const list = await (await api("/api/v1/tokens", { as: "researcher" })).json();
  return list.tokens.filter((t: { name: string; revokedAt: string | null }) => t.name === "rate limit probe" && !t.revokedAt);
}

afterAll(async () => {
  for (const p of await probes()) await api(`/api/v1/tokens/${p.id}`, { method: "DELETE", as: "researcher" });
  for (const t of [token, other]) if (t) await api(`/api/v1/tokens/${t.id}`, { method: "DELETE", as: "researcher" });
  redis.disconnect();
});

describe("rate limits", () => {
  it("a member who spends their write budget gets 429 with Retry-After and a message; reads and other members go on", async () => {
    // One request first, so the count exists with its window, then bring it to one below the budget.
    const key = `${PREFIX}:rl:write:member:${researcherId}`;
    await redis.del(key);
    expect((await write(token.secret)).status).toBe(201);
    expect(Number(await redis.get(key))).toBe(1);
    await redis.set(key, String(WRITES - 1), "KEEPTTL");
    expect((await write(token.secret)).status).toBe(201); // the last one of the minute
    const probesBefore = await probes();
    const limited = await write(token.secret);
    expect(limited.status).toBe(429);
    const retryAfter = Number(limited.headers.get("retry-after"));
    expect(Number.isInteger(retryAfter)).toBe(true);
    expect(retryAfter).toBeGreaterThanOrEqual(1);
    expect(retryAfter).toBeLessThanOrEqual(60);
    const body = await limited.json();
    expect(body.error.code).toBe("rate_limited");
    expect(body.error.message).toMatch(/Too many write requests/);
    expect(body.error.details).toMatchObject({ limit: WRITES, windowSeconds: 60, budget: "member" });
    try {
      // The refused request did nothing: no token was created by it.
      expect((await probes()).length).toBe(probesBefore.length);
      expect(probesBefore.length).toBeGreaterThanOrEqual(2);
      // Reads have their own budget; the member's other token shares the write budget; another member is not affected.
      expect((await read(token.secret)).status).toBe(200);
      expect((await write(other.secret)).status).toBe(429);
      expect((await api("/api/v1/runs?limit=1", { as: "owner" })).status).toBe(200);
    } finally {
      await redis.del(key);
    }
    expect((await write(other.secret)).status).toBe(201);
  });

  it("the budget comes back when the window ends", async () => {
    const t = await newToken("rate limit window");
    const key = `${PREFIX}:rl:read:member:${researcherId}`;
    expect((await read(t.secret)).status).toBe(200);
    await redis.set(key, String(READS), "PX", 1500);
    const limited = await read(t.secret);
    expect(limited.status).toBe(429);
    expect(Number(limited.headers.get("retry-after"))).toBeGreaterThanOrEqual(1);
    await new Promise((r) => setTimeout(r, 1800));
    expect((await read(t.secret)).status).toBe(200);
    await api(`/api/v1/tokens/${t.id}`, { method: "DELETE", as: "researcher" });
  });

  it("a signed-in member is counted by user id across requests", async () => {
    // The member's user id, through their own session.
    const ws = await sessionFetch("researcher2", "/api/v1/workspace/members");
    expect(ws.status).toBe(200);
    const list = await ws.json();
    const items: { userId: string; email: string }[] = Array.isArray(list) ? list : (list.items ?? list.members);
    const me = items.find((m) => m.email === "postdoc@larkspur.example");
    expect(me, JSON.stringify(items).slice(0, 300)).toBeTruthy();
    const key = `${PREFIX}:rl:read:member:${me!.userId}`;
    await redis.set(key, String(READS), "PX", 20_000);
    try {
      const limited = await sessionFetch("researcher2", "/api/v1/runs?limit=1", { rateLimitExpected: true });
      expect(limited.status).toBe(429);
      expect(limited.headers.get("retry-after")).toMatch(/^\d+$/);
      // Another member (the researcher's token) has a budget of their own.
      expect((await api("/api/v1/runs?limit=1", { as: "researcher" })).status).toBe(200);
    } finally {
      await redis.del(key);
    }
    expect((await sessionFetch("researcher2", "/api/v1/runs?limit=1")).status).toBe(200);
  });
});
