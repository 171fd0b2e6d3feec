// One fact per place: e, h, kB and the graphene lattice constant (and what follows from them: e^2/h,
// h/e^2, h/e) are written down in src/engine/constants.ts only; the app imports them from there.
import { readdirSync, readFileSync } from "node:fs";
import path from "node:path";
import ts from "typescript";
import { describe, expect, it } from "vitest";
import { BOLTZMANN_J_PER_K, ELEMENTARY_CHARGE_C, GRAPHENE_LATTICE_NM, PLANCK_JS } from "@/engine/constants";

const ROOT = path.resolve(import.meta.dirname, "../..");
const HOME = "src/engine/constants.ts";

/** Numbers that are these constants, and the digits by which text would state them. */
const NUMBERS = new Set([ELEMENTARY_CHARGE_C, PLANCK_JS, BOLTZMANN_J_PER_K, GRAPHENE_LATTICE_NM, 3.874045865e-5, 25812.80745, 4.135667696e-15]);
const DIGITS = /0\.246|1\.602176|6\.626070|1\.380649|3\.874045|25[\s,\\]*812\.80|4\.135667/;

/** Literals in code (numbers, strings, templates, JSX text) that restate a constant; comments are not code. */
function restated(file: string, source: string): string[] {
  const sf = ts.createSourceFile(file, source, ts.ScriptTarget.Latest, true, file.endsWith(".tsx") ? ts.ScriptKind.TSX : ts.ScriptKind.TS);
  const out: string[] = [];
  const visit = (n: ts.Node) => {
    const hit =
      (ts.isNumericLiteral(n) && NUMBERS.has(Number(n.text))) ||
      ((ts.isStringLiteralLike(n) || ts.isTemplateLiteralToken(n) || ts.isJsxText(n)) && DIGITS.test(n.text));
    if (hit) out.push(`${file}:${sf.getLineAndCharacterOfPosition(n.getStart()).line + 1}: ${n.getText().slice(0, 80)}`);
    ts.forEachChild(n, visit);
  };
  visit(sf);
  return out;
}

function sourceFiles(dir: string): string[] {
  return readdirSync(path.join(ROOT, dir), { withFileTypes: true }).flatMap((e) => {
    const rel = path.posix.join(dir, e.name);
    if (e.isDirectory()) return e.name === "node_modules" || e.name === "build" ? [] : sourceFiles(rel);
    return /\.(ts|tsx)$/.test(e.name) && !e.name.endsWith(".d.ts") ? [rel] : [];
  });
}

describe("physical constants live in src/engine/constants.ts", () => {
  it("the check sees a restated constant in code and not in a comment", () => {
    expect(restated("x.ts", "// a = 0.246 nm\nconst a = 0.246;\nconst t = `a = 0.246 nm`;\nconst g = 3.874045865e-5;")).toEqual([
      "x.ts:2: 0.246",
      "x.ts:3: `a = 0.246 nm`",
      "x.ts:4: 3.874045865e-5",
    ]);
    expect(restated("y.tsx", "const p = <p>h/e = 4.135667696 × 10⁻¹⁵ Wb</p>;")).toHaveLength(1);
    expect(restated(HOME, readFileSync(path.join(ROOT, HOME), "utf8")).length).toBeGreaterThanOrEqual(4);
  });

  it("no other file of src/ or worker/ writes them down", () => {
    // Tests state the values on their own, as independent references; they are not scanned.
    const files = [...sourceFiles("src"), ...sourceFiles("worker")].filter((f) => f !== HOME && !/\.test\.tsx?$/.test(f));
    expect(files.length).toBeGreaterThan(100);
    const found = files.flatMap((f) => restated(f, readFileSync(path.join(ROOT, f), "utf8")));
    expect(found, "import the value from @/engine/constants").toEqual([]);
  });
});
