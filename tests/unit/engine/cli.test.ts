import { describe, expect, it } from "vitest";
import { spawnSync } from "node:child_process";
import { readFileSync, readdirSync } from "node:fs";
import os from "node:os";
import path from "node:path";

const ROOT = path.resolve(import.meta.dirname, "../../..");
const FIX = path.join(ROOT, "tests/fixtures");
const expected = JSON.parse(readFileSync(path.join(FIX, "expected.json"), "utf8")) as Record<string, Record<string, unknown>>;

/** `npm run cli`: the launcher, which runs the JavaScript bundle (dist/engine-cli.mjs, built when missing or stale). */
function run(args: string[], input?: string, cwd = ROOT) {
  return spawnSync(process.execPath, [path.join(ROOT, "scripts/cli.mjs"), ...args], { cwd, input, encoding: "utf8" });
}
/** The TypeScript source through tsx, as `npm run cli` ran before the bundle. */
function runTsx(args: string[], input?: string) {
  return spawnSync(path.join(ROOT, "node_modules/.bin/tsx"), [path.join(ROOT, "src/cli.ts"), ...args], { cwd: ROOT, input, encoding: "utf8" });
}
function at(obj: unknown, dotted: string): unknown {
  return dotted.split(".").reduce<unknown>((o, k) => (o === null || o === undefined ? undefined : (o as Record<string, unknown>)[k]), obj);
}

describe("command line on the fixtures (tests/fixtures/expected.json)", () => {
  const files = readdirSync(FIX)
    .filter((f) => f.endsWith(".json") && f !== "expected.json")
    .sort();
  it("every fixture has an expectation", () => {
    for (const f of files) expect(expected[f], f).toBeDefined();
  });
  for (const f of files) {
    it(f, () => {
      const exp = expected[f] as {
        exit: number;
        stderr?: string;
        equals?: Record<string, unknown>;
        closeTo?: Record<string, [number, number]>;
        lessThan?: Record<string, number>;
        greaterThan?: Record<string, number>;
        lengthOf?: Record<string, number>;
      };
      const r = run(["compute", path.join(FIX, f)]);
      expect(r.status, r.stderr).toBe(exp.exit);
      if (exp.exit !== 0) {
        const lines = r.stderr.trimEnd().split("\n");
        expect(lines.length).toBe(1);
        expect(lines[0]).toMatch(new RegExp(exp.stderr as string));
        expect(r.stdout).toBe("");
        return;
      }
      const out = JSON.parse(r.stdout);
      expect(out.engineVersion).toMatch(/^2\.1\.0\+/);
      expect(out.inputHash).toMatch(/^[0-9a-f]{64}$/);
      for (const [k, v] of Object.entries(exp.equals ?? {})) expect(at(out, k), k).toEqual(v);
      for (const [k, [v, tol]] of Object.entries(exp.closeTo ?? {})) expect(Math.abs((at(out, k) as number) - v), k).toBeLessThanOrEqual(tol);
      for (const [k, v] of Object.entries(exp.lessThan ?? {})) expect(at(out, k) as number, k).toBeLessThan(v);
      for (const [k, v] of Object.entries(exp.greaterThan ?? {})) expect(at(out, k) as number, k).toBeGreaterThan(v);
      for (const [k, v] of Object.entries(exp.lengthOf ?? {})) expect((at(out, k) as unknown[]).length, k).toBe(v);
    });
  }
  // The bundle against the TypeScript it was built from: the same bytes on standard output and
  // standard error and the same exit code, on results, refusals and bad input, from another folder too.
  for (const f of ["conductance-disordered-ensemble.json", "dos-bloch.json", "ldos-map.json", "spectrum-flux.json", "invalid-unknown-field.json"]) {
    it(`${f}: the bundle prints exactly what the TypeScript prints`, () => {
      const a = run(["compute", path.join(FIX, f)], undefined, os.tmpdir());
      const b = runTsx(["compute", path.join(FIX, f)]);
      expect(a.status).toBe(b.status);
      expect(a.stdout).toBe(b.stdout);
      expect(a.stderr).toBe(b.stderr);
      expect(a.stdout.length + a.stderr.length).toBeGreaterThan(0);
    });
  }
  it("the bundle loads the same kernel backend as the TypeScript (engineVersion)", () => {
    const text = readFileSync(path.join(FIX, "spectrum-path.json"), "utf8");
    const a = JSON.parse(run(["compute", "-"], text, os.tmpdir()).stdout) as { engineVersion: string };
    const b = JSON.parse(runTsx(["compute", "-"], text).stdout) as { engineVersion: string };
    expect(a.engineVersion).toBe(b.engineVersion);
  });
  it("reads standard input with '-' and prints exactly one JSON object", () => {
    const r = run(["compute", "-"], readFileSync(path.join(FIX, "spectrum-path.json"), "utf8"));
    expect(r.status).toBe(0);
    expect(r.stdout.trim().split("\n").length).toBe(1);
    expect(JSON.parse(r.stdout).kind).toBe("spectrum");
  });
  it("bad JSON and bad usage exit with code 2 and one line", () => {
    const a = run(["compute", "-"], "{ nope");
    expect(a.status).toBe(2);
    expect(a.stderr.trim().split("\n").length).toBe(1);
    expect(a.stderr).toMatch(/^input: not valid JSON/);
    expect(run(["frobnicate"]).status).toBe(2);
  });
});
