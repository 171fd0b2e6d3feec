import { describe, expect, it } from "vitest";
import { spendCapMessage } from "@/server/billing/notify";
import { seatQuantity } from "@/server/billing/webhooks";

describe("spendCapMessage", () => {
  const base = { workspaceName: "Larkspur Devices Lab", period: "2026-12", spendUsd: 200.4, spendCapUsd: 250, billingUrl: "http://127.0.0.1:3000/billing" };
  it("says the share of the cap at 80 %", () => {
    const m = spendCapMessage({ ...base, thresholdPercent: 80 });
    expect(m.subject).toBe("Larkspur Devices Lab: compute spend at 80 % of the spend cap");
    expect(m.text).toContain("200.40 USD of the 250.00 USD spend cap (80 %)");
    expect(m.text).toContain("http://127.0.0.1:3000/billing");
  });
  it("says what is refused at 100 %", () => {
    const m = spendCapMessage({ ...base, thresholdPercent: 100, spendUsd: 251 });
    expect(m.subject).toContain("reached the spend cap (250.00 USD)");
    expect(m.text).toContain("refused");
  });
});

describe("seatQuantity", () => {
  it("reads the licensed item's quantity and ignores the metered one", () => {
    const sub = {
      items: {
        data: [
          { quantity: undefined, price: { lookup_key: "triskel_compute_seconds_metered", recurring: { usage_type: "metered" } } },
          { quantity: 5, price: { lookup_key: "triskel_lab_seat_monthly", recurring: { usage_type: "licensed" } } },
        ],
      },
    };
    expect(seatQuantity(sub as never)).toBe(5);
  });
});
