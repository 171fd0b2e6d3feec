// Load (npm run test:soak): autocannon on loopback against the production rate limits (the
// defaults of src/env.ts; the soak instance does not raise them, scripts/env.d/ratelimit.sh).
// Like real clients of one lab, the load is spread over several members, each with a token of
// their own, each pacing itself under its member's budget: 50 connections for 60 s reading runs
// and submitting small runs. Then one member goes over its budget on purpose: 429 with
// Retry-After is the expected answer, counted and reported. Throughput, p50/p95/p99 latency,
// statuses and 429s go to .data/soak-<base>/load.json and a table on standard output.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import autocannon from "autocannon";
import { envSchema } from "@/env";
import { appUrl } from "../support/services";
import { addMembers, createLabWorkspace, record, SMALL_RUN, sql, type SoakWorkspace } from "./support";

const CONNECTIONS = Number(process.env.SOAK_LOAD_CONNECTIONS ?? 50);
const SECONDS = Number(process.env.SOAK_LOAD_SECONDS ?? 60);
const MEMBERS = Number(process.env.SOAK_LOAD_MEMBERS ?? 10);
/** One submission per this many requests of a connection; the rest read. */
const WRITE_EVERY = 10;
/** The budgets the web app enforces (the same variables, parsed by the same schema). */
const READS_PER_MINUTE = envSchema.shape.RATE_LIMIT_READS_PER_MINUTE.parse(process.env.RATE_LIMIT_READS_PER_MINUTE);
const WRITES_PER_MINUTE = envSchema.shape.RATE_LIMIT_WRITES_PER_MINUTE.parse(process.env.RATE_LIMIT_WRITES_PER_MINUTE);
/** A polite client keeps to this share of its member's budgets. */
const PACE = 0.9;

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

interface Tally {
  read: number[];
  write: number[];
  statuses: Record<string, number>;
  accepted: number;
  limited: number;
}
const tally = (): Tally => ({ read: [], write: [], statuses: {}, accepted: 0, limited: 0 });

/** One autocannon instance for one member's token; answers are added to `t`. */
function load(token: string, connections: number, seconds: number, requests: autocannon.Request[], t: Tally, connectionRate?: number) {
  const url = new URL(appUrl());
  const withToken = requests.map((r) => ({ ...r, headers: { authorization: `Bearer ${token}`, "content-type": "application/json" } }));
  const instance = autocannon({
    url: url.origin,
    connections,
    duration: seconds,
    timeout: 30,
    requests: withToken,
    ...(connectionRate ? { connectionRate } : {}),
  });
  instance.on("response", (client: autocannon.Client, statusCode: number, _bytes: number, responseTime: number) => {
    t.statuses[statusCode] = (t.statuses[statusCode] ?? 0) + 1;
    // The request just answered (no pipelining: the client moves to its next request after this event).
    const idx = client.requestIterator?.currentRequestIndex ?? 0;
    const isWrite = withToken[idx]?.method === "POST";
    (isWrite ? t.write : t.read).push(responseTime);
    if (isWrite && statusCode === 202) t.accepted++;
    if (statusCode === 429) t.limited++;
  });
  return new Promise<autocannon.Result>((resolve, reject) => {
    instance.on("done", resolve);
    instance.on("error", reject);
  });
}

const sum = (results: autocannon.Result[], f: (r: autocannon.Result) => number) => results.reduce((a, r) => a + f(r), 0);

describe("load", () => {
  it(`${CONNECTIONS} connections of ${MEMBERS} members for ${SECONDS} s under the production rate limits: no errors, nothing lost, 429s counted`, async () => {
    expect(new URL(appUrl()).hostname).toBe("127.0.0.1");
    // Production budgets, not the test instances' 1,000,000.
    expect([READS_PER_MINUTE, WRITES_PER_MINUTE]).toEqual([
      envSchema.shape.RATE_LIMIT_READS_PER_MINUTE.parse(undefined),
      envSchema.shape.RATE_LIMIT_WRITES_PER_MINUTE.parse(undefined),
    ]);
    const members = await addMembers(w, MEMBERS + 1);
    const greedy = members.pop()!;
    const reads = ["/api/v1/runs?limit=20", "/api/v1/runs?limit=5&status=succeeded", "/api/v1/usage"];
    const requests: autocannon.Request[] = [];
    for (let i = 0; i < WRITE_EVERY - 1; i++) requests.push({ method: "GET", path: reads[i % reads.length] });
    requests.push({ method: "POST", path: "/api/v1/runs", body: JSON.stringify(SMALL_RUN) });

    // Pacing: a member's connections together stay under PACE of both of its budgets.
    const perMember = Math.max(1, Math.floor(CONNECTIONS / MEMBERS));
    const memberRate = Math.min((PACE * READS_PER_MINUTE) / 60 / ((WRITE_EVERY - 1) / WRITE_EVERY), (PACE * WRITES_PER_MINUTE) / 60 / (1 / WRITE_EVERY));
    const connectionRate = Math.max(1, Math.floor(memberRate / perMember));
    const t = tally();
    const results = await Promise.all(members.map((m) => load(m.token, perMember, SECONDS, requests, t, connectionRate)));

    const all = [...t.read, ...t.write].sort((a, b) => a - b);
    const r = [...t.read].sort((a, b) => a - b);
    const wr = [...t.write].sort((a, b) => a - b);
    const total = sum(results, (x) => x.requests.total);
    const errors = sum(results, (x) => x.errors);
    const timeouts = sum(results, (x) => x.timeouts);
    const [{ runs }] = await sql`select count(*)::int as runs from runs where workspace_id = ${w.id}`;
    const otherNon2xx = Object.entries(t.statuses)
      .filter(([s]) => !s.startsWith("2") && s !== "429")
      .reduce((a, [, n]) => a + n, 0);

    // Over the budget on purpose: one member, unpaced, reads only, 15 s.
    const g = tally();
    const greedyResult = await load(greedy.token, 10, 15, [{ method: "GET", path: "/api/v1/runs?limit=5" }], g);
    const probe = await fetch(new URL("/api/v1/runs?limit=1", appUrl()), { headers: { authorization: `Bearer ${greedy.token}` } });
    const probeBody = await probe.json();
    const retryAfter = Number(probe.headers.get("retry-after"));
    // Meanwhile the polite members' budgets are their own: one of them still reads.
    const other = await fetch(new URL("/api/v1/runs?limit=1", appUrl()), { headers: { authorization: `Bearer ${members[0].token}` } });

    const figures = {
      rateLimits: { readsPerMinute: READS_PER_MINUTE, writesPerMinute: WRITES_PER_MINUTE, source: "src/env.ts defaults (production)" },
      members: MEMBERS,
      connections: perMember * MEMBERS,
      connectionsPerMember: perMember,
      requestsPerSecondPerConnection: connectionRate,
      durationSeconds: SECONDS,
      requests: total,
      requestsPerSecond: Math.round(total / SECONDS),
      latencyMs: { p50: percentile(all, 50), p95: percentile(all, 95), p99: percentile(all, 99), max: all[all.length - 1] ?? 0 },
      readLatencyMs: { p50: percentile(r, 50), p95: percentile(r, 95), p99: percentile(r, 99), count: r.length },
      writeLatencyMs: { p50: percentile(wr, 50), p95: percentile(wr, 95), p99: percentile(wr, 99), count: wr.length },
      statuses: t.statuses,
      rateLimited: t.limited,
      errors,
      timeouts,
      otherNon2xx,
      runsAccepted: t.accepted,
      runsInDatabase: runs,
      overBudget: {
        connections: 10,
        seconds: 15,
        requests: greedyResult.requests.total,
        statuses: g.statuses,
        rateLimited: g.limited,
        probeStatus: probe.status,
        retryAfterSeconds: retryAfter,
        otherMemberStatus: other.status,
      },
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
      `[load] statuses ${JSON.stringify(t.statuses)} (429: ${t.limited}), errors ${errors}, timeouts ${timeouts}, runs accepted ${t.accepted}, in the database ${runs}; ` +
        `over budget: ${JSON.stringify(g.statuses)}, probe ${probe.status} Retry-After ${retryAfter}`,
    );
    expect(errors).toBe(0);
    expect(timeouts).toBe(0);
    expect(otherNon2xx).toBe(0);
    expect(total).toBeGreaterThan(MEMBERS * perMember * 10);
    // Paced under their budgets, the members are (almost) never refused; each 429 is reported above.
    expect(t.limited).toBeLessThanOrEqual(Math.ceil(total / 100));
    // Every accepted submission is a run row (nothing lost). Submissions still in flight when the
    // time ended may have been stored without autocannon reading their 202: at most one per connection.
    expect(runs).toBeGreaterThanOrEqual(t.accepted);
    expect(runs).toBeLessThanOrEqual(t.accepted + perMember * MEMBERS);
    // The member over its budget is refused with 429 and told when to come back; others are not.
    expect(g.limited).toBeGreaterThan(0);
    expect(Object.keys(g.statuses).filter((s) => s !== "200" && s !== "429")).toEqual([]);
    expect(probe.status).toBe(429);
    expect(retryAfter).toBeGreaterThan(0);
    expect(retryAfter).toBeLessThanOrEqual(60);
    expect(probeBody.error.message).toBeTruthy();
    expect(other.status).toBe(200);
  });
});
