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
});
