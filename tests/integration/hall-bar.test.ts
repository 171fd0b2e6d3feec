// Hall bars through the API (computation kind hallBar): a calculation equal to the command line's
// output, a scan over field whose grid carries R_xx and R_xy, and refusals in words naming the field.
import { afterAll, describe, expect, it } from "vitest";
import { cliCompute, get, post, smallNetwork, sql, waitFor } from "./runs-support";
import { api } from "../support/services";
import { datasetForm } from "../support/csv";

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

  it("an R_xy dataset (synthetic) is kept in ohms and fitted with the hallBar kind; the conductance kind is refused in words", async () => {
    const csv =
      ["B (T),Rxy (ohm)", ...Array.from({ length: 12 }, (_, i) => `${(-0.3 + 0.05 * i).toFixed(2)},${(-900 + 150 * i).toFixed(1)}`)].join("\n") + "\n";
    const up = await api("/api/v1/datasets", {
      method: "POST",
      body: datasetForm(csv, { name: "IT Hall bar R_xy (synthetic)", xColumn: "B (T)", xUnit: "T", yColumn: "Rxy (ohm)", yUnit: "ohm", yMeasures: "hall" }),
    });
    expect(up.status).toBe(201);
    const d = await up.json();
    expect(d.yUnit).toBe("ohm");
    expect(d.yMeasures).toBe("hall");
    const stored = (await get(`/api/v1/datasets/${d.id}`)).body;
    expect(stored.points.y[0]).toBe(-900);
    const fit = {
      datasetId: d.id,
      network,
      sweepParameter: "fieldTesla",
      fit: [{ parameter: "node.forward", initial: 0.5, min: 0.3, max: 0.8 }],
    };
    const wrong = await post("/api/v1/fits?dryRun=true", { ...fit, computation: { kind: "conductance", energyMeV: 0.8 } });
    expect(wrong.status).toBe(422);
    expect(wrong.body.error.message).toMatch(/Hall resistance R_xy.*fit it with "hallBar"/);
    const right = await post("/api/v1/fits?dryRun=true", { ...fit, computation: { kind: "hallBar", energyMeV: 0.8 } });
    expect(right.status).toBe(200);
    expect(right.body.estimate.computeSeconds).toBeGreaterThan(0);
    // without a kind the dataset decides it
    const implied = await post("/api/v1/fits?dryRun=true", { ...fit, computation: { energyMeV: 0.8 } });
    expect(implied.status).toBe(200);
  });
});
