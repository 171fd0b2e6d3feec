import { readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { EnvError, parseEnv, STAND_IN_VALUES } from "@/env";

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
    expect([env.RATE_LIMIT_FAILED_PER_MINUTE, env.TRUSTED_PROXY_HOPS, env.API_TOKENS_PER_MEMBER]).toEqual([60, 0, 20]);
    expect(() => parseEnv({ ...good, TRUSTED_PROXY_HOPS: "-1" })).toThrowError(/TRUSTED_PROXY_HOPS is invalid/);
    expect(() => parseEnv({ ...good, API_TOKENS_PER_MEMBER: "0" })).toThrowError(/API_TOKENS_PER_MEMBER is invalid/);
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

/** What scripts/lib.sh and scripts/env.d/*.sh export for `npm start` and `npm test` (the stand-ins). */
const scripted = {
  ...good,
  NODE_ENV: "production",
  TRISKEL_STAND_INS: "1",
  ...STAND_IN_VALUES,
  CLERK_FAKE_URL: "http://127.0.0.1:41003",
  STRIPE_API_HOST: "127.0.0.1",
  STRIPE_API_PORT: "41004",
  STRIPE_API_PROTOCOL: "http",
};
const problemsOf = (source: Record<string, string | undefined>) => {
  try {
    parseEnv(source);
    return [];
  } catch (e) {
    expect(e).toBeInstanceOf(EnvError);
    return (e as Error).message.split("\n");
  }
};
const namesIn = (lines: string[]) => lines.map((l) => /^environment variable (\w+) /.exec(l)?.[1]);

describe("stand-in keys and development secrets (src/env.ts deploymentProblems)", () => {
  it("the scripts give the stand-ins exactly the values src/env.ts knows as theirs", () => {
    const root = path.resolve(import.meta.dirname, "../..");
    const text = ["scripts/env.d/clerk.sh", "scripts/env.d/stripe.sh"].map((f) => readFileSync(path.join(root, f), "utf8")).join("\n");
    for (const [name, value] of Object.entries(STAND_IN_VALUES)) {
      const escaped = value.replace(/[$]/g, "\\$");
      expect(text, name).toMatch(new RegExp(`export ${name}="?(\\$\\{${name}:-)?${escaped}`));
    }
    expect(readFileSync(path.join(root, "scripts/lib.sh"), "utf8")).toMatch(/^\s*export TRISKEL_STAND_INS=1$/m);
  });

  it("production mode with the stand-ins is accepted when TRISKEL_STAND_INS=1 says so (npm start, npm test)", () => {
    expect(problemsOf(scripted)).toEqual([]);
    expect(parseEnv(scripted).TRISKEL_STAND_INS).toBe(true);
    expect(parseEnv(good).TRISKEL_STAND_INS).toBe(false);
    expect(problemsOf({ ...scripted, NODE_ENV: "development", TRISKEL_STAND_INS: undefined })).toEqual([]);
    expect(problemsOf({ ...scripted, TRISKEL_STAND_INS: "yes" })[0]).toMatch(/^environment variable TRISKEL_STAND_INS is invalid \("yes"\): must be 0 or 1/);
  });

  it("production mode without the flag refuses every stand-in key, secret and address, one line each", () => {
    const lines = problemsOf({ ...scripted, TRISKEL_STAND_INS: undefined });
    expect(namesIn(lines).sort()).toEqual(
      [
        "CLERK_FAKE_URL",
        "CLERK_SECRET_KEY",
        "CLERK_WEBHOOK_SECRET",
        "NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY",
        "STRIPE_API_HOST",
        "STRIPE_SECRET_KEY",
        "STRIPE_WEBHOOK_SECRET",
      ].sort(),
    );
    expect(lines.find((l) => l.startsWith("environment variable CLERK_SECRET_KEY"))).toBe(
      'environment variable CLERK_SECRET_KEY is invalid ("sk_live_triskel_local_stand_in"): is the local stand-in\'s value, refused in production mode; ' +
        "a deployment sets its own (docs/accounts.md, docs/billing.md); only local runs against fakes/ set TRISKEL_STAND_INS=1",
    );
    expect(problemsOf({ ...scripted, TRISKEL_STAND_INS: "0" }).length).toBe(7);
  });

  it("refuses the development Stripe webhook secret with a live key, in any mode and even with the flag", () => {
    for (const NODE_ENV of ["development", "production", "test"]) {
      for (const key of ["sk_live_51AbC", "rk_live_51AbC"]) {
        const lines = problemsOf({ ...scripted, NODE_ENV, STRIPE_SECRET_KEY: key });
        expect(namesIn(lines), `${NODE_ENV} ${key}`).toEqual(["STRIPE_WEBHOOK_SECRET"]);
        expect(lines[0]).toMatch(/development secret, which anyone can read in this repository, while STRIPE_SECRET_KEY is a live key; set the signing secret/);
      }
    }
    expect(problemsOf({ ...scripted, STRIPE_SECRET_KEY: "sk_live_51AbC", STRIPE_WEBHOOK_SECRET: "whsec_from_the_dashboard" })).toEqual([]);
  });

  it("refuses it in production mode against Stripe itself (no host, or any non-loopback host), even with a test key", () => {
    const real = { ...scripted, STRIPE_SECRET_KEY: "sk_test_51AbC", STRIPE_API_HOST: undefined, STRIPE_API_PORT: undefined, STRIPE_API_PROTOCOL: undefined };
    expect(namesIn(problemsOf(real))).toEqual(["STRIPE_WEBHOOK_SECRET"]);
    expect(problemsOf(real)[0]).toContain("while production mode talks to api.stripe.com");
    expect(namesIn(problemsOf({ ...real, STRIPE_API_HOST: "stripe.internal.example" }))).toEqual(["STRIPE_WEBHOOK_SECRET"]);
    expect(problemsOf({ ...real, NODE_ENV: "development" })).toEqual([]);
  });

  it("refuses the stand-in's Clerk webhook secret with a real Clerk key", () => {
    const lines = problemsOf({ ...scripted, NODE_ENV: "development", CLERK_SECRET_KEY: "sk_live_realinstancekey" });
    expect(namesIn(lines)).toEqual(["CLERK_WEBHOOK_SECRET"]);
    expect(lines[0]).toContain("while CLERK_SECRET_KEY is a real Clerk key");
  });

  it("a real deployment's own keys in production mode pass", () => {
    const deployment = {
      ...good,
      NODE_ENV: "production",
      CLERK_SECRET_KEY: "sk_live_realinstancekey",
      NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY: "pk_live_Y2xlcmsuZXhhbXBsZS5vcmck",
      CLERK_WEBHOOK_SECRET: "whsec_" + Buffer.from("clerk endpoint").toString("base64"),
      STRIPE_SECRET_KEY: "sk_live_51AbC",
      STRIPE_WEBHOOK_SECRET: "whsec_from_the_dashboard",
    };
    expect(problemsOf(deployment)).toEqual([]);
  });
});
