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
};

export default nextConfig;
