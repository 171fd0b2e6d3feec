// Walks the whole authorization matrix (tests/integration/authz-table.ts): every route file under
// src/app/api, every method it exports, every caller (the demo lab's four roles, a member of
// another workspace, no credentials, a revoked token). A route or method without a table entry
// fails the first test, so a new route cannot ship without its expectations.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import postgres from "postgres";
import { appUrl, checkAnswer, databaseUrl, demoTokens, ensureFreeSeats, failOnRateLimit, type DemoTokenKey } from "../support/services";
import type { Json } from "../support/json";
import { CALLERS, fitBody, SMALL_RUN, TABLE, type CallerKey, type Entry, type Expect, type Fixtures } from "./authz-table";

const API_DIR = join(import.meta.dirname, "..", "..", "src", "app", "api");
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;
const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });

function routeFiles(): { route: string; method: string }[] {
  const out: { route: string; method: string }[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = join(dir, name);
      if (statSync(full).isDirectory()) walk(full);
      else if (name === "route.ts") {
        const src = readFileSync(full, "utf8");
        const route = relative(API_DIR, dir);
        const found = METHODS.filter((m) => new RegExp(`export\\s+(const|async\\s+function|function)\\s+${m}\\b`).test(src));
        if (found.length === 0) out.push({ route, method: "(none found)" });
        for (const m of found) out.push({ route, method: m });
      }
    }
  };
  walk(API_DIR);
  return out;
}

const TOKEN_OF: Partial<Record<CallerKey, DemoTokenKey>> = {
  owner: "owner",
  billingAdmin: "billingAdmin",
  researcher: "researcher",
  viewer: "viewer",
  other: "student",
};
let revokedSecret = "";

function headersFor(who: CallerKey): Record<string, string> {
  if (who === "anonymous") return {};
  if (who === "revoked") return { authorization: `Bearer ${revokedSecret}` };
  return { authorization: `Bearer ${demoTokens()[TOKEN_OF[who]!]}` };
}

async function call(who: CallerKey, method: string, path: string, body?: unknown): Promise<Response> {
  const headers: Record<string, string> = headersFor(who);
  let payload: BodyInit | undefined;
  if (body instanceof FormData) payload = body;
  else if (body !== undefined || (method !== "GET" && method !== "DELETE")) {
    headers["content-type"] = "application/json";
    payload = JSON.stringify(body ?? {});
  }
  const res = await fetch(new URL(path, appUrl()), { method, headers, body: payload, redirect: "manual" });
  failOnRateLimit(res, `${who} ${method} ${path}`);
  // Every answer of the matrix, errors included, must match the API document.
  await checkAnswer(method, path, res, `${who} ${method} ${path}`);
  return res;
}

async function ok<T = Json>(res: Response, what: string): Promise<T> {
  const text = await res.text();
  if (res.status >= 300) throw new Error(`${what}: ${res.status} ${text.slice(0, 300)}`);
  return JSON.parse(text) as T;
}

let fixtures: Fixtures;
/** Fits the matrix started (each a few minutes of engine work): cancelled at the end. */
const startedFits: string[] = [];
let labWorkspaceId = "";

beforeAll(async () => {
  // Invitations and fresh members take seats of the demo lab: its Billing admin buys enough first.
  await ensureFreeSeats(30);
  const created = await ok(await call("researcher", "POST", "/api/v1/tokens", { name: "authz revoked" }), "token");
  await ok(await call("researcher", "DELETE", `/api/v1/tokens/${created.token.id}`), "revoke");
  revokedSecret = created.secret;

  labWorkspaceId =
    (await ok(await call("owner", "GET", "/api/v1/workspace"), "workspace")).id ??
    (await ok(await call("owner", "GET", "/api/v1/billing"), "billing")).workspace.id;
  const newNetwork = async () =>
    (await ok(await call("researcher", "POST", "/api/v1/networks", { name: "authz matrix", network: SMALL_RUN.network }), "network")).id as string;
  const networkId = await newNetwork();
  const run = await ok(await call("researcher", "POST", "/api/v1/runs", SMALL_RUN), "run");
  const sweep = await ok(
    await call("researcher", "POST", "/api/v1/sweeps", {
      ...SMALL_RUN,
      name: "authz matrix",
      axes: [{ parameter: "fieldTesla", from: 0, to: 0.1, points: 2 }],
    }),
    "sweep",
  );
  const datasets = await ok(await call("researcher", "GET", "/api/v1/datasets"), "datasets");
  const lk07 = datasets.items.find((d: { name: string }) => /LK-07/.test(d.name));
  if (!lk07) throw new Error("demo dataset LK-07 not found");
  const fit = await ok(await call("researcher", "POST", "/api/v1/fits", fitBody(lk07.id)), "fit");
  const billing = await ok(await call("owner", "GET", "/api/v1/billing"), "billing");
  const otherBilling = await ok(await call("other", "GET", "/api/v1/billing"), "billing (other)");
  fixtures = {
    networkId,
    runId: run.id,
    sweepId: sweep.id,
    datasetId: lk07.id,
    fitId: fit.id,
    spendCapUsd: billing.spendCapUsd,
    otherSpendCapUsd: otherBilling.spendCapUsd,
    freshNetwork: async () => `/api/v1/networks/${await newNetwork()}`,
    freshResearcherToken: async () => (await ok(await call("researcher", "POST", "/api/v1/tokens", { name: "authz fresh" }), "token")).token.id,
    ownToken: async (who) => {
      const as = who === "anonymous" || who === "revoked" ? "researcher" : who;
      return (await ok(await call(as, "POST", "/api/v1/tokens", { name: "authz own" }), "token")).token.id;
    },
    freshMember: async (role) => {
      const email = `member-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}@authz.example`;
      const [u] = await sql`insert into users (email, name) values (${email}, 'Authz Matrix Member') returning id`;
      await sql`insert into memberships (workspace_id, user_id, role) values (${labWorkspaceId}, ${u.id}, ${role})`;
      return u.id as string;
    },
    freshInvitation: async () => {
      const email = `invite-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}@authz.example`;
      await ensureFreeSeats(1); // the seats/sync entry may have given the spare seats back
      return (await ok(await call("owner", "POST", "/api/v1/workspace/members", { email, role: "viewer" }), "invitation")).invitation.id;
    },
  };
}, 120_000);

afterAll(async () => {
  for (const id of [...startedFits, fixtures?.fitId].filter(Boolean))
    await call("owner", "POST", `/api/v1/fits/${id}/cancel`)
      .then((r) => r.text())
      .catch(() => {});
  // Leave the demo lab as it was: no extra members or open invitations, the cap unchanged.
  await sql`delete from invitations where email like '%@authz.example'`.catch(() => {});
  await sql`delete from users where email like '%@authz.example'`.catch(() => {});
  await sql.end();
});

function expectationOf(e: Entry, who: CallerKey): Expect {
  if (e.expect.owner === "public") return "public";
  return e.expect[who] ?? (who === "anonymous" || who === "revoked" ? 401 : (undefined as never));
}

function matches(expected: Expect, status: number): boolean {
  if (expected === "ok") return (status >= 200 && status < 300) || status === 409;
  return status === expected;
}

describe("authorization matrix", () => {
  it("has an entry for every route file and method under src/app/api, and no stale entry", () => {
    const files = routeFiles();
    const key = (r: { route: string; method: string }) => `${r.method} ${r.route}`;
    const tableKeys = new Set(TABLE.map(key));
    const fileKeys = new Set(files.map(key));
    expect(files.length).toBeGreaterThan(30);
    expect(files.filter((r) => !tableKeys.has(key(r))).map(key), "routes without a matrix entry").toEqual([]);
    expect(TABLE.filter((e) => !fileKeys.has(key(e))).map(key), "matrix entries without a route").toEqual([]);
    const incomplete = TABLE.filter((e) => e.expect.owner !== "public" && CALLERS.some((c) => expectationOf(e, c) === undefined)).map(key);
    expect(incomplete, "entries missing a caller").toEqual([]);
  });

  it("every caller gets the expected status on every route (401/403/404 with the JSON error body)", async () => {
    const failures: string[] = [];
    let cells = 0;
    for (const e of TABLE) {
      if (e.expect.owner === "public") continue;
      for (const who of CALLERS) {
        const expected = expectationOf(e, who);
        const path = await e.path(fixtures, who);
        const res = await call(who, e.method, path, e.body?.(fixtures, who));
        const text = await res.text();
        cells++;
        if (e.route === "v1/fits" && e.method === "POST" && res.status === 202) startedFits.push(JSON.parse(text).id);
        if (!matches(expected, res.status)) {
          failures.push(`${e.method} /api/${e.route} as ${who}: expected ${expected}, got ${res.status} ${text.slice(0, 160)}`);
          continue;
        }
        if (typeof expected === "number") {
          const body = JSON.parse(text);
          if (typeof body?.error?.message !== "string" || !body.error.message)
            failures.push(`${e.method} /api/${e.route} as ${who}: ${res.status} without an error message`);
          if (who === "revoked" && expected === 401 && !/revoked/.test(body.error.message))
            failures.push(`${e.method} /api/${e.route} as revoked: message does not say revoked`);
        }
      }
    }
    expect(failures).toEqual([]);
    expect(cells).toBeGreaterThan(250);
  });

  it("lists of another workspace never contain the lab's objects", async () => {
    for (const [path, id] of [
      ["/api/v1/networks", fixtures.networkId],
      ["/api/v1/runs", fixtures.runId],
      ["/api/v1/sweeps", fixtures.sweepId],
      ["/api/v1/datasets", fixtures.datasetId],
      ["/api/v1/fits", fixtures.fitId],
    ] as const) {
      const text = await (await call("other", "GET", path)).text();
      expect(text, path).not.toContain(id);
      const own = await (await call("viewer", "GET", path)).text();
      expect(own, path).toContain(id);
    }
  });

  it("public routes: health and the API document answer without credentials, webhooks refuse a bad signature with 400", async () => {
    const health = await call("anonymous", "GET", "/api/v1/health");
    expect(health.status).toBe(200);
    expect((await health.json()).status).toBe("ok");
    for (const who of ["anonymous", "revoked", "viewer"] as const) {
      const doc = await call(who, "GET", "/api/v1/openapi.json");
      expect(doc.status, who).toBe(200);
      expect((await doc.json()).openapi, who).toBe("3.1.0");
    }
    const clerk = await fetch(new URL("/api/webhooks/clerk", appUrl()), {
      method: "POST",
      headers: {
        "content-type": "application/json",
        "svix-id": "msg_authz",
        "svix-timestamp": String(Math.floor(Date.now() / 1000)),
        "svix-signature": "v1,AAAA",
        "webhook-id": "msg_authz",
        "webhook-timestamp": String(Math.floor(Date.now() / 1000)),
        "webhook-signature": "v1,AAAA",
      },
      body: JSON.stringify({ type: "user.deleted", data: { id: "user_authz" } }),
    });
    expect(clerk.status).toBe(400);
    expect((await clerk.json()).error.message).toBeTruthy();
    const stripe = await fetch(new URL("/api/webhooks/stripe", appUrl()), {
      method: "POST",
      headers: { "content-type": "application/json", "stripe-signature": `t=${Math.floor(Date.now() / 1000)},v1=${"0".repeat(64)}` },
      body: JSON.stringify({ id: "evt_authz", type: "invoice.paid", data: { object: {} } }),
    });
    expect(stripe.status).toBe(400);
    expect((await stripe.json()).error.message).toBeTruthy();
    const unsigned = await fetch(new URL("/api/webhooks/stripe", appUrl()), { method: "POST", headers: { "content-type": "application/json" }, body: "{}" });
    expect(unsigned.status).toBe(400);
  });
});
