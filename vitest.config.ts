import { defineConfig } from "vitest/config";
import path from "node:path";

// Projects: unit and engine-ts (pure, no services), integration (real PostgreSQL, Redis, the fakes
// and a running web app + worker started by scripts/test.sh), e2e (headless Debian Chromium), and
// recovery (kills the worker and flushes Redis). Projects of one group run at the same time, so the
// destructive recovery file has a group of its own that starts only when every other file is done.
const DESTRUCTIVE = ["tests/integration/runs-recovery.test.ts"];
export default defineConfig({
  resolve: { alias: { "@": path.resolve(import.meta.dirname, "src") } },
  test: {
    projects: [
      {
        extends: true,
        test: {
          name: "unit",
          include: ["tests/unit/**/*.test.ts", "src/**/*.test.ts"],
          environment: "node",
          testTimeout: 60_000,
          setupFiles: ["tests/unit/engine-native/select-backend.setup.ts"],
        },
      },
      {
        // The engine suite again on the TypeScript kernels (unit uses auto: native when it loads).
        extends: true,
        test: {
          name: "engine-ts",
          include: ["tests/unit/engine/**/*.test.ts"],
          environment: "node",
          testTimeout: 60_000,
          env: { TRISKEL_KERNELS: "ts" },
          setupFiles: ["tests/unit/engine-native/select-backend.setup.ts"],
        },
      },
      {
        extends: true,
        test: {
          name: "integration",
          include: ["tests/integration/**/*.test.ts"],
          exclude: DESTRUCTIVE,
          environment: "node",
          testTimeout: 180_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
      {
        extends: true,
        test: {
          name: "recovery",
          include: DESTRUCTIVE,
          environment: "node",
          testTimeout: 240_000,
          hookTimeout: 120_000,
          fileParallelism: false,
          sequence: { groupOrder: 1 },
        },
      },
      // npm run test:soak only (scripts/soak.sh sets TRISKEL_SOAK=1): fault drills with restarts
      // and the load test; never part of `npm test`.
      ...(process.env.TRISKEL_SOAK === "1"
        ? [
            {
              extends: true as const,
              test: {
                name: "soak",
                include: ["tests/soak/**/*.test.ts"],
                environment: "node" as const,
                testTimeout: 600_000,
                hookTimeout: 180_000,
                fileParallelism: false,
              },
            },
          ]
        : []),
      {
        extends: true,
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          testTimeout: 180_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
