#!/usr/bin/env node
// `npm run cli`: the command line (src/cli.ts: the engine's `compute` and the remote commands) from its JavaScript bundle,
// dist/engine-cli.mjs (scripts/build-cli.mjs, built at install). When the bundle is missing or
// older than one of the files it was built from, it is built first (about 0.1 s, once); without
// esbuild the TypeScript runs through tsx as before. Output and exit codes are the command line's.
import { spawnSync } from "node:child_process";
import { existsSync, readFileSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const bundle = path.join(root, "dist", "engine-cli.mjs");
const inputsFile = path.join(root, "dist", "engine-cli.inputs.json");

function fresh() {
  if (!existsSync(bundle) || !existsSync(inputsFile)) return false;
  const built = statSync(bundle).mtimeMs;
  try {
    const inputs = JSON.parse(readFileSync(inputsFile, "utf8"));
    return inputs.every((f) => statSync(path.join(root, f)).mtimeMs <= built);
  } catch {
    return false; // an input was moved or deleted: rebuild
  }
}

if (!fresh()) {
  const { buildCli } = await import("./build-cli.mjs");
  const r = await buildCli();
  if (!r.ok) {
    // no bundle (r.line says why): the TypeScript through tsx, as before the bundle existed;
    // nothing more is printed, so standard error keeps the command line's one-line contract
    const tsx = spawnSync(path.join(root, "node_modules", ".bin", "tsx"), [path.join(root, "src", "cli.ts"), ...process.argv.slice(2)], {
      stdio: "inherit",
    });
    process.exit(tsx.status ?? 1);
  }
}
await import(pathToFileURL(bundle).href);
