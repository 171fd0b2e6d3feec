// The API contract (src/shared/api/routes.ts) against the route files: every JSON endpoint is in
// the table and answers through reply()/noContent() with its own name, so the compiler checks its
// body against the type the browser reads; the browser calls the API only through src/lib/api.ts.
import { readFileSync } from "node:fs";
import { join, relative } from "node:path";
import { describe, expect, it } from "vitest";
import { FILE_ROUTES, JSON_ROUTES, routeRequest } from "@/shared/api";
import { SRC as root, endpointsOf, files, routeFiles as findRouteFiles } from "../support/route-files";

const routeFiles = findRouteFiles();
const endpoints = routeFiles.flatMap(endpointsOf);
const json = new Set<string>(JSON_ROUTES);
const fileRoutes = new Set<string>(FILE_ROUTES);
const base = (route: string) => route.replace(/\?.*$/, "");

describe("API contract", () => {
  it("finds the route files (the scan itself works)", () => {
    expect(routeFiles.length).toBeGreaterThan(30);
    expect(endpoints.map((e) => `${e.method} ${e.path}`)).toContain("GET /api/v1/runs/{id}");
  });

  it("lists every endpoint of every route file, as JSON or as a file download", () => {
    const unlisted = endpoints.map((e) => `${e.method} ${e.path}`).filter((k) => !json.has(k) && !fileRoutes.has(k));
    expect(unlisted).toEqual([]);
  });

  it("lists no endpoint that has no handler", () => {
    const served = new Set(endpoints.map((e) => `${e.method} ${e.path}`));
    expect([...JSON_ROUTES, ...FILE_ROUTES].map(base).filter((k) => !served.has(k))).toEqual([]);
  });

  it("every JSON handler answers through reply()/noContent() with its own name, never NextResponse.json", () => {
    const problems: string[] = [];
    for (const e of endpoints) {
      const key = `${e.method} ${e.path}`;
      if (fileRoutes.has(key)) continue;
      if (e.source.includes("NextResponse.json(")) problems.push(`${key}: answers with NextResponse.json`);
      const variants = JSON_ROUTES.filter((r) => base(r) === key);
      const answered = (v: string) => new RegExp(`(?:reply|noContent)\\(\\s*"${v.replace(/[?{}]/g, "\\$&")}"`).test(e.source);
      for (const v of variants) if (!answered(v)) problems.push(`${v}: no reply("${v}", …)`);
    }
    expect(problems).toEqual([]);
  });

  it("no reply() names an endpoint of another file", () => {
    const problems: string[] = [];
    for (const file of routeFiles) {
      const own = new Set(endpointsOf(file).map((e) => `${e.method} ${e.path}`));
      for (const m of readFileSync(file, "utf8").matchAll(/(?:reply|noContent)\(\s*"([^"]+)"/g))
        if (!own.has(base(m[1]))) problems.push(`${relative(root, file)}: ${m[1]}`);
    }
    expect(problems).toEqual([]);
  });

  it("the browser calls the API only through src/lib/api.ts", () => {
    const browser = [
      ...files(join(root, "components"), (f) => /\.tsx?$/.test(f)),
      ...files(join(root, "lib"), (f) => /\.tsx?$/.test(f) && !f.endsWith("api.ts")),
    ];
    const direct = browser.filter((f) => /fetch\(\s*[`"']\/api\//.test(readFileSync(f, "utf8"))).map((f) => relative(root, f));
    expect(direct).toEqual([]);
  });

  it("routeRequest fills path parameters, URI-encoded, and refuses a missing one", () => {
    expect(routeRequest("GET /api/v1/runs/{id}", { id: "a b" })).toEqual({ method: "GET", path: "/api/v1/runs/a%20b" });
    expect(routeRequest("POST /api/v1/runs?dryRun=true")).toEqual({ method: "POST", path: "/api/v1/runs?dryRun=true" });
    expect(() => routeRequest("GET /api/v1/runs/{id}", {})).toThrow(/path parameter "id" is missing/);
  });
});
