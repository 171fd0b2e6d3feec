// The route files under src/app/api/v1 and the endpoints each exports ("METHOD /api/v1/..."), read
// from the source: the API contract test and the API document test both check against them.
import { readdirSync, readFileSync, statSync } from "node:fs";
import { join, relative } from "node:path";

export const SRC = join(import.meta.dirname, "../../src");
export const API_DIR = join(SRC, "app/api/v1");

export function files(dir: string, test: (f: string) => boolean): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = join(dir, name);
    return statSync(full).isDirectory() ? files(full, test) : test(full) ? [full] : [];
  });
}

/** "METHOD /api/v1/..." for every handler a route file exports. */
export function endpointsOf(file: string): { method: string; path: string; source: string }[] {
  const path =
    "/api/v1/" +
    relative(API_DIR, join(file, ".."))
      .split("\\")
      .join("/")
      .replace(/\[(\w+)\]/g, "{$1}");
  const source = readFileSync(file, "utf8");
  const methods = [...source.matchAll(/^export (?:const|async function) (GET|POST|PUT|PATCH|DELETE)\b/gm)].map((m) => m[1]);
  return methods.map((method) => ({ method, path: path.replace(/\/$/, ""), source }));
}

export const routeFiles = () => files(API_DIR, (f) => f.endsWith("route.ts"));
