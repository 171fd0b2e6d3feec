// API tokens (/api/v1/tokens): shown once, stored hashed, never listed with secret or hash, role
// no higher than the member's, revocation takes effect at once, other workspaces see nothing.
import { createHash } from "node:crypto";
import postgres from "postgres";
import { afterAll, describe, expect, it } from "vitest";
import { api, appUrl, databaseUrl } from "../support/services";
import { sessionFetch } from "../support/session";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });
afterAll(async () => {
  await sql.end();
});

const sha256 = (s: string) => createHash("sha256").update(s).digest("hex");
const bearer = (secret: string) => ({ authorization: `Bearer ${secret}` });

describe("creating a token", () => {
  it("answers 201 with the secret once; the database holds only its hash; lists never show either", async () => {
    const res = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "fit script" } });
    expect(res.status).toBe(201);
    const body = await res.json();
    expect(body.secret).toMatch(/^trk_[A-Za-z0-9_-]{40,}$/);
    expect(body.token).toMatchObject({ name: "fit script", role: "researcher", revokedAt: null, lastUsedAt: null });
    expect(JSON.stringify(body.token)).not.toContain(body.secret);
    expect(JSON.stringify(body)).not.toContain(sha256(body.secret));
    expect(body.secret.startsWith(body.token.prefix)).toBe(true);

    const [row] = await sql`select token_hash, prefix from api_tokens where id = ${body.token.id}`;
    expect(row.token_hash).toBe(sha256(body.secret));
    expect(JSON.stringify(row)).not.toContain(body.secret);

    const list = await api("/api/v1/tokens", { as: "researcher" });
    const text = await list.text();
    expect(list.status).toBe(200);
    expect(text).toContain(body.token.id);
    expect(text).not.toContain(body.secret);
    expect(text).not.toContain(row.token_hash);
    expect(text).not.toMatch(/hash/i);
  });

  it("the new token works at once, records its last use, and stops working when revoked", async () => {
    const { token, secret } = await (await api("/api/v1/tokens", { method: "POST", as: "owner", json: { name: "short-lived", role: "viewer" } })).json();
    const who = await fetch(new URL("/api/v1/workspace", appUrl()), { headers: bearer(secret) });
    expect(who.status).toBe(200);
    expect((await who.json()).member.role).toBe("viewer");
    const [used] = await sql`select last_used_at from api_tokens where id = ${token.id}`;
    expect(used.last_used_at).not.toBeNull();

    const revoked = await api(`/api/v1/tokens/${token.id}`, { method: "DELETE", as: "owner" });
    expect(revoked.status).toBe(200);
    expect((await revoked.json()).token.revokedAt).not.toBeNull();
    const after = await fetch(new URL("/api/v1/workspace", appUrl()), { headers: bearer(secret) });
    expect(after.status).toBe(401);
    expect((await after.json()).error.message).toMatch(/revoked/);
  });

  it("a token never gets more rights than its member (viewers: read-only tokens)", async () => {
    const viewerAsks = await api("/api/v1/tokens", { method: "POST", as: "viewer", json: { name: "x", role: "researcher" } });
    expect(viewerAsks.status).toBe(403);
    const err = (await viewerAsks.json()).error;
    expect(err.message).toMatch(/^role:/);
    expect(err.details.allowed).toEqual(["viewer"]);

    const researcherAsks = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "x", role: "owner" } });
    expect(researcherAsks.status).toBe(403);
    const billingAsks = await api("/api/v1/tokens", { method: "POST", as: "billingAdmin", json: { name: "x", role: "researcher" } });
    expect(billingAsks.status).toBe(403);

    const viewerOk = await api("/api/v1/tokens", { method: "POST", as: "viewer", json: { name: "read only" } });
    expect(viewerOk.status).toBe(201);
    expect((await viewerOk.json()).token.role).toBe("viewer");
  });

  it("a viewer-role token of an Owner cannot do what a Viewer cannot (invite)", async () => {
    const { secret } = await (await api("/api/v1/tokens", { method: "POST", as: "owner", json: { name: "owner read-only", role: "viewer" } })).json();
    const res = await fetch(new URL("/api/v1/workspace/members", appUrl()), {
      method: "POST",
      headers: { ...bearer(secret), "content-type": "application/json" },
      body: JSON.stringify({ email: "nobody@example.org", role: "viewer" }),
    });
    expect(res.status).toBe(403);
  });

  it("names the field and what is allowed for bad input", async () => {
    const empty = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "  " } });
    expect(empty.status).toBe(422);
    expect((await empty.json()).error.message).toMatch(/^name: must not be empty/);
    const role = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "x", role: "admin" } });
    expect(role.status).toBe(422);
    expect((await role.json()).error.message).toMatch(/^role: must be one of owner, billing_admin, researcher, viewer/);
    const extra = await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "x", hash: "abc" } });
    expect(extra.status).toBe(422);
    const notJson = await api("/api/v1/tokens", { method: "POST", as: "researcher", body: "{", headers: { "content-type": "application/json" } });
    expect(notJson.status).toBe(400);
  });

  it("a browser session can create and list tokens too", async () => {
    const res = await sessionFetch("researcher2", "/api/v1/tokens", { method: "POST", json: { name: "from the browser" } });
    expect(res.status).toBe(201);
    const { token } = await res.json();
    expect(token.role).toBe("researcher");
    const list = await sessionFetch("researcher2", "/api/v1/tokens");
    expect((await list.json()).tokens.map((t: { id: string }) => t.id)).toContain(token.id);
  });
});

describe("tokens of other members and other workspaces", () => {
  it("cannot be listed or revoked by anyone else (404, never data)", async () => {
    const { token } = await (await api("/api/v1/tokens", { method: "POST", as: "researcher", json: { name: "mine" } })).json();
    const ownerList = await (await api("/api/v1/tokens", { as: "owner" })).json();
    expect(ownerList.tokens.map((t: { id: string }) => t.id)).not.toContain(token.id);
    const byStudent = await api(`/api/v1/tokens/${token.id}`, { method: "DELETE", as: "student" });
    expect(byStudent.status).toBe(404);
    const byViewer = await api(`/api/v1/tokens/${token.id}`, { method: "DELETE", as: "viewer" });
    expect(byViewer.status).toBe(404);
    const [row] = await sql`select revoked_at from api_tokens where id = ${token.id}`;
    expect(row.revoked_at).toBeNull();
    const bogus = await api("/api/v1/tokens/not-a-uuid", { method: "DELETE", as: "researcher" });
    expect(bogus.status).toBe(404);
  });
});
