import { describe, expect, it } from "vitest";
import { endpointFor, guard } from "@/server/http/method-guard";

describe("the HTTP method guard in front of Next", () => {
  it("TRACE and other methods Next does not route: 405 JSON with Allow on an endpoint, 404 JSON elsewhere under /api", () => {
    const trace = guard("TRACE", "/api/v1/runs?limit=5")!;
    expect(trace.status).toBe(405);
    expect(trace.headers.allow).toBe("GET, HEAD, OPTIONS, POST");
    expect(trace.headers["content-type"]).toBe("application/json");
    expect(JSON.parse(trace.body).error).toMatchObject({ code: "method_not_allowed" });
    expect(guard("PROPFIND", "/api/v1/runs/0b7f4a9e-2c41-4a7e-9a55-3f1d2c3b4a5e")!.headers.allow).toBe("GET, HEAD, OPTIONS");
    const unknown = guard("TRACE", "/api/v1/nothing-here")!;
    expect(unknown.status).toBe(404);
    expect(JSON.parse(unknown.body).error.code).toBe("not_found");
    expect(guard("TRACE", "/api/webhooks/stripe")!.headers.allow).toBe("OPTIONS, POST");
    const page = guard("TRACE", "/runs")!;
    expect(page.status).toBe(405);
  });

  it("a standard method an endpoint lacks: 405 JSON naming the allowed ones", () => {
    const del = guard("DELETE", "/api/v1/runs")!;
    expect(del.status).toBe(405);
    expect(del.headers.allow).toBe("GET, HEAD, OPTIONS, POST");
    expect(JSON.parse(del.body).error.message).toMatch(/DELETE is not allowed on \/api\/v1\/runs; allowed: GET, HEAD, OPTIONS, POST/);
    expect(guard("PUT", "/api/v1/networks/abc")).toBeUndefined();
    expect(guard("GET", "/api/v1/networks/abc")).toBeUndefined();
    expect(guard("HEAD", "/api/v1/networks")).toBeUndefined();
    expect(guard("OPTIONS", "/api/v1/networks")).toBeUndefined();
    expect(guard("POST", "/api/webhooks/clerk")).toBeUndefined();
    expect(guard("GET", "/api/v1/nothing-here")).toBeUndefined(); // the catch-all route answers 404 JSON
    expect(guard("GET", "/runs")).toBeUndefined();
  });

  it("static segments win over {id}, as in Next's router", () => {
    expect(endpointFor("/api/v1/workspace/invitations/accept")?.template).toBe("/api/v1/workspace/invitations/accept");
    expect(endpointFor("/api/v1/workspace/invitations/0b7f4a9e")?.template).toBe("/api/v1/workspace/invitations/{id}");
    expect(guard("POST", "/api/v1/workspace/invitations/accept")).toBeUndefined();
    expect(guard("DELETE", "/api/v1/workspace/invitations/accept")!.status).toBe(405);
    expect(endpointFor("/api/v1/runs/x/result.json")?.template).toBe("/api/v1/runs/{id}/result.json");
  });

  it("an /api path that is not valid percent-encoding: 400 JSON", () => {
    const bad = guard("GET", "/api/v1/runs/%ZZ")!;
    expect(bad.status).toBe(400);
    expect(JSON.parse(bad.body).error.code).toBe("bad_request");
    expect(guard("GET", "/api/v1/runs/%E6%95%B0")).toBeUndefined();
  });
});
