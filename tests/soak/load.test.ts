// Load (npm run test:soak): autocannon on loopback, 50 connections for 60 s, reading runs and
// submitting small runs with a Lab token of a workspace of its own (no spend cap, so the demo
// lab's budget is untouched). Throughput, p50/p95/p99 latency and errors go to
// .data/soak-<base>/load.json and a table on standard output.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import autocannon from "autocannon";
import { appUrl } from "../support/services";
import { createLabWorkspace, record, SMALL_RUN, sql, type SoakWorkspace } from "./support";

const CONNECTIONS = Number(process.env.SOAK_LOAD_CONNECTIONS ?? 50);
const SECONDS = Number(process.env.SOAK_LOAD_SECONDS ?? 60);
/** One submission per this many requests of a connection; the rest read. */
const WRITE_EVERY = 10;

let w: SoakWorkspace;
beforeAll(async () => {
  w = await createLabWorkspace("Soak load lab");
});
afterAll(async () => {
  await sql.end();
});

function percentile(sorted: number[], p: number) {
  if (!sorted.length) return 0;
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)];
}

describe("load", () => {
  it(`${CONNECTIONS} connections for ${SECONDS} s reading runs and submitting small runs: no errors, nothing lost`, async () => {
    const url = new URL(appUrl());
    expect(url.hostname).toBe("127.0.0.1");
    const headers = { authorization: `Bearer ${w.tokens.researcher}`, "content-type": "application/json" };
    const reads = ["/api/v1/runs?limit=20", "/api/v1/runs?limit=5&status=succeeded", "/api/v1/usage"];
    const requests: autocannon.Request[] = [];
    for (let i = 0; i < WRITE_EVERY - 1; i++) requests.push({ method: "GET", path: reads[i % reads.length], headers });
    requests.push({ method: "POST", path: "/api/v1/runs", headers, body: JSON.stringify(SMALL_RUN) });

    const times: { read: number[]; write: number[] } = { read: [], write: [] };
    const statuses: Record<string, number> = {};
    let accepted = 0;
    const instance = autocannon({ url: url.origin, connections: CONNECTIONS, duration: SECONDS, timeout: 30, requests });
    instance.on("response", (client: autocannon.Client, statusCode: number, _bytes: number, responseTime: number) => {
      statuses[statusCode] = (statuses[statusCode] ?? 0) + 1;
      // The request just answered (no pipelining: the client moves to its next request after this event).
      const idx = client.requestIterator?.currentRequestIndex ?? 0;
      const isWrite = requests[idx]?.method === "POST";
      (isWrite ? times.write : times.read).push(responseTime);
      if (isWrite && statusCode === 202) accepted++;
    });
    const result = await new Promise<autocannon.Result>((resolve, reject) => {
      instance.on("done", resolve);
      instance.on("error", reject);
    });
    const all = [...times.read, ...times.write].sort((a, b) => a - b);
    const r = [...times.read].sort((a, b) => a - b);
    const wr = [...times.write].sort((a, b) => a - b);
    const [{ runs }] = await sql`select count(*)::int as runs from runs where workspace_id = ${w.id}`;
    const figures = {
      connections: CONNECTIONS,
      durationSeconds: SECONDS,
      requests: result.requests.total,
      requestsPerSecond: Math.round(result.requests.average),
      latencyMs: { p50: percentile(all, 50), p95: percentile(all, 95), p99: percentile(all, 99), max: all[all.length - 1] ?? 0 },
      readLatencyMs: { p50: percentile(r, 50), p95: percentile(r, 95), p99: percentile(r, 99), count: r.length },
      writeLatencyMs: { p50: percentile(wr, 50), p95: percentile(wr, 95), p99: percentile(wr, 99), count: wr.length },
      statuses,
      errors: result.errors,
      timeouts: result.timeouts,
      non2xx: result.non2xx,
      runsAccepted: accepted,
      runsInDatabase: runs,
    };
    record("load.json", "load", figures);
    console.table({
      all: { "req/s": figures.requestsPerSecond, p50: figures.latencyMs.p50, p95: figures.latencyMs.p95, p99: figures.latencyMs.p99, count: all.length },
      reads: {
        "req/s": Math.round(r.length / SECONDS),
        p50: figures.readLatencyMs.p50,
        p95: figures.readLatencyMs.p95,
        p99: figures.readLatencyMs.p99,
        count: r.length,
      },
      submissions: {
        "req/s": Math.round(wr.length / SECONDS),
        p50: figures.writeLatencyMs.p50,
        p95: figures.writeLatencyMs.p95,
        p99: figures.writeLatencyMs.p99,
        count: wr.length,
      },
    });
    console.log(
      `[load] statuses ${JSON.stringify(statuses)}, errors ${result.errors}, timeouts ${result.timeouts}, runs accepted ${accepted}, in the database ${runs}`,
    );
    expect(result.errors).toBe(0);
    expect(result.timeouts).toBe(0);
    expect(result.non2xx).toBe(0);
    expect(result.requests.total).toBeGreaterThan(CONNECTIONS * 10);
    // Every accepted submission is a run row (nothing lost). Submissions still in flight when the
    // 60 s ended may have been stored without autocannon reading their 202: at most one per connection.
    expect(runs).toBeGreaterThanOrEqual(accepted);
    expect(runs).toBeLessThanOrEqual(accepted + CONNECTIONS);
  });
});
