// Two runs at a time on one worker's engine pool, with and without helper threads, for 60 rounds
// (scripts/stress-engine-threads.ts, in a child process so that a crash is seen as one): before
// the slack of src/engine/native/src/slack.h, this ended with SIGSEGV within 2 to 17 rounds on
// the 2-core test machine (OpenBLAS's zheevd reading past its buffers). Every result must equal
// the same input computed alone.
import { spawnSync } from "node:child_process";
import path from "node:path";
import { describe, expect, it } from "vitest";

const root = path.join(import.meta.dirname, "..", "..");

describe("engine threads under concurrent runs", () => {
  it("60 rounds of two overlapping 40 x 40 runs: no crash, the serial numbers every time", { timeout: 900_000 }, () => {
    const r = spawnSync(path.join(root, "node_modules", ".bin", "tsx"), [path.join(root, "scripts", "stress-engine-threads.ts"), "60"], {
      cwd: root,
      encoding: "utf8",
      timeout: 880_000,
    });
    const tail = `${r.stdout.split("\n").slice(-5).join("\n")}\n${r.stderr.slice(-2000)}`;
    expect(r.signal, `the stress process was killed by ${r.signal}:\n${tail}`).toBeNull();
    expect(r.status, tail).toBe(0);
    expect(r.stdout).toContain("all 60 rounds gave the serial results");
  });
});
