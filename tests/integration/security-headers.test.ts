// Security headers on pages and API responses (next.config.ts headers()), and no server secret in
// the client bundle: the built static assets of this test run (NEXT_DIST_DIR) are searched for the
// values of every secret the server holds.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, resolve } from "node:path";
import { describe, expect, it } from "vitest";
import { api, appUrl } from "../support/services";

function expectSecurityHeaders(res: Response, what: string) {
  const csp = res.headers.get("content-security-policy") ?? "";
  expect(csp, what).toMatch(/default-src 'self'/);
  expect(csp, what).toMatch(/frame-ancestors 'none'/);
  expect(csp, what).toMatch(/object-src 'none'/);
  expect(csp, what).not.toMatch(/unsafe-eval/);
  const script = /script-src ([^;]*)/.exec(csp)?.[1] ?? "";
  expect(script, what).toMatch(/'self'/);
  expect(script, what).not.toMatch(/\*|https?:/);
  expect(res.headers.get("x-frame-options"), what).toBe("DENY");
  expect(res.headers.get("referrer-policy"), what).toBe("strict-origin-when-cross-origin");
  expect(res.headers.get("x-content-type-options"), what).toBe("nosniff");
  expect(res.headers.get("permissions-policy"), what).toMatch(/camera=\(\)/);
  expect(res.headers.get("x-powered-by"), what).toBeNull();
}

describe("security headers", () => {
  it("the landing page, the sign-in page and a clerk-js asset carry them", async () => {
    for (const path of ["/", "/sign-in", "/clerk/clerk.browser.js"]) {
      const res = await fetch(new URL(path, appUrl()), { redirect: "manual" });
      expect(res.status, path).toBeLessThan(400);
      expectSecurityHeaders(res, path);
      await res.arrayBuffer();
    }
  });

  it("API answers carry them: a success, a 401 and the health check", async () => {
    const ok = await api("/api/v1/runs?limit=1");
    expect(ok.status).toBe(200);
    expectSecurityHeaders(ok, "GET /api/v1/runs");
    const anon = await api("/api/v1/runs", { as: null });
    expect(anon.status).toBe(401);
    expectSecurityHeaders(anon, "401");
    const health = await fetch(new URL("/api/v1/health", appUrl()));
    expectSecurityHeaders(health, "health");
  });
});

describe("secrets never reach the client bundle", () => {
  const names = ["STRIPE_SECRET_KEY", "CLERK_SECRET_KEY", "STRIPE_WEBHOOK_SECRET", "CLERK_WEBHOOK_SECRET", "DATABASE_URL"];

  it("no secret value appears in the built static assets or the served HTML", async () => {
    const secrets = names.map((n) => [n, process.env[n]] as const);
    for (const [n, v] of secrets) expect(v, `${n} is set for the test run`).toBeTruthy();
    const dist = resolve(import.meta.dirname, "..", "..", process.env.NEXT_DIST_DIR ?? ".next", "static");
    const files: string[] = [];
    const walk = (dir: string) => {
      for (const name of readdirSync(dir)) {
        const full = join(dir, name);
        if (statSync(full).isDirectory()) walk(full);
        else files.push(full);
      }
    };
    walk(dist);
    expect(files.filter((f) => f.endsWith(".js")).length).toBeGreaterThan(5);
    const found: string[] = [];
    for (const f of files) {
      const text = readFileSync(f, "latin1");
      for (const [n, v] of secrets) if (text.includes(v!)) found.push(`${n} in ${f}`);
      // The secret part of DATABASE_URL (host and port) alone, too.
      if (/postgres(ql)?:\/\/[^"'\s]*@/.test(text)) found.push(`a postgres:// URL in ${f}`);
      if (/\bsk_(test|live)_[A-Za-z0-9_]{8,}/.test(text)) found.push(`a secret key (sk_...) in ${f}`);
    }
    for (const path of ["/", "/sign-in", "/pricing"]) {
      const html = await (await fetch(new URL(path, appUrl()))).text();
      for (const [n, v] of secrets) if (html.includes(v!)) found.push(`${n} in the HTML of ${path}`);
    }
    expect(found).toEqual([]);
  });
});
