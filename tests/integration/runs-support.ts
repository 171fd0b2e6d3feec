// Helpers for the runs, sweeps and networks integration tests (real web app, worker, PostgreSQL, Redis).
import { spawn, execFile } from "node:child_process";
import { closeSync, mkdtempSync, openSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { dirname, join } from "node:path";
import { promisify } from "node:util";
import postgres from "postgres";
import { api, databaseUrl, type DemoTokenKey } from "../support/services";
import type { Json } from "../support/json";

export const sql = postgres(databaseUrl(), { max: 3, onnotice: () => {} });

/** A small clean triangular network (synthetic): quick to compute. */
export function smallNetwork(columns = 6, rows = 6): Record<string, unknown> {
  return {
    lattice: "triangular",
    size: { columns, rows },
    transverse: "periodic",
    twistDegrees: 0.11,
    modeVelocityMps: 1.0e6,
    channelsPerLink: 1,
    node: { forward: 0.6, left: 0.2, right: 0.2 },
  };
}

export async function json<T = Json>(res: Response): Promise<T> {
  const text = await res.text();
  try {
    return JSON.parse(text) as T;
  } catch {
    throw new Error(`not JSON (status ${res.status}): ${text.slice(0, 300)}`);
  }
}

export async function post(path: string, body: unknown, as: DemoTokenKey = "researcher") {
  const res = await api(path, { method: "POST", json: body, as });
  return { status: res.status, body: await json(res) };
}

export async function get(path: string, as: DemoTokenKey = "researcher") {
  const res = await api(path, { as });
  return { status: res.status, body: await json(res) };
}

export async function waitFor<T>(what: string, probe: () => Promise<T | undefined | null | false>, timeoutMs = 120_000, everyMs = 250): Promise<T> {
  const until = Date.now() + timeoutMs;
  let last: unknown;
  while (Date.now() < until) {
    try {
      const v = await probe();
      if (v) return v;
      last = v;
    } catch (err) {
      last = err;
    }
    await new Promise((r) => setTimeout(r, everyMs));
  }
  throw new Error(`timed out waiting for ${what} (last: ${last instanceof Error ? last.message : JSON.stringify(last)})`);
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

const execFileP = promisify(execFile);

/** What `npm run -s cli -- compute FILE.json` prints for an input (the same command, run here). */
export async function cliCompute(input: unknown): Promise<string> {
  const dir = mkdtempSync(join(tmpdir(), "triskel-cli-"));
  const file = join(dir, "input.json");
  writeFileSync(file, JSON.stringify(input));
  const { stdout } = await execFileP("npm", ["run", "-s", "cli", "--", "compute", file], { maxBuffer: 64 * 1024 * 1024, env: process.env });
  return stdout;
}

export async function workspaceId(name = "Larkspur Devices Lab"): Promise<string> {
  const [row] = await sql`select id from workspaces where name = ${name}`;
  return row.id;
}

export async function counts(wsId: string) {
  const [r] = await sql`select
    (select count(*)::int from runs where workspace_id = ${wsId}) as runs,
    (select count(*)::int from sweeps where workspace_id = ${wsId}) as sweeps,
    (select count(*)::int from networks where workspace_id = ${wsId}) as networks`;
  return r as { runs: number; sweeps: number; networks: number };
}

/** Pid (and process group) of the worker that scripts/test.sh started, or the last replacement. */
export function workerPid(): number {
  const file = process.env.TRISKEL_WORKER_PID_FILE;
  if (!file) throw new Error("TRISKEL_WORKER_PID_FILE is not set: run through `npm test`");
  return Number(readFileSync(file, "utf8").trim());
}

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/** SIGKILL the worker's whole process group (tsx and the node process it started). */
export async function killWorker(): Promise<number> {
  const pid = workerPid();
  try {
    process.kill(-pid, "SIGKILL");
  } catch {
    process.kill(pid, "SIGKILL");
  }
  await waitFor("the worker to die", async () => !alive(pid), 10_000, 100);
  return pid;
}

/**
 * Starts a replacement worker with the same environment, in its own process group, logging next
 * to the first one, and records its pid where scripts/test.sh will stop it at the end.
 */
export function startWorker(): number {
  const file = process.env.TRISKEL_WORKER_PID_FILE!;
  const log = openSync(join(dirname(file), "worker.log"), "a");
  const child = spawn("node_modules/.bin/tsx", ["worker/main.ts"], {
    cwd: process.cwd(),
    env: { ...process.env, NODE_ENV: "production" },
    detached: true,
    stdio: ["ignore", log, log],
  });
  closeSync(log);
  child.unref();
  writeFileSync(file, `${child.pid}\n`);
  return child.pid!;
}
