// The fault drills' hold before the finishing transaction (worker/drill-hold.ts) is off unless
// asked for twice, and a production-mode process cannot turn it on outside the stand-ins.
import { mkdtempSync, readFileSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { EnvError, parseEnv, STAND_IN_VALUES } from "@/env";
import { drillHoldMs, makeHoldBeforeFinish } from "../../../worker/drill-hold";

const good = { DATABASE_URL: "postgres://postgres@127.0.0.1:5432/triskel", REDIS_URL: "redis://127.0.0.1:6379" };
const deployment = {
  ...good,
  NODE_ENV: "production",
  CLERK_SECRET_KEY: "sk_live_realinstancekey",
  NEXT_PUBLIC_CLERK_PUBLISHABLE_KEY: "pk_live_Y2xlcmsuZXhhbXBsZS5vcmck",
  CLERK_WEBHOOK_SECRET: "whsec_" + Buffer.from("clerk endpoint").toString("base64"),
  STRIPE_SECRET_KEY: "sk_live_51AbC",
  STRIPE_WEBHOOK_SECRET: "whsec_from_the_dashboard",
};
const soak = { ...good, NODE_ENV: "production", TRISKEL_STAND_INS: "1", ...STAND_IN_VALUES, STRIPE_API_HOST: "127.0.0.1" };

describe("drill hook: hold before the finishing transaction", () => {
  it("is off by default, with only one of its two variables, and with a bad value refused", () => {
    expect(drillHoldMs(parseEnv(good))).toBe(0);
    expect(drillHoldMs(parseEnv({ ...good, TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: "5000" }))).toBe(0);
    expect(drillHoldMs(parseEnv({ ...good, TRISKEL_DRILLS: "1" }))).toBe(0);
    expect(() => parseEnv({ ...good, TRISKEL_DRILLS: "yes" })).toThrowError(/TRISKEL_DRILLS is invalid \("yes"\): must be 0 or 1/);
    expect(() => parseEnv({ ...good, TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: "-1" })).toThrowError(/TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS is invalid/);
  });

  it("is on with both variables in development, and in production mode only against the stand-ins", () => {
    const on = { TRISKEL_DRILLS: "1", TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: "5000" };
    expect(drillHoldMs(parseEnv({ ...good, ...on }))).toBe(5000);
    expect(drillHoldMs(parseEnv({ ...soak, ...on }))).toBe(5000);
    // A deployment (its own keys, no TRISKEL_STAND_INS) refuses to start with the drill flag at all.
    expect(() => parseEnv({ ...deployment, ...on })).toThrowError(EnvError);
    expect(() => parseEnv({ ...deployment, ...on })).toThrowError(
      /TRISKEL_DRILLS is invalid \("1"\): turns on the fault drills' hooks, refused in production mode/,
    );
    expect(() => parseEnv({ ...deployment, TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: "5000" })).not.toThrow();
    // Even if the check at start-up were bypassed, the hook itself stays off there.
    expect(drillHoldMs({ NODE_ENV: "production", TRISKEL_STAND_INS: false, TRISKEL_DRILLS: true, TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: 5000 })).toBe(0);
  });

  it("when on, writes one marker per held job and waits before returning", async () => {
    const dir = mkdtempSync(join(tmpdir(), "triskel-drill-"));
    const hold = makeHoldBeforeFinish(parseEnv({ ...good, TRISKEL_DRILLS: "1", TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: "300", TRISKEL_DRILL_DIR: dir }));
    const started = Date.now();
    await hold("run", "00000000-0000-4000-8000-000000000001", { outcome: "succeeded", cpuSeconds: 1.5 });
    expect(Date.now() - started).toBeGreaterThanOrEqual(290);
    expect(readdirSync(dir)).toEqual(["hold-run-00000000-0000-4000-8000-000000000001.json"]);
    const marker = JSON.parse(readFileSync(join(dir, readdirSync(dir)[0]), "utf8"));
    expect(marker).toMatchObject({
      kind: "run",
      id: "00000000-0000-4000-8000-000000000001",
      outcome: "succeeded",
      cpuSeconds: 1.5,
      holdMs: 300,
      pid: process.pid,
    });
    const off = makeHoldBeforeFinish(parseEnv(good));
    const t = Date.now();
    await off("fit", "x", { outcome: "succeeded", cpuSeconds: 1 });
    expect(Date.now() - t).toBeLessThan(50);
  });
});
