// Sweeps through /api/v1/sweeps with the real worker process: a 50-point sweep with rising
// progress and results identical to the command line's, the CSV export, a two-axis grid,
// cancellation midway, and invalid submissions that write nothing.
import { afterAll, describe, expect, it } from "vitest";
import { api } from "../support/services";
import { cliCompute, counts, get, post, smallNetwork, sql, waitFor, workspaceId } from "./runs-support";

afterAll(async () => {
  await sql.end();
});

const finished = (s: string) => ["succeeded", "failed", "cancelled"].includes(s);
const POINTS = 50;

/** Base of the 50-point sweeps: conductance of a small disordered network, a short ensemble per point. */
const base = {
  network: { ...smallNetwork(10, 10), disorder: { linkPhaseWidthRad: 3.0, seed: 5 } },
  computation: { kind: "conductance", energyMeV: 0.4, ensemble: { samples: 6 } },
};

describe("a 50-point sweep", () => {
  it("fans out into 50 runs, shows rising progress and a partial grid, and ends with the command line's results", async () => {
    const created = await post("/api/v1/sweeps", {
      ...base,
      name: "IT conductance versus field",
      axes: [{ parameter: "fieldTesla", from: 0, to: 0.49, points: POINTS }],
    });
    expect(created.status).toBe(202);
    expect(created.body.pointCount).toBe(POINTS);
    expect(created.body.axes[0].values).toHaveLength(POINTS);
    const id = created.body.id;
    const [{ n, est }] = await sql`select count(*)::int as n, sum(estimated_compute_seconds)::float8 as est from runs where sweep_id = ${id}`;
    expect(n).toBe(POINTS);
    expect(created.body.estimate.computeSeconds).toBeCloseTo(est, 2);

    const progress: number[] = [];
    let sawPartialGrid = false;
    const done = await waitFor(
      "the sweep to finish",
      async () => {
        const s = (await get(`/api/v1/sweeps/${id}`)).body;
        progress.push(s.progress);
        const ready = s.grid.quantities ? Object.values(s.grid.quantities as Record<string, (number | null)[]>)[0] : undefined;
        if (s.status === "running" && ready && ready.some((v) => v !== null) && ready.some((v) => v === null)) sawPartialGrid = true;
        return finished(s.status) ? s : undefined;
      },
      170_000,
      250,
    );
    expect(done.status).toBe("succeeded");
    expect(done.counts).toEqual({ queued: 0, running: 0, succeeded: POINTS, failed: 0, cancelled: 0 });
    expect(progress[progress.length - 1]).toBe(1);
    for (let i = 1; i < progress.length; i++) expect(progress[i]).toBeGreaterThanOrEqual(progress[i - 1] - 1e-9);
    expect(progress.some((p) => p > 0 && p < 1)).toBe(true);
    expect(sawPartialGrid).toBe(true);
    expect(done.grid.shape).toEqual([POINTS]);
    expect(done.engineVersion).toEqual(expect.any(String));

    // Every point's result is exactly what the command line prints for that input.
    const picks = [0, 17, POINTS - 1];
    const printed = await Promise.all(
      picks.map((i) => cliCompute({ network: base.network, computation: { ...base.computation, fieldTesla: done.points[i].coordinates.fieldTesla } })),
    );
    for (const [k, i] of picks.entries()) {
      const run = (await get(`/api/v1/runs/${done.points[i].runId}`)).body;
      expect(run.sweepId).toBe(id);
      expect(run.sweepPointIndex).toBe(i);
      expect(run.result).toEqual(JSON.parse(printed[k]));
    }
    const points = await sql`select sweep_point_index, compute_seconds, (input->'computation'->>'fieldTesla')::float8 as field from runs
      where sweep_id = ${id} order by sweep_point_index`;
    expect(points.map((p) => p.sweep_point_index)).toEqual([...Array(POINTS).keys()]);
    points.forEach((p, i) => expect(p.field).toBeCloseTo(done.axes[0].values[i], 12));

    // One ledger row per point, with the seconds the run records.
    const ledger =
      await sql`select l.compute_seconds as billed, r.compute_seconds as spent from usage_ledger l join runs r on r.id = l.run_id where r.sweep_id = ${id}`;
    expect(ledger).toHaveLength(POINTS);
    for (const row of ledger) expect(row.billed).toBeCloseTo(row.spent, 6);
    expect(done.computeSeconds).toBeCloseTo(
      ledger.reduce((s, r) => s + r.billed, 0),
      4,
    );

    const csv = await api(`/api/v1/sweeps/${id}/results.csv`);
    expect(csv.headers.get("content-type")).toMatch(/text\/csv/);
    const lines = (await csv.text()).trim().split("\n");
    const comments = lines.filter((l) => l.startsWith("#"));
    expect(comments.join("\n")).toContain(`engine version: ${done.engineVersion}; input hash (sha256): ${done.inputHash}`);
    expect(done.inputHash).toMatch(/^[0-9a-f]{64}$/);
    expect(comments.join("\n")).toContain("# axis 1: Magnetic field B (T)");
    expect(comments.join("\n")).toContain(`/sweeps/${id}`);
    const rows = lines.filter((l) => !l.startsWith("#"));
    expect(rows[0].split(",").slice(0, 5)).toEqual(["point_index", "field_T", "status", "run_id", "compute_s"]);
    expect(rows[0].split(",").filter((c) => c === "field_T")).toHaveLength(1);
    expect(rows[0].split(",")).toEqual(expect.arrayContaining(["conductance_e2h", "conductance_S", "resistance_ohm"]));
    expect(rows).toHaveLength(POINTS + 1);
    expect(rows[1].split(",")[2]).toBe("succeeded");

    const listed = await get(`/api/v1/runs?sweepId=${id}&limit=200`);
    expect(listed.body.runs).toHaveLength(POINTS);
    const standalone = await get(`/api/v1/runs?limit=200`);
    expect(standalone.body.runs.every((r: { sweepId: string | null }) => r.sweepId === null)).toBe(true);
  });

  it("stops when cancelled midway: no further points are computed", async () => {
    const created = await post("/api/v1/sweeps", {
      ...base,
      computation: { ...base.computation, ensemble: { samples: 12 } },
      axes: [{ parameter: "energyMeV", from: 0, to: 2, points: POINTS }],
    });
    expect(created.status).toBe(202);
    const id = created.body.id;
    await waitFor("a few points done", async () => (await get(`/api/v1/sweeps/${id}`)).body.counts.succeeded >= 3, 120_000, 150);
    const cancel = await api(`/api/v1/sweeps/${id}/cancel`, { method: "POST" });
    expect(cancel.status).toBe(202);
    const [{ at }] = await sql`select cancel_requested_at as at from sweeps where id = ${id}`;
    const stopped = await waitFor(
      "the sweep to stop",
      async () => {
        const s = (await get(`/api/v1/sweeps/${id}`)).body;
        return finished(s.status) ? s : undefined;
      },
      30_000,
      100,
    );
    expect(stopped.status).toBe("cancelled");
    expect(stopped.counts.succeeded).toBeLessThan(POINTS);
    expect(stopped.counts.cancelled).toBeGreaterThan(0);
    expect(stopped.counts.queued + stopped.counts.running).toBe(0);

    // Give any worker the chance to misbehave, then check nothing moved.
    await new Promise((r) => setTimeout(r, 3000));
    const later = (await get(`/api/v1/sweeps/${id}`)).body;
    expect(later.counts).toEqual(stopped.counts);
    const startedAfter = await sql`select count(*)::int as n from runs where sweep_id = ${id} and started_at > ${at}`;
    expect(startedAfter[0].n).toBe(0);
    // Points still queued at the cancel never started: each ends cancelled, with no compute and no charge.
    const neverStarted = await sql`select r.status, r.compute_seconds, (select count(*)::int from usage_ledger l where l.run_id = r.id) as charged
      from runs r where r.sweep_id = ${id} and r.started_at is null`;
    expect(neverStarted.length).toBeGreaterThan(0);
    expect(neverStarted.length).toBeLessThanOrEqual(stopped.counts.cancelled);
    for (const p of neverStarted) {
      expect(p.status).toBe("cancelled");
      expect(p.compute_seconds ?? 0).toBe(0);
      expect(p.charged).toBe(0);
    }
    // Billed: every succeeded point, and cancelled points that had spent compute; nothing twice.
    const [{ billed, spent }] = await sql`select
      (select count(*)::int from usage_ledger l join runs r on r.id = l.run_id where r.sweep_id = ${id}) as billed,
      (select count(*)::int from runs where sweep_id = ${id} and status in ('succeeded', 'cancelled') and compute_seconds > 0) as spent`;
    expect(billed).toBe(spent);
    expect(billed).toBeGreaterThanOrEqual(stopped.counts.succeeded);
    expect((await api(`/api/v1/sweeps/${id}/cancel`, { method: "POST" })).status).toBe(409);
  });

  it("a two-axis grid over a network path and a computation field", async () => {
    const created = await post("/api/v1/sweeps", {
      network: smallNetwork(4, 4),
      computation: { kind: "conductance" },
      axes: [
        { parameter: "node.forward", values: [0.4, 0.7] },
        { parameter: "energyMeV", from: 0, to: 1, points: 3 },
      ],
    });
    expect(created.status).toBe(202);
    const s = await waitFor("the grid", async () => {
      const b = (await get(`/api/v1/sweeps/${created.body.id}`)).body;
      return finished(b.status) ? b : undefined;
    });
    expect(s.status).toBe("succeeded");
    // No name given: the default is in words, with units.
    expect(s.name).toBe("Conductance versus forward probability and energy (meV)");
    expect(s.grid.shape).toEqual([2, 3]);
    expect(s.points[4].coordinates).toEqual({ "node.forward": 0.7, energyMeV: 0.5 });
    const run = (await get(`/api/v1/runs/${s.points[4].runId}`)).body;
    expect(run.input.network.node.forward).toBeCloseTo(0.7, 12);
    // Changing node.forward keeps the left:right ratio (here 1:1).
    expect(run.input.network.node.left).toBeCloseTo(0.15, 12);
    expect(run.input.network.node.right).toBeCloseTo(0.15, 12);
  });
});

describe("invalid sweep submissions get the documented status and write nothing", () => {
  it("unknown parameter or bad axes (422), over the plan's points (402), a point the engine refuses (422), another workspace's network (404)", async () => {
    const lab = await workspaceId();
    const before = await counts(lab);
    const unknownParameter = await post("/api/v1/sweeps", { ...base, axes: [{ parameter: "colourIndex", values: [1, 2] }] });
    expect(unknownParameter.status).toBe(422);
    expect(unknownParameter.body.error.message).toMatch(/colourIndex/);
    const noAxes = await post("/api/v1/sweeps", { ...base, axes: [] });
    expect(noAxes.status).toBe(422);
    expect(noAxes.body.error.message).toMatch(/axes/);
    const badPoint = await post("/api/v1/sweeps", {
      network: smallNetwork(4, 4),
      computation: { kind: "conductance" },
      axes: [{ parameter: "node.forward", values: [0.5, 0.05] }],
    });
    expect(badPoint.status).toBe(422);
    // in words: which values, why, and what is allowed (the scan builder's sentence); the first point's engine text in the details
    expect(badPoint.body.error.message).toMatch(
      /^Axis 1, forward probability: 1 of 2 values \(0\.05\) is not reachable: no unitary node has them .*keeps left and right turning in the network's ratio 0\.5 : 0\.5; at that setting the forward probability must lie between 0\.111111 and 1\.$/,
    );
    expect(badPoint.body.error.message).not.toMatch(/sqrt\(|network\.node/);
    expect(badPoint.body.error.details).toMatchObject({
      field: "axes.0",
      reason: "node",
      refusedValues: [0.05],
      nearestValidAxis: { parameter: "node.forward", values: [0.5] },
    });
    expect(badPoint.body.error.details.pointError).toMatch(/^scan point 1 \(node\.forward = 0\.05\): network\.node\.forward: unreachable node probabilities/);
    // a local density of states map over field on a periodic sample (a torus): only whole flux quanta, refused before anything runs
    const torus = await post("/api/v1/sweeps?dryRun=true", {
      network: smallNetwork(4, 4),
      computation: { kind: "ldos", energyMeV: 1 },
      axes: [{ parameter: "fieldTesla", from: 0, to: 1, points: 6 }],
    });
    expect(torus.status).toBe(422);
    expect(torus.body.error.message).toMatch(
      /^Axis 1, perpendicular magnetic field: 5 of 6 values \(0\.2 T, 0\.4 T, 0\.6 T, 0\.8 T, 1 T\) are not allowed: .*a torus/,
    );
    expect(torus.body.error.details).toMatchObject({ reason: "torusField", refusedValues: [0.2, 0.4, 0.6, 0.8, 1] });
    const snapped = torus.body.error.details.nearestValidAxis;
    const dry = await post("/api/v1/sweeps?dryRun=true", { network: smallNetwork(4, 4), computation: { kind: "ldos", energyMeV: 1 }, axes: [snapped] });
    expect(dry.status).toBe(200);
    expect(dry.body.pointCount).toBe(6);
    const labNetwork = (await get("/api/v1/networks?limit=1")).body.networks[0].id;
    const foreign = await post(
      "/api/v1/sweeps",
      { networkId: labNetwork, computation: { kind: "conductance" }, axes: [{ parameter: "energyMeV", values: [0, 1] }] },
      "student",
    );
    expect(foreign.status).toBe(404);
    expect(await counts(lab)).toEqual(before);

    const [student] = await sql`select w.id from workspaces w join memberships m on m.workspace_id = w.id join users u on u.id = m.user_id
      where u.email = 'student@fernhill.example'`;
    const studentBefore = await counts(student.id);
    const tooMany = await post(
      "/api/v1/sweeps",
      { network: smallNetwork(4, 4), computation: { kind: "conductance" }, axes: [{ parameter: "energyMeV", from: 0, to: 1, points: 101 }] },
      "student",
    );
    expect(tooMany.status).toBe(402);
    expect(tooMany.body.error.message).toContain("over the Free plan's limit of 100 points per scan");
    expect(tooMany.body.error.details).toMatchObject({ limit: "maxSweepPoints", value: 100, requested: 101 });
    expect(await counts(student.id)).toEqual(studentBefore);

    expect((await get("/api/v1/sweeps/3f1c2b7a-0000-4000-8000-000000000000")).status).toBe(404);
  });
});
