/**
 * The source tree's import graph, read with the TypeScript parser (no type checking): which files a
 * module imports (static imports and re-exports, `import()` and `require()` with a string literal),
 * resolved for relative and "@/" (= src/) specifiers. Type-only imports are erased by the compiler,
 * so they are reported apart (`typeOnly`); bare specifiers (packages, Node built-ins) are kept as
 * written.
 *
 * Used by the import checks in tests/unit (the browser-safe engine entry, no cycles between the
 * folders of src/server, browser code and src/shared apart from src/server), and as a script:
 *   node_modules/.bin/tsx scripts/import-graph.ts server-cycles    # folder cycles in src/server
 *   node_modules/.bin/tsx scripts/import-graph.ts browser-entry    # Node built-ins under src/engine/browser.ts
 *   node_modules/.bin/tsx scripts/import-graph.ts layers           # browser code or src/shared reaching the server; missing server-only markers
 * Each exits 1 and prints what is wrong when the check fails.
 */
import { existsSync, readFileSync, readdirSync, statSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import ts from "typescript";

export const ROOT = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const EXTENSIONS = [".ts", ".tsx", ".mts", ".js", ".mjs"];

export interface ImportEdge {
  /** The specifier as written. */
  specifier: string;
  /** Absolute path of the imported file, or null for a package or Node built-in (a local path that names no file throws). */
  resolved: string | null;
  /** Erased at compile time (`import type`, `export type`, or every named binding marked `type`). */
  typeOnly: boolean;
}

function resolveFile(base: string): string | null {
  if (existsSync(base) && statSync(base).isFile()) return base;
  for (const ext of EXTENSIONS) if (existsSync(base + ext)) return base + ext;
  for (const ext of EXTENSIONS) {
    const index = path.join(base, "index" + ext);
    if (existsSync(index)) return index;
  }
  return null;
}

/** Resolve a specifier written in `fromFile`: relative and "@/" paths to a file, anything else to null. */
export function resolveSpecifier(fromFile: string, specifier: string): string | null {
  if (specifier.startsWith("./") || specifier.startsWith("../")) return resolveFile(path.resolve(path.dirname(fromFile), specifier));
  if (specifier.startsWith("@/")) return resolveFile(path.join(ROOT, "src", specifier.slice(2)));
  return null;
}

function isLocal(specifier: string): boolean {
  return specifier.startsWith("./") || specifier.startsWith("../") || specifier.startsWith("@/");
}

const importCache = new Map<string, ImportEdge[]>();

/** Every import of one source file. */
export function importsOf(file: string): ImportEdge[] {
  const cached = importCache.get(file);
  if (cached) return cached;
  const source = ts.createSourceFile(
    file,
    readFileSync(file, "utf8"),
    ts.ScriptTarget.Latest,
    true,
    file.endsWith(".tsx") ? ts.ScriptKind.TSX : ts.ScriptKind.TS,
  );
  const edges: ImportEdge[] = [];
  const add = (specifier: string, typeOnly: boolean) => {
    const resolved = isLocal(specifier) ? resolveSpecifier(file, specifier) : null;
    // A local import that names no file would hide an edge: refuse it (the tree would not compile either).
    if (isLocal(specifier) && !resolved) throw new Error(`${relative(file)}: cannot resolve the import "${specifier}"`);
    edges.push({ specifier, resolved, typeOnly });
  };
  const visit = (node: ts.Node) => {
    if (ts.isImportDeclaration(node) && ts.isStringLiteral(node.moduleSpecifier)) {
      const clause = node.importClause;
      let typeOnly = false;
      if (clause) {
        if (clause.isTypeOnly) typeOnly = true;
        else if (!clause.name && clause.namedBindings && ts.isNamedImports(clause.namedBindings)) {
          const elements = clause.namedBindings.elements;
          typeOnly = elements.length > 0 && elements.every((e) => e.isTypeOnly);
        }
      }
      add(node.moduleSpecifier.text, typeOnly);
    } else if (ts.isExportDeclaration(node) && node.moduleSpecifier && ts.isStringLiteral(node.moduleSpecifier)) {
      let typeOnly = node.isTypeOnly;
      if (!typeOnly && node.exportClause && ts.isNamedExports(node.exportClause)) {
        const elements = node.exportClause.elements;
        typeOnly = elements.length > 0 && elements.every((e) => e.isTypeOnly);
      }
      add(node.moduleSpecifier.text, typeOnly);
    } else if (
      ts.isImportEqualsDeclaration(node) &&
      ts.isExternalModuleReference(node.moduleReference) &&
      ts.isStringLiteral(node.moduleReference.expression)
    ) {
      add(node.moduleReference.expression.text, node.isTypeOnly);
    } else if (ts.isCallExpression(node) && node.arguments.length >= 1 && ts.isStringLiteralLike(node.arguments[0])) {
      const callee = node.expression;
      const isDynamicImport = callee.kind === ts.SyntaxKind.ImportKeyword;
      const isRequire = ts.isIdentifier(callee) && callee.text === "require";
      if (isDynamicImport || isRequire) add(node.arguments[0].text, false);
    } else if (ts.isImportTypeNode(node) && ts.isLiteralTypeNode(node.argument) && ts.isStringLiteral(node.argument.literal)) {
      add(node.argument.literal.text, true); // import("x").T in a type position
    }
    ts.forEachChild(node, visit);
  };
  visit(source);
  importCache.set(file, edges);
  return edges;
}

/** Node's built-in modules, with or without the "node:" prefix (subpaths such as "fs/promises" included). */
const NODE_BUILTINS = new Set([
  "assert",
  "async_hooks",
  "buffer",
  "child_process",
  "cluster",
  "console",
  "constants",
  "crypto",
  "dgram",
  "diagnostics_channel",
  "dns",
  "domain",
  "events",
  "fs",
  "http",
  "http2",
  "https",
  "inspector",
  "module",
  "net",
  "os",
  "path",
  "perf_hooks",
  "process",
  "punycode",
  "querystring",
  "readline",
  "repl",
  "stream",
  "string_decoder",
  "sys",
  "timers",
  "tls",
  "trace_events",
  "tty",
  "url",
  "util",
  "v8",
  "vm",
  "wasi",
  "worker_threads",
  "zlib",
]);

export function isNodeBuiltin(specifier: string): boolean {
  if (specifier.startsWith("node:")) return true;
  return NODE_BUILTINS.has(specifier.split("/")[0]);
}

export interface GraphModule {
  file: string;
  /** The chain of files from the entry to this one (entry first). */
  via: string[];
}

/**
 * Every source file reachable from `entry` through runtime imports (type-only imports skipped unless
 * `includeTypeOnly`), breadth first, each with the shortest chain that reaches it. A module for
 * which `stopAt` answers true is listed but its own imports are not followed.
 */
export function walk(entry: string, options: { includeTypeOnly?: boolean; stopAt?: (file: string) => boolean } = {}): Map<string, GraphModule> {
  const seen = new Map<string, GraphModule>([[entry, { file: entry, via: [entry] }]]);
  const queue = [entry];
  while (queue.length > 0) {
    const file = queue.shift()!;
    const here = seen.get(file)!;
    if (file !== entry && options.stopAt?.(file)) continue;
    for (const edge of importsOf(file)) {
      if (edge.typeOnly && !options.includeTypeOnly) continue;
      if (!edge.resolved || seen.has(edge.resolved)) continue;
      if (!/\.(m?ts|tsx|m?js)$/.test(edge.resolved)) continue; // .json, .csv, .node: leaves, not modules to read
      seen.set(edge.resolved, { file: edge.resolved, via: [...here.via, edge.resolved] });
      queue.push(edge.resolved);
    }
  }
  return seen;
}

export function relative(file: string): string {
  return path.relative(ROOT, file).split(path.sep).join("/");
}

/** All .ts/.tsx files under a directory (tests excluded: `*.test.ts`). */
export function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...sourceFiles(full));
    else if (/\.tsx?$/.test(entry.name) && !/\.test\.tsx?$/.test(entry.name) && !entry.name.endsWith(".d.ts")) out.push(full);
  }
  return out.sort();
}

/** Modules marked "use client" under src/ (the roots of the browser bundles). */
export function clientModules(): string[] {
  return sourceFiles(path.join(ROOT, "src")).filter((f) => /^\s*["']use client["']/m.test(readFileSync(f, "utf8").slice(0, 400)));
}

export interface BrowserEntryProblem {
  /** The module that imports it (repository-relative). */
  file: string;
  /** What it imports: a Node built-in, or the native addon / its loader. */
  specifier: string;
  /** Entry first, ending with `file`. */
  chain: string[];
}

/**
 * Modules reachable from a browser entry that import a Node built-in or the engine's native addon
 * (a ".node" file, anything under src/engine/native/, or a require()).
 */
export function browserEntryProblems(entry: string): BrowserEntryProblem[] {
  const nativeDir = path.join(ROOT, "src/engine/native") + path.sep;
  const problems: BrowserEntryProblem[] = [];
  for (const mod of walk(entry).values()) {
    for (const edge of importsOf(mod.file)) {
      if (edge.typeOnly) continue;
      const native = edge.specifier.endsWith(".node") || (edge.resolved !== null && edge.resolved.startsWith(nativeDir));
      if (isNodeBuiltin(edge.specifier) || native) {
        problems.push({ file: relative(mod.file), specifier: edge.specifier, chain: mod.via.map(relative) });
      }
    }
    if (mod.file.startsWith(nativeDir)) problems.push({ file: relative(mod.file), specifier: "(native addon loader)", chain: mod.via.map(relative) });
  }
  return problems;
}

export interface FolderEdge {
  from: string;
  to: string;
  /** "file -> imported file" pairs that make the edge (repository-relative). */
  imports: string[];
}

/**
 * Folder-level graph of `dir`: one node per direct sub-folder (files directly in `dir` belong to
 * a node named "."), an edge A -> B when a file under A imports a file under B (A != B). Type-only
 * imports count too unless `runtimeOnly`: a folder that needs another's types depends on it.
 */
export function folderGraph(dir: string, options: { runtimeOnly?: boolean } = {}): Map<string, Map<string, FolderEdge>> {
  const folderOf = (file: string): string | null => {
    const rel = path.relative(dir, file);
    if (rel.startsWith("..") || path.isAbsolute(rel)) return null;
    const parts = rel.split(path.sep);
    return parts.length === 1 ? "." : parts[0];
  };
  const graph = new Map<string, Map<string, FolderEdge>>();
  for (const file of sourceFiles(dir)) {
    const from = folderOf(file)!;
    if (!graph.has(from)) graph.set(from, new Map());
    for (const edge of importsOf(file)) {
      if (!edge.resolved || (options.runtimeOnly && edge.typeOnly)) continue;
      const to = folderOf(edge.resolved);
      if (to === null || to === from) continue;
      const edges = graph.get(from)!;
      if (!edges.has(to)) edges.set(to, { from, to, imports: [] });
      edges.get(to)!.imports.push(`${relative(file)} -> ${relative(edge.resolved)}${edge.typeOnly ? " (type only)" : ""}`);
    }
  }
  return graph;
}

/** Strongly connected components with more than one folder (Tarjan), each sorted, largest first. */
export function folderCycles(graph: Map<string, Map<string, FolderEdge>>): string[][] {
  let index = 0;
  const indices = new Map<string, number>(),
    low = new Map<string, number>();
  const stack: string[] = [],
    onStack = new Set<string>();
  const out: string[][] = [];
  const connect = (v: string) => {
    indices.set(v, index);
    low.set(v, index);
    index++;
    stack.push(v);
    onStack.add(v);
    for (const w of graph.get(v)?.keys() ?? []) {
      if (!indices.has(w)) {
        connect(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, indices.get(w)!));
    }
    if (low.get(v) === indices.get(v)) {
      const component: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        component.push(w);
      } while (w !== v);
      if (component.length > 1) out.push(component.sort());
    }
  };
  for (const v of [...graph.keys()].sort()) if (!indices.has(v)) connect(v);
  return out.sort((a, b) => b.length - a.length || a[0].localeCompare(b[0]));
}

/** One line per edge inside each cycle, naming the imports that make it. */
export function describeCycles(graph: Map<string, Map<string, FolderEdge>>, cycles: string[][]): string[] {
  const lines: string[] = [];
  for (const component of cycles) {
    lines.push(`cycle: ${component.join(" <-> ")}`);
    for (const from of component) {
      for (const to of component) {
        const edge = graph.get(from)?.get(to);
        if (edge) lines.push(`  ${from} -> ${to}: ${edge.imports.join("; ")}`);
      }
    }
  }
  return lines;
}

// ---- Layers: browser code and src/shared against src/server --------------------------------------

const SERVER_DIR = path.join(ROOT, "src/server") + path.sep;
const SHARED_DIR = path.join(ROOT, "src/shared") + path.sep;
const ENGINE_DIR = path.join(ROOT, "src/engine") + path.sep;
const ENV_FILE = path.join(ROOT, "src/env.ts");
const ENGINE_BROWSER = path.join(ROOT, "src/engine/browser.ts");
/** The marker every module that touches the database, the queue or secrets imports first. */
export const SERVER_ONLY_MARKER = path.join(ROOT, "src/server/server-only.ts");

/** Clients and SDKs of the database, the queue, the payment, sign-in and mail services. */
const SERVER_PACKAGE = /^(postgres|drizzle-orm\/postgres-js|bullmq|ioredis|stripe|nodemailer|@clerk\/nextjs\/server|@clerk\/backend)(\/.*)?$/;
/** Packages no browser or shared module may import: the above, the query builder, the server's
 * rate limiter and thread pool, and the npm marker package "server-only". */
const BROWSER_FORBIDDEN_PACKAGE =
  /^(postgres|drizzle-orm|bullmq|ioredis|stripe|nodemailer|@clerk\/nextjs\/server|@clerk\/backend|rate-limiter-flexible|piscina|server-only)(\/.*)?$/;

export interface LayerProblem {
  /** The module that imports it (repository-relative). */
  file: string;
  /** The import as written. */
  specifier: string;
  /** What is wrong with it. */
  reason: string;
  /** Root first, ending with `file`. */
  chain: string[];
}

/**
 * Imports that do not belong in code that runs in the browser, in the import graphs of `roots`
 * (runtime imports followed; the walk does not go on into src/server, whose entry is the problem):
 * anything under src/server or src/env.ts (type-only imports too: a type both sides use belongs in
 * src/shared), a Node built-in, or a package of the database, the queue or the hosted services.
 */
export function browserLayerProblems(roots: string[]): LayerProblem[] {
  const problems: LayerProblem[] = [];
  const done = new Set<string>();
  const isServer = (file: string) => file.startsWith(SERVER_DIR) || file === ENV_FILE;
  for (const root of roots) {
    for (const mod of walk(root, { stopAt: isServer }).values()) {
      if (done.has(mod.file) || (mod.file !== root && isServer(mod.file))) continue;
      done.add(mod.file);
      const report = (specifier: string, reason: string) => problems.push({ file: relative(mod.file), specifier, reason, chain: mod.via.map(relative) });
      for (const edge of importsOf(mod.file)) {
        if (edge.resolved && isServer(edge.resolved))
          report(edge.specifier, `server code (${relative(edge.resolved)})${edge.typeOnly ? ", type-only: move the type to src/shared" : ""}`);
        else if (edge.typeOnly) continue;
        else if (isNodeBuiltin(edge.specifier)) report(edge.specifier, "a Node built-in");
        else if (BROWSER_FORBIDDEN_PACKAGE.test(edge.specifier)) report(edge.specifier, "a package of the database, the queue or a hosted service");
      }
    }
  }
  return problems;
}

/**
 * browserLayerProblems for every module of src/shared, plus its own rule: src/shared imports only
 * src/shared and the engine's browser entry (never src/components, src/lib, src/app or deep engine paths).
 */
export function sharedLayerProblems(): LayerProblem[] {
  const files = sourceFiles(SHARED_DIR);
  const problems = browserLayerProblems(files);
  for (const file of files) {
    for (const edge of importsOf(file)) {
      if (!edge.resolved || edge.resolved.startsWith(SERVER_DIR) || edge.resolved === ENV_FILE) continue; // reported above
      if (edge.resolved.startsWith(SHARED_DIR) || edge.resolved === ENGINE_BROWSER) continue;
      const reason = edge.resolved.startsWith(ENGINE_DIR) ? 'a deep engine path: import "@/engine/browser"' : `outside src/shared (${relative(edge.resolved)})`;
      problems.push({ file: relative(file), specifier: edge.specifier, reason, chain: [relative(file)] });
    }
  }
  return problems;
}

/**
 * Why `file` must import the server-only marker: the imports by which it touches the database,
 * the queue or secrets (src/server/db, src/server/queue, src/env.ts, or their clients and the
 * payment, sign-in and mail SDKs; runtime imports, static or dynamic). Modules of src/server/db,
 * src/server/queue and src/env.ts itself always must. Empty: it need not.
 */
export function serverResourceImports(file: string): string[] {
  const own =
    file.startsWith(path.join(ROOT, "src/server/db") + path.sep) || file.startsWith(path.join(ROOT, "src/server/queue") + path.sep) || file === ENV_FILE;
  const isResource = (f: string) =>
    f.startsWith(path.join(ROOT, "src/server/db") + path.sep) || f.startsWith(path.join(ROOT, "src/server/queue") + path.sep) || f === ENV_FILE;
  const why = importsOf(file)
    .filter((e) => !e.typeOnly && ((e.resolved !== null && isResource(e.resolved)) || SERVER_PACKAGE.test(e.specifier)))
    .map((e) => e.specifier);
  return own ? [`(${relative(file)} itself)`, ...why] : why;
}

/** Whether `file` imports the server-only marker (a runtime import, not type-only). */
export function importsServerOnlyMarker(file: string): boolean {
  return importsOf(file).some((e) => !e.typeOnly && e.resolved === SERVER_ONLY_MARKER);
}

/** Modules of src/ (the engine aside) that touch the database, the queue or secrets without the marker. */
export function missingServerOnlyMarkers(): { file: string; because: string[] }[] {
  return sourceFiles(path.join(ROOT, "src"))
    .filter((f) => !f.startsWith(ENGINE_DIR) && f !== SERVER_ONLY_MARKER)
    .map((f) => ({ file: f, because: serverResourceImports(f) }))
    .filter((m) => m.because.length > 0 && !importsServerOnlyMarker(m.file))
    .map((m) => ({ file: relative(m.file), because: m.because }));
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const what = process.argv[2];
  if (what === "server-cycles") {
    const graph = folderGraph(path.join(ROOT, "src/server"));
    const cycles = folderCycles(graph);
    for (const line of describeCycles(graph, cycles)) console.log(line);
    if (cycles.length === 0) console.log("src/server: no import cycles between folders");
    process.exit(cycles.length === 0 ? 0 : 1);
  } else if (what === "browser-entry") {
    const problems = browserEntryProblems(path.join(ROOT, "src/engine/browser.ts"));
    for (const p of problems) console.log(`${p.file} imports ${p.specifier} (${p.chain.join(" -> ")})`);
    if (problems.length === 0) console.log("src/engine/browser.ts: no Node built-ins or native addon in its import graph");
    process.exit(problems.length === 0 ? 0 : 1);
  } else if (what === "layers") {
    const problems = [...browserLayerProblems(clientModules()), ...sharedLayerProblems()];
    for (const p of problems) console.log(`${p.file} imports ${p.specifier}: ${p.reason} (${p.chain.join(" -> ")})`);
    const missing = missingServerOnlyMarkers();
    for (const m of missing) console.log(`${m.file} touches ${m.because.join(", ")} but does not import "@/server/server-only"`);
    if (problems.length === 0 && missing.length === 0)
      console.log("browser code and src/shared reach no server code; every module that touches the database, the queue or secrets is marked server-only");
    process.exit(problems.length === 0 && missing.length === 0 ? 0 : 1);
  } else {
    console.error("usage: tsx scripts/import-graph.ts server-cycles | browser-entry | layers");
    process.exit(2);
  }
}
