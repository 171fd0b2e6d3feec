// The run form and the scan builder check a computation on its network: an LDOS map or a sample
// DOS on a periodic sample (a torus) at a field that is not a whole number of flux quanta is
// flagged under the field, as the engine's parse refuses it (src/lib/engineClient.ts).
import { describe, expect, it } from "vitest";
import { parseComputeInput, torusFieldStepTesla } from "@/engine/browser";
import { validateComputationOn } from "@/lib/engineClient";

const network = { lattice: "triangular", size: { columns: 6, rows: 4 }, twistDegrees: 0.11, node: { forward: 0.6 } };

describe("a computation checked on its network", () => {
  const step = torusFieldStepTesla(parseComputeInput({ network, computation: { kind: "ldos" } }).network)!;
  it("flags the field a torus refuses, with the engine's words, and accepts whole flux quanta", () => {
    const bad = validateComputationOn(network, { kind: "ldos", fieldTesla: 0.5 * step });
    expect(bad.ok).toBe(false);
    expect(!bad.ok && bad.issues.fieldTesla).toMatch(/a closed periodic sample \(a torus\) holds a whole number of flux quanta/);
    expect(() => parseComputeInput({ network, computation: { kind: "ldos", fieldTesla: 0.5 * step } })).toThrow(/a torus/);
    expect(validateComputationOn(network, { kind: "ldos", fieldTesla: 3 * step }).ok).toBe(true);
    expect(validateComputationOn(network, { kind: "dos", source: "sample", fieldTesla: 0.5 * step }).ok).toBe(false);
  });
  it("leaves computations with leads, and rings with open edges, alone", () => {
    expect(validateComputationOn(network, { kind: "conductance", fieldTesla: 0.5 * step }).ok).toBe(true);
    expect(validateComputationOn({ ...network, transverse: "open" }, { kind: "ldos", fieldTesla: 0.5 * step }).ok).toBe(true);
  });
});
