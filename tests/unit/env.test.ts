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

  it("names a bad value and shows it", () => {
    expect(() => parseEnv({ ...good, REDIS_URL: "http://example" })).toThrowError(/REDIS_URL is invalid \("http:\/\/example"\).*redis:\/\//);
    expect(() => parseEnv({ ...good, WORKER_CONCURRENCY: "lots" })).toThrowError(/WORKER_CONCURRENCY is invalid/);
  });
});
