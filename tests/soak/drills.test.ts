// Drills with long jobs in flight (npm run test:soak): the worker SIGKILLed between the engine's
// finish and the finishing transaction (the drill hook of worker/drill-hold.ts), the web server
// SIGKILLed mid-submission, PostgreSQL stopped with `-m immediate` on a durable instance (fsync on,
// scripts/soak.sh), Redis SIGKILLed. After each, over every job of the workspace (audit in
// ./support.ts): none lost, none finished twice, one ledger row and one meter event per billed
// run, no half-written sweep or run, reservations back to 0. Figures: .data/soak-<base>/drills.json.
import { existsSync, readdirSync, rmSync } from "node:fs";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { killWorker } from "../integration/runs-support";
import { appUrl } from "../support/services";
import {
  addMembers,
  assertWorkerAlive,
  audit,
  call,
  createLabWorkspace,
  ctl,
  health,
  longRun,
  record,
  sleep,
  SMALL_RUN,
  sql,
  until,
  startWorkerWith,
  type SoakWorkspace,
} from "./support";

let w: SoakWorkspace;
const LONG = 4;
const seconds = (since: number) => Math.round((Date.now() - since) / 100) / 10;

beforeAll(async () => {
  w = await createLabWorkspace("Soak in-flight drills lab");
});
afterAll(async () => {
  await sql.end();
});

async function submit(path: "/api/v1/runs" | "/api/v1/sweeps", body: unknown): Promise<string> {
  const r = await call(w, "researcher", "POST", path, body);
  expect(r.status, JSON.stringify(r.body)).toBe(202);
  return r.body.id as string;
}
async function submitLong(n: number, seed: number) {
  const ids: string[] = [];
  for (let i = 0; i < n; i++) ids.push(await submit("/api/v1/runs", longRun(seed + i)));
  return ids;
}
async function submitSmall(n: number, seed: number) {
  const ids: string[] = [];
  for (let i = 0; i < n; i++)
    ids.push(await submit("/api/v1/runs", { ...SMALL_RUN, computation: { ...SMALL_RUN.computation, energyMeV: 0.1 + 0.003 * (seed + i) } }));
  return ids;
}
async function statusesOf(ids: string[]) {
  return sql`select id, status, attempts, progress from runs where id in ${sql(ids)}`;
}
/** Waits until at least `n` of the runs are running, one of them at least `minProgress` through its compute. */
async function untilRunning(ids: string[], n: number, minProgress = 0) {
  return until(
    `${n} long runs computing`,
    async () => {
      const rows = await statusesOf(ids);
      if (rows.some((r) => r.status === "succeeded")) throw new Error("a long run finished before the fault: make it heavier");
      const running = rows.filter((r) => r.status === "running");
      return running.length >= n && running.some((r) => r.progress >= minProgress) ? rows : undefined;
    },
    180_000,
    200,
  );
}
function expectClean(a: Awaited<ReturnType<typeof audit>>) {
  expect(a).toMatchObject({
    notFinal: 0,
    sweepsMissingPoints: 0,
    runsWithoutReservation: 0,
    runsBilledTwice: 0,
    succeededWithoutLedgerRow: 0,
    reservedComputeSecondsAfter: 0,
  });
  expect(a.meterEvents).toBe(a.ledgerRows);
  expect(a.distinctMeterEvents).toBe(a.ledgerRows);
}

describe("drills with long jobs in flight", () => {
  it("worker SIGKILLed between the engine's finish and the finishing transaction: recomputed once, billed once", async () => {
    const dir = join(process.env.RUN_DIR!, "drills");
    rmSync(dir, { recursive: true, force: true });
    // A worker with the drill hook: it holds every computed job (10 minutes) before finishing it.
    await killWorker();
    const holding = startWorkerWith({ TRISKEL_DRILLS: "1", TRISKEL_DRILL_HOLD_BEFORE_FINISH_MS: "600000", TRISKEL_DRILL_DIR: dir });
    const ids = await submitLong(LONG, 0);
    const held = await until(
      "two long runs computed and held before their finishing transaction",
      async () => {
        assertWorkerAlive(holding);
        const files = existsSync(dir) ? readdirSync(dir).filter((f) => f.startsWith("hold-run-")) : [];
        return files.length >= 2 ? files.map((f) => f.slice("hold-run-".length, -".json".length)) : undefined;
      },
      180_000,
      200,
    );
    // In the window: computed, yet still running in the database, no result, no ledger row.
    const inWindow = await sql`select r.id, r.status, r.result is null as no_result,
      (select count(*)::int from usage_ledger l where l.run_id = r.id) as ledger from runs r where r.id in ${sql(held)}`;
    expect(
      inWindow.every((r) => r.status === "running" && r.no_result && r.ledger === 0),
      JSON.stringify(inWindow),
    ).toBe(true);
    const killedAt = Date.now();
    await killWorker();
    const replacement = startWorkerWith();
    await until(
      "the long runs to finish after the kill",
      async () => {
        const rows = await statusesOf(ids);
        if (rows.every((r) => r.status === "succeeded")) return true;
        assertWorkerAlive(replacement);
        return false;
      },
      240_000,
      1000,
    );
    const after = await statusesOf(ids);
    const a = await audit(w);
    expectClean(a);
    const heldRows = after.filter((r) => held.includes(r.id));
    expect(heldRows.every((r) => r.attempts >= 2)).toBe(true);
    const [{ n: ledger }] = await sql`select count(*)::int as n from usage_ledger where run_id in ${sql(ids)}`;
    expect(ledger).toBe(LONG);
    record("drills.json", "workerKillBeforeFinish", {
      longRuns: LONG,
      heldAtKill: held.length,
      heldRunsRecomputed: heldRows.length,
      attemptsOfHeldRuns: heldRows.map((r) => r.attempts),
      secondsToFinishAfterKill: seconds(killedAt),
      ...a,
    });
  });

  it("web server SIGKILLed mid-submission: every 202 exists and finishes, no half-written rows", async () => {
    const long = await submitLong(3, 10);
    await untilRunning(long, 1);
    // Six members, each with a token of their own, two submitting loops each (runs, and every
    // third a 4-point sweep): within the production write budget of each member.
    const members = await addMembers(w, 6);
    const [{ n: rowsBefore }] = await sql`select count(*)::int as n from runs where workspace_id = ${w.id}`;
    const accepted: { kind: "run" | "sweep"; id: string }[] = [];
    const statuses: Record<string, number> = {};
    let inFlight = 0;
    let killedAt = 0;
    let answersLost = 0;
    let refusedAfterKill = 0;
    let failedBeforeKill = 0;
    let busyRefusals = 0;
    let stop = false;
    const loop = async (token: string, seed: number) => {
      for (let n = 0; n < 20 && !stop; n++) {
        const sweep = n % 3 === 1;
        const body = sweep
          ? {
              name: "soak web-kill sweep",
              network: SMALL_RUN.network,
              computation: SMALL_RUN.computation,
              axes: [{ parameter: "fieldTesla", from: 0, to: 0.1, points: 4 }],
            }
          : { ...SMALL_RUN, computation: { ...SMALL_RUN.computation, energyMeV: 0.2 + 0.001 * (seed * 20 + n) } };
        const startedAt = Date.now();
        inFlight++;
        try {
          const res = await fetch(new URL(sweep ? "/api/v1/sweeps" : "/api/v1/runs", appUrl()), {
            method: "POST",
            headers: { authorization: `Bearer ${token}`, "content-type": "application/json" },
            body: JSON.stringify(body),
            signal: AbortSignal.timeout(30_000),
          });
          statuses[res.status] = (statuses[res.status] ?? 0) + 1;
          const json = await res.json().catch(() => null);
          if (res.status === 202) accepted.push({ kind: sweep ? "sweep" : "run", id: json.id });
          else if (res.status === 429) await sleep(1000 * Number(res.headers.get("retry-after") ?? 1));
          else if (res.status === 503 && json?.error?.code === "unavailable" && res.headers.get("retry-after")) {
            // The analysis thread's queue is full (src/server/offload): refused, nothing written; a client waits and retries.
            busyRefusals++;
            await sleep(1000 * Number(res.headers.get("retry-after")));
          }
        } catch {
          // No answer: in flight when the server died (its outcome unknown to the client), or refused after.
          if (killedAt && startedAt < killedAt) answersLost++;
          else if (killedAt) {
            refusedAfterKill++;
            return; // the server is gone: this client stops (it would retry once it is back)
          } else failedBeforeKill++;
        } finally {
          inFlight--;
        }
      }
    };
    const loops = members.flatMap((m, i) => [loop(m.token, 2 * i), loop(m.token, 2 * i + 1)]);
    await until("30 submissions accepted", async () => accepted.length >= 30, 120_000, 20);
    const inFlightAtKill = inFlight;
    killedAt = Date.now();
    await ctl("web-kill");
    await sleep(1000);
    stop = true;
    await Promise.all(loops);
    await ctl("web-start");
    const secondsDown = seconds(killedAt);
    expect(inFlightAtKill).toBeGreaterThan(0);
    expect(failedBeforeKill).toBe(0);
    // Answers received: 202, 429 with Retry-After (waited out), or 503 "unavailable" with Retry-After
    // when the analysis thread's queue is full (waited out, nothing written); never another 5xx.
    expect(
      Object.keys(statuses).filter((s) => (s !== "202" && s !== "429" && s !== "503") || (s === "503" && statuses[s] !== busyRefusals)),
      JSON.stringify(statuses),
    ).toEqual([]);
    // Every accepted submission is in the database, and finishes.
    const runIds = accepted.filter((a) => a.kind === "run").map((a) => a.id);
    const sweepIds = accepted.filter((a) => a.kind === "sweep").map((a) => a.id);
    const foundRuns = runIds.length ? await sql`select id from runs where id in ${sql(runIds)}` : [];
    const foundSweeps = sweepIds.length ? await sql`select id from sweeps where id in ${sql(sweepIds)}` : [];
    expect(foundRuns.length).toBe(runIds.length);
    expect(foundSweeps.length).toBe(sweepIds.length);
    const a = await audit(w);
    expectClean(a);
    const done = runIds.length ? await sql`select count(*)::int as n from runs where id in ${sql(runIds)} and status = 'succeeded'` : [{ n: 0 }];
    expect(done[0].n).toBe(runIds.length);
    const sweepsDone = sweepIds.length ? await sql`select count(*)::int as n from sweeps where id in ${sql(sweepIds)} and status = 'succeeded'` : [{ n: 0 }];
    expect(sweepsDone[0].n).toBe(sweepIds.length);
    expect((await statusesOf(long)).every((r) => r.status === "succeeded")).toBe(true);
    const [{ n: rowsAfter }] = await sql`select count(*)::int as n from runs where workspace_id = ${w.id}`;
    const acceptedRows = runIds.length + sweepIds.length * 4;
    record("drills.json", "webKillMidSubmission", {
      longRunsInFlight: long.length,
      members: members.length,
      accepted: { runs: runIds.length, sweeps: sweepIds.length },
      submissionStatuses: statuses,
      busyRefusals,
      inFlightAtKill,
      answersLost,
      refusedAfterKill,
      secondsToHealthyAfterKill: secondsDown,
      // Rows written by submissions whose answer was lost with the server (committed, then killed): they finish too.
      rowsWithoutAnAnswer: rowsAfter - rowsBefore - acceptedRows,
      ...a,
    });
  });

  it("PostgreSQL stopped with -m immediate (fsync on): committed work kept, jobs in flight finish, nothing twice", async () => {
    const [settings] =
      await sql`select current_setting('fsync') as fsync, current_setting('synchronous_commit') as sync, current_setting('full_page_writes') as fpw`;
    expect(settings).toEqual({ fsync: "on", sync: "on", fpw: "on" });
    const small = await submitSmall(3, 0);
    await until("the small runs to succeed", async () => (await statusesOf(small)).every((r) => r.status === "succeeded"), 120_000, 500);
    const committed = await sql`select id from usage_ledger where run_id in ${sql(small)} order by id`;
    const long = await submitLong(LONG, 20);
    // Killed when one long run is past half its compute: its finishing transaction falls in the outage.
    await untilRunning(long, 2, 0.5);
    const downAt = Date.now();
    await ctl("pg-kill");
    let healthWhileDown = 0;
    try {
      healthWhileDown = (await until(
        "health to report the database down",
        async () => ((await health()).status === 503 ? 503 : undefined),
        30_000,
        250,
      )) as number;
      await sleep(2000);
    } finally {
      await ctl("pg-start");
    }
    const downSeconds = seconds(downAt);
    await until("health 200", async () => (await health()).status === 200, 90_000, 250);
    const secondsToHealthy = seconds(downAt);
    // What was committed before the crash is there after crash recovery.
    const kept = await sql`select id from usage_ledger where run_id in ${sql(small)} order by id`;
    expect(kept.map((k) => k.id)).toEqual(committed.map((k) => k.id));
    const a = await audit(w);
    expectClean(a);
    const after = await statusesOf(long);
    expect(
      after.every((r) => r.status === "succeeded"),
      JSON.stringify(after),
    ).toBe(true);
    record("drills.json", "postgresImmediateStop", {
      settings,
      longRunsInFlight: long.length,
      healthWhileDown,
      downSeconds,
      secondsToHealthy,
      committedLedgerRowsKept: `${kept.length}/${committed.length}`,
      attemptsOfLongRuns: after.map((r) => r.attempts),
      longRunsRetried: after.filter((r) => r.attempts >= 2).length,
      ...a,
    });
  });

  it("Redis SIGKILLed (its data gone) with jobs in flight and queued: all finish, once", async () => {
    const long = await submitLong(LONG, 30);
    await untilRunning(long, 2);
    const queued = await submitSmall(4, 20);
    const downAt = Date.now();
    await ctl("redis-kill");
    let healthWhileDown = 0;
    try {
      healthWhileDown = (await until(
        "health to report the queue down",
        async () => ((await health()).status === 503 ? 503 : undefined),
        30_000,
        250,
      )) as number;
      await sleep(2000);
    } finally {
      await ctl("redis-start");
    }
    const downSeconds = seconds(downAt);
    await until("health 200", async () => (await health()).status === 200, 90_000, 250);
    const a = await audit(w);
    expectClean(a);
    const after = await statusesOf([...long, ...queued]);
    expect(
      after.every((r) => r.status === "succeeded"),
      JSON.stringify(after),
    ).toBe(true);
    record("drills.json", "redisKill", {
      longRunsInFlight: long.length,
      queuedAtKill: queued.length,
      healthWhileDown,
      downSeconds,
      secondsToAllFinished: seconds(downAt),
      attempts: after.map((r) => r.attempts),
      ...a,
    });
  });
});
