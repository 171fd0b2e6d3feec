// Who is calling: every /api/v1 route refuses requests without a session or token, with a revoked
// token, and with a forged session; sessions from the sign-in stand-in resolve to the right
// workspace (active organization -> lab, none -> personal).
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";
import { generateKeyPairSync, sign } from "node:crypto";
import { describe, expect, it } from "vitest";
import { api, appUrl } from "../support/services";
import { sessionCookies, sessionFetch } from "../support/session";

const API_DIR = join(import.meta.dirname, "..", "..", "src", "app", "api", "v1");
const METHODS = ["GET", "POST", "PUT", "PATCH", "DELETE"] as const;
const SOME_ID = "00000000-0000-4000-8000-000000000000";

/** Every route file under src/app/api/v1 with the methods it exports, dynamic segments filled in. */
function apiRoutes(): { path: string; method: string }[] {
  const out: { path: string; method: string }[] = [];
  const walk = (dir: string) => {
    for (const name of readdirSync(dir)) {
      const full = join(dir, name);
      if (statSync(full).isDirectory()) walk(full);
      else if (name === "route.ts") {
        const rel = relative(API_DIR, dir).split("/").filter(Boolean);
        const path = "/api/v1/" + rel.map((seg) => (seg.startsWith("[") ? SOME_ID : seg)).join("/");
        const src = readFileSync(full, "utf8");
        for (const m of METHODS)
          if (new RegExp(`export\\s+(const|async\\s+function|function)\\s+${m}\\b`).test(src)) out.push({ path: path.replace(/\/$/, ""), method: m });
      }
    }
  };
  walk(API_DIR);
  return out.filter((r) => r.path !== "/api/v1/health" && r.path !== "/api/v1/openapi.json");
}

async function call(path: string, method: string, headers: Record<string, string> = {}) {
  const hasBody = method !== "GET" && method !== "DELETE";
  return fetch(new URL(path, appUrl()), {
    method,
    headers: { ...headers, ...(hasBody ? { "content-type": "application/json" } : {}) },
    body: hasBody ? "{}" : undefined,
    redirect: "manual",
  });
}

describe("authentication on every /api/v1 route", () => {
  const routes = apiRoutes();

  it("finds the routes it checks (tokens, members, and the others)", () => {
    const paths = routes.map((r) => `${r.method} ${r.path}`);
    expect(paths).toContain("POST /api/v1/tokens");
    expect(paths).toContain("GET /api/v1/workspace/members");
    expect(routes.length).toBeGreaterThan(10);
  });

  it("answers 401 with the JSON error body when there is neither session nor token", async () => {
    const failures: string[] = [];
    for (const r of routes) {
      const res = await call(r.path, r.method);
      const body = await res.json().catch(() => null);
      if (res.status !== 401 || body?.error?.code !== "unauthenticated") failures.push(`${r.method} ${r.path} -> ${res.status}`);
    }
    expect(failures).toEqual([]);
  });

  it("answers 401 to a revoked token on every route", async () => {
    const created = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "to be revoked" } });
    expect(created.status).toBe(201);
    const { token, secret } = await created.json();
    expect((await api(`/api/v1/tokens/${token.id}`, { method: "DELETE", as: "researcher" })).status).toBe(200);
    const failures: string[] = [];
    for (const r of routes) {
      const res = await call(r.path, r.method, { authorization: `Bearer ${secret}` });
      const body = await res.json().catch(() => null);
      if (res.status !== 401 || !/revoked/.test(body?.error?.message ?? "")) failures.push(`${r.method} ${r.path} -> ${res.status}`);
    }
    expect(failures).toEqual([]);
  });

  it("refuses a malformed Authorization header and an unknown token, naming what is expected", async () => {
    const bad = await call("/api/v1/workspace", "GET", { authorization: "Token abc" });
    expect(bad.status).toBe(401);
    expect((await bad.json()).error.message).toMatch(/Bearer/);
    const unknown = await call("/api/v1/workspace", "GET", { authorization: `Bearer trk_${"x".repeat(43)}` });
    expect(unknown.status).toBe(401);
    expect((await unknown.json()).error.message).toMatch(/Unknown API token/);
  });
});

describe("browser sessions (Clerk through the stand-in)", () => {
  it("a lab member's session with the lab active resolves to the lab and their role", async () => {
    const res = await sessionFetch("viewer", "/api/v1/workspace");
    expect(res.status).toBe(200);
    const body = await res.json();
    expect(body.via).toBe("session");
    expect(body.workspace.clerkOrgId).toBe("org_demo_larkspur");
    expect(body.member).toMatchObject({ email: "viewer@larkspur.example", role: "viewer" });
    expect(body.can["work.create"]).toBe(false);
  });

  it("a session without an active organization resolves to the personal Free workspace", async () => {
    const res = await sessionFetch("researcher", "/api/v1/workspace", { workspace: "personal" });
    const body = await res.json();
    expect(body.workspace).toMatchObject({ kind: "personal", plan: "free", clerkOrgId: null });
    expect(body.member.role).toBe("owner");
  });

  it("a session token signed with another key is not a session (401)", async () => {
    const { cookies } = await sessionCookies("owner");
    const [head, payload] = cookies.__session.split(".");
    const { privateKey } = generateKeyPairSync("rsa", { modulusLength: 2048 });
    const forged = `${head}.${payload}.${sign("RSA-SHA256", Buffer.from(`${head}.${payload}`), privateKey).toString("base64url")}`;
    const res = await fetch(new URL("/api/v1/workspace", appUrl()), {
      headers: { cookie: `__client=${cookies.__client}; __client_uat=${cookies.__client_uat}; __session=${forged}` },
      redirect: "manual",
    });
    expect(res.status).toBe(401);
  });

  it("an expired session on a page load goes through the handshake at the stand-in and comes back signed in", async () => {
    const { cookies } = await sessionCookies("researcher");
    // The browser still knows its client but its short-lived session token is gone.
    const jar = new Map([
      ["__client", cookies.__client],
      ["__client_uat", cookies.__client_uat],
    ]);
    const cookieHeader = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
    const doc = { "sec-fetch-dest": "document", accept: "text/html" };
    const first = await fetch(new URL("/networks", appUrl()), { headers: { ...doc, cookie: cookieHeader() }, redirect: "manual" });
    expect(first.status).toBe(307);
    const handshake = new URL(first.headers.get("location")!, appUrl());
    expect(handshake.pathname).toBe("/__clerk/v1/client/handshake");
    const back = await fetch(handshake, { headers: { ...doc, cookie: cookieHeader() }, redirect: "manual" });
    expect(back.status).toBe(307);
    expect(back.headers.get("location")).toBe(new URL("/networks", appUrl()).toString());
    for (const c of back.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair.indexOf("=");
      jar.set(pair.slice(0, i), pair.slice(i + 1));
    }
    expect(jar.get("__session")).toMatch(/^ey/);
    const page = await fetch(new URL("/networks", appUrl()), { headers: { ...doc, cookie: cookieHeader() }, redirect: "manual" });
    expect(page.status).toBe(200);
  });

  it("signed-in pages send a signed-out visitor to our sign-in page; public pages and health stay open", async () => {
    const page = await fetch(new URL("/networks", appUrl()), { redirect: "manual" });
    expect([302, 307]).toContain(page.status);
    expect(page.headers.get("location")).toMatch(/\/sign-in\?redirect_url=%2Fnetworks/);
    for (const open of ["/", "/pricing", "/sign-in", "/sign-up", "/api/v1/health"]) {
      const res = await fetch(new URL(open, appUrl()), { redirect: "manual" });
      expect(`${open} ${res.status}`).toBe(`${open} 200`);
    }
  });
});
