// The OpenAPI document (src/server/openapi/document.ts) against the route files: every route file
// under src/app/api/v1 appears with every method it exports, and nothing else; the document is
// OpenAPI 3.1 in shape, every $ref resolves, and every schema in it compiles with ajv (draft
// 2020-12) as the integration tests' answer check uses it.
import { describe, expect, it } from "vitest";
import { openApiDocument } from "@/server/openapi/document";
import { endpointsOf, routeFiles } from "../../../support/route-files";
import { answerValidator } from "../../../support/openapi";

type Json = Record<string, unknown>;
const doc = openApiDocument() as Json & { paths: Record<string, Record<string, Json>>; components: Json & { schemas: Record<string, Json> } };
const METHODS = ["get", "put", "post", "delete", "options", "head", "patch", "trace"];
const operations = Object.entries(doc.paths).flatMap(([path, item]) =>
  Object.entries(item)
    .filter(([m]) => METHODS.includes(m))
    .map(([m, op]) => ({ key: `${m.toUpperCase()} ${path}`, op })),
);

function refsIn(value: unknown, out: string[] = []): string[] {
  if (Array.isArray(value)) value.forEach((v) => refsIn(v, out));
  else if (value && typeof value === "object")
    for (const [k, v] of Object.entries(value)) {
      if (k === "$ref" && typeof v === "string") out.push(v);
      else refsIn(v, out);
    }
  return out;
}
function resolve(ref: string): unknown {
  if (!ref.startsWith("#/")) return undefined;
  return ref
    .slice(2)
    .split("/")
    .map((p) => p.replaceAll("~1", "/").replaceAll("~0", "~"))
    .reduce<unknown>((node, key) => (node && typeof node === "object" ? (node as Json)[key] : undefined), doc);
}

describe("OpenAPI document", () => {
  it("has every method of every route file under src/app/api/v1, and no operation without a handler", () => {
    const served = routeFiles()
      .flatMap(endpointsOf)
      .map((e) => `${e.method} ${e.path}`);
    expect(served.length).toBeGreaterThan(40);
    expect(served).toContain("GET /api/v1/openapi.json");
    expect(served.filter((k) => !operations.some((o) => o.key === k))).toEqual([]);
    expect(operations.map((o) => o.key).filter((k) => !served.includes(k))).toEqual([]);
  });

  it("is OpenAPI 3.1 in shape: version, info, paths, components, an answer and a summary for every operation, unique operation ids", () => {
    expect(doc.openapi).toBe("3.1.0");
    expect(doc.info).toMatchObject({ title: expect.any(String), version: expect.any(String) });
    expect(Object.keys(doc.components.schemas).length).toBeGreaterThan(50);
    for (const { key, op } of operations) {
      expect(op.summary, key).toEqual(expect.any(String));
      expect(Object.keys(op.responses as Json).length, key).toBeGreaterThan(0);
      for (const status of Object.keys(op.responses as Json)) expect(status, key).toMatch(/^[1-5]\d\d$/);
    }
    const ids = operations.map((o) => o.op.operationId);
    expect(new Set(ids).size).toBe(ids.length);
    for (const name of Object.keys(doc.components.schemas)) expect(name).toMatch(/^[A-Za-z0-9._-]+$/);
  });

  it("resolves every $ref", () => {
    const refs = [...new Set(refsIn(doc))];
    expect(refs.length).toBeGreaterThan(50);
    expect(refs.filter((r) => resolve(r) === undefined)).toEqual([]);
  });

  it("declares every path parameter of every template, and the security of each operation", () => {
    for (const { key, op } of operations) {
      const names = [...key.matchAll(/\{(\w+)\}/g)].map((m) => m[1]);
      const declared = ((op.parameters as Json[]) ?? []).filter((p) => p.in === "path").map((p) => p.name);
      expect(declared, key).toEqual(names);
    }
    expect(doc.security).toEqual([{ apiToken: [] }, { session: [] }]);
    const publicOps = operations.filter((o) => Array.isArray(o.op.security) && (o.op.security as unknown[]).length === 0).map((o) => o.key);
    expect(publicOps.sort()).toEqual(["GET /api/v1/health", "GET /api/v1/openapi.json"]);
    const runs = doc.paths["/api/v1/runs"].post as Json & { responses: Json; parameters: Json[] };
    expect(Object.keys(runs.responses)).toEqual(expect.arrayContaining(["200", "202", "401", "402", "403", "422", "429"]));
    expect(runs.parameters.map((p) => p.name)).toContain("dryRun");
  });

  it("compiles every schema with ajv (draft 2020-12), and the answer check accepts a right body and rejects a wrong one", () => {
    const v = answerValidator(doc);
    for (const name of Object.keys(doc.components.schemas)) expect(() => v.ajv.getSchema(`triskel-openapi#/components/schemas/${name}`), name).not.toThrow();
    const estimate = { computeSeconds: 1.5, costUsd: 0 };
    const created = { id: "r1", status: "queued", estimate, kind: "conductance", inputHash: "h", createdAt: "2026-01-01T00:00:00Z" };
    expect(v.check("POST", "/api/v1/runs", 202, "application/json", created).problems).toEqual([]);
    const wrong = v.check("POST", "/api/v1/runs", 202, "application/json", { ...created, status: "lost", extra: 1 });
    expect(wrong.route).toBe("POST /api/v1/runs");
    expect(wrong.problems.join("\n")).toMatch(/must be equal to one of the allowed values|additional properties/);
    expect(v.check("GET", "/api/v1/runs/abc", 404, "application/json", { error: { code: "not_found", message: "No run." } }).problems).toEqual([]);
    expect(v.check("GET", "/api/v1/runs/abc", 404, "application/json", { message: "No run." }).problems.length).toBeGreaterThan(0);
    expect(v.check("GET", "/api/v1/runs", 418, "application/json", {}).problems).toEqual(["status 418 is not documented for GET /api/v1/runs"]);
    expect(v.routeOf("POST", "/api/v1/workspace/invitations/accept")).toBe("POST /api/v1/workspace/invitations/accept");
    expect(v.routeOf("DELETE", "/api/v1/workspace/invitations/5")).toBe("DELETE /api/v1/workspace/invitations/{id}");
    expect(v.routeOf("GET", "/api/v1/nowhere")).toBeNull();
    expect(v.checkedCount()).toBe(4);
  });

  it("takes request bodies from the handlers' zod schemas and the engine's", () => {
    const body = (path: string, method: string) => (doc.paths[path][method].requestBody as Json).content as Record<string, Json>;
    const runBody = body("/api/v1/runs", "post")["application/json"].schema as Json & { properties: Record<string, Json> };
    expect(runBody.properties.network).toEqual({ $ref: "#/components/schemas/NetworkDefinition" });
    expect(runBody.properties.computation).toEqual({ $ref: "#/components/schemas/ComputationDefinition" });
    expect(runBody.additionalProperties).toBe(false);
    const upload = body("/api/v1/datasets", "post")["multipart/form-data"].schema as Json & { required: string[] };
    expect(upload.required).toEqual(expect.arrayContaining(["file", "name", "xColumn", "xUnit", "yColumn", "yUnit"]));
    const seats = body("/api/v1/billing/seats", "put")["application/json"].schema as Json & { properties: Record<string, Json> };
    expect(seats.properties.seats).toMatchObject({ type: "integer", minimum: 1 });
  });
});
