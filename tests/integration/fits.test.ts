// Fits as jobs against the running app and worker: the seeded synthetic LK-07 curve (made by the
// engine with node.forward = 0.55 and contactOhms = 600, src/server/demo/lk07.ts) is fitted back
// within the reported standard errors; one usage-ledger row per fit; export and curve CSV;
// bad input answered 422 with the field; roles.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import postgres from "postgres";
import { api, databaseUrl } from "../support/services";
import { LK07_TRUTH } from "../../src/server/demo/lk07";
import { LK07_COMPUTATION, LK07_FIT_START, LK07_NETWORK } from "../../src/shared/lk07";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });
let datasetId = "";
beforeAll(async () => {
  const list = await (await api("/api/v1/datasets")).json();
  datasetId = list.items.find((d: { name: string }) => d.name === "LK-07 magnetoconductance (synthetic)").id;
});
afterAll(async () => {
  await sql.end();
  const { closeDb } = await import("../../src/server/db");
  await closeDb();
});

async function waitFinished(id: string, timeoutMs = 170_000) {
  const end = Date.now() + timeoutMs;
  const progress: number[] = [];
  for (;;) {
    const f = await (await api(`/api/v1/fits/${id}`)).json();
    progress.push(f.progress);
    if (["succeeded", "failed", "cancelled"].includes(f.status)) return { f, progress };
    if (Date.now() > end) throw new Error(`fit ${id} still ${f.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 1000));
  }
}

describe("fits", () => {
  it("fits node.forward and contactOhms back within the reported uncertainties, metered once", async () => {
    const res = await api("/api/v1/fits", {
      method: "POST",
      json: { datasetId, network: LK07_NETWORK, computation: LK07_COMPUTATION, sweepParameter: "fieldTesla", fit: LK07_FIT_START },
    });
    expect(res.status).toBe(202);
    const { id, estimate } = await res.json();
    expect(estimate.computeSeconds).toBeGreaterThan(0);
    const { f } = await waitFinished(id);
    expect(f.status).toBe("succeeded");
    const r = f.result;
    expect(r.parameters.map((p: { parameter: string }) => p.parameter)).toEqual(["node.forward", "contactOhms"]);
    for (const p of r.parameters) {
      const truth = LK07_TRUTH[p.parameter as keyof typeof LK07_TRUTH];
      expect(p.stderr).toBeGreaterThan(0);
      expect(Math.abs(p.value - truth)).toBeLessThan(3 * p.stderr);
    }
    // Gaussian noise of the stated sigma: chi2/dof near 1 (within 4 sqrt(2/dof), dof = 118).
    expect(Math.abs(r.chi2PerDof - 1)).toBeLessThan(4 * Math.sqrt(2 / 118));
    expect(r.correlation).toHaveLength(2);
    expect(r.curve.x).toHaveLength(120);
    expect(r.residuals).toHaveLength(120);
    expect(f.engineVersion).toMatch(/\d+\.\d+\.\d+/);
    expect(f.computeSeconds).toBeGreaterThan(0);
    expect(f.progress).toBe(1);

    const ledger =
      await sql`select l.compute_seconds, r.kind from fits f join runs r on r.id = f.run_id join usage_ledger l on l.run_id = r.id where f.id = ${id}`;
    expect(ledger).toHaveLength(1);
    expect(ledger[0].kind).toBe("fit");
    expect(ledger[0].compute_seconds).toBeCloseTo(f.computeSeconds, 3);

    // A retried job finishing the same fit again (its first attempt's worker was thought lost)
    // writes no second companion run and no second ledger row.
    const { finishFit } = await import("../../src/server/fits/execution");
    await sql`update fits set status = 'running' where id = ${id}`;
    const [row] = await sql`select workspace_id, created_by, dataset_id, input, input_hash, estimated_compute_seconds, attempts from fits where id = ${id}`;
    const again = await finishFit(
      {
        id,
        workspaceId: row.workspace_id,
        createdBy: row.created_by,
        datasetId: row.dataset_id,
        input: row.input,
        points: { x: [], y: [], sigma: null },
        inputHash: row.input_hash,
        estimatedComputeSeconds: row.estimated_compute_seconds,
        attempts: row.attempts,
      },
      { status: "succeeded", result: f.result, computeSeconds: f.computeSeconds, engineVersion: f.engineVersion },
    );
    expect(again).toBe(true);
    const ledgerAfter = await sql`select count(*)::int as n from usage_ledger l join fits f on f.run_id = l.run_id where f.id = ${id}`;
    expect(ledgerAfter[0].n).toBe(1);
    const fitRuns = await sql`select count(*)::int as n from runs where kind = 'fit' and input->>'fitId' = ${id}`;
    expect(fitRuns[0].n).toBe(1);
    // and a finished fit is not finished twice
    expect(
      await finishFit(
        {
          id,
          workspaceId: row.workspace_id,
          createdBy: null,
          datasetId: row.dataset_id,
          input: {},
          points: { x: [], y: [], sigma: null },
          inputHash: "",
          estimatedComputeSeconds: 0,
          attempts: 1,
        },
        { status: "failed", computeSeconds: 0, engineVersion: "" },
      ),
    ).toBe(false);

    const report = await (await api(`/api/v1/fits/${id}/export`)).json();
    expect(report.engineVersion).toBe(f.engineVersion);
    expect(report.dataset.dataHash).toMatch(/^[0-9a-f]{64}$/);
    expect(report.settings.fit).toEqual(LK07_FIT_START);
    expect(report.settings.sweepParameter).toBe("fieldTesla");
    const csv = (await (await api(`/api/v1/fits/${id}/curve.csv`)).text()).trim().split("\n");
    // two # lines, the header with units in the names, one row per data point
    expect(csv).toHaveLength(123);
    expect(csv[2]).toBe("field_T,model_conductance_e2h,residual_e2h");
    // chi2 profiles of both parameters (on by default), in the report and as CSV: one row per point
    expect(r.profiles.map((p: { parameter: string }) => p.parameter)).toEqual(["node.forward", "contactOhms"]);
    for (const p of r.profiles) {
      expect(p.refitted).toBe(true);
      expect(p.points.length).toBeGreaterThanOrEqual(9);
      // no profile point lies below the fit's chi2 (else the fit would have descended from it)
      for (const pt of p.points) expect(pt.chi2).toBeGreaterThanOrEqual(r.chi2 * (1 - 1e-6));
      const best = r.parameters.find((q: { parameter: string }) => q.parameter === p.parameter);
      expect(p.interval.low).toBeLessThan(best.value);
      expect(p.interval.high).toBeGreaterThan(best.value);
    }
    expect(report.result.profiles).toEqual(r.profiles);
    const profilesCsv = await api(`/api/v1/fits/${id}/profiles.csv`);
    expect(profilesCsv.headers.get("content-type")).toMatch(/text\/csv/);
    const lines = (await profilesCsv.text()).trim().split("\n");
    // columns by the export rule (units in the names, src/shared/quantities.ts), after 3 # lines
    expect(lines.slice(0, 3).every((l) => l.startsWith("# "))).toBe(true);
    expect(lines[0]).toContain(`input sha256 ${report.inputHash}`);
    expect(lines[3]).toBe("profiled_parameter,profiled_unit,value,chi2_1,one_sigma_level_1,fitted_node_forward_probability_1,fitted_contact_resistance_ohm");
    expect(lines.length - 4).toBe(r.profiles[0].points.length + r.profiles[1].points.length);
    const first = lines[4].split(",");
    expect(first.slice(0, 2)).toEqual(["node.forward", "1"]);
    expect(Number(first[3])).toBeCloseTo(r.profiles[0].points[0].chi2, 9);
    const ohms = lines.find((l) => l.startsWith("contactOhms,"))!.split(",");
    expect(ohms[1]).toBe("ohm");

    const list = await (await api(`/api/v1/fits?datasetId=${datasetId}`, { as: "viewer" })).json();
    expect(list.items.map((x: { id: string }) => x.id)).toContain(id);
  });

  it("an engine input error in a fit answers like the same error in a run: 422, same code, message, field and issues", async () => {
    const network = { ...LK07_NETWORK, size: { columns: 4, rows: 3 } };
    const run = await api("/api/v1/runs", { method: "POST", json: { network, computation: LK07_COMPUTATION } });
    const fit = await api("/api/v1/fits", {
      method: "POST",
      json: { datasetId, network, computation: LK07_COMPUTATION, sweepParameter: "fieldTesla", fit: LK07_FIT_START },
    });
    expect(run.status).toBe(422);
    expect(fit.status).toBe(422);
    const runError = (await run.json()).error;
    const fitError = (await fit.json()).error;
    expect(runError.code).toBe("invalid_input");
    expect(runError.details.field).toBe("network.size.rows");
    expect(runError.details.issues).toHaveLength(1);
    expect(fitError).toEqual(runError);
    // A saved network that is not in this workspace: the same answer as a run's.
    const missing = "00000000-0000-0000-0000-000000000000";
    const runMissing = await api("/api/v1/runs", { method: "POST", json: { networkId: missing, computation: LK07_COMPUTATION } });
    const fitMissing = await api("/api/v1/fits", {
      method: "POST",
      json: { datasetId, networkId: missing, computation: LK07_COMPUTATION, sweepParameter: "fieldTesla", fit: LK07_FIT_START },
    });
    expect(runMissing.status).toBe(404);
    expect(fitMissing.status).toBe(404);
    expect((await fitMissing.json()).error).toEqual((await runMissing.json()).error);
  });

  it("answers 422 naming the field for parameters, bounds, sweep parameter and network; 403 for a viewer; 404 across workspaces", async () => {
    const base = { datasetId, network: LK07_NETWORK, computation: LK07_COMPUTATION, sweepParameter: "fieldTesla" };
    const cases: [unknown, RegExp][] = [
      [{ ...base, fit: [{ parameter: "energyMeV", initial: 1, min: 0, max: 2 }] }, /fit\.0\.parameter/],
      [{ ...base, fit: [{ parameter: "node.forward", initial: 0.95, min: 0.2, max: 0.9 }] }, /fit\.0\.initial/],
      [{ ...base, fit: [{ parameter: "node.forward", initial: 0.5, min: 0.01, max: 0.9 }] }, /fit\.0\.min/],
      [{ ...base, sweepParameter: "energyMeV", fit: LK07_FIT_START }, /sweepParameter/],
      [{ ...base, network: { ...LK07_NETWORK, size: { columns: 4, rows: 3 } }, fit: LK07_FIT_START }, /network\.size\.rows/],
      [{ ...base, fit: [] }, /fit/],
    ];
    for (const [body, field] of cases) {
      const res = await api("/api/v1/fits", { method: "POST", json: body });
      expect(res.status).toBe(422);
      expect((await res.json()).error.message).toMatch(field);
    }
    expect((await api("/api/v1/fits", { method: "POST", json: { ...base, fit: LK07_FIT_START }, as: "viewer" })).status).toBe(403);
    expect((await api("/api/v1/fits", { method: "POST", json: { ...base, fit: LK07_FIT_START }, as: "student" })).status).toBe(404);
    expect((await api("/api/v1/fits/00000000-0000-0000-0000-000000000000")).status).toBe(404);
  });
});
