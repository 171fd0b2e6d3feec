// POST /api/v1/fits?dryRun=true: the fit form's estimate before "Start the fit". Every check of a
// real submission, the stages as the fitter would run them, the cost counted from them, and
// nothing written.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { api } from "../support/services";
import { LK07_COMPUTATION, LK07_FIT_START, LK07_NETWORK } from "../../src/shared/lk07";

let datasetId = "";
beforeAll(async () => {
  const list = await (await api("/api/v1/datasets")).json();
  datasetId = list.items.find((d: { name: string }) => d.name === "LK-07 magnetoconductance (synthetic)").id;
});
afterAll(async () => {
  const { closeDb } = await import("../../src/server/db");
  await closeDb();
});

const body = (options?: Record<string, number>) => ({
  datasetId,
  network: LK07_NETWORK,
  computation: LK07_COMPUTATION,
  sweepParameter: "fieldTesla",
  fit: LK07_FIT_START,
  ...(options ? { options } : {}),
});

async function fitCount(): Promise<number> {
  const list = await (await api(`/api/v1/fits?datasetId=${datasetId}&limit=100`)).json();
  return list.items.length;
}

describe("fit dry run", () => {
  it("answers the estimate and the stages and writes nothing", async () => {
    const before = await fitCount();
    const res = await api("/api/v1/fits?dryRun=true", { method: "POST", json: body() });
    expect(res.status).toBe(200);
    const d = await res.json();
    expect(d.dryRun).toBe(true);
    // two fitted parameters: 8k + 8 = 24 global points, 3 descents, 40 iterations at most, profiles of 9 points refitted in 2 iterations
    expect(d.stages).toEqual({ globalStarts: 24, localStarts: 3, maxIterations: 40, profilePoints: 9, profileIterations: 2 });
    expect(d.points).toBe(120);
    // globalStarts + multiStart x 8 x (k + 1) + 2k + 1 model curves, then k x points x (1 + iterations x k) for the profiles;
    // one engine computation per point
    expect(d.modelCurves).toBe(24 + 3 * 8 * 3 + 5 + 2 * 9 * (1 + 2 * 2));
    expect(d.estimate.engineEvaluations).toBe(d.modelCurves * 120);
    expect(d.estimate.computeSeconds).toBeGreaterThan(0);
    expect(d.estimate.costUsd).toBeGreaterThanOrEqual(0);
    expect(d.inputHash).toMatch(/^[0-9a-f]{64}$/);
    expect(await fitCount()).toBe(before);
  });

  it("counts the user's number of global starts in the cost; 0 turns the global stage off", async () => {
    const small = await (await api("/api/v1/fits?dryRun=true", { method: "POST", json: body({ globalStarts: 8, multiStart: 2 }) })).json();
    const large = await (await api("/api/v1/fits?dryRun=true", { method: "POST", json: body({ globalStarts: 64, multiStart: 2 }) })).json();
    expect(small.stages).toMatchObject({ globalStarts: 8, localStarts: 2 });
    expect(large.modelCurves - small.modelCurves).toBe(56);
    expect(large.estimate.computeSeconds / small.estimate.computeSeconds).toBeCloseTo(large.modelCurves / small.modelCurves, 2);
    const off = await (await api("/api/v1/fits?dryRun=true", { method: "POST", json: body({ globalStarts: 0 }) })).json();
    // local only: one descent from the initial values, which also evaluates its start
    expect(off.stages).toEqual({ globalStarts: 0, localStarts: 1, maxIterations: 40, profilePoints: 9, profileIterations: 2 });
    expect(off.modelCurves).toBe(1 + 8 * 3 + 5 + 2 * 9 * (1 + 2 * 2));
  });

  it("makes the checks of a real submission: 422 with the field, 403 for a viewer, 404 across workspaces, 400 for a bad flag", async () => {
    const bad = await api("/api/v1/fits?dryRun=true", {
      method: "POST",
      json: { ...body(), fit: [{ parameter: "node.forward", initial: 0.95, min: 0.2, max: 0.9 }] },
    });
    expect(bad.status).toBe(422);
    expect((await bad.json()).error.message).toMatch(/fit\.0\.initial/);
    expect((await api("/api/v1/fits?dryRun=true", { method: "POST", json: body(), as: "viewer" })).status).toBe(403);
    expect((await api("/api/v1/fits?dryRun=true", { method: "POST", json: body(), as: "student" })).status).toBe(404);
    // bounds valid one by one but not together: node.forward up to 0.98 with a forward spread up to 0.2 leaves [0, 1]
    const together = await api("/api/v1/fits?dryRun=true", {
      method: "POST",
      json: {
        ...body(),
        fit: [
          { parameter: "node.forward", initial: 0.6, min: 0.3, max: 0.98 },
          { parameter: "disorder.forwardSpread", initial: 0.05, min: 0, max: 0.2 },
        ],
      },
    });
    expect(together.status).toBe(422);
    const e = (await together.json()).error;
    expect(e.details.field).toBe("fit");
    expect(e.message).toMatch(/bounds together are not a valid model at node\.forward = 0\.98, disorder\.forwardSpread = 0\.2.*narrow the bounds/);
    // the profile options: counted in the cost, 0 turns them off, 1 is refused in words
    const noProfiles = await (await api("/api/v1/fits?dryRun=true", { method: "POST", json: body({ profilePoints: 0 }) })).json();
    expect(noProfiles.stages.profilePoints).toBe(0);
    expect(noProfiles.modelCurves).toBe(24 + 3 * 8 * 3 + 5);
    const one = await api("/api/v1/fits?dryRun=true", { method: "POST", json: body({ profilePoints: 1 }) });
    expect(one.status).toBe(422);
    expect((await one.json()).error.message).toMatch(/at least 2 points/);
    const flag = await api("/api/v1/fits?dryRun=maybe", { method: "POST", json: body() });
    expect(flag.status).toBe(400);
    expect((await flag.json()).error.message).toMatch(/dryRun/);
  });
});
