// Two worker processes on one machine share one sweep: the test instance's worker plus a second
// one started here with the same environment (the same Redis and PostgreSQL). Every point is
// computed once (one claim, one attempt, one ledger row), both processes take points, and the
// throughput of one and of two processes is measured on sweeps of the same points (printed for
// docs/reliability.md; never asserted: timing targets belong to `npm run bench`).
import { spawn } from "node:child_process";
import { closeSync, existsSync, openSync, readFileSync } from "node:fs";
import { hostname, loadavg } from "node:os";
import { dirname, join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { get, post, smallNetwork, sql, waitFor, workerPid } from "./runs-support";

const POINTS = 16;
const SIZE = 20,
  SAMPLES = 16;
const finished = (s: string) => ["succeeded", "failed", "cancelled"].includes(s);
// points of a few tenths of a second each (20 x 20, 16 disorder samples)
const sweepBody = (seed: number, points = POINTS) => ({
  network: { ...smallNetwork(SIZE, SIZE), disorder: { linkPhaseWidthRad: 3.0, seed } },
  computation: { kind: "conductance", energyMeV: 0.3, ensemble: { samples: SAMPLES } },
  axes: [{ parameter: "fieldTesla", from: 0, to: 0.2, points }],
});

let second: number | null = null;
const secondLog = () => join(dirname(process.env.TRISKEL_WORKER_PID_FILE ?? "/tmp/x"), "worker-2.log");

afterAll(async () => {
  if (second) {
    try {
      process.kill(-second, "SIGTERM");
    } catch {
      // already gone
    }
    await waitFor(
      "the second worker to stop",
      async () => {
        try {
          process.kill(second as number, 0);
          return false;
        } catch {
          return true;
        }
      },
      20_000,
      100,
    ).catch(() => process.kill(-(second as number), "SIGKILL"));
  }
  await sql.end();
});

/** A second worker process (its own process group and log), consuming once it says so in its log. */
async function startSecondWorker(): Promise<number> {
  const log = openSync(secondLog(), "w");
  const child = spawn("node_modules/.bin/tsx", ["worker/main.ts"], {
    cwd: process.cwd(),
    env: { ...process.env, NODE_ENV: "production" },
    detached: true,
    stdio: ["ignore", log, log],
  });
  closeSync(log);
  child.unref();
  await waitFor("the second worker to consume", async () => existsSync(secondLog()) && /consuming/.test(readFileSync(secondLog(), "utf8")), 60_000, 200);
  return child.pid!;
}

/** Submits a sweep and waits for it; returns its id and the seconds from submission to the last point. */
async function runSweep(seed: number, points = POINTS): Promise<{ id: string; seconds: number }> {
  const created = await post("/api/v1/sweeps", sweepBody(seed, points));
  expect(created.status, JSON.stringify(created.body)).toBe(202);
  const id = created.body.id as string;
  const s = await waitFor(
    "the sweep to complete",
    async () => {
      const b = (await get(`/api/v1/sweeps/${id}`)).body;
      return finished(b.status) ? b : undefined;
    },
    170_000,
    100,
  );
  expect(s.status).toBe("succeeded");
  const [{ last }] = await sql`select extract(epoch from max(finished_at) - min(created_at))::float8 as last from runs where sweep_id = ${id}`;
  return { id, seconds: last as number };
}

describe("two worker processes share one sweep", () => {
  it("every point computed once, points taken by both processes; throughput with one and two processes", async () => {
    // a short sweep first, so the timed ones start on warm processes (engine threads up, JIT done)
    await runSweep(5, 4);
    const one = await runSweep(21);
    second = await startSecondWorker();
    await runSweep(6, 8);
    const two = await runSweep(21);

    const points = await sql`select sweep_point_index as i, status, attempts, worker_id from runs where sweep_id = ${two.id} order by sweep_point_index`;
    expect(points.map((p) => p.i)).toEqual([...Array(POINTS).keys()]);
    expect(points.every((p) => p.status === "succeeded" && p.attempts === 1)).toBe(true);
    const ledger =
      await sql`select l.run_id, count(*)::int as n from usage_ledger l join runs r on r.id = l.run_id where r.sweep_id = ${two.id} group by l.run_id`;
    expect(ledger).toHaveLength(POINTS);
    expect(ledger.every((r) => r.n === 1)).toBe(true);
    // both processes computed points (worker ids are host:pid; tsx runs the worker in a child of the pid we started)
    const byWorker = new Map<string, number>();
    for (const p of points) byWorker.set(p.worker_id as string, (byWorker.get(p.worker_id as string) ?? 0) + 1);
    expect(byWorker.size, JSON.stringify([...byWorker])).toBe(2);
    for (const w of byWorker.keys()) expect(w.startsWith(`${hostname()}:`)).toBe(true);
    expect(workerPid()).not.toBe(second);

    // the same points on one and on two processes give the same numbers
    const results = async (id: string) =>
      (await sql`select sweep_point_index as i, result->'conductance'->>'total' as g from runs where sweep_id = ${id} order by sweep_point_index`).map(
        (r) => r.g,
      );
    expect(await results(two.id)).toEqual(await results(one.id));

    console.log(
      `[sweep throughput] ${POINTS} points (${SIZE} x ${SIZE}, ${SAMPLES} samples each) on ${hostname()}, load average ${loadavg()[0].toFixed(1)}: one worker process ${one.seconds.toFixed(2)} s ` +
        `(${(POINTS / one.seconds).toFixed(2)} points/s), two processes ${two.seconds.toFixed(2)} s (${(POINTS / two.seconds).toFixed(2)} points/s); ` +
        `points per process ${[...byWorker.values()].join(" + ")}`,
    );
  });
});
