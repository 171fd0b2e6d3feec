// Runs through /api/v1/runs with the real worker process: results identical to the command
// line's, progress, cancellation, compute-seconds and the usage ledger, filters and pagination,
// and invalid submissions that write nothing.
import { afterAll, describe, expect, it } from "vitest";
import { api } from "../support/services";
import { cliCompute, counts, get, post, smallNetwork, sql, waitFor, workspaceId } from "./runs-support";

afterAll(async () => {
  await sql.end();
});

const finished = (s: string) => ["succeeded", "failed", "cancelled"].includes(s);

/** A run heavy enough to last a few seconds on one thread (an ensemble of disorder samples). */
const longInput = {
  network: { ...smallNetwork(24, 24), disorder: { linkPhaseWidthRad: 6.283185307179586, seed: 3 } },
  computation: { kind: "conductance", energyMeV: 0.5, ensemble: { samples: 400 } },
};

describe("a run", () => {
  it("answers 202 with an estimate, completes in the worker, and its result is exactly the command line's", async () => {
    const input = { network: smallNetwork(8, 8), computation: { kind: "conductance", energyMeV: 0.7, fieldTesla: 0.05 } };
    const created = await post("/api/v1/runs", input);
    expect(created.status).toBe(202);
    expect(created.body).toMatchObject({ id: expect.any(String), status: "queued", kind: "conductance" });
    expect(created.body.estimate.computeSeconds).toBeGreaterThan(0);

    const run = await waitFor("the run to finish", async () => {
      const r = await get(`/api/v1/runs/${created.body.id}`);
      return finished(r.body.status) ? r.body : undefined;
    });
    expect(run.status).toBe("succeeded");
    expect(run.progress).toBe(1);
    expect(run.error).toBeNull();
    expect(run.computeSeconds).toBeGreaterThan(0);
    expect(run.engineVersion).toEqual(expect.any(String));
    expect(run.inputHash).toEqual(expect.any(String));

    const printed = await cliCompute(input);
    expect(run.result).toEqual(JSON.parse(printed));
    const file = await api(`/api/v1/runs/${run.id}/result.json`);
    expect(file.headers.get("content-type")).toMatch(/application\/json/);
    expect(await file.text()).toBe(printed);

    const ledger = await sql`select compute_seconds, plan, period, user_id from usage_ledger where run_id = ${run.id}`;
    expect(ledger).toHaveLength(1);
    expect(ledger[0].compute_seconds).toBeCloseTo(run.computeSeconds, 5);
    expect(ledger[0].plan).toBe("lab");
    const [row] = await sql`select engine_version, input_hash, estimated_compute_seconds from runs where id = ${run.id}`;
    expect(row.engine_version).toBe(run.engineVersion);
    expect(row.estimated_compute_seconds).toBeGreaterThan(0);
  });

  it("shows progress rising while it runs and stops within a second or two of cancel, billing what it spent", async () => {
    const created = await post("/api/v1/runs", longInput);
    expect(created.status).toBe(202);
    const id = created.body.id;
    const seen = await waitFor(
      "progress between 0 and 1",
      async () => {
        const r = await get(`/api/v1/runs/${id}`);
        if (finished(r.body.status)) throw new Error(`run ended (${r.body.status}) before progress could be seen; make it longer`);
        return r.body.status === "running" && r.body.progress > 0 && r.body.progress < 1 ? r.body.progress : undefined;
      },
      120_000,
      200,
    );
    expect(seen).toBeGreaterThan(0);

    const cancel = await api(`/api/v1/runs/${id}/cancel`, { method: "POST" });
    expect(cancel.status).toBe(202);
    const run = await waitFor(
      "the run to stop",
      async () => {
        const r = await get(`/api/v1/runs/${id}`);
        return finished(r.body.status) ? r.body : undefined;
      },
      30_000,
      100,
    );
    expect(run.status).toBe("cancelled");
    expect(run.computeSeconds).toBeGreaterThan(0);
    expect(run.result).toBeNull();
    const ledger = await sql`select compute_seconds from usage_ledger where run_id = ${id}`;
    expect(ledger).toHaveLength(1);
    expect(ledger[0].compute_seconds).toBeCloseTo(run.computeSeconds, 5);

    const again = await api(`/api/v1/runs/${id}/cancel`, { method: "POST" });
    expect(again.status).toBe(409);
  });

  it("can use a saved network by id, and lists filter by status, kind and network with cursor pagination", async () => {
    const net = await post("/api/v1/networks", { name: "IT runs list network", network: smallNetwork(4, 4) });
    const ids: string[] = [];
    for (const energyMeV of [0.1, 0.2, 0.3]) {
      const r = await post("/api/v1/runs", { networkId: net.body.id, computation: { kind: "conductance", energyMeV } });
      expect(r.status).toBe(202);
      ids.push(r.body.id);
    }
    await waitFor("the three runs", async () => {
      const list = await get(`/api/v1/runs?networkId=${net.body.id}&status=succeeded`);
      return list.body.runs.length === 3;
    });
    const page1 = await get(`/api/v1/runs?networkId=${net.body.id}&limit=2`);
    expect(page1.body.runs.map((r: { id: string }) => r.id)).toEqual([ids[2], ids[1]]);
    expect(page1.body.runs[0].networkVersion).toBe(1);
    const page2 = await get(`/api/v1/runs?networkId=${net.body.id}&limit=2&cursor=${page1.body.nextCursor}`);
    expect(page2.body.runs.map((r: { id: string }) => r.id)).toEqual([ids[0]]);
    expect(page2.body.nextCursor).toBeNull();
    const byKind = await get(`/api/v1/runs?networkId=${net.body.id}&kind=spectrum`);
    expect(byKind.body.runs).toHaveLength(0);
    const badStatus = await get("/api/v1/runs?status=done");
    expect(badStatus.status).toBe(422);
    expect(badStatus.body.error.message).toMatch(/status/);
    const viewer = await get(`/api/v1/runs/${ids[0]}`, "viewer");
    expect(viewer.status).toBe(200);
    expect(viewer.body.result).not.toBeNull();
  });
});

describe("invalid run submissions get the documented status and write nothing", () => {
  it("bad schema (422), over a plan limit (402), unknown network (404), another workspace's network (404), viewer (403)", async () => {
    const lab = await workspaceId();
    const [student] = await sql`select w.id from workspaces w join memberships m on m.workspace_id = w.id join users u on u.id = m.user_id
      where u.email = 'student@fernhill.example'`;
    const labBefore = await counts(lab);
    const studentBefore = await counts(student.id);

    const badSchema = await post("/api/v1/runs", { network: smallNetwork(), computation: { kind: "conductance", energyMeV: "high" } });
    expect(badSchema.status).toBe(422);
    expect(badSchema.body.error.message).toMatch(/computation\.energyMeV/);

    const badKind = await post("/api/v1/runs", { network: smallNetwork(), computation: { kind: "magic" } });
    expect(badKind.status).toBe(422);
    expect(badKind.body.error.message).toMatch(/computation/);

    const both = await post("/api/v1/runs", {
      network: smallNetwork(),
      networkId: "7d9e6a53-1111-4c1e-8a44-0a2b3c4d5e6f",
      computation: { kind: "conductance" },
    });
    expect(both.status).toBe(422);

    const overPlan = await post("/api/v1/runs", { network: smallNetwork(44, 44), computation: { kind: "conductance" } }, "student");
    expect(overPlan.status).toBe(402);
    expect(overPlan.body.error.message).toContain("over the Free plan's limit of 40 cells per side");

    const bigEnsemble = await post(
      "/api/v1/runs",
      { network: { ...smallNetwork(), disorder: { linkPhaseWidthRad: 1, seed: 1 } }, computation: { kind: "conductance", ensemble: { samples: 51 } } },
      "student",
    );
    expect(bigEnsemble.status).toBe(402);
    expect(bigEnsemble.body.error.message).toContain("over the Free plan's limit of 50 disorder seeds per ensemble");

    const unknown = await post("/api/v1/runs", { networkId: "7d9e6a53-1111-4c1e-8a44-0a2b3c4d5e6f", computation: { kind: "conductance" } });
    expect(unknown.status).toBe(404);
    expect(unknown.body.error.code).toBe("not_found");

    const labNetwork = (await get("/api/v1/networks?limit=1")).body.networks[0].id;
    const foreign = await post("/api/v1/runs", { networkId: labNetwork, computation: { kind: "conductance" } }, "student");
    expect(foreign.status).toBe(404);
    expect(foreign.body.error.message).toContain(labNetwork);

    const viewer = await post("/api/v1/runs", { network: smallNetwork(), computation: { kind: "conductance" } }, "viewer");
    expect(viewer.status).toBe(403);

    const notJson = await api("/api/v1/runs", { method: "POST", body: "{oops", headers: { "content-type": "application/json" } });
    expect(notJson.status).toBe(400);

    // A dry run makes every check and answers the estimate, writing nothing.
    const dry = await post("/api/v1/runs?dryRun=true", { network: smallNetwork(), computation: { kind: "conductance" } });
    expect(dry.status).toBe(200);
    expect(dry.body.dryRun).toBe(true);
    expect(dry.body.estimate.computeSeconds).toBeGreaterThan(0);
    const dryRefused = await post("/api/v1/runs?dryRun=true", { network: smallNetwork(44, 44), computation: { kind: "conductance" } }, "student");
    expect(dryRefused.status).toBe(402);
    const drySweep = await post("/api/v1/sweeps?dryRun=true", {
      network: smallNetwork(),
      computation: { kind: "conductance" },
      axes: [{ parameter: "energyMeV", from: 0, to: 1, points: 7 }],
    });
    expect(drySweep.status).toBe(200);
    expect(drySweep.body.pointCount).toBe(7);

    expect(await counts(lab)).toEqual(labBefore);
    expect(await counts(student.id)).toEqual(studentBefore);
  });

  it("unknown run ids and other workspaces' runs answer 404", async () => {
    expect((await get("/api/v1/runs/3f1c2b7a-0000-4000-8000-000000000000")).status).toBe(404);
    expect((await get("/api/v1/runs/not-an-id")).status).toBe(404);
    const mine = (await get("/api/v1/runs?limit=1")).body.runs[0];
    expect((await get(`/api/v1/runs/${mine.id}`, "student")).status).toBe(404);
  });
});
