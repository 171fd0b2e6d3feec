// The remote command line (`npm run -s cli -- submit | status | cancel | fetch`, src/client/) against
// the running app and worker: the same numbers as `compute` for the same file, scans with --csv,
// --no-wait, progress lines on standard error without a terminal, Ctrl-C without a terminal, and
// every exit code (0, 2, 3, 4, 5, 6) with one line on standard error.
import { spawn, spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { api, appUrl, demoTokens, type DemoTokenKey } from "../support/services";
import { smallNetwork, sql } from "./runs-support";

const ROOT = path.resolve(import.meta.dirname, "../..");
const CLI = path.join(ROOT, "scripts/cli.mjs");
const FIX = path.join(ROOT, "tests/fixtures");
const EXAMPLES = path.join(ROOT, "docs/examples");
const dir = mkdtempSync(path.join(tmpdir(), "triskel-remote-cli-"));
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/;
const leftRunning: string[] = [];
const PYTHON = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";

afterAll(async () => {
  // a job a test left running on purpose is cancelled, so later files find an idle worker
  for (const id of leftRunning) cli(["cancel", id]);
  await sql.end();
});

/** The command line as a script runs it: pipes (no terminal), the service from the environment. */
function cli(args: string[], options: { as?: DemoTokenKey; env?: Record<string, string | undefined>; input?: string } = {}) {
  const env = { ...process.env, TRISKEL_URL: appUrl(), TRISKEL_TOKEN: demoTokens()[options.as ?? "researcher"], ...options.env };
  const r = spawnSync(process.execPath, [CLI, ...args], { cwd: ROOT, env, input: options.input, encoding: "utf8", timeout: 170_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr, lines: r.stderr.trimEnd().split("\n") };
}

function file(name: string, body: unknown): string {
  const p = path.join(dir, name);
  writeFileSync(p, JSON.stringify(body));
  return p;
}

const compute = (p: string) => JSON.parse(cli(["compute", p]).stdout) as Record<string, unknown> & { conductance: Record<string, number>; inputHash: string };

describe("submit a calculation", () => {
  it("waits, prints the finished calculation as the API returns it, with the numbers of compute, progress one line per change", () => {
    const p = path.join(EXAMPLES, "run.json");
    const r = cli(["submit", p]);
    expect(r.status, r.stderr).toBe(0);
    const run = JSON.parse(r.stdout);
    expect(run.id).toMatch(UUID);
    expect(run.status).toBe("succeeded");
    const local = compute(p);
    expect(run.result.inputHash).toBe(local.inputHash);
    for (const k of ["valleyK", "valleyKPrime", "total"]) expect(Math.abs(run.result.conductance[k] - local.conductance[k]), k).toBeLessThan(1e-12);
    expect(run.result.conductance.unit).toBe("e2/h");
    expect(run.result.checks).toEqual(local.checks);
    // no terminal: plain lines, no carriage returns or escapes, the first the estimate, the last the end
    expect(r.stderr.includes("\r") || r.stderr.includes("\u001b")).toBe(false);
    expect(r.lines[0]).toMatch(new RegExp(`^calculation ${run.id} submitted \\(estimate [0-9.e+-]+ compute-seconds, [0-9.]+ USD\\)$`));
    expect(r.lines.at(-1)).toBe(`calculation ${run.id}: succeeded 100%`);
    for (const line of r.lines.slice(1)) expect(line).toMatch(new RegExp(`^calculation ${run.id}: (queued|running|succeeded) \\d+%$`));
    expect(new Set(r.lines).size).toBe(r.lines.length);
  });

  it("--no-wait prints the id; status shows it; fetch waits and prints result.json, byte for byte what compute prints", async () => {
    const p = path.join(EXAMPLES, "run.json");
    const r = cli(["submit", p, "--no-wait"]);
    expect(r.status, r.stderr).toBe(0);
    const id = r.stdout.trim();
    expect(id).toMatch(UUID);
    const s = cli(["status", id]);
    expect(s.status, s.stderr).toBe(0);
    expect(JSON.parse(s.stdout)).toMatchObject({ id, kind: "conductance" });
    expect(s.lines).toHaveLength(1);
    expect(s.lines[0]).toMatch(new RegExp(`^calculation ${id}: (queued|running|succeeded) \\d+%$`));
    const f = cli(["fetch", id]);
    expect(f.status, f.stderr).toBe(0);
    const served = await (await api(`/api/v1/runs/${id}/result.json`)).text();
    expect(f.stdout).toBe(served);
    expect(JSON.parse(f.stdout).conductance.total).toBeCloseTo(compute(p).conductance.total, 12);
  });

  it("the files compute refuses with exit code 2 give 2 from submit too, with compute's line, service up or out of reach", async () => {
    for (const name of ["invalid-unknown-field.json", "invalid-unreachable-node.json", "invalid-odd-cylinder.json"]) {
      const local = cli(["compute", path.join(FIX, name)]);
      expect(local.status, name).toBe(2);
      const r = cli(["submit", path.join(FIX, name)]);
      expect(r.status, `${name}: ${r.stderr}`).toBe(2);
      expect(r.lines, name).toEqual(local.lines);
      expect(r.stdout).toBe("");
      const offline = cli(["submit", path.join(FIX, name)], { env: { TRISKEL_URL: "http://127.0.0.1:45099" } });
      expect(offline.status, `${name} offline: ${offline.stderr}`).toBe(2);
      expect(offline.lines, name).toEqual(local.lines);
    }
    // a body the engine cannot check here (a saved network) is refused by the service: 422, exit code 2
    const saved = await (
      await api("/api/v1/networks", { method: "POST", json: { name: "remote-cli invalid computation", network: smallNetwork(4, 4) } })
    ).json();
    const bad = cli(["submit", file("saved-bad.json", { networkId: saved.id, computation: { kind: "conductance", energyMeV: "high" } })]);
    expect(bad.status, bad.stderr).toBe(2);
    expect(bad.lines).toEqual([expect.stringMatching(/\(HTTP 422 invalid_input\)$/)]);
    const notJson = path.join(dir, "broken.json");
    writeFileSync(notJson, "{ nope");
    const a = cli(["compute", notJson]);
    const b = cli(["submit", notJson]);
    expect([a.status, b.status]).toEqual([2, 2]);
    expect(b.stderr).toBe(a.stderr);
    const badSweep = cli(["submit", file("bad-sweep.json", { network: smallNetwork(), computation: { kind: "conductance" }, sweep: { axis: [] } })]);
    expect(badSweep.status).toBe(2);
    expect(badSweep.lines).toEqual(["input: sweep.axis: unknown member; allowed: axes, ensemble, name"]);
    const usage = cli(["submit", path.join(EXAMPLES, "run.json"), "--csv", path.join(dir, "x.csv")]);
    expect(usage.status).toBe(2);
    expect(usage.lines).toEqual(["submit: --csv writes a scan's results; this file has no sweep member"]);
    expect(cli(["status"]).status).toBe(2);
    expect(cli(["status", "a", "--wat"]).lines).toEqual(["status: unknown option --wat; allowed: --url, --token"]);
    const missing = cli(["status", "00000000-0000-4000-8000-000000000000"]);
    expect(missing.status).toBe(2);
    expect(missing.lines).toEqual(["no calculation or scan 00000000-0000-4000-8000-000000000000 in this group (HTTP 404 not_found)"]);
  });

  it("--dry-run prints the estimate and submits nothing", async () => {
    const count = async () => Number((await sql`select count(*)::int as n from sweeps`)[0].n);
    const before = await count();
    const r = cli(["submit", path.join(EXAMPLES, "scan.json"), "--dry-run"]);
    expect(r.status, r.stderr).toBe(0);
    const dry = JSON.parse(r.stdout);
    expect(dry).toMatchObject({ dryRun: true, pointCount: 5 });
    expect(dry.estimate.computeSeconds).toBeGreaterThan(0);
    expect(r.lines).toEqual([expect.stringMatching(/^dry run: estimate [0-9.e+-]+ compute-seconds, [0-9.]+ USD; nothing submitted$/)]);
    expect(await count()).toBe(before);
  });
});

describe("submit a scan", () => {
  it("waits, prints the scan, --csv writes its results; a point has the numbers of compute", () => {
    const csvPath = path.join(dir, "scan.csv");
    const r = cli(["submit", path.join(EXAMPLES, "scan.json"), "--csv", csvPath]);
    expect(r.status, r.stderr).toBe(0);
    const scan = JSON.parse(r.stdout);
    expect(scan).toMatchObject({ status: "succeeded", pointCount: 5, name: "conductance versus field (example)" });
    expect(r.lines.at(-1)).toBe(`scan ${scan.id}: succeeded 100% (5 of 5 points done)`);
    for (const line of r.lines.slice(1)) expect(line).toMatch(new RegExp(`^scan ${scan.id}: (queued|running|succeeded) \\d+% \\(\\d of 5 points done\\)$`));
    const csv = readFileSync(csvPath, "utf8");
    const rows = csv.split("\n").filter((l) => l && !l.startsWith("#"));
    // the export rule: units in the column names (docs/api.md)
    expect(rows[0]).toMatch(/^point_index,field_T,status,run_id,compute_s,/);
    expect(rows).toHaveLength(6);
    expect(csv).toMatch(/^# axis 1: Magnetic field B \(T\): 5 values from 0 T to 0\.2 T$/m);
    // the last point (fieldTesla = 0.2) against compute on the same input
    const example = JSON.parse(readFileSync(path.join(EXAMPLES, "scan.json"), "utf8"));
    const local = compute(file("scan-point.json", { network: example.network, computation: { ...example.computation, fieldTesla: 0.2 } }));
    expect(scan.points[4].coordinates).toEqual({ fieldTesla: 0.2 });
    expect(scan.grid.quantities["conductance.total"][4]).toBeCloseTo(local.conductance.total, 12);
    // fetch of a scan prints the same CSV (but for the time it was generated)
    const f = cli(["fetch", scan.id]);
    expect(f.status).toBe(0);
    const undated = (text: string) => text.replace(/^# exported: .*$/m, "");
    expect(undated(f.stdout)).toBe(undated(csv));
  });
});

describe("exit codes", () => {
  it("3: a Free student over the plan's largest network (402), the API's message in one line", () => {
    const r = cli(["submit", file("too-big.json", { network: smallNetwork(42, 42), computation: { kind: "conductance" } })], { as: "student" });
    expect(r.status, r.stderr).toBe(3);
    expect(r.lines).toHaveLength(1);
    expect(r.lines[0]).toMatch(/40.*\(HTTP 402 payment_required\)$/);
  });

  it("4: a cancelled scan; cancel prints it, fetch and submit report it with one line", () => {
    const big = {
      network: smallNetwork(48, 48),
      computation: { kind: "conductance", energyMeV: 0.5 },
      sweep: { axes: [{ parameter: "fieldTesla", from: 0, to: 1, points: 30 }] },
    };
    const r = cli(["submit", file("long-scan.json", big), "--no-wait"]);
    expect(r.status, r.stderr).toBe(0);
    const id = r.stdout.trim();
    const c = cli(["cancel", id]);
    expect(c.status, c.stderr).toBe(0);
    expect(JSON.parse(c.stdout).id).toBe(id);
    expect(c.lines[0]).toMatch(new RegExp(`^cancel requested: scan ${id}: `));
    const f = cli(["fetch", id]);
    expect(f.status).toBe(4);
    expect(f.lines.at(-1)).toBe(`scan ${id} was cancelled`);
    // cancelling again: it has finished (409), exit 2 with the API's message
    const again = cli(["cancel", id]);
    expect(again.status).toBe(2);
    expect(again.lines).toHaveLength(1);
    expect(again.lines[0]).toMatch(/\(HTTP 409 conflict\)$/);
  });

  it("5: a bad token (401), no token, a viewer submitting (403)", () => {
    const bad = cli(["submit", path.join(EXAMPLES, "run.json")], { env: { TRISKEL_TOKEN: "trk_not_a_real_token_000000000000" } });
    expect(bad.status).toBe(5);
    expect(bad.lines).toHaveLength(1);
    expect(bad.lines[0]).toMatch(/\(HTTP 401 unauthenticated\)$/);
    const none = cli(["status", "x"], { env: { TRISKEL_TOKEN: undefined } });
    expect(none.status).toBe(5);
    expect(none.lines[0]).toMatch(/^no API token: give --token TOKEN or set TRISKEL_TOKEN/);
    const viewer = cli(["submit", path.join(EXAMPLES, "run.json")], { as: "viewer" });
    expect(viewer.status).toBe(5);
    expect(viewer.lines[0]).toMatch(/\(HTTP 403 forbidden\)$/);
    // --url and --token win over the environment
    const flags = cli(["status", "00000000-0000-4000-8000-000000000000", "--url", appUrl(), "--token", demoTokens().researcher], {
      env: { TRISKEL_URL: "http://127.0.0.1:45099", TRISKEL_TOKEN: "trk_wrong" },
    });
    expect(flags.status).toBe(2);
  });

  it("6: an unreachable service, one line naming it", () => {
    const r = cli(["submit", path.join(EXAMPLES, "run.json")], { env: { TRISKEL_URL: "http://127.0.0.1:45099" } });
    expect(r.status).toBe(6);
    expect(r.lines).toEqual([expect.stringMatching(/^cannot reach http:\/\/127\.0\.0\.1:45099: ECONNREFUSED$/)]);
    const notUrl = cli(["status", "x"], { env: { TRISKEL_URL: "ftp://example" } });
    expect(notUrl.status).toBe(2);
  });

  it("130: Ctrl-C without a terminal leaves the job running and prints its id", async () => {
    const big = {
      network: smallNetwork(48, 48),
      computation: { kind: "conductance", energyMeV: 0.5 },
      sweep: { axes: [{ parameter: "fieldTesla", from: 0, to: 1, points: 30 }] },
    };
    const env = { ...process.env, TRISKEL_URL: appUrl(), TRISKEL_TOKEN: demoTokens().researcher };
    const child = spawn(process.execPath, [CLI, "submit", file("interrupted-scan.json", big)], { cwd: ROOT, env, stdio: ["pipe", "pipe", "pipe"] });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d) => (stdout += d));
    const progressed = new Promise<void>((resolve) =>
      child.stderr.on("data", (d) => {
        stderr += d;
        if (/: (queued|running) \d+%/.test(stderr)) resolve();
      }),
    );
    await progressed;
    child.kill("SIGINT");
    const code = await new Promise<number | null>((resolve) => child.on("close", resolve));
    const id = stdout.trim();
    expect(id).toMatch(UUID);
    leftRunning.push(id);
    expect(code).toBe(130);
    expect(stderr.trimEnd().split("\n").at(-1)).toBe(`interrupted: scan ${id} is left running (npm run -s cli -- fetch ${id} waits for it again)`);
    const [row] = await sql`select cancel_requested_at from sweeps where id = ${id}`;
    expect(row.cancel_requested_at).toBeNull();
  });

  it("on a terminal: a bar redrawn in place; Ctrl-C asks whether to cancel, y cancels (exit 4)", () => {
    const big = {
      network: smallNetwork(48, 48),
      computation: { kind: "conductance", energyMeV: 0.5 },
      sweep: { axes: [{ parameter: "fieldTesla", from: 0, to: 1, points: 30 }] },
    };
    const env = { ...process.env, TRISKEL_URL: appUrl(), TRISKEL_TOKEN: demoTokens().researcher };
    const driver = path.join(ROOT, "tests/integration/python/tty_driver.py");
    const r = spawnSync(PYTHON, [driver, "y", process.execPath, CLI, "submit", file("terminal-scan.json", big)], {
      cwd: ROOT,
      env,
      encoding: "utf8",
      timeout: 170_000,
    });
    expect(r.status, r.stderr).toBe(0);
    const { exit, terminal } = JSON.parse(r.stdout) as { exit: number; terminal: string };
    expect(exit, terminal).toBe(4);
    const id = /scan ([0-9a-f-]{36}) submitted/.exec(terminal)?.[1] ?? "";
    expect(id).toMatch(UUID);
    expect(terminal).toContain(`\r\u001b[2K[${"-".repeat(24)}] scan ${id}: `);
    expect(terminal).toContain("cancel the job? [y/N] ");
    expect(terminal).toContain(`cancelling scan ${id}`);
    expect(terminal.trimEnd().endsWith(`scan ${id} was cancelled`)).toBe(true);
  });
});
