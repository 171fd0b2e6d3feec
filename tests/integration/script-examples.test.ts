// Every "from a script" example (src/client/examples.ts, files under docs/examples/) run against the
// running app as a reader would run it, and the manual's page /manual/scripts showing those files.
// The shell example runs in a fresh folder that sees the repository's docs/ and an `npm` that runs
// `npm run -s cli -- ...` as the repository's command line (node scripts/cli.mjs ...).
import { spawnSync } from "node:child_process";
import { chmodSync, existsSync, mkdirSync, mkdtempSync, readFileSync, symlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { SCRIPT_EXAMPLES } from "../../src/client/examples";
import { appUrl, demoTokens } from "../support/services";

const ROOT = path.resolve(import.meta.dirname, "../..");
const PYTHON = existsSync("/usr/bin/python3") ? "/usr/bin/python3" : "python3";

/** A folder where the examples' relative paths (docs/examples/...) resolve, with outputs kept apart from the repository. */
function workFolder(): string {
  const dir = mkdtempSync(path.join(tmpdir(), "triskel-examples-"));
  symlinkSync(path.join(ROOT, "docs"), path.join(dir, "docs"));
  mkdirSync(path.join(dir, "bin"));
  const npm = path.join(dir, "bin", "npm");
  writeFileSync(
    npm,
    `#!/bin/sh\n[ "$1 $2 $3 $4" = "run -s cli --" ] || { echo "this test's npm only runs: npm run -s cli -- ..." >&2; exit 99; }\nshift 4\nexec "${process.execPath}" "${path.join(ROOT, "scripts/cli.mjs")}" "$@"\n`,
  );
  chmodSync(npm, 0o755);
  return dir;
}

const env = (dir: string) => ({
  ...process.env,
  PATH: `${path.join(dir, "bin")}:${process.env.PATH}`,
  TRISKEL_URL: appUrl(),
  TRISKEL_TOKEN: demoTokens().researcher,
  PYTHONPATH: path.join(ROOT, "public/clients"),
});

const computeOf = (file: string) =>
  JSON.parse(spawnSync(process.execPath, [path.join(ROOT, "scripts/cli.mjs"), "compute", path.join(ROOT, file)], { encoding: "utf8" }).stdout);

describe("script examples", () => {
  it("docs/examples/cli.sh runs with every command succeeding, its files hold the numbers of compute", () => {
    const dir = workFolder();
    const r = spawnSync("bash", ["-e", path.join(ROOT, "docs/examples/cli.sh")], { cwd: dir, env: env(dir), encoding: "utf8", timeout: 170_000 });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toBe(""); // the last line's "submit failed" did not print
    const read = (f: string) => readFileSync(path.join(dir, f), "utf8");
    const local = computeOf("docs/examples/run.json");
    const run = JSON.parse(read("run.json"));
    expect(run.status).toBe("succeeded");
    expect(run.result.conductance.total).toBeCloseTo(local.conductance.total, 12);
    expect(JSON.parse(read("scan.json"))).toMatchObject({ status: "succeeded", pointCount: 5 });
    expect(
      read("scan.csv")
        .split("\n")
        .filter((l) => l && !l.startsWith("#")),
    ).toHaveLength(6);
    expect(JSON.parse(read("status.json")).kind).toBe("conductance");
    expect(JSON.parse(read("result.json")).inputHash).toBe(local.inputHash);
    expect(JSON.parse(read("estimate.json"))).toMatchObject({ dryRun: true, pointCount: 5 });
    // progress and the estimate went to standard error, one line each
    expect(r.stderr).toMatch(/^calculation [0-9a-f-]{36} submitted \(estimate /m);
    expect(r.stderr).toMatch(/^scan [0-9a-f-]{36}: succeeded 100% \(5 of 5 points done\)$/m);
  });

  it("docs/examples/client.py runs with Debian's python3 and prints the numbers of compute and the error", () => {
    const dir = workFolder();
    const r = spawnSync(PYTHON, [path.join(ROOT, "docs/examples/client.py")], { cwd: dir, env: env(dir), encoding: "utf8", timeout: 170_000 });
    expect(r.status, r.stderr).toBe(0);
    const lines = r.stdout.trimEnd().split("\n");
    const local = computeOf("docs/examples/run.json");
    expect(lines[0]).toMatch(/^\{'computeSeconds': [0-9.e-]+, 'costUsd': [0-9.e-]+\}$/);
    expect(lines[1]).toMatch(new RegExp(`^G = ${local.conductance.total.toString().slice(0, 10)}\\d* e2/h checks: \\{'currentConservationError': `));
    expect(lines[2]).toBe("warnings: []");
    const grid = JSON.parse(lines[3]) as number[];
    expect(grid).toHaveLength(5);
    expect(grid.every((g) => g > 0)).toBe(true);
    expect(lines[4]).toMatch(/^422 invalid_input computation\.energyMeV: /);
    expect(readFileSync(path.join(dir, "scan.csv"), "utf8")).toMatch(/\npoint_index,field_T,/);
  });

  it("the manual's page shows every example file as it is, and the manual links to it and to the client", async () => {
    const html = await (await fetch(new URL("/manual/scripts", appUrl()))).text();
    const escape = (s: string) => s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&#x27;");
    for (const e of SCRIPT_EXAMPLES) {
      const block = html.match(new RegExp(`data-example="${e.file}"[\\s\\S]*?<code>([\\s\\S]*?)</code>`));
      expect(block, e.file).not.toBeNull();
      expect(block![1], e.file).toBe(escape(readFileSync(path.join(ROOT, e.file), "utf8")));
    }
    const manual = await (await fetch(new URL("/manual", appUrl()))).text();
    expect(manual).toContain('href="/manual/scripts"');
    expect(manual).toContain('href="/clients/triskel.py"');
  });
});
