// Hostile requests beyond JSON bodies: names, query strings, cursors, ids, PATCH bodies, file
// names, methods and paths. Each finding of the hostile-input review has its own test below; then
// property-based fuzzing (fast-check, fixed seeds) checks the one invariant over many inputs:
// never a 5xx, always a JSON error body whose code is in the table of docs/api.md. The web server's
// log written meanwhile must hold no SQL, no query parameters and no token hash.
import { createHash } from "node:crypto";
import { openSync, readFileSync, readSync, statSync, closeSync } from "node:fs";
import http from "node:http";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import fc from "fast-check";
import postgres from "postgres";
import { datasetForm } from "../support/csv";
import { api, appUrl, databaseUrl, demoTokens } from "../support/services";

const sql = postgres(databaseUrl(), { max: 2, onnotice: () => {} });

/** The error codes docs/api.md documents (its table of statuses and codes). */
const DOCUMENTED_CODES = new Set(
  [...readFileSync(path.join(import.meta.dirname, "../../docs/api.md"), "utf8").matchAll(/^\| (4\d\d|5\d\d) \| `(\w+)` \|/gm)].map((m) => m[2]),
);

const CSV = "B (mT),R (kohm)\n0,1\n1,2\n2,3\n3,4\n4,5\n";
const MAPPING = { name: "hostile request", xColumn: "B (mT)", xUnit: "mT", yColumn: "R (kohm)", yUnit: "kohm" };
const NETWORK = {
  lattice: "triangular",
  size: { columns: 4, rows: 4 },
  transverse: "periodic",
  twistDegrees: 0.11,
  node: { forward: 0.6, left: 0.2, right: 0.2 },
};
const UUID = "0b7f4a9e-2c41-4a7e-9a55-3f1d2c3b4a5e";
const DASHES = "-".repeat(36);
const LISTS = ["/api/v1/runs", "/api/v1/sweeps", "/api/v1/networks", "/api/v1/fits", "/api/v1/datasets"] as const;

let networkId = "";
// Null until beforeAll has recorded them: cleanup after a failed set-up must not take the seeded rows for its own.
let datasetsBefore: Set<string> | null = null;
let tokensBefore: Set<string> | null = null;
let logFile = "";
let logOffset = 0;
let tried = 0;
let failures: string[] = [];

interface Answer {
  status: number;
  headers: Headers;
  text: string;
  body: { error?: { code?: unknown; message?: unknown; details?: Record<string, unknown> } } | null;
}

async function answer(res: Response): Promise<Answer> {
  const text = await res.text();
  let body: Answer["body"] = null;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON
  }
  return { status: res.status, headers: res.headers, text, body };
}

/** The invariant: below 500, and a 4xx carries `{ error: { code, message } }` with a documented code. */
function wellRefused(a: Answer): boolean {
  if (a.status >= 500) return false;
  if (a.status < 400) return true;
  const e = a.body?.error;
  return typeof e?.message === "string" && e.message.length > 0 && typeof e.code === "string" && DOCUMENTED_CODES.has(e.code);
}

/** Records a request that broke the invariant (all are reported at the end of each test). */
async function probe(what: string, url: string, init: RequestInit & { as?: "researcher" | "owner"; json?: unknown } = {}): Promise<Answer> {
  tried++;
  const a = await answer(await api(url, init));
  if (!wellRefused(a)) failures.push(`${what}: ${init.method ?? "GET"} ${url.slice(0, 160)} -> ${a.status} ${a.text.slice(0, 160)}`);
  return a;
}

/** A raw HTTP request (fetch refuses TRACE and normalises paths). */
function rawRequest(method: string, pathAndQuery: string): Promise<Answer> {
  const url = new URL(appUrl());
  return new Promise((resolve, reject) => {
    const req = http.request(
      { host: url.hostname, port: url.port, method, path: pathAndQuery, headers: { authorization: `Bearer ${demoTokens().researcher}` } },
      (res) => {
        let text = "";
        res.setEncoding("utf8");
        res.on("data", (c) => (text += c));
        res.on("end", () => {
          let body: Answer["body"] = null;
          try {
            body = JSON.parse(text);
          } catch {
            // not JSON
          }
          const headers = new Headers();
          for (const [k, v] of Object.entries(res.headers)) if (typeof v === "string") headers.set(k, v);
          resolve({ status: res.statusCode ?? 0, headers, text, body });
        });
      },
    );
    req.on("error", reject);
    req.end();
  });
}

const rowCounts = () => sql`
  select (select count(*) from networks)::int as n, (select count(*) from sweeps)::int as s,
         (select count(*) from datasets)::int as d, (select count(*) from api_tokens)::int as t`;
const cursorOf = (text: string) => Buffer.from(text).toString("base64url");
const expectNoFailures = () => expect(failures).toEqual([]);

beforeAll(async () => {
  failures = [];
  expect([...DOCUMENTED_CODES].sort()).toEqual(
    [
      "bad_request",
      "conflict",
      "forbidden",
      "internal",
      "invalid_input",
      "method_not_allowed",
      "not_found",
      "payload_too_large",
      "payment_required",
      "rate_limited",
      "unauthenticated",
      "unavailable",
    ].sort(),
  );
  const created = await api("/api/v1/networks", { method: "POST", json: { name: "hostile requests target", network: NETWORK } });
  expect(created.status).toBe(201);
  networkId = (await created.json()).id;
  datasetsBefore = new Set((await sql`select id from datasets`).map((r) => r.id as string));
  tokensBefore = new Set((await sql`select id from api_tokens`).map((r) => r.id as string));
  logFile = path.join(process.env.TRISKEL_DATA_DIR ?? "", "run", "web.log");
  logOffset = statSync(logFile).size;
});

afterAll(async () => {
  await api(`/api/v1/networks/${networkId}`, { method: "DELETE" });
  const datasetsKept = datasetsBefore;
  const tokensKept = tokensBefore;
  if (datasetsKept) {
    const datasets = (await sql`select id from datasets`).map((r) => r.id as string).filter((id) => !datasetsKept.has(id));
    if (datasets.length) await sql`delete from datasets where id in ${sql(datasets)} and not exists (select 1 from fits where fits.dataset_id = datasets.id)`;
  }
  if (tokensKept) {
    const tokens = (await sql`select id from api_tokens`).map((r) => r.id as string).filter((id) => !tokensKept.has(id));
    if (tokens.length) await sql`delete from api_tokens where id in ${sql(tokens)}`;
  }
  await sql.end();
});

describe("findings: 4xx JSON instead of 500", () => {
  it("a NUL character in a name (network, rename, sweep, dataset, token) is 422 naming the field; nothing is written", async () => {
    const before = await rowCounts();
    const cases: [string, string, RequestInit & { json?: unknown }][] = [
      ["network name", "/api/v1/networks", { method: "POST", json: { name: "bad\u0000name", network: NETWORK } }],
      ["rename", `/api/v1/networks/${networkId}`, { method: "PATCH", json: { name: "\u0000" } }],
      ["replace", `/api/v1/networks/${networkId}`, { method: "PUT", json: { name: "x\u0000", network: NETWORK } }],
      [
        "sweep name",
        "/api/v1/sweeps",
        {
          method: "POST",
          json: { name: "s\u0000", network: NETWORK, computation: { kind: "conductance" }, axes: [{ parameter: "fieldTesla", values: [0, 0.1] }] },
        },
      ],
      ["token name", "/api/v1/tokens", { method: "POST", json: { name: "token\u0000name" } }],
    ];
    for (const [what, url, init] of cases) {
      const a = await probe(what, url, init);
      expect(a.status, what).toBe(422);
      expect(a.body?.error?.code, what).toBe("invalid_input");
      expect(a.body?.error?.details?.field, what).toBe("name");
    }
    for (const field of ["name", "xColumn", "description"]) {
      const a = await probe(`dataset ${field}`, "/api/v1/datasets", {
        method: "POST",
        body: datasetForm(CSV, { ...MAPPING, [field]: `${MAPPING.name}\u0000` }, "nul.csv"),
      });
      expect(a.status, field).toBe(422);
      expect(a.body?.error?.details?.field).toBe(field);
    }
    const nulFile = await probe("NUL in the file", "/api/v1/datasets", { method: "POST", body: datasetForm(`${CSV}6,\u00007\n`, MAPPING, "nul.csv") });
    expect(nulFile.status).toBe(422);
    expect(nulFile.body?.error?.details?.field).toBe("file");
    const query = await probe("NUL in a query parameter", "/api/v1/runs?kind=con%00ductance");
    expect(query.status).toBe(400);
    expect(query.body?.error).toMatchObject({ code: "bad_request", details: { field: "kind" } });
    const after = await rowCounts();
    expect(after).toEqual(before);
    const [n] = await sql`select name from networks where id = ${networkId}`;
    expect(n.name).toBe("hostile requests target");
    expectNoFailures();
  });

  it("a cursor whose date has the right shape but does not exist, or whose id is 36 dashes: 400 naming cursor", async () => {
    for (const list of ["/api/v1/runs", "/api/v1/sweeps", "/api/v1/networks"]) {
      for (const text of [
        `2026-02-31T00:00:00.000000Z|${UUID}`,
        `2026-13-01T00:00:00Z|${UUID}`,
        `0000-01-01T00:00:00Z|${UUID}`,
        `2026-01-01T00:00:00.000000Z|${DASHES}`,
      ]) {
        const a = await probe(`cursor ${text}`, `${list}?cursor=${cursorOf(text)}`);
        expect(a.status, `${list} ${text}`).toBe(400);
        expect(a.body?.error).toMatchObject({ code: "bad_request", details: { field: "cursor" } });
      }
    }
    expectNoFailures();
  });

  it("ids of 36 dashes: 404 in paths, 422 as a runs filter", async () => {
    for (const url of [
      `/api/v1/runs/${DASHES}`,
      `/api/v1/runs/${DASHES}/result.json`,
      `/api/v1/sweeps/${DASHES}`,
      `/api/v1/sweeps/${DASHES}/results.csv`,
      `/api/v1/networks/${DASHES}`,
      `/api/v1/datasets/${DASHES}`,
      `/api/v1/datasets/${DASHES}/original`,
      `/api/v1/fits/${DASHES}`,
      `/api/v1/fits/${DASHES}/curve.csv`,
      `/api/v1/fits/${DASHES}/profiles.csv`,
    ]) {
      const a = await probe("dashes id", url);
      expect(a.status, url).toBe(404);
      expect(a.body?.error?.code).toBe("not_found");
    }
    for (const [method, url] of [
      ["POST", `/api/v1/runs/${DASHES}/cancel`],
      ["POST", `/api/v1/fits/${DASHES}/cancel`],
      ["DELETE", `/api/v1/tokens/${DASHES}`],
      ["DELETE", `/api/v1/networks/${DASHES}`],
    ])
      expect((await probe("dashes id", url, { method })).status, url).toBe(404);
    for (const filter of ["networkId", "sweepId"]) {
      const a = await probe("dashes filter", `/api/v1/runs?${filter}=${DASHES}`);
      expect(a.status, filter).toBe(422);
      expect(a.body?.error?.code).toBe("invalid_input");
    }
    const fits = await probe("dashes dataset filter", `/api/v1/fits?datasetId=${DASHES}`);
    expect(fits.status).toBe(422);
    expectNoFailures();
  });

  it("before=0000-01-01T00:00:00Z and dates that do not exist on the fit and dataset lists: 422 naming before", async () => {
    for (const list of ["/api/v1/fits", "/api/v1/datasets"]) {
      for (const before of ["0000-01-01T00:00:00Z", "2026-02-31T00:00:00Z", "+275760-09-13T00:00:00.000Z", "10000-01-01T00:00:00Z"]) {
        const a = await probe(`before ${before}`, `${list}?before=${encodeURIComponent(before)}`);
        expect(a.status, `${list} ${before}`).toBe(422);
        expect(a.body?.error).toMatchObject({ code: "invalid_input", details: { field: "before" } });
      }
      expect((await api(`${list}?before=${encodeURIComponent(new Date().toISOString())}`)).status).toBe(200);
    }
    expectNoFailures();
  });

  it("version=99999999999 on a network: 400 naming version", async () => {
    for (const version of ["99999999999", "2147483648", "1e3", "-1", "0"]) {
      const a = await probe(`version ${version}`, `/api/v1/networks/${networkId}?version=${version}`);
      expect(a.status, version).toBe(400);
      expect(a.body?.error).toMatchObject({ code: "bad_request", details: { field: "version" } });
    }
    const missing = await probe("version 2147483647", `/api/v1/networks/${networkId}?version=2147483647`);
    expect(missing.status).toBe(404);
    expect((await api(`/api/v1/networks/${networkId}?version=1`)).status).toBe(200);
    expectNoFailures();
  });

  it("/api/v1/runs/%ZZ and other undecodable paths: 400 JSON", async () => {
    for (const p of ["/api/v1/runs/%ZZ", "/api/v1/datasets/%E0%A4%A/original", "/api/v1/networks/%"]) {
      const a = await rawRequest("GET", p);
      expect(a.status, p).toBe(400);
      expect(a.headers.get("content-type")).toMatch(/application\/json/);
      expect(a.body?.error?.code).toBe("bad_request");
    }
  });

  it("TRACE and other unsupported methods: 405 JSON with an Allow header", async () => {
    const trace = await rawRequest("TRACE", "/api/v1/runs");
    expect(trace.status).toBe(405);
    expect(trace.headers.get("allow")).toBe("GET, HEAD, OPTIONS, POST");
    expect(trace.body?.error?.code).toBe("method_not_allowed");
    const onId = await rawRequest("TRACE", `/api/v1/networks/${networkId}`);
    expect(onId.status).toBe(405);
    expect(onId.headers.get("allow")).toBe("DELETE, GET, HEAD, OPTIONS, PATCH, PUT");
    for (const [method, p, allow] of [
      ["DELETE", "/api/v1/runs", "GET, HEAD, OPTIONS, POST"],
      ["PUT", "/api/v1/sweeps", "GET, HEAD, OPTIONS, POST"],
      ["PATCH", `/api/v1/runs/${UUID}`, "GET, HEAD, OPTIONS"],
      ["GET", `/api/v1/runs/${UUID}/cancel`, "OPTIONS, POST"],
      ["PROPFIND", "/api/v1/datasets", "GET, HEAD, OPTIONS, POST"],
      ["GET", "/api/webhooks/stripe", "OPTIONS, POST"],
      ["POST", "/api/v1/openapi.json", "GET, HEAD, OPTIONS"],
    ]) {
      const a = await rawRequest(method, p);
      expect(a.status, `${method} ${p}`).toBe(405);
      expect(a.headers.get("allow"), `${method} ${p}`).toBe(allow);
      expect(a.body?.error?.code).toBe("method_not_allowed");
    }
    const unknown = await rawRequest("TRACE", "/api/v1/no-such-thing");
    expect(unknown.status).toBe(404);
    expect(unknown.body?.error?.code).toBe("not_found");
    // The methods that exist keep working.
    expect((await rawRequest("GET", "/api/v1/runs?limit=1")).status).toBe(200);
    const options = await rawRequest("OPTIONS", "/api/v1/runs");
    expect(options.status).toBeLessThan(300);
  });

  it("unknown /api paths: 404 JSON for every method; real routes and the webhooks are not shadowed", async () => {
    for (const method of ["GET", "POST", "PUT", "PATCH", "DELETE"]) {
      for (const p of ["/api/v1/nope", "/api/v2/runs", "/api", "/api/v1/runs/x/y/z", `/api/v1/networks/${networkId}/versions`, "/api/webhooks/nope"]) {
        const a = await probe(`unknown path`, p, {
          method,
          ...(method === "GET" || method === "DELETE" ? {} : { body: "{}", headers: { "content-type": "application/json" } }),
        });
        expect(a.status, `${method} ${p}`).toBe(404);
        expect(a.headers.get("content-type"), `${method} ${p}`).toMatch(/application\/json/);
        expect(a.body?.error?.code).toBe("not_found");
        expect(a.body?.error?.message).toMatch(/No API endpoint/);
      }
    }
    expect((await api("/api/v1/health", { as: null })).status).toBe(200);
    expect((await api("/api/v1/openapi.json", { as: null })).status).toBe(200);
    expect((await api(`/api/v1/networks/${networkId}`)).status).toBe(200);
    // The Stripe webhook still reaches its handler (a missing signature is its own 400).
    const hook = await answer(await fetch(new URL("/api/webhooks/stripe", appUrl()), { method: "POST", body: "{}" }));
    expect(hook.status).toBe(400);
    expect(hook.body?.error?.code).toBe("bad_request");
    expect(String(hook.body?.error?.message)).toMatch(/Stripe-Signature/i);
    const clerk = await answer(await fetch(new URL("/api/webhooks/clerk", appUrl()), { method: "POST", body: "{}" }));
    expect(clerk.status).toBeGreaterThanOrEqual(400);
    expect(clerk.status).toBeLessThan(500);
    expect(clerk.body?.error?.message).not.toMatch(/No API endpoint/);
    expectNoFailures();
  });

  it("limit=-5 and limit=99999 on every list: 400 naming limit and the range 1 to 200", async () => {
    for (const list of LISTS) {
      for (const limit of ["-5", "99999", "0", "201", "2.5", "abc"]) {
        const a = await probe(`limit ${limit}`, `${list}?limit=${limit}`);
        expect(a.status, `${list} limit=${limit}`).toBe(400);
        expect(a.body?.error).toMatchObject({ code: "bad_request", details: { field: "limit", min: 1, max: 200 } });
        expect(a.body?.error?.message).toMatch(/^limit: must be a whole number from 1 to 200/);
      }
      for (const limit of ["1", "200"]) expect((await api(`${list}?limit=${limit}`)).status, `${list} limit=${limit}`).toBe(200);
    }
    expectNoFailures();
  });

  it("PATCH with __proto__, constructor or prototype keys: 422 naming the field, nothing changed", async () => {
    const [before] = await sql`select current_version, name from networks where id = ${networkId}`;
    const bodies: [string, string][] = [
      ['{"__proto__": {"name": "polluted"}}', "__proto__"],
      ['{"network": {"__proto__": {"lattice": "square"}}}', "network.__proto__"],
      ['{"network": {"node": {"__proto__": {"forward": 0.9}}}}', "network.node.__proto__"],
      ['{"network": {"constructor": {"prototype": {"x": 1}}}}', "network.constructor"],
      ['{"network": {"size": {"prototype": 1}}}', "network.size.prototype"],
      ['{"name": "ok", "network": {"size": {"columns": 5, "constructor": 1}}}', "network.size.constructor"],
    ];
    for (const [body, field] of bodies) {
      const a = await probe("prototype key", `/api/v1/networks/${networkId}`, { method: "PATCH", body, headers: { "content-type": "application/json" } });
      expect(a.status, body).toBe(422);
      expect(a.body?.error).toMatchObject({ code: "invalid_input", details: { field } });
      expect(a.body?.error?.message).toContain(field);
    }
    const [after] = await sql`select current_version, name from networks where id = ${networkId}`;
    expect(after).toEqual(before);
    // A plain PATCH still merges.
    const ok = await api(`/api/v1/networks/${networkId}`, { method: "PATCH", json: { network: { node: { forward: 0.5, left: 0.25, right: 0.25 } } } });
    expect(ok.status).toBe(200);
    const merged = await ok.json();
    expect(merged.network.node).toMatchObject({ forward: 0.5, left: 0.25, right: 0.25 });
    expect(merged.network.lattice).toBe("triangular");
    expectNoFailures();
  });

  it("cancelling a finished fit: 409 conflict, worded as for runs", async () => {
    const [dataset] = await sql`select id from datasets where name = 'LK-07 magnetoconductance (synthetic)'`;
    const { LK07_COMPUTATION, LK07_FIT_START, LK07_NETWORK } = await import("../../src/shared/lk07");
    const created = await api("/api/v1/fits", {
      method: "POST",
      json: {
        datasetId: dataset.id,
        network: LK07_NETWORK,
        computation: LK07_COMPUTATION,
        sweepParameter: "fieldTesla",
        fit: LK07_FIT_START,
        options: { maxIterations: 1 },
      },
    });
    expect(created.status).toBe(202);
    const { id } = await created.json();
    const first = await api(`/api/v1/fits/${id}/cancel`, { method: "POST" });
    expect(first.status).toBe(200);
    // Queued: cancelled at once; running: flagged and stopped by its worker. Wait for the end.
    let status = "";
    for (let i = 0; i < 120 && !["succeeded", "failed", "cancelled"].includes(status); i++) {
      status = (await (await api(`/api/v1/fits/${id}`)).json()).status;
      if (!["succeeded", "failed", "cancelled"].includes(status)) await new Promise((r) => setTimeout(r, 500));
    }
    const again = await answer(await api(`/api/v1/fits/${id}/cancel`, { method: "POST" }));
    expect(again.status).toBe(409);
    expect(again.body?.error?.code).toBe("conflict");
    expect(again.body?.error?.message).toBe(`Fit ${id} has already ${status === "cancelled" ? "been cancelled" : status}; nothing to cancel.`);
    // A succeeded one too (the status set here as a finished worker would leave it).
    await sql`update fits set status = 'succeeded', finished_at = now() where id = ${id}`;
    const succeeded = await answer(await api(`/api/v1/fits/${id}/cancel`, { method: "POST" }));
    expect(succeeded.status).toBe(409);
    expect(succeeded.body?.error?.message).toBe(`Fit ${id} has already succeeded; nothing to cancel.`);
    expect(succeeded.body?.error?.details).toEqual({ status: "succeeded" });
    const [row] = await sql`select status from fits where id = ${id}`;
    expect(row.status).toBe("succeeded");
    await sql`update fits set status = 'cancelled' where id = ${id}`;
  });
});

describe("findings: downloads of files with any name", () => {
  it("a dataset named in German or Chinese downloads with filename* (RFC 5987) and an ASCII fallback", async () => {
    for (const name of ["Messung-Größe-µ.csv", "数据.csv", "Résumé (1) 100%.csv"]) {
      const up = await api("/api/v1/datasets", { method: "POST", body: datasetForm(CSV, { ...MAPPING, name: `file ${name}` }, name) });
      expect(up.status, name).toBe(201);
      const { id, originalFilename } = await up.json();
      expect(originalFilename).toBe(name);
      const res = await api(`/api/v1/datasets/${id}/original`);
      expect(res.status, name).toBe(200);
      expect(await res.text()).toBe(CSV);
      const cd = res.headers.get("content-disposition") ?? "";
      expect(cd).toMatch(/^attachment; filename="[\x20-\x7e]+"; filename\*=UTF-8''/);
      expect(decodeURIComponent(/filename\*=UTF-8''(\S+)$/.exec(cd)![1])).toBe(name);
      expect(/filename="([^"]*)"/.exec(cd)![1]).not.toMatch(/["\\%]/);
    }
  });
});

describe("property-based: never a 5xx, always a documented JSON error", () => {
  it("names: renames, new networks and dataset names of arbitrary text", async () => {
    failures = [];
    const name = fc.oneof(
      fc.string({ unit: "binary", maxLength: 60 }),
      fc.string({ unit: "grapheme", maxLength: 60 }),
      fc.constantFrom("", " ", "\u0000", "a\u0000", "\u202eevil", "💥".repeat(201), "x".repeat(201), "'; drop table networks; --", "\ud800", "\udfff\ud800"),
    );
    await fc.assert(
      fc.asyncProperty(name, async (n) => {
        const a = await probe(`rename ${JSON.stringify(n).slice(0, 40)}`, `/api/v1/networks/${networkId}`, { method: "PATCH", json: { name: n } });
        if (a.status === 200) {
          const [row] = await sql`select name from networks where id = ${networkId}`;
          // Stored as UTF-8: a lone surrogate comes back as U+FFFD.
          return row.name === Buffer.from(n.trim()).toString("utf8");
        }
        return wellRefused(a);
      }),
      { numRuns: 80, seed: 41 },
    );
    await fc.assert(
      fc.asyncProperty(name, async (n) => {
        const a = await probe(`dataset name ${JSON.stringify(n).slice(0, 40)}`, "/api/v1/datasets", {
          method: "POST",
          body: datasetForm(CSV, { ...MAPPING, name: n }, "n.csv"),
        });
        return wellRefused(a);
      }),
      { numRuns: 25, seed: 43 },
    );
    await api(`/api/v1/networks/${networkId}`, { method: "PATCH", json: { name: "hostile requests target" } });
    expectNoFailures();
  });

  it("query strings: arbitrary and hostile parameters on every list", async () => {
    failures = [];
    const key = fc.oneof(
      fc.constantFrom("limit", "cursor", "before", "status", "kind", "networkId", "sweepId", "datasetId", "includeSweepPoints", "period", "version", "dryRun"),
      fc.string({ unit: "binary", maxLength: 12 }),
    );
    const value = fc.oneof(
      fc.string({ unit: "binary", maxLength: 40 }),
      fc.constantFrom(
        "-5",
        "99999",
        "0",
        "1e3",
        "NaN",
        "\u0000",
        DASHES,
        UUID,
        "0000-01-01T00:00:00Z",
        "2026-02-31T00:00:00Z",
        "9999-12-31T23:59:59Z",
        "true",
        "[]",
        "{}",
        "%ZZ",
      ),
      fc.integer().map(String),
    );
    const list = fc.constantFrom<string>(
      ...LISTS,
      "/api/v1/usage",
      `/api/v1/networks/${networkId}`,
      "/api/v1/tokens",
      "/api/v1/workspace/members",
      "/api/v1/openapi.json",
    );
    await fc.assert(
      fc.asyncProperty(list, fc.array(fc.tuple(key, value), { minLength: 1, maxLength: 4 }), async (url, params) => {
        const q = new URLSearchParams(params).toString();
        return wellRefused(await probe("query", `${url}?${q}`));
      }),
      { numRuns: 150, seed: 47 },
    );
    expectNoFailures();
  });

  it("cursors: arbitrary text, near-misses of real ones and real ones with a changed character", async () => {
    failures = [];
    const first = await (await api("/api/v1/runs?limit=1&includeSweepPoints=true")).json();
    const real = Buffer.from(first.nextCursor ?? cursorOf(`2026-01-01T00:00:00.000000Z|${UUID}`), "base64url").toString("utf8");
    const at = fc.oneof(
      fc
        .tuple(fc.integer({ min: 0, max: 9999 }), fc.integer({ min: 0, max: 19 }), fc.integer({ min: 0, max: 39 }), fc.integer({ min: 0, max: 29 }))
        .map(
          ([y, m, d, h]) =>
            `${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}-${String(d).padStart(2, "0")}T${String(h).padStart(2, "0")}:00:00.000000Z`,
        ),
      fc.string({ unit: "binary", maxLength: 30 }),
    );
    const id = fc.oneof(
      fc.uuid(),
      fc.constantFrom(DASHES, UUID.toUpperCase(), `${UUID}0`, "", "\u0000".repeat(36)),
      fc.string({ unit: "binary", minLength: 36, maxLength: 36 }),
    );
    const raw = fc.oneof(
      fc.tuple(at, id).map(([a, i]) => cursorOf(`${a}|${i}`)),
      fc.string({ maxLength: 80 }),
      fc
        .nat({ max: real.length - 1 })
        .chain((i) => fc.string({ unit: "binary", minLength: 1, maxLength: 1 }).map((c) => cursorOf(real.slice(0, i) + c + real.slice(i + 1)))),
    );
    await fc.assert(
      fc.asyncProperty(fc.constantFrom("/api/v1/runs", "/api/v1/sweeps", "/api/v1/networks"), raw, async (url, cursor) => {
        const a = await probe("cursor", `${url}?cursor=${encodeURIComponent(cursor)}`);
        return a.status === 200 || (a.status === 400 && a.body?.error?.code === "bad_request");
      }),
      { numRuns: 120, seed: 53 },
    );
    expectNoFailures();
  });

  it("ids: arbitrary text in every {id} of the API", async () => {
    failures = [];
    const templates: [string, string][] = [
      ["GET", "/api/v1/runs/{id}"],
      ["GET", "/api/v1/runs/{id}/result.json"],
      ["POST", "/api/v1/runs/{id}/cancel"],
      ["GET", "/api/v1/sweeps/{id}"],
      ["GET", "/api/v1/sweeps/{id}/results.csv"],
      ["POST", "/api/v1/sweeps/{id}/cancel"],
      ["GET", "/api/v1/networks/{id}"],
      ["PATCH", "/api/v1/networks/{id}"],
      ["DELETE", "/api/v1/networks/{id}"],
      ["GET", "/api/v1/datasets/{id}"],
      ["GET", "/api/v1/datasets/{id}/original"],
      ["POST", "/api/v1/datasets/{id}/period"],
      ["GET", "/api/v1/fits/{id}"],
      ["GET", "/api/v1/fits/{id}/export"],
      ["GET", "/api/v1/fits/{id}/curve.csv"],
      ["GET", "/api/v1/fits/{id}/profiles.csv"],
      ["POST", "/api/v1/fits/{id}/cancel"],
      ["DELETE", "/api/v1/tokens/{id}"],
      ["DELETE", "/api/v1/workspace/invitations/{id}"],
      ["PATCH", "/api/v1/workspace/members/{id}"],
    ];
    // (Not "." or "..": fetch resolves those segments away, to a real list.)
    const id = fc.oneof(
      fc.string({ unit: "binary", minLength: 1, maxLength: 50 }).filter((s) => s !== "." && s !== ".."),
      fc.uuid(),
      fc.constantFrom(DASHES, "%ZZ", "%2e%2e", "%00", "0", "-1", "99999999999", "null", "undefined", UUID.replace(/-/g, ""), `${UUID}.json`, "a".repeat(5000)),
    );
    await fc.assert(
      fc.asyncProperty(fc.constantFrom(...templates), id, async ([method, template], raw) => {
        // Owner: the members route needs it; no generated id belongs to a real object of this workspace.
        const url = template.replace("{id}", /^%/.test(raw) ? raw : encodeURIComponent(raw));
        const init: RequestInit & { as?: "owner" } = { method, as: "owner" };
        if (method === "PATCH") Object.assign(init, { body: '{"role":"viewer"}', headers: { "content-type": "application/json" } });
        const a = await probe("id", url, init);
        return wellRefused(a) && a.status >= 400;
      }),
      { numRuns: 150, seed: 59 },
    );
    expectNoFailures();
  });

  it("PATCH bodies: arbitrary JSON and hostile keys never reach a 5xx or a prototype", async () => {
    failures = [];
    const hostileKey = fc.constantFrom(
      "__proto__",
      "constructor",
      "prototype",
      "\u0000",
      "",
      "node",
      "size",
      "lattice",
      "toString",
      "valueOf",
      "hasOwnProperty",
    );
    const leaf = fc.oneof(fc.jsonValue({ maxDepth: 2 }), fc.constantFrom("\u0000", 1e308, -1, null, 0.5));
    const patch = fc.oneof(
      fc.jsonValue({ maxDepth: 4 }),
      fc.dictionary(hostileKey, leaf, { maxKeys: 3 }).map((network) => ({ network })),
      fc.record({ network: fc.record({ node: fc.dictionary(fc.oneof(hostileKey, fc.constantFrom("forward", "left", "right")), leaf, { maxKeys: 3 }) }) }),
      fc.tuple(hostileKey, leaf).map(([k, v]) => `{"network": {"node": {${JSON.stringify(k)}: ${JSON.stringify(v)}}}}`),
    );
    await fc.assert(
      fc.asyncProperty(patch, async (p) => {
        const body = typeof p === "string" ? p : JSON.stringify(p);
        const a = await probe(`patch ${body.slice(0, 60)}`, `/api/v1/networks/${networkId}`, {
          method: "PATCH",
          body,
          headers: { "content-type": "application/json" },
        });
        if (/"(__proto__|constructor|prototype)"\s*:/.test(body) && a.status < 400) return false;
        return wellRefused(a);
      }),
      { numRuns: 120, seed: 61 },
    );
    expectNoFailures();
  });

  it("file names: arbitrary uploaded names round-trip through the download header", async () => {
    failures = [];
    const fileName = fc.oneof(
      fc.string({ unit: "grapheme", minLength: 1, maxLength: 40 }),
      fc.string({ unit: "binary", minLength: 1, maxLength: 40 }),
      fc.constantFrom(
        "数据.csv",
        "Messung-Größe-µ.csv",
        'a"b.csv',
        "..\\..\\evil.csv",
        "../../etc/passwd",
        "%00.csv",
        "a\r\nSet-Cookie: x=1.csv",
        "\u202eexe.csv",
        "x".repeat(400),
      ),
    );
    await fc.assert(
      fc.asyncProperty(fileName, async (n) => {
        const up = await probe(`file name ${JSON.stringify(n).slice(0, 40)}`, "/api/v1/datasets", { method: "POST", body: datasetForm(CSV, MAPPING, n) });
        if (up.status !== 201) return wellRefused(up);
        const { id, originalFilename } = up.body as unknown as { id: string; originalFilename: string | null };
        const res = await api(`/api/v1/datasets/${id}/original`);
        tried++;
        if (res.status !== 200 || (await res.text()) !== CSV) return false;
        const cd = res.headers.get("content-disposition") ?? "";
        const star = /filename\*=UTF-8''(\S+)$/.exec(cd);
        const shown = star ? decodeURIComponent(star[1]) : /filename="([^"]*)"/.exec(cd)?.[1];
        return shown === (originalFilename ?? shown) && !/[\r\n]/.test(cd);
      }),
      { numRuns: 40, seed: 67 },
    );
    expectNoFailures();
  });
});

describe("the web server's log", () => {
  it("held no SQL, no query parameters and no token hash while all of the above ran", () => {
    const fd = openSync(logFile, "r");
    const size = statSync(logFile).size;
    const buffer = Buffer.alloc(size - logOffset);
    readSync(fd, buffer, 0, buffer.length, logOffset);
    closeSync(fd);
    const log = buffer.toString("utf8");
    for (const leak of [
      "Failed query",
      "params:",
      "parameters:",
      'select "',
      "insert into",
      ...Object.values(demoTokens()),
      ...Object.values(demoTokens()).map((t) => createHash("sha256").update(t).digest("hex")),
    ])
      expect(log.includes(leak), leak.slice(0, 12)).toBe(false);
    console.log(`[hostile-requests] ${tried} hostile requests tried`);
    expect(tried).toBeGreaterThan(600);
  });
});
