// The "from a script" examples (src/client/examples.ts) are files; docs/scripts.md holds each one
// verbatim and the exit codes as the command line defines them, so the page cannot drift from what
// tests/integration/script-examples.test.ts runs.
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { EXIT_CODES } from "@/client/api";
import { USAGE } from "@/client/commands";
import { SCRIPT_EXAMPLES } from "@/client/examples";

const ROOT = path.resolve(import.meta.dirname, "../../..");
const doc = readFileSync(path.join(ROOT, "docs/scripts.md"), "utf8");

describe("script examples", () => {
  it("every file of docs/examples is listed, and docs/scripts.md shows each verbatim in a fenced block", () => {
    const files = readdirSync(path.join(ROOT, "docs/examples")).map((f) => `docs/examples/${f}`);
    expect(SCRIPT_EXAMPLES.map((e) => e.file).sort()).toEqual(files.sort());
    for (const e of SCRIPT_EXAMPLES) {
      const text = readFileSync(path.join(ROOT, e.file), "utf8");
      expect(text.endsWith("\n"), e.file).toBe(true);
      expect(doc, e.file).toContain(`\`${e.file}\`:\n\n\`\`\`${e.language}\n${text}\`\`\`\n`);
    }
  });

  it("docs/scripts.md and the usage text give the exit codes of src/client/api.ts", () => {
    const rows = [...doc.matchAll(/^\| (\d+) \| (.+) \|$/gm)].map((m) => [Number(m[1]), m[2]]);
    expect(rows).toEqual(EXIT_CODES.map((e) => [e.code, e.meaning]));
    for (const e of EXIT_CODES) expect(USAGE).toContain(`${String(e.code).padStart(3)}  ${e.meaning}`);
  });
});
