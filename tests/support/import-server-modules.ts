// Imports every server module, shared and library module and every API route, as `next build`
// does when it collects pages, and prints one JSON line: how many loaded and which threw. Run it
// with no Triskel variables set (tests/unit/env-usage.test.ts): a module that reads env() at its
// top level fails here, and would fail a build without the deployment's variables.
import { readdirSync } from "node:fs";
import path from "node:path";
import { pathToFileURL } from "node:url";

const root = path.resolve(import.meta.dirname, "../..");
function walk(dir: string): string[] {
  return readdirSync(path.join(root, dir), { withFileTypes: true }).flatMap((e) =>
    e.isDirectory()
      ? walk(path.posix.join(dir, e.name))
      : /\.tsx?$/.test(e.name) && !/\.test\.tsx?$|\.d\.ts$/.test(e.name)
        ? [path.posix.join(dir, e.name)]
        : [],
  );
}
// *-generate.ts files are scripts (they write files when run), not modules of the app.
const files = [...walk("src/server"), ...walk("src/shared"), ...walk("src/lib"), ...walk("src/app").filter((f) => f.endsWith("/route.ts"))].filter(
  (f) => !f.endsWith("-generate.ts"),
);
const failed: { file: string; error: string }[] = [];
for (const file of files) {
  try {
    await import(pathToFileURL(path.join(root, file)).href);
  } catch (err) {
    failed.push({ file, error: String((err as Error).message ?? err).split("\n")[0] });
  }
}
console.log(JSON.stringify({ loaded: files.length - failed.length, failed }));
process.exit(0);
