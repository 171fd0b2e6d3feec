// The API document in words (the manual's reference page): schemas as phrases, every operation
// with its parameters, body fields and answers.
import { describe, expect, it } from "vitest";
import { operationsInWords, schemaWords } from "@/server/openapi/words";
import { FILE_ROUTES, JSON_ROUTES } from "@/shared/api";

describe("the API document in words", () => {
  it("says a schema as a phrase: its component, its values, its bounds and default", () => {
    expect(schemaWords({ $ref: "#/components/schemas/RunDetail" })).toBe("RunDetail");
    expect(schemaWords({ type: "integer", minimum: 1, maximum: 200, default: 50 })).toBe("integer, 1 to 200, default 50");
    expect(schemaWords({ type: "integer", minimum: 1, maximum: Number.MAX_SAFE_INTEGER })).toBe("integer, at least 1");
    expect(schemaWords({ type: "string", minLength: 1 })).toBe("string, at least 1 characters");
    expect(schemaWords({ type: "string", enum: ["a", "b"] })).toBe('one of "a", "b"');
    expect(schemaWords({ type: "array", items: { type: "number" }, minItems: 1, maxItems: 2 })).toBe("array of number, 1 to 2 items");
    expect(schemaWords({ anyOf: [{ type: "null" }, { $ref: "#/components/schemas/Estimate" }] })).toBe("one of: null | Estimate");
  });

  it("lists every operation once, with the body fields and answers of POST /api/v1/runs", () => {
    const ops = operationsInWords();
    const keys = ops.map((o) => `${o.method} ${o.path}`);
    expect(new Set(keys).size).toBe(keys.length);
    expect(keys.sort()).toEqual([...new Set([...JSON_ROUTES, ...FILE_ROUTES].map((r) => r.replace(/\?.*$/, "")))].sort());
    const runs = ops.find((o) => o.method === "POST" && o.path === "/api/v1/runs")!;
    expect(runs.body?.fields.map((f) => [f.name, f.required, f.type])).toEqual([
      ["network", false, "NetworkDefinition"],
      ["networkId", false, "string"],
      ["networkVersion", false, "integer, at least 1"],
      ["computation", true, "ComputationDefinition"],
    ]);
    expect(runs.parameters.map((p) => p.name)).toEqual(["dryRun"]);
    expect(runs.responses.find((r) => r.status === "202")?.type).toBe("application/json: RunCreated");
    expect(runs.responses.find((r) => r.status === "402")?.description).toMatch(/payment_required/);
    expect(ops.find((o) => o.path === "/api/v1/openapi.json")?.public).toBe(true);
  });
});
