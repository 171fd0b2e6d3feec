// Saved, versioned networks through /api/v1/networks (real web app and database).
import { afterAll, describe, expect, it } from "vitest";
import { api } from "../support/services";
import { counts, get, json, post, smallNetwork, sql, waitFor, workspaceId } from "./runs-support";

afterAll(async () => {
  await sql.end();
});

describe("networks", () => {
  it("creates version 1, makes a new version on PUT and PATCH, and reads any version", async () => {
    const created = await post("/api/v1/networks", { name: "IT versioned network", network: smallNetwork(4, 4) });
    expect(created.status).toBe(201);
    expect(created.body.version).toBe(1);
    expect(created.body.network.size).toEqual({ columns: 4, rows: 4 });
    const id = created.body.id;

    const put = await api(`/api/v1/networks/${id}`, { method: "PUT", json: { network: smallNetwork(6, 4) } });
    expect(put.status).toBe(200);
    expect((await json(put)).version).toBe(2);

    const patch = await api(`/api/v1/networks/${id}`, {
      method: "PATCH",
      json: { name: "IT versioned network (renamed)", network: { node: { forward: 0.5, left: 0.25, right: 0.25 } } },
    });
    const patched = await json(patch);
    expect(patch.status).toBe(200);
    expect(patched.version).toBe(3);
    expect(patched.name).toBe("IT versioned network (renamed)");
    expect(patched.network.node.forward).toBe(0.5);
    expect(patched.network.size).toEqual({ columns: 6, rows: 4 });

    const v1 = await get(`/api/v1/networks/${id}?version=1`);
    expect(v1.body.version).toBe(1);
    expect(v1.body.network.size).toEqual({ columns: 4, rows: 4 });
    const current = await get(`/api/v1/networks/${id}`);
    expect(current.body.currentVersion).toBe(3);
    expect(current.body.versions.map((v: { version: number }) => v.version)).toEqual([1, 2, 3]);

    const missing = await get(`/api/v1/networks/${id}?version=9`);
    expect(missing.status).toBe(404);
  });

  it("lists newest first with cursor pagination", async () => {
    const first = await get("/api/v1/networks?limit=2");
    expect(first.status).toBe(200);
    expect(first.body.networks).toHaveLength(2);
    expect(first.body.nextCursor).toEqual(expect.any(String));
    const second = await get(`/api/v1/networks?limit=2&cursor=${first.body.nextCursor}`);
    const ids = new Set(first.body.networks.map((n: { id: string }) => n.id));
    for (const n of second.body.networks) expect(ids.has(n.id)).toBe(false);
    const bad = await get("/api/v1/networks?cursor=nonsense");
    expect(bad.status).toBe(400);
    expect(bad.body.error.message).toMatch(/cursor/);
  });

  it("refuses an invalid network with 422 naming the field, and writes nothing", async () => {
    const ws = await workspaceId();
    const before = await counts(ws);
    const bad = await post("/api/v1/networks", { name: "IT bad", network: { ...smallNetwork(), node: { forward: 0.05, left: 0.475, right: 0.475 } } });
    expect(bad.status).toBe(422);
    expect(bad.body.error.code).toBe("invalid_input");
    expect(bad.body.error.message).toMatch(/network\.node/);
    const unknownField = await post("/api/v1/networks", { name: "IT bad", network: { ...smallNetwork(), colour: "red" } });
    expect(unknownField.status).toBe(422);
    expect(unknownField.body.error.message).toMatch(/colour/);
    const noName = await post("/api/v1/networks", { network: smallNetwork() });
    expect(noName.status).toBe(422);
    expect(noName.body.error.message).toMatch(/name/);
    expect(await counts(ws)).toEqual(before);
  });

  it("refuses a network over the Free plan's size with 402 naming the limit", async () => {
    const res = await post("/api/v1/networks", { name: "IT too big", network: smallNetwork(42, 42) }, "student");
    expect(res.status).toBe(402);
    expect(res.body.error.message).toContain("over the Free plan's limit of 40 cells per side");
    expect(res.body.error.details).toMatchObject({ limit: "maxCellsPerSide", value: 40 });
  });

  it("lets a viewer read but not create", async () => {
    const res = await post("/api/v1/networks", { name: "IT viewer", network: smallNetwork() }, "viewer");
    expect(res.status).toBe(403);
    expect((await get("/api/v1/networks", "viewer")).status).toBe(200);
  });

  it("hides another workspace's networks (404)", async () => {
    const lab = await get("/api/v1/networks?limit=1");
    const id = lab.body.networks[0].id;
    const other = await get(`/api/v1/networks/${id}`, "student");
    expect(other.status).toBe(404);
    const del = await api(`/api/v1/networks/${id}`, { method: "DELETE", as: "student" });
    expect(del.status).toBe(404);
  });

  it("answers 409 to delete while a run uses the network, 204 once none does", async () => {
    const created = await post("/api/v1/networks", { name: "IT in use", network: smallNetwork(4, 4) });
    const id = created.body.id;
    const run = await post("/api/v1/runs", { networkId: id, computation: { kind: "conductance", energyMeV: 1 } });
    expect(run.status).toBe(202);
    const del = await api(`/api/v1/networks/${id}`, { method: "DELETE" });
    expect(del.status).toBe(409);
    const body = await json(del);
    expect(body.error.code).toBe("conflict");
    expect(body.error.details.usedBy.runs).toBe(1);
    await waitFor("the run to finish", async () => ["succeeded", "failed"].includes((await get(`/api/v1/runs/${run.body.id}`)).body.status));

    const unused = await post("/api/v1/networks", { name: "IT unused", network: smallNetwork(4, 4) });
    const ok = await api(`/api/v1/networks/${unused.body.id}`, { method: "DELETE" });
    expect(ok.status).toBe(204);
    expect((await get(`/api/v1/networks/${unused.body.id}`)).status).toBe(404);
  });
});
