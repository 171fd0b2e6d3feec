// The per-job compute-time cap (src/shared/plans.ts maxJobComputeSeconds: Free 10 compute-minutes,
// Lab 6 compute-hours, the engine's own limit). A run, each sweep point and a whole fit whose
// estimate is over the cap are refused before anything is written, dry runs too: 402 on Free
// (naming the Lab plan's cap), 422 on Lab, where no plan allows more. Networks are synthetic.
import { afterAll, describe, expect, it } from "vitest";
import { PLANS } from "../../src/shared/plans";
import { csvText, datasetForm } from "../support/csv";
import { api } from "../support/services";
import { counts, post, smallNetwork, sql, workspaceId } from "./runs-support";

const created: string[] = [];
afterAll(async () => {
  if (created.length) await sql`delete from datasets where id in ${sql(created)} and not exists (select 1 from fits where fits.dataset_id = datasets.id)`;
  await sql.end();
});

const FREE = PLANS.free.maxJobComputeSeconds;
const LAB = PLANS.lab.maxJobComputeSeconds;

/** About an hour of compute on the largest Free network (a thermal average over an ensemble):
 * well over Free's cap and well under Lab's, whatever the cost model's calibration does within a
 * factor of 3 (the Lab dry run below checks that it lies between the two). */
const heavyNetwork = { ...smallNetwork(40, 40), disorder: { linkPhaseWidthRad: 3, seed: 4 } };
const heavyComputation = { kind: "conductance", energyMeV: 0.5, temperatureK: 20, ensemble: { samples: 10 } };
/** Far over six hours: a large thermal ensemble. */
const hugeNetwork = { ...smallNetwork(200, 200), disorder: { linkPhaseWidthRad: 3, seed: 4 } };
const hugeComputation = { kind: "conductance", energyMeV: 0.5, temperatureK: 20, ensemble: { samples: 1000 } };

async function studentWorkspace(): Promise<string> {
  const [row] = await sql`select w.id from workspaces w join memberships m on m.workspace_id = w.id join users u on u.id = m.user_id
    where u.email = 'student@fernhill.example'`;
  return row.id;
}

describe("the per-job compute-time cap", () => {
  it("the plans state it: 10 compute-minutes on Free, 6 compute-hours on Lab", () => {
    expect(FREE).toBe(600);
    expect(LAB).toBe(21_600);
  });

  it("a Free run over 10 compute-minutes is refused with 402, its estimate and the Lab cap; the same run is accepted on Lab", async () => {
    const student = await studentWorkspace();
    const before = await counts(student);
    // The Lab dry run tells the estimate: between the two caps.
    const lab = await post("/api/v1/runs?dryRun=true", { network: heavyNetwork, computation: heavyComputation });
    expect(lab.status).toBe(200);
    const estimate = lab.body.estimate.computeSeconds;
    expect(estimate).toBeGreaterThan(FREE);
    expect(estimate).toBeLessThan(LAB);

    for (const path of ["/api/v1/runs", "/api/v1/runs?dryRun=true"]) {
      const r = await post(path, { network: heavyNetwork, computation: heavyComputation }, "student");
      expect(r.status).toBe(402);
      expect(r.body.error.code).toBe("payment_required");
      expect(r.body.error.message).toContain("The calculation: the estimated compute time is");
      expect(r.body.error.message).toContain("over the Free plan's limit of 600 compute-seconds (10.0 compute-minutes) per job");
      expect(r.body.error.message).toContain("The Lab plan allows 21,600 compute-seconds (6.00 compute-hours)");
      expect(r.body.error.details).toMatchObject({ limit: "maxJobComputeSeconds", value: FREE, plan: "free", unit: "compute-seconds" });
      expect(r.body.error.details.requested).toBeCloseTo(estimate, 0);
    }
    expect(await counts(student)).toEqual(before);
  });

  it("a Lab run over 6 compute-hours is refused with 422 naming the estimate and the limit", async () => {
    const lab = await workspaceId();
    const before = await counts(lab);
    for (const path of ["/api/v1/runs", "/api/v1/runs?dryRun=true"]) {
      const r = await post(path, { network: hugeNetwork, computation: hugeComputation });
      expect(r.status).toBe(422);
      expect(r.body.error.code).toBe("invalid_input");
      expect(r.body.error.message).toMatch(/compute-seconds .* over the limit of 6\.00 compute-hours/);
      expect(r.body.error.details).toMatchObject({ resource: "computeTime", limitComputeSeconds: LAB });
      expect(r.body.error.details.estimatedComputeSeconds).toBeGreaterThan(LAB);
    }
    expect(await counts(lab)).toEqual(before);
  });

  it("each sweep point is held to the cap: a Free sweep with a point over it is refused whole (402), naming the point", async () => {
    const student = await studentWorkspace();
    const before = await counts(student);
    const body = {
      network: heavyNetwork,
      computation: { kind: "conductance", energyMeV: 0.5, temperatureK: 20 },
      ensemble: { samples: 10 },
      axes: [{ parameter: "energyMeV", from: 0.1, to: 0.3, points: 3 }],
    };
    for (const path of ["/api/v1/sweeps", "/api/v1/sweeps?dryRun=true"]) {
      const r = await post(path, body, "student");
      expect(r.status).toBe(402);
      expect(r.body.error.message).toMatch(/^scan point 0 \(energyMeV = 0\.1\): the estimated compute time is/);
      expect(r.body.error.details).toMatchObject({ limit: "maxJobComputeSeconds", value: FREE });
    }
    // Small points pass on Free: the cap is per point, the quota is for the sum.
    const ok = await post(
      "/api/v1/sweeps?dryRun=true",
      { ...body, network: smallNetwork(), computation: { kind: "conductance" }, ensemble: undefined },
      "student",
    );
    expect(ok.status).toBe(200);
    expect(await counts(student)).toEqual(before);
  });

  it("a fit is one job: a Free fit whose evaluations add up to more than the cap is refused (402) before it is stored", async () => {
    const rows = Array.from({ length: 120 }, (_, i) => [(i * 0.05).toFixed(2), (1 + 0.1 * Math.cos(i)).toFixed(4)]);
    const csv = csvText(["B (T)", "G (e2/h)"], rows, { comments: ["synthetic"], finalNewline: true });
    const form = datasetForm(csv, { name: "cap test curve (synthetic)", xColumn: "B (T)", xUnit: "T", yColumn: "G (e2/h)", yUnit: "e2/h" }, "synthetic.csv");
    const up = await api("/api/v1/datasets", { method: "POST", body: form, as: "student" });
    expect(up.status).toBe(201);
    const datasetId = (await up.json()).id;
    created.push(datasetId);
    const [{ n: fitsBefore }] = await sql`select count(*)::int as n from fits where dataset_id = ${datasetId}`;
    const fit = [{ parameter: "node.forward", initial: 0.5, min: 0.2, max: 0.9 }];
    const res = await api("/api/v1/fits", {
      method: "POST",
      as: "student",
      json: {
        datasetId,
        network: smallNetwork(40, 40),
        computation: { kind: "conductance", energyMeV: 0.5, temperatureK: 5, temperaturePoints: 20 },
        sweepParameter: "fieldTesla",
        fit,
      },
    });
    const body = await res.json();
    expect(res.status).toBe(402);
    expect(body.error.message).toMatch(/^The fit \(\d+ engine evaluations\): the estimated compute time is/);
    expect(body.error.details).toMatchObject({ limit: "maxJobComputeSeconds", value: FREE, plan: "free" });
    const [{ n: fitsAfter }] = await sql`select count(*)::int as n from fits where dataset_id = ${datasetId}`;
    expect(fitsAfter).toBe(fitsBefore);
  });
});
