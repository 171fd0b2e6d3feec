// Hostile input, property-based (fast-check): JSON bodies to the four creation endpoints and CSV
// uploads. Every case must be answered 4xx with a JSON error message (never 5xx), and nothing may
// be written: the rows of the demo lab's networks, runs, sweeps, fits and datasets are counted in
// PostgreSQL before and after. Runs per property are kept modest so the file stays quick.
import { afterAll, beforeAll, beforeEach, describe, expect, it } from "vitest";
import fc from "fast-check";
import postgres from "postgres";
import { csvText, datasetForm } from "../support/csv";
import { api, appUrl, databaseUrl, demoTokens, failOnRateLimit } from "../support/services";
import { LK07_COMPUTATION, LK07_FIT_START, LK07_NETWORK } from "../../src/shared/lk07";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });
let workspaceId = "";
let datasetId = "";
let tried = 0;
let wrong = 0;

const NETWORK = {
  lattice: "triangular",
  size: { columns: 4, rows: 4 },
  transverse: "periodic",
  twistDegrees: 0.11,
  modeVelocityMps: 1.0e6,
  channelsPerLink: 1,
  node: { forward: 0.6, left: 0.2, right: 0.2 },
};
const COMPUTATION = { kind: "conductance", energyMeV: 0.4 };

async function counts() {
  const [row] = await sql`
    select
      (select count(*) from networks where workspace_id = ${workspaceId})::int as networks,
      (select count(*) from runs where workspace_id = ${workspaceId} and kind <> 'fit')::int as runs,
      (select count(*) from sweeps where workspace_id = ${workspaceId})::int as sweeps,
      (select count(*) from fits where workspace_id = ${workspaceId})::int as fits,
      (select count(*) from datasets where workspace_id = ${workspaceId})::int as datasets`;
  return row;
}

let failures: string[] = [];
/** One request: must be 4xx with `{"error": {"code", "message"}}`. */
async function expectRefused(what: string, path: string, init: RequestInit) {
  tried++;
  const headers = new Headers(init.headers);
  headers.set("authorization", `Bearer ${demoTokens().researcher}`);
  // A 429 would otherwise count as a proper refusal (4xx with a message): it fails the test instead.
  const res = failOnRateLimit(await fetch(new URL(path, appUrl()), { ...init, headers }), `${what} ${path}`);
  const text = await res.text();
  let body: { error?: { message?: unknown; code?: unknown } } | null = null;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON: body stays null and the check below fails
  }
  const ok =
    res.status >= 400 && res.status < 500 && typeof body?.error?.message === "string" && body.error.message.length > 0 && typeof body?.error?.code === "string";
  if (!ok) wrong++;
  if (!ok) failures.push(`${what} ${path} -> ${res.status} ${text.slice(0, 200)}`);
  return ok;
}
const postJson = (what: string, path: string, text: string) =>
  expectRefused(what, path, { method: "POST", headers: { "content-type": "application/json" }, body: text });

const ENDPOINTS = ["/api/v1/runs", "/api/v1/networks", "/api/v1/sweeps", "/api/v1/fits"] as const;

/** Values no numeric, string or enum field of the schemas accepts. */
const hostileValue = fc.oneof(
  fc.constantFrom(
    "NaN",
    "Infinity",
    "-Infinity",
    "1e999",
    "0x10",
    "",
    " ",
    "\u0000",
    "‮evil",
    "💥".repeat(50),
    "<script>alert(1)</script>",
    "'; drop table runs; --",
  ),
  fc.constantFrom(1e308, -1e308, Number.MAX_SAFE_INTEGER * 1e6, -Number.MAX_SAFE_INTEGER, 1e-320),
  fc.constantFrom<unknown>(null, true, false, [], [1, 2, 3], {}, { $gt: 0 }, { __proto__: { admin: true } }),
  fc.string({ unit: "binary", maxLength: 40 }).map((s) => `x${s}`),
  fc.array(fc.integer(), { minLength: 1, maxLength: 5 }).map((a) => ({ nested: a })),
);

function base(endpoint: (typeof ENDPOINTS)[number]): Record<string, unknown> {
  switch (endpoint) {
    case "/api/v1/runs":
      return { network: structuredClone(NETWORK), computation: { ...COMPUTATION } };
    case "/api/v1/networks":
      return { name: "hostile", network: structuredClone(NETWORK) };
    case "/api/v1/sweeps":
      return {
        name: "hostile",
        network: structuredClone(NETWORK),
        computation: { ...COMPUTATION },
        axes: [{ parameter: "fieldTesla", from: 0, to: 0.1, points: 3 }],
      };
    case "/api/v1/fits":
      return {
        datasetId,
        network: structuredClone(LK07_NETWORK),
        computation: structuredClone(LK07_COMPUTATION),
        sweepParameter: "fieldTesla",
        fit: structuredClone(LK07_FIT_START),
      };
  }
}

/** Paths of leaves that must be numbers, strings or enums (replacing one with a hostile value must fail). */
function leafPaths(o: unknown, prefix: string[] = []): string[][] {
  if (o === null || typeof o !== "object") return [prefix];
  if (Array.isArray(o)) return o.flatMap((v, i) => leafPaths(v, [...prefix, String(i)]));
  return Object.entries(o).flatMap(([k, v]) => leafPaths(v, [...prefix, k]));
}
function setAt(o: Record<string, unknown>, path: string[], value: unknown) {
  let cur = o;
  for (const k of path.slice(0, -1)) cur = cur[k] as Record<string, unknown>;
  cur[path[path.length - 1]] = value;
}
function deep(depth: number): string {
  return '{"a":'.repeat(depth) + "1" + "}".repeat(depth);
}

beforeAll(async () => {
  const ws = await (await api("/api/v1/billing", { as: "owner" })).json();
  workspaceId = ws.workspace.id;
  const datasets = await (await api("/api/v1/datasets")).json();
  datasetId = datasets.items.find((d: { name: string }) => /LK-07/.test(d.name)).id;
});
beforeEach(() => {
  failures = [];
});
afterAll(async () => {
  await sql.end();
});

describe("hostile JSON bodies to runs, networks, sweeps and fits", () => {
  it("one field replaced by a hostile value: 4xx with a message, nothing written", async () => {
    const before = await counts();
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...ENDPOINTS), fc.nat(), hostileValue, async (endpoint, pick, value) => {
        const body = base(endpoint);
        // Leaves the API does not validate as numbers or strings (free text names) are skipped.
        const paths = leafPaths(body).filter((p) => p[0] !== "name" && p[0] !== "description");
        const path = paths[pick % paths.length];
        setAt(body, path, value);
        return expectRefused(`${path.join(".")}=${JSON.stringify(value)?.slice(0, 40)}`, endpoint, {
          method: "POST",
          headers: { "content-type": "application/json" },
          body: JSON.stringify(body),
        });
      }),
      { numRuns: 60, seed: 9 },
    );
    expect(failures).toEqual([]);
    expect(await counts()).toEqual(before);
  });

  it("arbitrary JSON documents and wrong top-level types: 4xx with a message, nothing written", async () => {
    const before = await counts();
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...ENDPOINTS), fc.jsonValue({ maxDepth: 4 }), async (endpoint, doc) =>
        postJson("random json", endpoint, JSON.stringify(doc)),
      ),
      { numRuns: 40, seed: 19 },
    );
    expect(failures).toEqual([]);
    expect(await counts()).toEqual(before);
  });

  it("malformed, deeply nested, prototype-polluting and oversized bodies", async () => {
    const before = await counts();
    for (const endpoint of ENDPOINTS) {
      await postJson("empty", endpoint, "");
      await postJson("not json", endpoint, "{network: triangular");
      await postJson("truncated", endpoint, JSON.stringify(base(endpoint)).slice(0, 30));
      await postJson("bare NaN", endpoint, "NaN");
      await postJson("deep nesting 5000", endpoint, deep(5000));
      await postJson("deep network", endpoint, JSON.stringify({ ...base(endpoint), network: JSON.parse(deep(200)) }));
      await postJson("__proto__ at top", endpoint, `{"__proto__": {"role": "owner"}, ${JSON.stringify(base(endpoint)).slice(1)}`);
      await postJson("constructor.prototype", endpoint, JSON.stringify({ constructor: { prototype: { isAdmin: true } } }));
      await postJson(
        "__proto__ in network",
        endpoint,
        JSON.stringify({ ...base(endpoint), network: { ...NETWORK, __proto__: null } }).replace('"lattice"', '"__proto__":{"polluted":1},"lattice"'),
      );
      // Oversized: 3 MB with Content-Length, and streamed without one.
      const big = JSON.stringify({ ...base(endpoint), padding: "x".repeat(3_000_000) });
      const res = await fetch(new URL(endpoint, appUrl()), {
        method: "POST",
        headers: { authorization: `Bearer ${demoTokens().researcher}`, "content-type": "application/json" },
        body: big,
      });
      tried++;
      expect(res.status, `${endpoint} oversized`).toBe(413);
      expect((await res.json()).error.code).toBe("payload_too_large");
      const stream = new ReadableStream({
        start(c) {
          for (let i = 0; i < 30; i++) c.enqueue(new TextEncoder().encode("x".repeat(100_000)));
          c.close();
        },
      });
      const streamed = await fetch(new URL(endpoint, appUrl()), {
        method: "POST",
        headers: { authorization: `Bearer ${demoTokens().researcher}`, "content-type": "application/json" },
        body: stream,
        duplex: "half",
      } as RequestInit);
      tried++;
      expect(streamed.status, `${endpoint} streamed oversized`).toBe(413);
      await streamed.text();
    }
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
    expect(failures).toEqual([]);
    expect(await counts()).toEqual(before);
  });

  it("network size limits are refused before any work (runs, sweeps, networks)", async () => {
    const before = await counts();
    for (const size of [
      { columns: 100_000, rows: 100_000 },
      { columns: 1e9, rows: 2 },
      { columns: 4, rows: -4 },
      { columns: 4.5, rows: 4 },
      { columns: 0, rows: 0 },
    ]) {
      for (const endpoint of ["/api/v1/runs", "/api/v1/networks", "/api/v1/sweeps"] as const) {
        const body = base(endpoint);
        (body.network as Record<string, unknown>).size = size;
        await postJson(`size ${JSON.stringify(size)}`, endpoint, JSON.stringify(body));
      }
    }
    // A sweep with far too many points, and a huge ensemble.
    await postJson(
      "sweep points",
      "/api/v1/sweeps",
      JSON.stringify({ ...base("/api/v1/sweeps"), axes: [{ parameter: "fieldTesla", from: 0, to: 1, points: 10_000_000 }] }),
    );
    await postJson("ensemble", "/api/v1/runs", JSON.stringify({ ...base("/api/v1/runs"), computation: { ...COMPUTATION, ensemble: { samples: 1e9 } } }));
    expect(failures).toEqual([]);
    expect(await counts()).toEqual(before);
  });
});

describe("hostile CSV uploads", () => {
  const mapping = { name: "hostile csv", xColumn: "B (mT)", xUnit: "mT", yColumn: "R (kohm)", yUnit: "kohm" };
  const upload = (csv: string | Uint8Array, fields: Record<string, string> = mapping, what = "csv") =>
    expectRefused(what, "/api/v1/datasets", { method: "POST", body: datasetForm(csv, fields, "hostile.csv") });

  it("random and malformed files: 4xx with a message, nothing written", async () => {
    const before = await counts();
    const cell = fc.oneof(
      fc.constantFrom("NaN", "Infinity", "-", "", "1e999", "=cmd|' /C calc'!A0", '"unterminated', "1,5", "💥", "null"),
      fc.string({ maxLength: 12 }).filter((s) => Number.isNaN(Number(s)) || s.trim() === ""),
    );
    await fc.assert(
      fc.asyncProperty(fc.array(fc.tuple(cell, cell), { minLength: 0, maxLength: 30 }), async (rows) => {
        // The mapped columns exist but no row holds two numbers (each cell is written as one cell).
        const csv = csvText(["B (mT)", "R (kohm)"], rows);
        return upload(csv, mapping, `rows ${JSON.stringify(rows).slice(0, 60)}`);
      }),
      { numRuns: 40, seed: 29 },
    );
    await fc.assert(
      fc.asyncProperty(fc.string({ unit: "grapheme", minLength: 1, maxLength: 30 }), async (column) =>
        upload("B (mT),R (kohm)\n0,1\n1,2\n2,3\n", { ...mapping, xColumn: `missing ${column}` }, "unknown column"),
      ),
      { numRuns: 20, seed: 31 },
    );
    await upload(new Uint8Array([0xff, 0xfe, 0x00, 0x41, 0xc3, 0x28]), mapping, "not utf-8");
    await upload("", mapping, "empty file");
    await upload("B (mT),R (kohm)\n0,1\n1,2\n", { ...mapping, xUnit: "parsecs" }, "unknown unit");
    await upload("B (mT),R (kohm)\n0,1\n1,2\n", { ...mapping, xColumn: "" }, "no x column");
    await upload("B (mT),R (kohm)\n0,1\n1,2\n", { ...mapping, name: "x".repeat(100_000) }, "huge name");
    await upload(
      csvText(
        Array.from({ length: 5000 }, (_, i) => `c${i}`),
        [],
        { finalNewline: true },
      ),
      mapping,
      "5000 columns, no rows",
    );
    // Broken quoting, written out as it is: a quote that never closes, a quote inside a bare cell.
    await upload('B (mT),R (kohm)\n"unterminated,1\n0,1\n1,2\n2,3\n', mapping, "unterminated quote");
    await upload('B (mT),R (kohm)\n0,1"5\n1,2\n2,3\n3,4"\n', mapping, "stray quotes");
    // Over the 5 MB upload limit.
    await upload(csvText(["B (mT)", "R (kohm)"], Array(1_500_000).fill([1, 2]), { finalNewline: true }), mapping, "6 MB");
    const notMultipart = await fetch(new URL("/api/v1/datasets", appUrl()), {
      method: "POST",
      headers: { authorization: `Bearer ${demoTokens().researcher}`, "content-type": "text/csv" },
      body: "B,R\n1,2\n",
    });
    tried++;
    expect(notMultipart.status).toBe(400);
    expect(failures).toEqual([]);
    expect(await counts()).toEqual(before);
  });

  it("tried enough cases", () => {
    // Printed for docs/reliability.md.
    console.log(`[hostile-input] ${tried} hostile requests tried, ${wrong} answered wrongly`);
    expect(wrong).toBe(0);
    expect(tried).toBeGreaterThan(200);
  });
});
