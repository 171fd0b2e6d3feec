import { realpathSync } from "node:fs";
import path from "node:path";
import type { NextConfig } from "next";

// Turbopack resolves files only below its root: the project folder, or, when node_modules is a
// symlink to another checkout (a git worktree sharing one install), the folder holding both.
function turbopackRoot(dir: string): string {
  let root = dir;
  try {
    const modules = path.dirname(realpathSync(path.join(dir, "node_modules")));
    while (path.relative(root, modules).startsWith("..")) root = path.dirname(root);
  } catch {
    // no node_modules yet: the project folder
  }
  return root;
}

// NEXT_DIST_DIR lets the test command build into its own folder, so a developer's running
// instance (.next) and a test run never overwrite each other.
// Security headers on every page and API response (docs/reliability.md). No 'unsafe-eval' in
// production (development's fast refresh needs it); scripts, clerk-js (/clerk/) and the sign-in
// stand-in (/__clerk/) are same-origin; inline scripts/styles are Next's hydration data and styles.
// CSP_CONNECT_EXTRA adds origins the browser may call (e.g. a hosted Clerk Frontend API).
const csp = [
  "default-src 'self'",
  `script-src 'self' 'unsafe-inline'${process.env.NODE_ENV === "production" ? "" : " 'unsafe-eval'"}`,
  "style-src 'self' 'unsafe-inline'",
  "img-src 'self' data: blob:",
  "font-src 'self' data:",
  `connect-src 'self'${process.env.CSP_CONNECT_EXTRA ? ` ${process.env.CSP_CONNECT_EXTRA}` : ""}`,
  "worker-src 'self' blob:",
  "object-src 'none'",
  "base-uri 'self'",
  "frame-ancestors 'none'",
].join("; ");
const securityHeaders = [
  { key: "Content-Security-Policy", value: csp },
  { key: "X-Frame-Options", value: "DENY" },
  { key: "Referrer-Policy", value: "strict-origin-when-cross-origin" },
  { key: "X-Content-Type-Options", value: "nosniff" },
  { key: "Permissions-Policy", value: "camera=(), microphone=(), geolocation=(), payment=(), usb=()" },
];

const nextConfig: NextConfig = {
  async headers() {
    return [{ source: "/:path*", headers: securityHeaders }];
  },
  distDir: process.env.NEXT_DIST_DIR || ".next",
  reactStrictMode: true,
  poweredByHeader: false,
  turbopack: { root: turbopackRoot(import.meta.dirname) },
  serverExternalPackages: ["piscina", "bullmq", "ioredis", "postgres"],
  // scripts/lib.sh (build_web) writes tsconfig.next.json for each build folder, so builds never
  // rewrite the committed tsconfig.json; a plain `next build` uses tsconfig.json.
  typescript: { tsconfigPath: process.env.NEXT_TSCONFIG || "tsconfig.json" },
  // Accounts (docs/accounts.md): the browser reaches the local sign-in stand-in same-origin, for
  // the Frontend API paths clerk-js calls only (src/server/auth/frontend-api.ts; src/proxy.ts
  // answers 404 for every other /__clerk path, the stand-in's admin API among them).
  async rewrites() {
    const clerkFake = process.env.CLERK_FAKE_URL;
    const frontendApi = ["/v1/environment", "/v1/client", "/v1/client/:path*", "/v1/me", "/v1/me/:path*"];
    return clerkFake ? frontendApi.map((p) => ({ source: `/__clerk${p}`, destination: `${clerkFake}${p}` })) : [];
  },
};

export default nextConfig;
