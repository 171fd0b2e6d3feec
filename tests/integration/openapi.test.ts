// GET /api/v1/openapi.json on the running app: public, OpenAPI 3.1, every route of the contract;
// the answer check of api() (tests/support/services.ts) really runs and refuses a wrong body; the
// manual's reference page lists the paths from the same document.
import { describe, expect, it } from "vitest";
import { FILE_ROUTES, JSON_ROUTES } from "@/shared/api";
import { api, appUrl, checkAnswer, checkedAnswers, documentValidator } from "../support/services";

type Doc = { openapi: string; paths: Record<string, Record<string, { responses: Record<string, unknown> }>> };

describe("the API document", () => {
  it("is served without credentials as JSON: OpenAPI 3.1.0 with every route of the contract", async () => {
    const res = await fetch(new URL("/api/v1/openapi.json", appUrl()));
    expect(res.status).toBe(200);
    expect(res.headers.get("content-type")).toMatch(/^application\/json/);
    const doc = (await res.json()) as Doc;
    expect(doc.openapi).toBe("3.1.0");
    const ops = Object.entries(doc.paths).flatMap(([p, item]) => Object.keys(item).map((m) => `${m.toUpperCase()} ${p}`));
    const routes = [...new Set([...JSON_ROUTES, ...FILE_ROUTES].map((r) => r.replace(/\?.*$/, "")))];
    expect(routes.filter((r) => !ops.includes(r))).toEqual([]);
    expect(ops.length).toBe(routes.length);
    // A bad token is not looked at: the document is public.
    const withBadToken = await fetch(new URL("/api/v1/openapi.json", appUrl()), { headers: { authorization: "Bearer trk_not_a_token" } });
    expect(withBadToken.status).toBe(200);
  });

  it("checks every JSON answer of api(): right answers pass and are counted, a wrong body fails naming the route, the status and the fields", async () => {
    const before = await checkedAnswers();
    const runs = await api("/api/v1/runs?limit=2");
    expect(runs.status).toBe(200);
    const list = (await runs.json()) as { runs: Record<string, unknown>[]; nextCursor: string | null };
    expect((await api("/api/v1/workspace")).status).toBe(200);
    expect((await api("/api/v1/runs/00000000-0000-4000-8000-000000000000")).status).toBe(404);
    expect((await api("/api/v1/runs", { as: null })).status).toBe(401);
    expect(await checkedAnswers()).toBe(before + 4);

    const v = await documentValidator();
    const wrong = { ...list, runs: [{ ...(list.runs[0] ?? {}), status: "lost", progress: "half" }] };
    const c = v.check("GET", "/api/v1/runs", 200, "application/json", wrong);
    expect(c.route).toBe("GET /api/v1/runs");
    expect(c.problems.length).toBeGreaterThan(0);
    const fake = new Response(JSON.stringify(wrong), { status: 200, headers: { "content-type": "application/json" } });
    await expect(checkAnswer("GET", "/api/v1/runs?limit=2", fake)).rejects.toThrow(/GET \/api\/v1\/runs, status 200[\s\S]*\/runs\/0/);
    const undocumented = new Response(JSON.stringify({ error: { code: "teapot", message: "no" } }), {
      status: 418,
      headers: { "content-type": "application/json" },
    });
    await expect(checkAnswer("GET", "/api/v1/runs", undocumented)).rejects.toThrow(/status 418 is not documented for GET \/api\/v1\/runs/);
    const notAnError = new Response(JSON.stringify({ message: "no" }), { status: 404, headers: { "content-type": "application/json" } });
    await expect(checkAnswer("GET", "/api/v1/runs/x", notAnError)).rejects.toThrow(/GET \/api\/v1\/runs\/\{id\}, status 404/);
  });

  it("the manual's API reference lists the paths, methods and answers from the document, and links to it", async () => {
    const res = await fetch(new URL("/manual/api", appUrl()));
    expect(res.status).toBe(200);
    const html = await res.text();
    for (const path of [
      "/api/v1/runs",
      "/api/v1/sweeps/{id}/results.csv",
      "/api/v1/fits/{id}/cancel",
      "/api/v1/workspace/members/{userId}",
      "/api/v1/openapi.json",
    ])
      expect(html, path).toContain(path);
    expect(html).toContain('href="/api/v1/openapi.json"');
    expect(html).toContain("Start a calculation");
    expect(html).toMatch(/dryRun/);
    const manual = await (await fetch(new URL("/manual", appUrl()))).text();
    expect(manual).toContain('href="/manual/api"');
  });
});
