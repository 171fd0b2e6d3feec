// The stand-in's pure parts: period arithmetic and webhook signatures the SDK accepts.
import Stripe from "stripe";
import { describe, expect, it } from "vitest";
import { signPayload } from "../../../fakes/stripe/server";
import { addMonth } from "../../../fakes/stripe/store";

describe("addMonth", () => {
  const at = (iso: string) => Math.floor(Date.parse(iso) / 1000);
  it("moves to the same day next month, or the last day of a shorter month", () => {
    expect(addMonth(at("2026-03-15T10:00:00Z"))).toBe(at("2026-04-15T10:00:00Z"));
    expect(addMonth(at("2026-01-31T00:00:00Z"))).toBe(at("2026-02-28T00:00:00Z"));
    expect(addMonth(at("2026-12-31T23:59:00Z"))).toBe(at("2027-01-31T23:59:00Z"));
  });
});

describe("signPayload", () => {
  it("produces a Stripe-Signature header the SDK verifies, and a wrong secret fails", () => {
    const stripe = new Stripe("sk_test_unit");
    const payload = JSON.stringify({ id: "evt_unit", object: "event", type: "invoice.paid", data: { object: {} } });
    const header = signPayload("whsec_unit", payload);
    expect(header).toMatch(/^t=\d+,v1=[0-9a-f]{64}$/);
    expect(stripe.webhooks.constructEvent(payload, header, "whsec_unit").id).toBe("evt_unit");
    expect(() => stripe.webhooks.constructEvent(payload, header, "whsec_other")).toThrow(/signature/i);
    expect(() => stripe.webhooks.constructEvent(payload + " ", header, "whsec_unit")).toThrow(/signature/i);
  });
});

describe("Store state file", () => {
  it("round-trips maps, sets and counters through JSON", async () => {
    const { Store } = await import("../../../fakes/stripe/store");
    const s = new Store();
    s.customers.set("cus_a", { id: "cus_a", object: "customer", created: 1, email: null, name: "Lab", description: null, metadata: {}, livemode: false });
    s.meterIdentifiers.add("ledger-1");
    s.failingCustomers.add("cus_a");
    s.invoiceCounter = 7;
    const back = Store.deserialize(s.serialize());
    expect(back.customers.get("cus_a")?.name).toBe("Lab");
    expect(back.meterIdentifiers.has("ledger-1")).toBe(true);
    expect(back.failingCustomers.has("cus_a")).toBe(true);
    expect(back.invoiceCounter).toBe(7);
    expect(back.prices).toBeInstanceOf(Map);
  });
});
