// Browser code and src/shared stay apart from the server. The import graphs (relative and "@/"
// imports followed, read by scripts/import-graph.ts) of every "use client" module and of every
// module of src/shared reach nothing under src/server nor src/env.ts (not even for a type), no Node
// built-in and no package of the database, the queue or the hosted services; src/shared imports
// only itself and the engine's browser entry. Every module that touches the database, the queue or
// secrets imports the server-only marker (src/server/server-only.ts), which throws in a browser.
// The same checks from the command line: node_modules/.bin/tsx scripts/import-graph.ts layers
import path from "node:path";
import { afterEach, describe, expect, it, vi } from "vitest";
import {
  ROOT,
  browserLayerProblems,
  clientModules,
  importsOf,
  missingServerOnlyMarkers,
  relative,
  serverResourceImports,
  sharedLayerProblems,
  sourceFiles,
  walk,
  type LayerProblem,
} from "../../scripts/import-graph";

const at = (file: string) => path.join(ROOT, file);
const describeProblems = (problems: LayerProblem[]) =>
  problems.map((p) => `${p.file} imports "${p.specifier}": ${p.reason} (via ${p.chain.join(" -> ")})`).join("\n");

describe("browser code", () => {
  it('no "use client" module reaches src/server, src/env.ts, a Node built-in or a database, queue or service package', () => {
    const roots = clientModules();
    expect(roots.length).toBeGreaterThan(30);
    // The walk follows "@/" imports into src/shared (the upload form parses CSV with the server's code).
    const upload = [...walk(at("src/components/data/DatasetUpload.tsx")).keys()].map(relative);
    expect(upload).toEqual(expect.arrayContaining(["src/shared/csv.ts", "src/shared/units.ts", "src/engine/browser.ts"]));
    const problems = browserLayerProblems(roots);
    expect(problems, describeProblems(problems)).toEqual([]);
  });

  it("the check finds server code, Node built-ins and service packages where they are", () => {
    const found = (file: string) => browserLayerProblems([at(file)]).map((p) => `${p.specifier}: ${p.reason}`);
    expect(found("src/server/health/index.ts")).toEqual(
      expect.arrayContaining(["@/server/db: server code (src/server/db/index.ts)", "@/server/queue: server code (src/server/queue/index.ts)"]),
    );
    // The status page reaches the probe through one import, named there.
    expect(found("src/app/(marketing)/status/page.tsx")).toEqual(["@/server/health: server code (src/server/health/index.ts)"]);
    expect(found("src/server/auth/tokens.ts")).toEqual(["node:crypto: a Node built-in"]);
    expect(found("src/server/billing/stripe.ts")).toEqual(
      expect.arrayContaining(["stripe: a package of the database, the queue or a hosted service", "@/env: server code (src/env.ts)"]),
    );
    // A server component that reaches the server through one import is named at that import.
    expect(found("src/app/(auth)/accept-invitation/page.tsx")).toEqual(["@/server/workspaces/invitations: server code (src/server/workspaces/invitations.ts)"]);
  });
});

describe("src/shared", () => {
  it("reaches no server code, Node built-in or database, queue or service package, and imports only src/shared and @/engine/browser", () => {
    const files = sourceFiles(at("src/shared")).map(relative);
    expect(files).toEqual(
      expect.arrayContaining([
        "src/shared/csv.ts",
        "src/shared/units.ts",
        "src/shared/fit-parameters.ts",
        "src/shared/lk07.ts",
        "src/shared/permissions.ts",
        "src/shared/plans.ts",
      ]),
    );
    const problems = sharedLayerProblems();
    expect(problems, describeProblems(problems)).toEqual([]);
  });

  it("the server and the browser import the same modules from it (one table, not two copies)", () => {
    const importers = (target: string) =>
      sourceFiles(at("src"))
        .filter((f) => importsOf(f).some((e) => !e.typeOnly && e.resolved === at(target)))
        .map(relative);
    expect(importers("src/shared/permissions.ts")).toEqual(expect.arrayContaining(["src/server/auth/index.ts", "src/components/shell/useMe.ts"]));
    expect(importers("src/shared/csv.ts")).toEqual(expect.arrayContaining(["src/server/datasets/service.ts", "src/components/data/DatasetUpload.tsx"]));
    expect(importers("src/shared/plans.ts")).toEqual(expect.arrayContaining(["src/server/billing/limits.ts", "src/components/runs/CostLine.tsx"]));
  });
});

describe("server-only marker", () => {
  afterEach(() => {
    vi.unstubAllGlobals();
    vi.resetModules();
  });

  it("every module that touches the database, the queue or secrets imports it", () => {
    const marked = sourceFiles(at("src"))
      .filter((f) => serverResourceImports(f).length > 0)
      .map(relative);
    expect(marked).toEqual(
      expect.arrayContaining([
        "src/env.ts",
        "src/server/db/index.ts",
        "src/server/db/schema/index.ts",
        "src/server/queue/index.ts",
        "src/server/billing/stripe.ts",
        "src/server/mail/index.ts",
        "src/server/auth/session.ts",
        "src/server/http/rate-limit.ts",
      ]),
    );
    expect(marked.length).toBeGreaterThan(30);
    // Pure modules need not: the CSV parser, the permissions table, the fitter.
    for (const pure of ["src/shared/csv.ts", "src/shared/permissions.ts", "src/server/fits/fitter.ts"])
      expect(serverResourceImports(at(pure)), pure).toEqual([]);
    const missing = missingServerOnlyMarkers();
    expect(missing, missing.map((m) => `${m.file} (${m.because.join(", ")}): add import "@/server/server-only"`).join("\n")).toEqual([]);
  });

  it("no module imports the npm package server-only (it throws under Vitest, tsx and plain Node)", () => {
    const users = sourceFiles(at("src"))
      .filter((f) => importsOf(f).some((e) => e.specifier === "server-only"))
      .map(relative);
    expect(users).toEqual([]);
  });

  it("throws when loaded where there is a window, and loads quietly in Node", async () => {
    vi.stubGlobal("window", {});
    await expect(import("@/server/server-only")).rejects.toThrow(/server-only module .* was loaded in the browser/);
    vi.unstubAllGlobals();
    vi.resetModules();
    expect(typeof window).toBe("undefined");
    await expect(import("@/server/server-only")).resolves.toBeDefined();
  });
});
