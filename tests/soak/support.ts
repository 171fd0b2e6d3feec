// Helpers of the soak drills (npm run test:soak, scripts/soak.sh): a Lab workspace of their own
// (subscribed through the Stripe stand-in, no spend cap) so the demo lab's budget is untouched,
// service control, and the figures file.
import { execFile, spawn } from "node:child_process";
import { closeSync, mkdirSync, openSync, readFileSync, writeFileSync, existsSync } from "node:fs";
import { dirname, join } from "node:path";
import { promisify } from "node:util";
import postgres from "postgres";
import { displayPrefix, hashToken, newTokenSecret } from "@/server/auth/tokens";
import { appUrl, databaseUrl, failOnRateLimit } from "../support/services";
import type { Json } from "../support/json";

export const sql = postgres(databaseUrl(), { max: 3, onnotice: () => {}, connect_timeout: 5 });
export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
export const stripeFake = () => `http://127.0.0.1:${process.env.STRIPE_FAKE_PORT}`;

export interface SoakWorkspace {
  id: string;
  tokens: { owner: string; billingAdmin: string; researcher: string };
  userIds: Record<string, string>;
  customer: string;
}

export async function createLabWorkspace(name: string): Promise<SoakWorkspace> {
  const slug = `soak-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 8)}`;
  const [ws] = await sql`insert into workspaces (name, slug, kind, plan) values (${name}, ${slug}, 'lab', 'free') returning id`;
  const tokens: Record<string, string> = {};
  const userIds: Record<string, string> = {};
  for (const [key, role] of [
    ["owner", "owner"],
    ["billingAdmin", "billing_admin"],
    ["researcher", "researcher"],
  ] as const) {
    const [u] = await sql`insert into users (email, name) values (${`${key}-${slug}@soak.example`}, ${`${key} of ${name}`}) returning id`;
    await sql`insert into memberships (workspace_id, user_id, role) values (${ws.id}, ${u.id}, ${role})`;
    const secret = newTokenSecret();
    await sql`insert into api_tokens (workspace_id, user_id, name, role, token_hash, prefix)
      values (${ws.id}, ${u.id}, 'soak', ${role}, ${hashToken(secret)}, ${displayPrefix(secret)})`;
    tokens[key] = secret;
    userIds[key] = u.id;
  }
  const w: SoakWorkspace = { id: ws.id, tokens: tokens as SoakWorkspace["tokens"], userIds, customer: "" };
  // Upgrade through the Checkout stand-in, then lift the spend cap.
  const start = await call(w, "billingAdmin", "POST", "/api/v1/billing/checkout");
  if (start.status !== 201) throw new Error(`checkout: ${start.status} ${JSON.stringify(start.body)}`);
  const pay = await fetch(`${start.body.url}/pay`, { method: "POST", redirect: "manual" });
  if (pay.status !== 303) throw new Error(`checkout pay: ${pay.status}`);
  for (let i = 0; i < 100; i++) {
    const [row] = await sql`select plan, stripe_customer_id from workspaces where id = ${ws.id}`;
    if (row.plan === "lab" && row.stripe_customer_id) {
      w.customer = row.stripe_customer_id;
      break;
    }
    await sleep(200);
  }
  if (!w.customer) throw new Error("the soak workspace did not become Lab");
  const cap = await call(w, "billingAdmin", "PUT", "/api/v1/billing/spend-cap", { spendCapUsd: null });
  if (cap.status !== 200) throw new Error(`spend cap: ${cap.status} ${JSON.stringify(cap.body)}`);
  return w;
}

/**
 * More members of the workspace (users with a membership, researcher by default), each with a
 * token of their own, as several real clients of one lab would be: rate limits count per member.
 */
export async function addMembers(w: SoakWorkspace, n: number, role = "researcher"): Promise<{ userId: string; token: string }[]> {
  const out: { userId: string; token: string }[] = [];
  const tag = Math.random().toString(36).slice(2, 8);
  for (let i = 0; i < n; i++) {
    const [u] = await sql`insert into users (email, name) values (${`member-${tag}-${i}-${w.id}@soak.example`}, ${`soak member ${i}`}) returning id`;
    await sql`insert into memberships (workspace_id, user_id, role) values (${w.id}, ${u.id}, ${role})`;
    const secret = newTokenSecret();
    await sql`insert into api_tokens (workspace_id, user_id, name, role, token_hash, prefix)
      values (${w.id}, ${u.id}, 'soak', ${role}, ${hashToken(secret)}, ${displayPrefix(secret)})`;
    out.push({ userId: u.id, token: secret });
  }
  return out;
}

export async function call(w: SoakWorkspace, as: keyof SoakWorkspace["tokens"], method: string, path: string, json?: unknown, timeoutMs = 20_000) {
  const res = await fetch(new URL(path, appUrl()), {
    method,
    headers: { authorization: `Bearer ${w.tokens[as]}`, ...(json !== undefined ? { "content-type": "application/json" } : {}) },
    body: json !== undefined ? JSON.stringify(json) : undefined,
    signal: AbortSignal.timeout(timeoutMs),
  });
  failOnRateLimit(res, `${as} ${method} ${path}`);
  const text = await res.text();
  let body: Json = text;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON: the body is the text
  }
  return { status: res.status, body, headers: res.headers };
}

export async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 120_000, everyMs = 500): Promise<T> {
  const started = Date.now();
  let last: unknown;
  for (;;) {
    try {
      const v = await probe();
      if (v) return v;
    } catch (e) {
      last = e;
    }
    if (Date.now() - started > timeoutMs)
      throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}${last ? ` (last error: ${(last as Error).message})` : ""}`);
    await sleep(everyMs);
  }
}

const run = promisify(execFile);
/** Stops or starts a service of the soak instance (scripts/soak.sh ctl). */
export async function ctl(
  action: "pg-stop" | "pg-start" | "pg-kill" | "redis-stop" | "redis-start" | "redis-kill" | "web-kill" | "web-start" | "mail-stop" | "mail-start",
) {
  await run("bash", ["scripts/soak.sh", "ctl", action], { env: process.env, timeout: 90_000 });
}

export async function health(): Promise<{ status: number; body: Json }> {
  try {
    const res = await fetch(new URL("/api/v1/health", appUrl()), { signal: AbortSignal.timeout(10_000) });
    return { status: res.status, body: await res.json() };
  } catch (e) {
    return { status: 0, body: { error: (e as Error).message } };
  }
}

/** Merges one section into the figures file (.data/soak-<base>/<file>). */
export function record(file: string, key: string, value: unknown) {
  const dir = process.env.TRISKEL_SOAK_OUT ?? join(process.cwd(), ".data");
  mkdirSync(dir, { recursive: true });
  const path = join(dir, file);
  const all = existsSync(path) ? JSON.parse(readFileSync(path, "utf8")) : {};
  all[key] = value;
  all.date = new Date().toISOString();
  writeFileSync(path, JSON.stringify(all, null, 2) + "\n");
}

export const SMALL_RUN = {
  network: {
    lattice: "triangular",
    size: { columns: 4, rows: 4 },
    transverse: "periodic",
    twistDegrees: 0.11,
    modeVelocityMps: 1.0e6,
    channelsPerLink: 1,
    node: { forward: 0.6, left: 0.2, right: 0.2 },
  },
  computation: { kind: "conductance", energyMeV: 0.4 },
};

/** Ledger and meter check for a set of runs: one ledger row each, one meter event per ledger row. */
export async function billingOnce(w: SoakWorkspace, runIds: string[], timeoutMs = 240_000) {
  const ledger = await sql`select id, run_id from usage_ledger where run_id in ${sql(runIds)}`;
  const ledgerIds = ledger.map((l) => l.id as string);
  await until(
    "every meter event of these runs sent",
    async () => {
      const [r] = await sql`select count(*)::int as sent from meter_outbox where ledger_id in ${sql(ledgerIds)} and status = 'sent'`;
      return r.sent === ledgerIds.length;
    },
    timeoutMs,
    1000,
  );
  const events = (await (await fetch(`${stripeFake()}/_fake/meter_events?customer=${w.customer}`)).json()).data as { identifier: string }[];
  const ids = events.map((e) => e.identifier).filter((i) => ledgerIds.includes(i));
  return {
    runs: runIds.length,
    ledgerRows: ledger.length,
    distinctLedgerRuns: new Set(ledger.map((l) => l.run_id)).size,
    meterEvents: ids.length,
    distinctMeterEvents: new Set(ids).size,
  };
}

/**
 * A long run: 40 x 40 cells, 48 disorder samples, several seconds of compute on the development
 * machine (about 7 s with the native kernels). `i` varies the disorder seed and the energy.
 */
export function longRun(i: number) {
  return {
    network: { ...SMALL_RUN.network, size: { columns: 40, rows: 40 }, disorder: { linkPhaseWidthRad: 3.0, seed: 100 + i } },
    computation: { kind: "conductance", energyMeV: 0.3 + 0.001 * i, ensemble: { samples: 48 } },
  };
}

/** How the workers this process started ended (pid -> exit code or signal), for the drills' failure messages. */
export const workerExits = new Map<number, string>();

/**
 * Starts a replacement worker like tests/integration/runs-support.ts startWorker, with extra
 * variables (the drill hooks), and records its pid where killWorker and scripts/soak.sh find it.
 */
export function startWorkerWith(extra: Record<string, string> = {}): number {
  const file = process.env.TRISKEL_WORKER_PID_FILE!;
  const log = openSync(join(dirname(file), "worker.log"), "a");
  const child = spawn("node_modules/.bin/tsx", ["worker/main.ts"], {
    cwd: process.cwd(),
    env: { ...process.env, NODE_ENV: "production", ...extra },
    detached: true,
    stdio: ["ignore", log, log],
  });
  closeSync(log);
  child.on("exit", (code, signal) => {
    const how = signal ?? `exit code ${code}`;
    workerExits.set(child.pid!, how);
    console.error(`[soak] worker ${child.pid} ended: ${how}`);
  });
  child.unref();
  writeFileSync(file, `${child.pid}\n`);
  return child.pid!;
}

/** Throws when the worker this process started last has ended (so a drill fails at once, saying how). */
export function assertWorkerAlive(pid: number) {
  const how = workerExits.get(pid);
  if (how) throw new Error(`the worker ${pid} ended (${how}); see worker.log`);
}

const FINAL = ["succeeded", "failed", "cancelled"];

/** Waits until no run, sweep or fit of the workspace is queued or running. */
export async function untilSettled(w: SoakWorkspace, timeoutMs = 300_000) {
  return until(
    "every job of the workspace to reach a final state",
    async () => {
      const [r] = await sql`select
        (select count(*)::int from runs where workspace_id = ${w.id} and status in ('queued', 'running')) +
        (select count(*)::int from sweeps where workspace_id = ${w.id} and status in ('queued', 'running')) +
        (select count(*)::int from fits where workspace_id = ${w.id} and status in ('queued', 'running')) as open`;
      return r.open === 0;
    },
    timeoutMs,
    1000,
  );
}

/**
 * The checks after a drill, over every job the workspace ever had: each in a final state (none
 * lost), none finished twice (at most one ledger row per run, one meter event per ledger row at
 * the Stripe stand-in), every succeeded run billed exactly once, no sweep without all its points
 * and no run without its reservation (its estimate), and the budget's reservation back to 0.
 */
export async function audit(w: SoakWorkspace) {
  await untilSettled(w);
  const runs = await sql`select id, status, kind, attempts, estimated_compute_seconds::float8 as est from runs where workspace_id = ${w.id}`;
  const notFinal = runs.filter((r) => !FINAL.includes(r.status)).length;
  const [sw] = await sql`select count(*)::int as n from sweeps s
    where s.workspace_id = ${w.id} and s.point_count <> (select count(*) from runs r where r.sweep_id = s.id)`;
  const withoutReservation = runs.filter((r) => r.kind !== "fit" && !(Number(r.est) > 0)).length;
  const [dup] = await sql`select count(*)::int as n from (select run_id from usage_ledger where workspace_id = ${w.id} group by run_id having count(*) > 1) d`;
  const [unbilled] = await sql`select count(*)::int as n from runs r where r.workspace_id = ${w.id} and r.status = 'succeeded'
    and not exists (select 1 from usage_ledger l where l.run_id = r.id)`;
  const billed = await sql`select distinct run_id from usage_ledger where workspace_id = ${w.id}`;
  const billing = await billingOnce(
    w,
    billed.map((b) => b.run_id as string),
  );
  const overview = await call(w, "billingAdmin", "GET", "/api/v1/billing");
  const statuses: Record<string, number> = {};
  for (const r of runs) statuses[r.status] = (statuses[r.status] ?? 0) + 1;
  return {
    jobs: runs.length,
    statuses,
    notFinal,
    sweepsMissingPoints: sw.n,
    runsWithoutReservation: withoutReservation,
    runsBilledTwice: dup.n,
    succeededWithoutLedgerRow: unbilled.n,
    ledgerRows: billing.ledgerRows,
    meterEvents: billing.meterEvents,
    distinctMeterEvents: billing.distinctMeterEvents,
    reservedComputeSecondsAfter: overview.body.reservedComputeSeconds as number,
  };
}
