// The piscina task body, called directly (no thread pool, no services): the result text is the
// command line's, CPU time is measured, the shared flag cancels, bad input fails cleanly.
import { describe, expect, it } from "vitest";
import { compute, parseComputeInput } from "@/engine";
import runEngine from "../../../worker/engine-thread";

const network = {
  lattice: "triangular",
  size: { columns: 6, rows: 6 },
  transverse: "periodic",
  twistDegrees: 0.11,
  node: { forward: 0.6, left: 0.2, right: 0.2 },
};

function control() {
  const sab = new SharedArrayBuffer(16);
  return { sab, cancel: new Int32Array(sab, 0, 1), progress: new Float64Array(sab, 8, 1) };
}

describe("engine task", () => {
  it("returns the result as the command line prints it, with CPU seconds, engine version and input hash", () => {
    const input = { network, computation: { kind: "conductance", energyMeV: 0.3 } };
    const c = control();
    const out = runEngine({ input, control: c.sab });
    expect(out.outcome).toBe("succeeded");
    if (out.outcome !== "succeeded") return;
    expect(out.resultJson).toBe(JSON.stringify(compute(parseComputeInput(input))));
    expect(out.cpuSeconds).toBeGreaterThan(0);
    expect(out.inputHash).toMatch(/^[0-9a-f]{64}$/);
    expect(JSON.parse(out.resultJson).engineVersion).toBe(out.engineVersion);
    expect(c.progress[0]).toBe(1);
  });

  it("stops with `cancelled` when the shared flag is set", () => {
    const c = control();
    Atomics.store(c.cancel, 0, 1);
    const out = runEngine({ input: { network: { ...network, size: { columns: 12, rows: 12 } }, computation: { kind: "conductance" } }, control: c.sab });
    expect(out.outcome).toBe("cancelled");
  });

  it("fails with the field named for input the engine refuses", () => {
    const out = runEngine({ input: { network: { ...network, node: { forward: 0.01 } }, computation: { kind: "conductance" } }, control: control().sab });
    expect(out.outcome).toBe("failed");
    if (out.outcome === "succeeded") return;
    expect(out.error.code).toBe("invalid_input");
    expect(out.error.field).toMatch(/^network\.node/);
  });
});
