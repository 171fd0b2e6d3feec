import { createHmac } from "node:crypto";
import { describe, expect, it } from "vitest";
import { verifyWebhook, WEBHOOK_TOLERANCE_S } from "@/server/auth/webhooks";
import { roleFromClerk } from "@/server/auth/roles";

const SECRET = "whsec_" + Buffer.from("unit-test-secret").toString("base64");
const sign = (id: string, ts: number, body: string, secret = SECRET) =>
  "v1," +
  createHmac("sha256", Buffer.from(secret.slice(6), "base64"))
    .update(`${id}.${ts}.${body}`)
    .digest("base64");

describe("webhook signatures (Standard Webhooks)", () => {
  const now = 1_800_000_000;
  it("accepts a matching v1 signature, also among several", () => {
    const body = '{"type":"user.created"}';
    expect(() => verifyWebhook(SECRET, { id: "msg_1", timestamp: String(now), signature: sign("msg_1", now, body) }, body, now)).not.toThrow();
    expect(() => verifyWebhook(SECRET, { id: "msg_1", timestamp: String(now), signature: `v1,AAAA ${sign("msg_1", now, body)}` }, body, now)).not.toThrow();
  });
  it("refuses a changed body, another id, a stale timestamp and missing headers, saying which", () => {
    const body = '{"type":"user.created"}';
    const sig = sign("msg_1", now, body);
    expect(() => verifyWebhook(SECRET, { id: "msg_1", timestamp: String(now), signature: sig }, body + " ", now)).toThrow(/signature/);
    expect(() => verifyWebhook(SECRET, { id: "msg_2", timestamp: String(now), signature: sig }, body, now)).toThrow(/signature/);
    expect(() => verifyWebhook(SECRET, { id: "msg_1", timestamp: String(now), signature: sig }, body, now + WEBHOOK_TOLERANCE_S + 1)).toThrow(/timestamp/);
    expect(() => verifyWebhook(SECRET, { id: null, timestamp: String(now), signature: sig }, body, now)).toThrow(/svix-id/);
  });
});

describe("Clerk organization roles", () => {
  it("map to Triskel roles; Clerk's defaults too; unknown roles get the least rights", () => {
    expect(roleFromClerk("org:owner")).toBe("owner");
    expect(roleFromClerk("org:admin")).toBe("owner");
    expect(roleFromClerk("billing_admin")).toBe("billing_admin");
    expect(roleFromClerk("org:researcher")).toBe("researcher");
    expect(roleFromClerk("org:member")).toBe("viewer");
    expect(roleFromClerk("org:janitor")).toBe("viewer");
    expect(roleFromClerk(null)).toBe("viewer");
  });
});
