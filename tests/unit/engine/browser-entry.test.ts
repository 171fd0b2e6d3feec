// The engine's browser-safe entry (src/engine/browser.ts): its import graph (relative and "@/"
// imports followed, type-only imports skipped because the compiler erases them) holds no Node
// built-in and not the native addon; and browser code reaches the engine through that entry only.
import path from "node:path";
import { describe, expect, it } from "vitest";
import { ROOT, browserEntryProblems, clientModules, importsOf, relative, walk } from "../../../scripts/import-graph";

const ENTRY = path.join(ROOT, "src/engine/browser.ts");
const ENGINE = path.join(ROOT, "src/engine") + path.sep;

const describeProblems = (problems: ReturnType<typeof browserEntryProblems>) =>
  problems.map((p) => `${p.file} imports ${p.specifier} (via ${p.chain.join(" -> ")})`).join("\n");

describe("browser-safe engine entry", () => {
  it("imports no Node built-in (node:*, fs, path, worker_threads, module, os, child_process, ...) and not the native addon", () => {
    const modules = [...walk(ENTRY).keys()].map(relative);
    // The entry really reaches the schema, the cost model and the parameters (the walk follows imports).
    expect(modules).toEqual(
      expect.arrayContaining([
        "src/engine/schema.ts",
        "src/engine/cost.ts",
        "src/engine/cost-constants.ts",
        "src/engine/parameters.ts",
        "src/engine/network/lattice.ts",
      ]),
    );
    const problems = browserEntryProblems(ENTRY);
    expect(problems, describeProblems(problems)).toEqual([]);
  });

  it("the check finds the Node modules of the server entry (src/engine/index.ts)", () => {
    const problems = browserEntryProblems(path.join(ROOT, "src/engine/index.ts"));
    const found = new Set(problems.map((p) => p.specifier));
    expect([...found]).toEqual(expect.arrayContaining(["node:crypto", "node:fs", "node:module", "node:worker_threads", "../native/index"]));
  });

  it("exports what the browser needs and nothing that loads the kernels", async () => {
    const browser = await import("@/engine/browser");
    for (const name of [
      "networkSchema",
      "computationSchema",
      "computeInputSchema",
      "parseComputeInput",
      "parseNetwork",
      "EngineInputError",
      "estimateCost",
      "checkResourceLimits",
      "COST_CONSTANTS",
      "applyParameter",
      "SWEEPABLE_PARAMETERS",
      "constants",
    ]) {
      expect(browser, name).toHaveProperty(name);
    }
    for (const name of ["compute", "inputHash", "ENGINE_VERSION", "getKernels", "setKernels", "tsKernels"]) expect(browser, name).not.toHaveProperty(name);
    // The server entry re-exports the same objects.
    const index = await import("@/engine");
    for (const [name, value] of Object.entries(browser)) expect((index as Record<string, unknown>)[name], name).toBe(value);
  });

  it('browser code (the import graphs of every "use client" module) reaches the engine only through src/engine/browser.ts', () => {
    const roots = clientModules();
    expect(roots.length).toBeGreaterThan(10);
    const wrong: string[] = [];
    const seen = new Set<string>();
    for (const root of roots) {
      for (const mod of walk(root).values()) {
        if (seen.has(mod.file) || mod.file.startsWith(ENGINE)) continue;
        seen.add(mod.file);
        for (const edge of importsOf(mod.file)) {
          if (edge.typeOnly || !edge.resolved?.startsWith(ENGINE) || edge.resolved === ENTRY) continue;
          wrong.push(`${relative(mod.file)} imports "${edge.specifier}" (via ${mod.via.map(relative).join(" -> ")}); import "@/engine/browser" instead`);
        }
      }
    }
    expect(wrong, wrong.join("\n")).toEqual([]);
  });
});
