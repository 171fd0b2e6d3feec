// Hall bars through the API (computation kind hallBar): a calculation equal to the command line's
// output, a scan over field whose grid carries R_xx and R_xy, and refusals in words naming the field.
import { afterAll, describe, expect, it } from "vitest";
import { cliCompute, get, post, smallNetwork, sql, waitFor } from "./runs-support";

const finished = (s: string) => ["succeeded", "failed", "cancelled"].includes(s);
// Synthetic: an open-edged disordered triangular bar.
const network = { ...smallNetwork(9, 6), transverse: "open", disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 5 } };

afterAll(async () => {
  await sql.end();
});

describe("Hall bar", () => {
  it("a calculation: 202 with an estimate, then the command line's result with the six terminals, R_xx, R_xy and the checks", async () => {
    const input = { network, computation: { kind: "hallBar", energyMeV: 0.8, fieldTesla: 0.2 } };
    const created = await post("/api/v1/runs", input);
    expect(created.status).toBe(202);
    expect(created.body.kind).toBe("hallBar");
    expect(created.body.estimate.computeSeconds).toBeGreaterThan(0);
    const run = await waitFor("the Hall bar to finish", async () => {
      const r = await get(`/api/v1/runs/${created.body.id}`);
      return finished(r.body.status) ? r.body : undefined;
    });
    expect(run.status).toBe("succeeded");
    expect(run.result.terminals.map((t: { name: string }) => t.name)).toEqual(["source", "drain", "top1", "bottom1", "top2", "bottom2"]);
    expect(run.result.resistances.hallOhms).toEqual(expect.any(Number));
    expect(run.result.checks.rowSumError).toBeLessThan(1e-10);
    expect(run.result).toEqual(JSON.parse(await cliCompute(input)));
  });

  it("a scan over field: the grid carries resistances.longitudinalOhms and resistances.hallOhms per point", async () => {
    const created = await post("/api/v1/sweeps", {
      network,
      computation: { kind: "hallBar", energyMeV: 0.8 },
      name: "IT Hall bar versus field",
      axes: [{ parameter: "fieldTesla", from: -0.2, to: 0.2, points: 3 }],
    });
    expect(created.status).toBe(202);
    const done = await waitFor("the scan to finish", async () => {
      const s = (await get(`/api/v1/sweeps/${created.body.id}`)).body;
      return finished(s.status) ? s : undefined;
    });
    expect(done.status).toBe("succeeded");
    const rxy = done.grid.quantities["resistances.hallOhms"] as number[];
    const rxx = done.grid.quantities["resistances.longitudinalOhms"] as number[];
    expect(rxy).toHaveLength(3);
    expect(rxx.every((v) => Number.isFinite(v))).toBe(true);
    // with disorder the Hall resistance changes with the field's sign
    expect(rxy[0]).not.toBeCloseTo(rxy[2], 3);
  });

  it("refuses a periodic sample and bad contacts with 422 naming the field, and writes nothing", async () => {
    const [{ n: before }] = await sql`select count(*)::int as n from runs`;
    const periodic = await post("/api/v1/runs", { network: smallNetwork(9, 6), computation: { kind: "hallBar" } });
    expect(periodic.status).toBe(422);
    expect(periodic.body.error.message).toMatch(/network\.transverse: a Hall bar needs open top and bottom edges/);
    const overlap = await post("/api/v1/runs", {
      network,
      computation: {
        kind: "hallBar",
        contacts: [
          { name: "a", edge: "top", fromColumn: 1, toColumn: 3 },
          { name: "b", edge: "top", fromColumn: 3, toColumn: 4 },
        ],
      },
    });
    expect(overlap.status).toBe(422);
    expect(overlap.body.error.message).toMatch(/computation\.contacts\.1\.fromColumn: the window \[3, 4\] overlaps "a"/);
    const [{ n: after }] = await sql`select count(*)::int as n from runs`;
    expect(after).toBe(before);
  });
});
