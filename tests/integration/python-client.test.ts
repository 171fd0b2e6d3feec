// The Python client (public/clients/triskel.py, served at /clients/triskel.py) with Debian's python3
// against the running app and worker: tests/integration/python/drive_client.py runs a calculation,
// a scan with its CSV, a cancel, a dataset upload and a small fit, and provokes errors; this file
// checks what it found, the served file, and that the client parses as Python 3.9.
import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { appUrl, demoTokens } from "../support/services";

const ROOT = path.resolve(import.meta.dirname, "../..");
const CLIENT = path.join(ROOT, "public/clients/triskel.py");
const PYTHON = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";

describe("Python client", () => {
  it("is served without sign-in at /clients/triskel.py, the file of the repository", async () => {
    const res = await fetch(new URL("/clients/triskel.py", appUrl()), { redirect: "manual" });
    expect(res.status).toBe(200);
    expect(await res.text()).toBe(readFileSync(CLIENT, "utf8"));
  });

  it("parses as Python 3.9 (no later syntax), without warnings", () => {
    const r = spawnSync(PYTHON, ["-W", "error", "-c", "import ast, sys; ast.parse(open(sys.argv[1]).read(), feature_version=(3, 9))", CLIENT], {
      encoding: "utf8",
    });
    expect(r.status, r.stderr).toBe(0);
  });

  it("runs, scans, cancels, uploads, fits and raises TriskelError with status, code and message", () => {
    const tokens = demoTokens();
    const r = spawnSync(PYTHON, [path.join(ROOT, "tests/integration/python/drive_client.py")], {
      encoding: "utf8",
      timeout: 170_000,
      env: {
        ...process.env,
        TRISKEL_URL: appUrl(),
        TRISKEL_TOKEN: tokens.researcher,
        TRISKEL_STUDENT_TOKEN: tokens.student,
        TRISKEL_CLIENT_DIR: path.dirname(CLIENT),
        TRISKEL_WORK_DIR: mkdtempSync(path.join(tmpdir(), "triskel-python-")),
      },
    });
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    // the same numbers as compute on the same input
    const local = spawnSync(process.execPath, [path.join(ROOT, "scripts/cli.mjs"), "compute", path.join(ROOT, "docs/examples/run.json")], { encoding: "utf8" });
    const expected = JSON.parse(local.stdout);
    expect(out.run.result.inputHash).toBe(expected.inputHash);
    expect(out.run.result.conductance.total).toBeCloseTo(expected.conductance.total, 12);
    expect(out.run.polls).toBeGreaterThanOrEqual(1);
    expect(out.estimate.computeSeconds).toBeGreaterThan(0);
    expect(out.sweep.grid[1]).toBeCloseTo(expected.conductance.total, 12);
    expect(out.sweep.csv).toMatch(/^#/);
    expect(out.sweep.csv).toMatch(/\npoint_index,field_T,status,run_id,compute_s,/);
    expect(out.cancelled).toMatchObject({ status: null, code: "job_cancelled", jobStatus: "cancelled" });
    expect(out.cancelAgain).toEqual({ status: 409, code: "conflict" });
    expect(out.invalid).toMatchObject({ status: 422, code: "invalid_input", details: { field: "computation.energyMeV" } });
    expect(out.invalid.message).toMatch(/^computation\.energyMeV: /);
    expect(out.plan).toMatchObject({ status: 402, code: "payment_required", details: { limit: "maxCellsPerSide" } });
    expect(out.token).toMatchObject({ status: 401, code: "unauthenticated" });
    expect(out.unreachable).toMatchObject({ status: null, code: "unreachable" });
    expect(out.unreachable.message).toMatch(/^cannot reach http:\/\/127\.0\.0\.1:45099: /);
    expect(out.dataset.name).toBe("python client curve (synthetic)");
    expect(out.fit.status).toBe("succeeded");
    // the curve is the model's own at node.forward = 0.6 without noise: the fit finds it back, and
    // its checks say that a chi2 this small is suspicious
    expect(out.fit.parameters[0].parameter).toBe("node.forward");
    expect(Math.abs(out.fit.parameters[0].value - 0.6)).toBeLessThan(1e-6);
    expect(out.fit.flags).toContain("chi2_low");
    expect(out.badMapping).toMatchObject({ status: 422, code: "invalid_input" });
    expect(out.retryAfter.got).toEqual({ id: "r1", status: "succeeded" });
    expect(out.retryAfter.hits).toBe(2);
    expect(out.retryAfter.waited).toBeGreaterThanOrEqual(0.95);
  });
});
