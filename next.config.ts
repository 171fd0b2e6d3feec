import type { NextConfig } from "next";

// NEXT_DIST_DIR lets the test command build into its own folder, so a developer's running
// instance (.next) and a test run never overwrite each other.
const nextConfig: NextConfig = {
  distDir: process.env.NEXT_DIST_DIR || ".next",
  reactStrictMode: true,
  poweredByHeader: false,
  turbopack: { root: import.meta.dirname },
  serverExternalPackages: ["piscina", "bullmq", "ioredis", "postgres"],
  typescript: { tsconfigPath: "tsconfig.json" },
  // Accounts (docs/accounts.md): the browser reaches the local sign-in stand-in same-origin.
  async rewrites() {
    const clerkFake = process.env.CLERK_FAKE_URL;
    return clerkFake ? [{ source: "/__clerk/:path*", destination: `${clerkFake}/:path*` }] : [];
  },
};

export default nextConfig;
