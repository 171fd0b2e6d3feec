#!/usr/bin/env node
// Bundles the command line (its entry src/cli.ts: the engine's `compute`, src/engine/cli.ts, and
// the remote commands, src/client/, with everything they import) into one JavaScript file,
// dist/engine-cli.mjs, with esbuild, so `npm run cli` starts without compiling
// TypeScript at every call. Run by package.json's `install` script after the native build (so
// `npm ci` builds it), and by scripts/cli.mjs when the bundle is missing or older than a source.
//
// Like the native build it never fails the install: without esbuild (a production install
// without devDependencies) it prints one line and exits 0, and scripts/cli.mjs runs the
// TypeScript through tsx instead. `--quiet`: no line on success.
import { existsSync, mkdirSync, renameSync, statSync, writeFileSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
export const CLI_ENTRY = path.join(root, "src", "cli.ts");
export const CLI_BUNDLE = path.join(root, "dist", "engine-cli.mjs");
/** The repository files the bundle was built from (esbuild's inputs outside node_modules), for the staleness check of scripts/cli.mjs. */
export const CLI_INPUTS = path.join(root, "dist", "engine-cli.inputs.json");

/** Build the bundle; returns one line saying what happened (never throws). */
export async function buildCli() {
  let esbuild;
  try {
    esbuild = await import("esbuild");
  } catch {
    return { ok: false, line: "skipped: esbuild is not installed; npm run cli runs the TypeScript through tsx" };
  }
  const started = Date.now();
  mkdirSync(path.dirname(CLI_BUNDLE), { recursive: true });
  // Written beside the bundle and renamed over it: a command line started meanwhile never reads half a file.
  const partial = `${CLI_BUNDLE}.${process.pid}.partial`;
  try {
    const out = await esbuild.build({
      entryPoints: [CLI_ENTRY],
      outfile: partial,
      bundle: true,
      platform: "node",
      format: "esm",
      target: "node20",
      // the same module resolution as tsc and tsx (the @/ alias of tsconfig.json)
      tsconfig: path.join(root, "tsconfig.json"),
      logLevel: "silent",
      metafile: true,
      legalComments: "none",
      banner: { js: "// Built by scripts/build-cli.mjs from src/cli.ts: do not edit, rebuild (npm run build:cli)." },
    });
    const inputs = Object.keys(out.metafile.inputs)
      .filter((f) => !f.split("/").includes("node_modules"))
      .sort();
    writeFileSync(`${CLI_INPUTS}.${process.pid}.partial`, `${JSON.stringify(inputs)}\n`);
    renameSync(`${CLI_INPUTS}.${process.pid}.partial`, CLI_INPUTS);
    renameSync(partial, CLI_BUNDLE);
  } catch (e) {
    const first = (e instanceof Error ? e.message : String(e)).split("\n")[0];
    return { ok: false, line: `build failed (${first.slice(0, 200)}); npm run cli runs the TypeScript through tsx` };
  }
  const kb = (statSync(CLI_BUNDLE).size / 1024).toFixed(0);
  return { ok: true, line: `built ${path.relative(root, CLI_BUNDLE)} (${kb} KiB) in ${((Date.now() - started) / 1000).toFixed(1)} s` };
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const r = await buildCli();
  if (!(r.ok && process.argv.includes("--quiet"))) console.log(`build-cli: ${r.line}`);
  if (!existsSync(CLI_BUNDLE) && process.argv.includes("--strict")) process.exit(1);
}
