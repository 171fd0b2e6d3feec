// A bad environment value stops a Triskel process with one line naming it, not a stack trace.
import { spawnSync } from "node:child_process";
import { describe, expect, it } from "vitest";

const tsx = new URL("../../node_modules/.bin/tsx", import.meta.url).pathname;

function run(script: string, env: Record<string, string>) {
  const childEnv: NodeJS.ProcessEnv = { NODE_ENV: "test", PATH: process.env.PATH ?? "", HOME: process.env.HOME ?? "/tmp", ...env };
  return spawnSync(tsx, [script], { env: childEnv, encoding: "utf8", timeout: 30_000 });
}

describe("start-up with a bad environment", () => {
  it("the worker exits 78 with one line naming REDIS_URL", () => {
    const r = run("worker/main.ts", { DATABASE_URL: "postgres://postgres@127.0.0.1:1/triskel", REDIS_URL: "http://not-redis" });
    expect(r.status).toBe(78);
    const lines = r.stderr.trim().split("\n");
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^Triskel cannot start: environment variable REDIS_URL is invalid/);
  });

  it("the migration step names a missing DATABASE_URL", () => {
    const r = run("scripts/migrate.ts", { REDIS_URL: "redis://127.0.0.1:1" });
    expect(r.status).toBe(78);
    expect(r.stderr.trim()).toMatch(/^Triskel cannot start: environment variable DATABASE_URL is missing/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it("the worker in production mode refuses the stand-ins' keys without TRISKEL_STAND_INS=1, and starts past the check with it", () => {
    const base = {
      NODE_ENV: "production",
      DATABASE_URL: "postgres://postgres@127.0.0.1:1/triskel",
      REDIS_URL: "redis://127.0.0.1:1",
      CLERK_SECRET_KEY: "sk_live_triskel_local_stand_in",
      STRIPE_SECRET_KEY: "sk_test_triskel_local_stand_in",
    };
    const r = run("worker/main.ts", base);
    expect(r.status).toBe(78);
    const lines = r.stderr.trim().split("\n");
    expect(lines).toHaveLength(2);
    expect(lines[0]).toMatch(/^Triskel cannot start: environment variable /);
    const text = lines.join("\n").replace(/^Triskel cannot start: /, "");
    expect(text).toMatch(
      /^environment variable CLERK_SECRET_KEY is invalid \("sk_live_triskel_local_stand_in"\): is the local stand-in's value.*TRISKEL_STAND_INS=1$/m,
    );
    expect(text).toMatch(
      /^environment variable STRIPE_SECRET_KEY is invalid \("sk_test_triskel_local_stand_in"\): is the local stand-in's value.*TRISKEL_STAND_INS=1$/m,
    );
    // With the flag the environment passes; the migration step then fails on the unreachable database instead.
    const flagged = run("scripts/migrate.ts", { ...base, TRISKEL_STAND_INS: "1" });
    expect(flagged.stderr).not.toContain("Triskel cannot start");
  });
});
