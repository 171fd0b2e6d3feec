import { describe, expect, it } from "vitest";
import { EnvError, parseEnv } from "@/env";

const good = { DATABASE_URL: "postgres://postgres@127.0.0.1:5432/triskel", REDIS_URL: "redis://127.0.0.1:6379" };

describe("environment validation (src/env.ts)", () => {
  it("accepts the local defaults and fills the optional ones", () => {
    const env = parseEnv(good);
    expect(env.APP_URL).toBe("http://127.0.0.1:3000");
    expect(env.WORKER_CONCURRENCY).toBe(2);
  });

  it("names a missing variable in one line", () => {
    const { DATABASE_URL: _omit, ...rest } = good;
    expect(() => parseEnv(rest)).toThrowError(EnvError);
    try {
      parseEnv(rest);
    } catch (e) {
      expect((e as Error).message).toMatch(/^environment variable DATABASE_URL is missing/);
      expect((e as Error).message.split("\n")).toHaveLength(1);
    }
  });

  it("gives the pool size, rate limits and meter sender their defaults", () => {
    const env = parseEnv(good);
    expect([env.DATABASE_POOL_SIZE, env.RATE_LIMIT_READS_PER_MINUTE, env.RATE_LIMIT_WRITES_PER_MINUTE]).toEqual([10, 600, 120]);
    expect([env.METER_SENDER_INTERVAL_MS, env.METER_SENDER_LEASE_SECONDS, env.METER_SENDER_WORKSPACE_ID]).toEqual([2000, 30, undefined]);
    const set = parseEnv({
      ...good,
      RATE_LIMIT_WRITES_PER_MINUTE: "1000000",
      METER_SENDER_LEASE_SECONDS: "3",
      METER_SENDER_WORKSPACE_ID: "3f2b8c1e-9a4d-4e6f-8b2a-1c3d5e7f9a0b",
    });
    expect([env.SMTP_URL, set.RATE_LIMIT_WRITES_PER_MINUTE, set.METER_SENDER_LEASE_SECONDS, set.METER_SENDER_WORKSPACE_ID]).toEqual([
      "smtp://127.0.0.1:1025",
      1_000_000,
      3,
      "3f2b8c1e-9a4d-4e6f-8b2a-1c3d5e7f9a0b",
    ]);
  });

  it("takes an empty METER_SENDER_WORKSPACE_ID as unset and names a bad one", () => {
    expect(parseEnv({ ...good, METER_SENDER_WORKSPACE_ID: "" }).METER_SENDER_WORKSPACE_ID).toBeUndefined();
    expect(() => parseEnv({ ...good, METER_SENDER_WORKSPACE_ID: "workspace-1" })).toThrowError(
      /METER_SENDER_WORKSPACE_ID is invalid \("workspace-1"\): must be a workspace id/,
    );
    expect(() => parseEnv({ ...good, RATE_LIMIT_READS_PER_MINUTE: "0" })).toThrowError(/RATE_LIMIT_READS_PER_MINUTE is invalid/);
    expect(() => parseEnv({ ...good, DATABASE_POOL_SIZE: "many" })).toThrowError(/DATABASE_POOL_SIZE is invalid/);
  });

  it("names a bad value and shows it", () => {
    expect(() => parseEnv({ ...good, REDIS_URL: "http://example" })).toThrowError(/REDIS_URL is invalid \("http:\/\/example"\).*redis:\/\//);
    expect(() => parseEnv({ ...good, WORKER_CONCURRENCY: "lots" })).toThrowError(/WORKER_CONCURRENCY is invalid/);
  });
});
