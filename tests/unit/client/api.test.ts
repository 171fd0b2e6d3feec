// The remote command line's client (src/client/api.ts) and progress lines (src/client/progress.ts)
// against a local stand-in server: Retry-After is honoured on 429 and 503, errors carry the API's
// code and message, statuses map to the documented exit codes.
import { createServer, type IncomingMessage, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { PassThrough } from "node:stream";
import { afterEach, describe, expect, it } from "vitest";
import { ClientSetupError, EXIT, exitCodeOf, RemoteApiError, retryAfterSeconds, TriskelClient } from "@/client/api";
import { describeState, ProgressReporter } from "@/client/progress";

let close: (() => void) | null = null;
afterEach(() => close?.());

async function standIn(
  answer: (req: IncomingMessage, res: ServerResponse, hit: number) => void,
): Promise<{ url: string; hits: { at: number; req: IncomingMessage }[] }> {
  const hits: { at: number; req: IncomingMessage }[] = [];
  const server = createServer((req, res) => {
    hits.push({ at: Date.now(), req });
    answer(req, res, hits.length);
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  close = () => server.close();
  return { url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`, hits };
}

const json = (res: ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}) => {
  res.writeHead(status, { "content-type": "application/json", ...headers });
  res.end(JSON.stringify(body));
};

describe("TriskelClient", () => {
  it("waits out a 429 and a 503 as Retry-After says, then answers; sends the token", async () => {
    const s = await standIn((req, res, hit) => {
      if (hit === 1) return json(res, 429, { error: { code: "rate_limited", message: "Too many read requests." } }, { "retry-after": "1" });
      if (hit === 2) return json(res, 503, { error: { code: "unavailable", message: "Redis is down." } }, { "retry-after": "0" });
      json(res, 200, { id: "r1", status: "running", progress: 0.5 });
    });
    const busy: string[] = [];
    const client = new TriskelClient({
      url: `${s.url}/api/v1/`,
      token: "trk_t",
      onBusy: (status, seconds, message) => busy.push(`${status} ${seconds} ${message}`),
    });
    const started = Date.now();
    const run = await client.call("GET /api/v1/runs/{id}", { params: { id: "r1" } });
    expect(run).toMatchObject({ id: "r1", status: "running" });
    expect(s.hits).toHaveLength(3);
    expect(s.hits[1].at - s.hits[0].at).toBeGreaterThanOrEqual(950);
    expect(Date.now() - started).toBeGreaterThanOrEqual(950);
    expect(busy).toEqual(["429 1 Too many read requests.", "503 0 Redis is down."]);
    expect(s.hits[0].req.url).toBe("/api/v1/runs/r1");
    expect(s.hits[0].req.headers.authorization).toBe("Bearer trk_t");
  });

  it("gives up after its retries, and throws the API's code and message with the exit code", async () => {
    const s = await standIn((req, res) => json(res, 503, { error: { code: "unavailable", message: "PostgreSQL is down." } }, { "retry-after": "0" }));
    const client = new TriskelClient({ url: s.url, token: "trk_t", busyRetries: 2 });
    const e = await client.call("GET /api/v1/sweeps/{id}", { params: { id: "s" } }).catch((x: unknown) => x);
    expect(e).toBeInstanceOf(RemoteApiError);
    expect(e).toMatchObject({ status: 503, code: "unavailable", message: "PostgreSQL is down.", exitCode: EXIT.unreachable });
    expect(s.hits).toHaveLength(3);
  });

  it("sends dry runs with their query and bodies as JSON; an error body that is not JSON still gives a message", async () => {
    const s = await standIn((req, res) => {
      res.writeHead(502, { "content-type": "text/plain" });
      res.end("bad gateway");
    });
    const client = new TriskelClient({ url: s.url, token: "trk_t" });
    const e = (await client.call("POST /api/v1/runs?dryRun=true", { json: { computation: {} } }).catch((x: unknown) => x)) as RemoteApiError;
    expect(s.hits[0].req.url).toBe("/api/v1/runs?dryRun=true");
    expect(s.hits[0].req.method).toBe("POST");
    expect(s.hits[0].req.headers["content-type"]).toBe("application/json");
    expect(e.status).toBe(502);
    expect(e.message).toBe("HTTP 502 Bad Gateway: bad gateway");
    expect(e.exitCode).toBe(6);
  });

  it("an address that is not http(s) is refused before anything is sent; an unreachable one is status 0, exit 6", async () => {
    expect(() => new TriskelClient({ url: "ftp://x", token: "t" })).toThrow(ClientSetupError);
    expect(() => new TriskelClient({ url: "not a url", token: "t" })).toThrow(/is not a URL/);
    const s = await standIn((req, res) => json(res, 200, {}));
    const port = new URL(s.url).port;
    close?.();
    close = null;
    const e = (await new TriskelClient({ url: `http://127.0.0.1:${port}`, token: "t" }).call("GET /api/v1/runs").catch((x: unknown) => x)) as RemoteApiError;
    expect(e.status).toBe(0);
    expect(e.exitCode).toBe(6);
    expect(e.message).toBe(`cannot reach http://127.0.0.1:${port}: ECONNREFUSED`);
  });
});

describe("exit codes and Retry-After", () => {
  it("maps every status as documented", () => {
    expect([400, 404, 409, 413, 422].map(exitCodeOf)).toEqual([2, 2, 2, 2, 2]);
    expect(exitCodeOf(402)).toBe(3);
    expect([401, 403].map(exitCodeOf)).toEqual([5, 5]);
    expect([0, 429, 500, 503].map(exitCodeOf)).toEqual([6, 6, 6, 6]);
  });
  it("reads seconds and HTTP dates; without a header it doubles", () => {
    expect(retryAfterSeconds("7", 0)).toBe(7);
    expect(retryAfterSeconds(new Date(10_000 + 3_000).toUTCString(), 0, 10_000)).toBe(3);
    expect([0, 1, 2, 10].map((a) => retryAfterSeconds(null, a))).toEqual([1, 2, 4, 30]);
  });
});

describe("progress", () => {
  const state = {
    noun: "scan" as const,
    id: "s1",
    status: "running" as const,
    progress: 0.4,
    pointCount: 10,
    counts: { queued: 5, running: 1, succeeded: 3, failed: 1, cancelled: 0 },
  };
  it("one line per change when not a terminal", () => {
    const stream = new PassThrough() as unknown as NodeJS.WriteStream;
    let text = "";
    (stream as unknown as PassThrough).on("data", (d) => (text += d));
    const p = new ProgressReporter(stream);
    p.update(state);
    p.update(state);
    p.update({ ...state, progress: 0.5 });
    p.end();
    expect(text).toBe("scan s1: running 40% (4 of 10 points done, 1 failed)\nscan s1: running 50% (4 of 10 points done, 1 failed)\n");
  });
  it("a bar redrawn in place on a terminal", () => {
    const stream = new PassThrough() as unknown as NodeJS.WriteStream & { isTTY: boolean; columns: number };
    stream.isTTY = true;
    stream.columns = 200;
    let text = "";
    (stream as unknown as PassThrough).on("data", (d) => (text += d));
    const p = new ProgressReporter(stream);
    p.update({ noun: "calculation", id: "r1", status: "running", progress: 0.5 });
    p.end();
    expect(text).toBe(`\r\x1b[2K[${"#".repeat(12)}${"-".repeat(12)}] ${describeState({ noun: "calculation", id: "r1", status: "running", progress: 0.5 })}\n`);
  });
});
