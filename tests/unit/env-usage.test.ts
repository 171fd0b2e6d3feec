// Every environment variable is read through src/env.ts and listed in .env.example.
import { spawnSync } from "node:child_process";
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { envSchema } from "@/env";

const ROOT = path.resolve(import.meta.dirname, "../..");

interface EnvRead {
  file: string;
  line: number;
  text: string;
  /** The variable when the read names one (process.env.X or process.env["X"]). */
  name?: string;
  /** True when the read is the left side of an assignment (process.env.X = ..., ??=, ||=). */
  assigned: boolean;
}

/** Every use of process.env in a TypeScript source (comments and strings are not code, so not counted). */
function envReads(file: string, source: string): EnvRead[] {
  const sf = ts.createSourceFile(file, source, ts.ScriptTarget.Latest, true, file.endsWith(".tsx") ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const out: EnvRead[] = [];
  const isProcessEnv = (n: ts.Node): boolean =>
    (ts.isPropertyAccessExpression(n) && ts.isIdentifier(n.expression) && n.expression.text === "process" && n.name.text === "env") ||
    (ts.isElementAccessExpression(n) &&
      ts.isIdentifier(n.expression) &&
      n.expression.text === "process" &&
      ts.isStringLiteralLike(n.argumentExpression) &&
      n.argumentExpression.text === "env");
  const visit = (n: ts.Node) => {
    // `import { env } from "node:process"` or `const { env } = process` also read it.
    const bindings =
      ts.isImportDeclaration(n) &&
      ts.isStringLiteral(n.moduleSpecifier) &&
      /^(node:)?process$/.test(n.moduleSpecifier.text) &&
      n.importClause?.namedBindings &&
      ts.isNamedImports(n.importClause.namedBindings)
        ? n.importClause.namedBindings.elements.map((e) => (e.propertyName ?? e.name).text)
        : ts.isVariableDeclaration(n) &&
            ts.isObjectBindingPattern(n.name) &&
            n.initializer &&
            ts.isIdentifier(n.initializer) &&
            n.initializer.text === "process"
          ? n.name.elements.map((e) => (e.propertyName ?? e.name).getText())
          : [];
    if (bindings.includes("env")) out.push({ file, line: sf.getLineAndCharacterOfPosition(n.getStart()).line + 1, text: n.getText(), assigned: false });
    if (isProcessEnv(n)) {
      const parent = n.parent;
      let name: string | undefined;
      let target: ts.Node = n;
      if (ts.isPropertyAccessExpression(parent) && parent.expression === n) {
        name = parent.name.text;
        target = parent;
      } else if (ts.isElementAccessExpression(parent) && parent.expression === n && ts.isStringLiteralLike(parent.argumentExpression)) {
        name = parent.argumentExpression.text;
        target = parent;
      }
      const up = target.parent;
      const assigned =
        target !== n &&
        ts.isBinaryExpression(up) &&
        up.left === target &&
        [ts.SyntaxKind.EqualsToken, ts.SyntaxKind.QuestionQuestionEqualsToken, ts.SyntaxKind.BarBarEqualsToken].includes(up.operatorToken.kind);
      const line = sf.getLineAndCharacterOfPosition(n.getStart()).line;
      out.push({ file, line: line + 1, text: source.split("\n")[line].trim(), name, assigned });
    }
    ts.forEachChild(n, visit);
  };
  visit(sf);
  return out;
}

function sourceFiles(dir: string): string[] {
  const files: string[] = [];
  for (const entry of readdirSync(path.join(ROOT, dir), { withFileTypes: true })) {
    const rel = path.posix.join(dir, entry.name);
    if (entry.isDirectory()) {
      if (entry.name === "node_modules" || entry.name === "build") continue;
      files.push(...sourceFiles(rel));
    } else if (/\.(ts|tsx|mts)$/.test(entry.name) && !entry.name.endsWith(".d.ts")) files.push(rel);
  }
  return files;
}

/** Whether one read is allowed where it is (everything else goes through src/env.ts). */
function allowed(r: EnvRead): boolean {
  if (r.file === "src/env.ts") return true;
  // The engine is a standalone library with its own kernel variables (TRISKEL_KERNELS, ...).
  if (r.file.startsWith("src/engine/")) return true;
  // Next.js's own runtime flag, set by Next and not by a deployment.
  if (r.file === "src/instrumentation.ts") return r.name === "NEXT_RUNTIME" && !r.assigned;
  // The command line's remote commands run on a user's machine, not in the service: the service's address and an API token.
  if (r.file === "src/client/commands.ts") return (r.name === "TRISKEL_URL" || r.name === "TRISKEL_TOKEN") && !r.assigned;
  return false;
}

describe("process.env is read through src/env.ts only", () => {
  it("the scanner finds reads in code and ignores comments and strings", () => {
    const found = envReads(
      "x.ts",
      [
        "// process.env.IN_A_COMMENT",
        'const s = "process.env.IN_A_STRING";',
        "const a = process.env.DIRECT;",
        'const b = process.env["BRACKETS"];',
        "const { C } = process.env;",
        "process.env.SET ??= '1';",
        "const { env: e } = process;",
        'import { env } from "node:process";',
        "const { argv } = process;",
      ].join("\n"),
    );
    expect(found.map((r) => [r.line, r.name ?? null, r.assigned])).toEqual([
      [3, "DIRECT", false],
      [4, "BRACKETS", false],
      [5, null, false],
      [6, "SET", true],
      [7, null, false],
      [8, null, false],
    ]);
  });

  it("no file of src/ or worker/ reads process.env except the allowed ones", () => {
    const reads = [...sourceFiles("src"), ...sourceFiles("worker")].flatMap((file) => envReads(file, readFileSync(path.join(ROOT, file), "utf8")));
    // The scan sees the known, allowed uses (so an empty result cannot pass by accident).
    expect(reads.some((r) => r.file === "src/env.ts")).toBe(true);
    expect(reads.filter((r) => r.file === "src/instrumentation.ts").map((r) => r.name)).toEqual(["NEXT_RUNTIME"]);
    const outside = reads.filter((r) => !allowed(r)).map((r) => `${r.file}:${r.line}: ${r.text}`);
    expect(outside, "read these through env() from src/env.ts (and add them to its schema and .env.example)").toEqual([]);
  });
});

describe("env() is read lazily", () => {
  it("server modules and API routes load with no Triskel variable set (as `next build` loads them)", () => {
    const tsx = path.join(ROOT, "node_modules/.bin/tsx");
    const r = spawnSync(tsx, ["tests/support/import-server-modules.ts"], {
      cwd: ROOT,
      env: { NODE_ENV: "production", PATH: process.env.PATH ?? "", HOME: process.env.HOME ?? "/tmp" },
      encoding: "utf8",
      timeout: 120_000,
    });
    expect(r.status, r.stderr).toBe(0);
    const result = JSON.parse(r.stdout.trim().split("\n").at(-1)!) as { loaded: number; failed: { file: string; error: string }[] };
    expect(result.failed).toEqual([]);
    expect(result.loaded).toBeGreaterThan(50);
  });
});

describe(".env.example lists every variable of src/env.ts", () => {
  const lines = readFileSync(path.join(ROOT, ".env.example"), "utf8").split("\n");
  /** `NAME=value` and the optional `# NAME=value` lines, with the line above each. */
  const listed = lines.flatMap((text, i) => {
    const m = /^(#\s*)?([A-Z][A-Z0-9_]*)=(.*)$/.exec(text);
    return m ? [{ name: m[2], value: m[3], commented: Boolean(m[1]), above: lines[i - 1] ?? "", line: i + 1 }] : [];
  });
  const shape = envSchema.shape as Record<string, (typeof envSchema.shape)[keyof typeof envSchema.shape]>;
  const keys = Object.keys(shape);

  it("every schema key once, with a one-line comment above it", () => {
    expect(keys.length).toBeGreaterThan(20);
    for (const key of keys) {
      const entries = listed.filter((l) => l.name === key);
      expect(entries, `${key} in .env.example`).toHaveLength(1);
      expect(entries[0].above, `comment above ${key}`).toMatch(/^#\s+\S/);
      expect(entries[0].above, `comment above ${key}`).not.toMatch(/^#\s*[A-Z][A-Z0-9_]*=/);
    }
  });

  it("lists no variable src/env.ts does not know", () => {
    expect(listed.map((l) => l.name).filter((n) => !keys.includes(n))).toEqual([]);
  });

  it("each value shown is valid, and is the default where the schema has one", () => {
    for (const l of listed) {
      const schema = shape[l.name];
      const parsed = schema.safeParse(l.value);
      expect(parsed.success, `.env.example line ${l.line}: ${l.name}=${l.value}`).toBe(true);
      const unset = schema.safeParse(undefined);
      if (unset.success && unset.data !== undefined) expect(parsed.data, `${l.name} shows its default`).toEqual(unset.data);
      // A required variable is set, not commented out.
      if (!unset.success) expect(l.commented, `${l.name} is required`).toBe(false);
    }
  });
});
