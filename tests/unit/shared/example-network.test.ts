// The example network every new group starts with: a valid network of the engine's schema, within
// the Free plan, marked as an example and invented, and a first conductance on it fits Free's per-job cap.
import { describe, expect, it } from "vitest";
import { estimateCost, parseComputeInput, parseNetwork } from "../../../src/engine/browser";
import { EXAMPLE_NETWORK, isExampleNetwork } from "../../../src/shared/networks";
import { PLANS } from "../../../src/shared/plans";

describe("the example network", () => {
  it("parses with the engine's schema and fits the Free plan's size", () => {
    const n = parseNetwork(EXAMPLE_NETWORK.definition);
    expect(n.size.columns).toBeLessThanOrEqual(PLANS.free.maxCellsPerSide);
    expect(n.size.rows).toBeLessThanOrEqual(PLANS.free.maxCellsPerSide);
  });

  it("says it is an example and invented, and is recognised by its name only", () => {
    expect(EXAMPLE_NETWORK.name).toMatch(/^Example: /);
    expect(EXAMPLE_NETWORK.name).toContain("invented");
    expect(isExampleNetwork(EXAMPLE_NETWORK.name)).toBe(true);
    expect(isExampleNetwork("Clean 0.11° triangular network")).toBe(false);
  });

  it("a first conductance on it is estimated well inside the Free plan's per-job limit", () => {
    const e = estimateCost(parseComputeInput({ network: EXAMPLE_NETWORK.definition, computation: { kind: "conductance", energyMeV: 1 } }));
    expect(e.computeSeconds).toBeGreaterThan(0);
    expect(e.computeSeconds).toBeLessThan(PLANS.free.maxJobComputeSeconds / 10);
  });
});
