import { afterEach, describe, expect, it, vi } from "vitest";
import { ApiError, findNul, internalErrorLog, readJson, redactSecrets, route, toResponse } from "@/server/http/errors";

/** An error shaped like postgres.js's PostgresError wrapped by Drizzle's DrizzleQueryError. */
function failedQuery() {
  const cause = Object.assign(new Error('invalid byte sequence for encoding "UTF8": 0x00'), {
    name: "PostgresError",
    severity: "ERROR",
    code: "22021",
    routine: "report_invalid_encoding_int",
    where: "unnamed portal parameter $2",
    query: "insert into api_tokens (name, hash) values ($1, $2)",
    parameters: ["evil\u0000", "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08"],
  });
  class DrizzleQueryError extends Error {
    constructor(
      readonly query: string,
      readonly params: unknown[],
      override readonly cause: unknown,
    ) {
      super(`Failed query: ${query}\nparams: ${params.join(",")}`);
    }
  }
  return new DrizzleQueryError("insert into api_tokens (name, hash) values ($1, $2)", cause.parameters, cause);
}

afterEach(() => vi.restoreAllMocks());

describe("internal errors", () => {
  it("are logged with code, reference, class and message, never the SQL, its parameters or a hash", async () => {
    const logged: string[] = [];
    vi.spyOn(console, "error").mockImplementation((...args: unknown[]) => void logged.push(args.map(String).join(" ")));
    const handler = route(async () => {
      const err = failedQuery();
      // A cause whose message quotes the value, as PostgreSQL's date and uuid errors do.
      (err.cause as { code: string; message: string }).code = "XX000";
      (err.cause as { message: string }).message = 'invalid input syntax for type uuid: "trk_live_abcdefghijkl"';
      throw err;
    });
    const res = await handler(new Request("http://x/api/v1/tokens?secret=sk_test_abcdefghij"), {});
    expect(res.status).toBe(500);
    const body = await res.json();
    expect(body.error.code).toBe("internal");
    const reference = body.error.details.reference;
    expect(reference).toMatch(/^[0-9a-f-]{36}$/);
    expect(body.error.message).toContain(reference);
    expect(logged).toHaveLength(1);
    const line = logged[0];
    expect(line).toContain(reference);
    const entry = JSON.parse(line.slice(line.indexOf("{")));
    expect(entry).toMatchObject({ level: "error", code: "internal", reference, method: "GET", path: "/api/v1/tokens" });
    expect(entry.errors[0]).toMatchObject({ class: "DrizzleQueryError", message: "Failed query (SQL not logged)" });
    expect(entry.errors[1]).toMatchObject({
      class: "Error",
      code: "XX000",
      routine: "report_invalid_encoding_int",
      message: "invalid input syntax for type uuid: [value not logged]",
    });
    for (const leak of [
      "insert into",
      "api_tokens (name",
      "9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08",
      "evil",
      "trk_live",
      "sk_test_abc",
      "secret=",
      "params",
      "parameters",
    ])
      expect(line, leak).not.toContain(leak);
  });

  it("PostgreSQL refusing a value the request carried (NUL, out of range, not a uuid) is 400, not 500", () => {
    const res = toResponse(failedQuery());
    expect(res.status).toBe(400);
  });

  it("other unknown errors are 500 with the reference in details", async () => {
    vi.spyOn(console, "error").mockImplementation(() => {});
    const res = toResponse(new TypeError("boom"));
    expect(res.status).toBe(500);
    const body = await res.json();
    expect(body.error.details.reference).toMatch(/^[0-9a-f-]{36}$/);
    expect(internalErrorLog("r", new TypeError("boom")).errors).toEqual([expect.objectContaining({ class: "TypeError", message: "boom" })]);
  });

  it("redacts tokens, keys, bearer credentials, URL passwords and hashes", () => {
    const text = redactSecrets(
      "trk_AbCdEf123456 sk_live_abcdef123 whsec_abcdefgh Bearer xyz postgres://u:hunter2@db/x e3b0c44298fc1c149afbf4c8996fb92427ae41e4649b934ca495991b7852b855",
    );
    for (const leak of ["AbCdEf123456", "abcdef123", "abcdefgh", "xyz", "hunter2", "e3b0c442"]) expect(text).not.toContain(leak);
  });
});

describe("hostile requests before any handler", () => {
  const ok = route(async () => new Response("ok"));
  it("query parameters and paths holding NUL, and undecodable paths, are 400 naming the parameter", async () => {
    const nul = await ok(new Request("http://x/api/v1/runs?kind=a%00b"), {});
    expect(nul.status).toBe(400);
    expect((await nul.json()).error).toMatchObject({ code: "bad_request", details: { field: "kind" } });
    const path = await ok(new Request("http://x/api/v1/runs/%ZZ"), {});
    expect(path.status).toBe(400);
    expect((await path.json()).error.code).toBe("bad_request");
    expect((await ok(new Request("http://x/api/v1/runs/%00"), {})).status).toBe(400);
    expect((await ok(new Request("http://x/api/v1/runs?kind=conductance"), {})).status).toBe(200);
  });

  it("JSON bodies with NUL in any key or value are 422 naming the field", async () => {
    const post = (body: string) => new Request("http://x/api/v1/networks", { method: "POST", body, headers: { "content-type": "application/json" } });
    await expect(readJson(post('{"name":"a\\u0000b"}'))).rejects.toMatchObject({ code: "invalid_input", details: { field: "name" } });
    await expect(readJson(post('{"network":{"node":{"k\\u0000":1}}}'))).rejects.toMatchObject({
      code: "invalid_input",
      details: { field: "network.node.k\\u0000" },
    });
    await expect(readJson(post('{"fit":[{"parameter":"x"},{"parameter":"\\u0000"}]}'))).rejects.toMatchObject({ details: { field: "fit.1.parameter" } });
    await expect(readJson(post('"\\u0000"'))).rejects.toMatchObject({ details: { field: "body" } });
    await expect(readJson(post('{"name":"fine \\u0001 \\u00e9"}'))).resolves.toEqual({ name: "fine \u0001 é" });
    expect(findNul({ a: [1, { b: "x" }] })).toBeUndefined();
    expect(new ApiError("method_not_allowed", "x").status).toBe(405);
  });
});
