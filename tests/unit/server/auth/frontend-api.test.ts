// Which /__clerk paths the app forwards to the sign-in stand-in: the Frontend API clerk-js calls,
// nothing of the Backend (admin) API; next.config.ts's rewrites and src/proxy.ts agree.
import { describe, expect, it } from "vitest";
import { CLERK_PROXY_PREFIX, isClerkProxyPath, isFrontendApiPath } from "@/server/auth/frontend-api";

describe("the sign-in proxy's path rule", () => {
  it("lets through the Frontend API paths clerk-js uses", () => {
    for (const p of [
      "/v1/environment",
      "/v1/client",
      "/v1/client/sign_ins",
      "/v1/client/sign_ins/sia_123/attempt_first_factor",
      "/v1/client/sign_ups/sua_1/prepare_verification",
      "/v1/client/sessions/sess_abc/touch",
      "/v1/client/sessions/sess_abc/tokens",
      "/v1/client/handshake",
      "/v1/me",
      "/v1/me/organization_memberships",
    ])
      expect(isFrontendApiPath(p), p).toBe(true);
  });

  it("refuses the Backend API, the stand-in's helpers and anything encoded, dotted or empty", () => {
    for (const p of [
      "/v1/users",
      "/v1/users/user_demo_owner",
      "/v1/users/user_demo_owner/organization_memberships",
      "/v1/organizations",
      "/v1/organizations/org_demo_larkspur/memberships",
      "/v1/jwks",
      "/__fake/session",
      "/__fake/health",
      "/v1/client/../users",
      "/v1/client%2F..%2Fusers",
      "/v1/client//users",
      "/v1/clientx",
      "/v1/CLIENT",
      "/v2/client",
      "",
      "/",
      "/v1",
    ])
      expect(isFrontendApiPath(p), p).toBe(false);
  });

  it("knows a proxy path in any letter case (the rewrites match that way)", () => {
    expect([`${CLERK_PROXY_PREFIX}/v1/users`, "/__CLERK/v1/users", "/__clerk"].map(isClerkProxyPath)).toEqual([true, true, true]);
    expect(["/__clerkx/v1/users", "/clerk/clerk.browser.js", "/api/v1/health"].map(isClerkProxyPath)).toEqual([false, false, false]);
  });

  it("next.config.ts rewrites only Frontend API paths to the stand-in, and none without CLERK_FAKE_URL", async () => {
    const saved = process.env.CLERK_FAKE_URL;
    try {
      const { default: config } = await import("../../../../next.config");
      process.env.CLERK_FAKE_URL = "http://127.0.0.1:49003";
      const rewrites = (await config.rewrites!()) as { source: string; destination: string }[];
      expect(rewrites.length).toBeGreaterThan(0);
      for (const r of rewrites) {
        expect(r.source.startsWith(`${CLERK_PROXY_PREFIX}/`), r.source).toBe(true);
        const sample = r.source.slice(CLERK_PROXY_PREFIX.length).replace(":path*", "sessions/sess_1/touch");
        expect(isFrontendApiPath(sample), r.source).toBe(true);
        expect(r.destination).toBe(`http://127.0.0.1:49003${r.source.slice(CLERK_PROXY_PREFIX.length)}`);
      }
      const reaches = (p: string) => rewrites.some((r) => new RegExp(`^${r.source.replace(":path*", ".*").replace(/\//g, "\\/")}$`).test(p));
      expect(["/__clerk/v1/users", "/__clerk/v1/organizations/o/memberships", "/__clerk/__fake/session", "/__clerk/v1/jwks"].filter(reaches)).toEqual([]);
      expect(reaches("/__clerk/v1/client/sign_ins")).toBe(true);
      delete process.env.CLERK_FAKE_URL;
      expect(await config.rewrites!()).toEqual([]);
    } finally {
      if (saved === undefined) delete process.env.CLERK_FAKE_URL;
      else process.env.CLERK_FAKE_URL = saved;
    }
  });
});
