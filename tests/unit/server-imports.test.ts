// No import loops between the folders of src/server: the folder-level graph (an edge A -> B when a
// file under src/server/A imports one under src/server/B; static, dynamic and type-only imports
// all count) has no cycle. Layers, lowest first: the marker server-only.ts; db, http, queue, mail;
// engine; auth; billing, workspaces, datasets; networks; jobs; runs; sweeps, fits, demo.
// The same check from the command line: node_modules/.bin/tsx scripts/import-graph.ts server-cycles
import path from "node:path";
import { describe, expect, it } from "vitest";
import { ROOT, describeCycles, folderCycles, folderGraph } from "../../scripts/import-graph";

const SERVER = path.join(ROOT, "src/server");

describe("src/server folder imports", () => {
  it("have no cycle between folders", () => {
    const graph = folderGraph(SERVER);
    expect(graph.size).toBeGreaterThan(10);
    const cycles = folderCycles(graph);
    expect(cycles, describeCycles(graph, cycles).join("\n")).toEqual([]);
  });

  it("the cycle finder finds a cycle", () => {
    const edge = (from: string, to: string) => [to, { from, to, imports: [] }] as const;
    const graph = new Map([
      ["a", new Map([edge("a", "b")])],
      ["b", new Map([edge("b", "c")])],
      ["c", new Map([edge("c", "a"), edge("c", "d")])],
      ["d", new Map()],
    ]);
    expect(folderCycles(graph)).toEqual([["a", "b", "c"]]);
  });
});
