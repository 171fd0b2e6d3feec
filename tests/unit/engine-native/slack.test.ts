// Over-reads of the libraries the native kernels call, on this machine (src/engine/native/src/slack.h).
// Debian's OpenBLAS 0.3.21 reads up to one column past the end of the matrix and of the work array
// in zheevd (found 2026-12-04: a worker process died with SIGSEGV in zgemv_n, called from zlatrd,
// when two runs computed at once). src/engine/native/test/slack-check.cc runs every routine of
// kernels.cc with one buffer at a time ending at a PROT_NONE page, in a child process per case:
// with the slack kernels.cc gives its own buffers, no case may crash (buffers JavaScript owns get no
// slack, so they must not be over-read at all). A deliberate one-element over-read must crash, or
// the fence proves nothing.
import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { chooseCoreType } from "@/engine/native/index";

const source = path.join(import.meta.dirname, "..", "..", "..", "src", "engine", "native", "test", "slack-check.cc");
const dir = mkdtempSync(path.join(tmpdir(), "triskel-slack-"));
const binary = path.join(dir, "slack-check");

// the kernel set the engine's loader would choose (src/engine/native/index.ts), one OpenBLAS thread as in the worker
const coreType = process.env.OPENBLAS_CORETYPE || chooseCoreType(readFileSync("/proc/cpuinfo", "utf8"));
const env = { ...process.env, OPENBLAS_NUM_THREADS: "1", OMP_NUM_THREADS: "1", ...(coreType ? { OPENBLAS_CORETYPE: coreType } : {}) };

function check(mode: "slack" | "none" | "control"): Map<string, "ok" | "CRASH"> {
  const r = spawnSync(binary, [mode], { env, encoding: "utf8", timeout: 300_000 });
  expect(r.status, `slack-check ${mode}: ${r.stderr}`).toBe(0);
  const lines = r.stdout.trim().split("\n");
  const out = new Map<string, "ok" | "CRASH">();
  for (const line of lines) {
    const m = /^(\S+ \d+): (ok|CRASH)$/.exec(line);
    expect(m, `slack-check ${mode} printed "${line}"`).not.toBeNull();
    out.set(m![1], m![2] as "ok" | "CRASH");
  }
  return out;
}

beforeAll(() => {
  // the same compiler and libraries as the addon (scripts/build-native.mjs needs them too)
  const cc = spawnSync("c++", ["-std=c++17", "-O1", "-o", binary, source, "-llapacke", "-lopenblas"], { encoding: "utf8" });
  if (cc.status !== 0) throw new Error(`cannot build slack-check.cc: ${cc.stderr || cc.error?.message}`);
}, 120_000);
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("buffers handed to OpenBLAS and LAPACK", () => {
  it("the fence catches a one-element over-read", () => {
    expect(check("control").get("control 0")).toBe("CRASH");
  });

  it("no routine of the kernels reads or writes past its buffers, with the kernels' slack", { timeout: 300_000 }, () => {
    const result = check("slack");
    // every case of the harness: 3 + 3 + 3 + 5 + 5 + 4 buffers
    expect(result.size).toBe(23);
    const crashed = [...result].filter(([, v]) => v === "CRASH").map(([k]) => k);
    expect(crashed, `cases that crashed (core type ${coreType ?? "OpenBLAS's choice"})`).toEqual([]);
    // what the libraries do without slack, for the record (Debian's 0.3.21: zheevd's matrix and work array)
    const bare = [...check("none")].filter(([, v]) => v === "CRASH").map(([k]) => k);
    console.info(`slack-check: without slack these cases read past their buffers: ${bare.join(", ") || "none"}`);
  });
});
