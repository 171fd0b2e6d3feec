import { describe, expect, it } from "vitest";
import { assertEnsembleWithinPlan, assertNetworkWithinPlan, assertSweepWithinPlan, queuePriority } from "@/server/billing/limits";
import { ApiError } from "@/server/http/errors";
import { PLANS } from "@/shared/plans";

describe("plan limits", () => {
  const thrown = (fn: () => void) => {
    try {
      fn();
    } catch (e) {
      return e as ApiError;
    }
    throw new Error("expected a refusal");
  };
  it("answers 402 on Free naming the limit and its value", () => {
    const e = thrown(() => assertNetworkWithinPlan("free", { columns: PLANS.free.maxCellsPerSide + 1, rows: 4 }));
    expect(e.status).toBe(402);
    expect(e.message).toBe(
      `The network is ${PLANS.free.maxCellsPerSide + 1} × 4 cells, over the Free plan's limit of ${PLANS.free.maxCellsPerSide} cells per side. ` +
        `The Lab plan allows ${PLANS.lab.maxCellsPerSide} cells per side; an Owner or Billing admin can upgrade the group on its Billing page.`,
    );
    // Words only: no field or limit names in the message (details carry them).
    expect(e.message).not.toMatch(/maxCellsPerSide|network\.size/);
    expect(e.details).toMatchObject({ limit: "maxCellsPerSide", value: PLANS.free.maxCellsPerSide, plan: "free" });
  });
  it("answers 422 on Lab, where no plan allows more", () => {
    const e = thrown(() => assertSweepWithinPlan("lab", PLANS.lab.maxSweepPoints + 1, 1));
    expect(e.status).toBe(422);
    expect(e.message).toContain(`The scan has ${(PLANS.lab.maxSweepPoints + 1).toLocaleString("en-US")} points, over the Lab plan's limit`);
    expect(e.details).toMatchObject({ limit: "maxSweepPoints" });
  });
  it("checks the engine's ensemble size", () => {
    const e = thrown(() =>
      assertEnsembleWithinPlan("free", { computation: { kind: "conductance", ensemble: { samples: PLANS.free.maxEnsembleSamples + 1 } } }),
    );
    expect(e.details).toMatchObject({ limit: "maxEnsembleSamples" });
    expect(() => assertEnsembleWithinPlan("free", { computation: { kind: "conductance" } })).not.toThrow();
    expect(() => assertNetworkWithinPlan("free", { columns: 40, rows: 40 })).not.toThrow();
  });
  it("gives Lab jobs a higher queue priority than Free (lower number)", () => {
    expect(queuePriority("lab")).toBeLessThan(queuePriority("free"));
  });
});
