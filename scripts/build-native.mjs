#!/usr/bin/env node
// Builds the engine's OpenBLAS/LAPACK kernels addon (src/engine/native) with the node-gyp that
// ships inside npm. Run by package.json's `install` script, so `npm ci` builds it; also
// `npm run build:native` (which rebuilds even when the addon is up to date).
//
// It NEVER fails the install: when a header, a library, the toolchain or node-gyp is missing, or
// the build fails, it prints one line and exits 0, and the engine runs on its TypeScript kernels.
// TRISKEL_SKIP_NATIVE=1 skips the build.
import { spawnSync } from "node:child_process";
import { existsSync, readdirSync, realpathSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const nativeDir = path.join(root, "src", "engine", "native");
const addon = path.join(nativeDir, "build", "Release", "triskel_kernels.node");
const force = process.argv.includes("--force");

function done(line) {
  console.log(`build-native: ${line}`);
  process.exit(0);
}

function which(cmd) {
  for (const dir of (process.env.PATH ?? "").split(path.delimiter)) {
    if (!dir) continue;
    const file = path.join(dir, cmd);
    try {
      if (statSync(file).isFile()) return file;
    } catch {
      // not there
    }
  }
  return null;
}

/** node-gyp inside npm's own install (never a download, never `npm exec`). */
function findNodeGyp() {
  const candidates = [];
  const fromNpm = (npmCli) => path.join(path.dirname(npmCli), "..", "node_modules", "node-gyp", "bin", "node-gyp.js");
  if (process.env.npm_execpath) candidates.push(fromNpm(process.env.npm_execpath));
  const npmBin = which("npm");
  if (npmBin) {
    try {
      candidates.push(fromNpm(realpathSync(npmBin)));
    } catch {
      /* broken link */
    }
    candidates.push(path.join(path.dirname(npmBin), "..", "lib", "node_modules", "npm", "node_modules", "node-gyp", "bin", "node-gyp.js"));
  }
  const prefix = path.dirname(path.dirname(process.execPath));
  candidates.push(path.join(prefix, "lib", "node_modules", "npm", "node_modules", "node-gyp", "bin", "node-gyp.js"));
  return candidates.find((c) => existsSync(c)) ?? null;
}

/** A header in the compiler's usual places (including Debian's multiarch folder). */
function findHeader(name, subdirs = []) {
  const bases = ["/usr/include", "/usr/local/include"];
  const multi = [];
  for (const base of bases) {
    try {
      for (const d of readdirSync(base)) if (d.endsWith("-linux-gnu")) multi.push(path.join(base, d));
    } catch {
      // no such folder
    }
  }
  for (const dir of [...bases, ...multi]) {
    for (const sub of ["", ...subdirs]) {
      const file = path.join(dir, sub, name);
      if (existsSync(file)) return file;
    }
  }
  return null;
}

/** A linkable library (the unversioned .so that -lNAME needs). */
function findLibrary(name) {
  const dirs = ["/usr/lib", "/usr/local/lib", "/lib"];
  for (const base of ["/usr/lib", "/lib"]) {
    try {
      for (const d of readdirSync(base)) if (d.endsWith("-linux-gnu")) dirs.push(path.join(base, d));
    } catch {
      // no such folder
    }
  }
  return dirs.map((d) => path.join(d, `lib${name}.so`)).find((f) => existsSync(f)) ?? null;
}

function newestSource() {
  let newest = 0;
  const visit = (file) => {
    newest = Math.max(newest, statSync(file).mtimeMs);
  };
  visit(path.join(nativeDir, "binding.gyp"));
  for (const f of readdirSync(path.join(nativeDir, "src"))) visit(path.join(nativeDir, "src", f));
  return newest;
}

if (process.env.TRISKEL_SKIP_NATIVE === "1") done("skipped (TRISKEL_SKIP_NATIVE=1); the engine uses its TypeScript kernels");
if (process.platform !== "linux") done(`skipped on ${process.platform} (Linux only); the engine uses its TypeScript kernels`);

const nodedir = path.dirname(path.dirname(process.execPath));
if (!existsSync(path.join(nodedir, "include", "node", "node_api.h"))) {
  done(`skipped: no Node headers at ${nodedir}/include/node/node_api.h; the engine uses its TypeScript kernels`);
}
if (!existsSync(path.join(root, "node_modules", "node-addon-api", "napi.h"))) {
  done("skipped: node-addon-api is not installed; the engine uses its TypeScript kernels");
}
const missing = [];
if (!which("c++") && !which("g++")) missing.push("a C++ compiler (g++)");
if (!which("make")) missing.push("make");
if (!which("python3")) missing.push("python3");
if (!findHeader("cblas.h", ["openblas"])) missing.push("cblas.h (libopenblas-dev)");
if (!findHeader("lapacke.h")) missing.push("lapacke.h (liblapacke-dev)");
if (!findLibrary("openblas")) missing.push("libopenblas.so (libopenblas-dev)");
if (!findLibrary("lapacke")) missing.push("liblapacke.so (liblapacke-dev)");
if (missing.length > 0) done(`skipped: missing ${missing.join(", ")}; the engine uses its TypeScript kernels`);

const gyp = findNodeGyp();
if (!gyp) done("skipped: npm's bundled node-gyp was not found; the engine uses its TypeScript kernels");

if (!force && existsSync(addon) && statSync(addon).mtimeMs >= newestSource()) done(`up to date (${path.relative(root, addon)})`);

const started = Date.now();
const build = spawnSync(process.execPath, [gyp, "rebuild", `--nodedir=${nodedir}`, "--jobs=2", "--loglevel=error"], {
  cwd: nativeDir,
  encoding: "utf8",
  // node-gyp must never go to the network for headers: the nodedir above is all it needs.
  env: { ...process.env, npm_config_nodedir: nodedir },
});
if (build.status !== 0 || !existsSync(addon)) {
  const lines = `${build.stderr ?? ""}\n${build.stdout ?? ""}`.split("\n").map((l) => l.trim());
  const cause =
    lines.find((l) => /error/i.test(l) && !/^gyp (ERR!|info) (stack|cwd|node|not ok|command|System)/.test(l)) ?? build.error?.message ?? `exit ${build.status}`;
  done(`build failed (${cause.slice(0, 200)}); the engine uses its TypeScript kernels`);
}

// Load it once in a child process (a fresh OpenBLAS) to report which kernel set it runs.
const probe = spawnSync(process.execPath, ["-e", `const m=require(${JSON.stringify(addon)});console.log(m.coreName())`], {
  encoding: "utf8",
  env: { ...process.env, OPENBLAS_NUM_THREADS: "1" },
});
const seconds = ((Date.now() - started) / 1000).toFixed(1);
if (probe.status !== 0) done(`built in ${seconds} s but it does not load (${(probe.stderr ?? "").split("\n")[0]}); the engine uses its TypeScript kernels`);
done(`built ${path.relative(root, addon)} in ${seconds} s (OpenBLAS loads, default core ${probe.stdout.trim()})`);
