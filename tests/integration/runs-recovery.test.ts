// Crash recovery with real processes: SIGKILL the worker in the middle of a sweep and start a new
// one (the sweep completes, every point once, one ledger row per point); flush Redis while runs
// are queued (they still complete, from the database); lose a queued fit's job (the periodic
// recovery pass every job kind shares enqueues it again). vitest.config.ts runs this file in a group of
// its own after every other file; it still leaves a worker running that answers a ping.
import { afterAll, describe, expect, it } from "vitest";
import { Queue } from "bullmq";
import { Redis } from "ioredis";
import { redisUrl } from "../support/services";
import { pingWorker } from "../support/worker";
import { LK07_COMPUTATION, LK07_NETWORK } from "../../src/shared/lk07";
import { get, killWorker, post, smallNetwork, sql, startWorker, waitFor, workerPid } from "./runs-support";

const redis = new Redis(redisUrl(), { maxRetriesPerRequest: null });
afterAll(async () => {
  // Whatever happened above, the worker left behind must be alive and consuming.
  const pong = await pingWorker({ after: "crash recovery" });
  expect(pong.workerPid).toBeGreaterThan(0);
  await sql.end();
  await redis.quit();
});

const finished = (s: string) => ["succeeded", "failed", "cancelled"].includes(s);
// Points of about a second each (16 x 16, 32 disorder samples), so a kill lands mid-point.
const POINTS = 24;

async function workerAlive(pid: number) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

describe("crash recovery", () => {
  it("a sweep survives SIGKILL of its worker: every point computed once, one ledger row per point", async () => {
    const created = await post("/api/v1/sweeps", {
      network: { ...smallNetwork(16, 16), disorder: { linkPhaseWidthRad: 3.0, seed: 9 } },
      computation: { kind: "conductance", energyMeV: 0.3, ensemble: { samples: 32 } },
      axes: [{ parameter: "fieldTesla", from: 0, to: 0.2, points: POINTS }],
    });
    expect(created.status).toBe(202);
    const id = created.body.id;
    await waitFor(
      "the sweep to get going",
      async () => {
        const s = (await get(`/api/v1/sweeps/${id}`)).body;
        if (finished(s.status)) throw new Error("the sweep finished before the worker could be killed; make its points heavier");
        return s.counts.succeeded >= 2 && s.counts.running > 0;
      },
      120_000,
      200,
    );

    const killed = await killWorker();
    const [{ done }] = await sql`select count(*)::int as done from runs where sweep_id = ${id} and status = 'succeeded'`;
    expect(done).toBeLessThan(POINTS);
    // The points the dead worker held: the database still says running.
    const inFlight = (await sql`select id from runs where sweep_id = ${id} and status = 'running'`).map((r) => r.id as string);
    expect(inFlight.length, "no point was mid-compute at the kill; make the points heavier").toBeGreaterThan(0);
    const replacement = startWorker();
    expect(replacement).not.toBe(killed);

    const s = await waitFor(
      "the sweep to complete after the crash",
      async () => {
        const b = (await get(`/api/v1/sweeps/${id}`)).body;
        return finished(b.status) ? b : undefined;
      },
      170_000,
      250,
    );
    expect(s.status).toBe("succeeded");
    expect(s.counts.succeeded).toBe(POINTS);

    const points = await sql`select sweep_point_index as i, status, attempts, compute_seconds from runs where sweep_id = ${id} order by sweep_point_index`;
    expect(points.map((p) => p.i)).toEqual([...Array(POINTS).keys()]);
    expect(points.every((p) => p.status === "succeeded")).toBe(true);
    // The points in flight at the kill were retried by the new worker.
    const retried = await sql`select attempts from runs where id = any(${inFlight}::uuid[])`;
    expect(retried).toHaveLength(inFlight.length);
    expect(retried.every((r) => r.attempts >= 2)).toBe(true);
    const ledger = await sql`select l.run_id, count(*)::int as n from usage_ledger l join runs r on r.id = l.run_id where r.sweep_id = ${id} group by l.run_id`;
    expect(ledger).toHaveLength(POINTS);
    expect(ledger.every((r) => r.n === 1)).toBe(true);
    expect(await workerAlive(workerPid())).toBe(true);
  });

  it("runs queued when Redis is flushed still complete (re-enqueued from the database)", async () => {
    const prefix = process.env.QUEUE_PREFIX ?? "triskel";
    const queue = new Queue("runs", { connection: redis, prefix });
    await queue.pause();
    const ids: string[] = [];
    try {
      for (const energyMeV of [0.2, 0.4, 0.6]) {
        const r = await post("/api/v1/runs", { network: smallNetwork(6, 6), computation: { kind: "conductance", energyMeV } });
        expect(r.status).toBe(202);
        ids.push(r.body.id);
      }
      // Paused: the jobs wait in Redis and the runs stay queued in the database.
      const waiting = await sql`select status from runs where id = any(${ids}::uuid[])`;
      expect(waiting.every((r) => r.status === "queued")).toBe(true);
      expect(await redis.exists(`${prefix}:runs:${ids[0]}`)).toBe(1);
    } finally {
      // Lose every job (and the pause with it).
      await redis.flushdb();
      await queue.close();
    }
    expect(await redis.exists(`${prefix}:runs:${ids[0]}`)).toBe(0);

    const runs = await waitFor(
      "the runs to complete after the flush",
      async () => {
        const all = await Promise.all(ids.map(async (id) => (await get(`/api/v1/runs/${id}`)).body));
        return all.every((r) => finished(r.status)) ? all : undefined;
      },
      120_000,
      300,
    );
    expect(runs.map((r) => r.status)).toEqual(["succeeded", "succeeded", "succeeded"]);
    const ledger = await sql`select run_id from usage_ledger where run_id = any(${ids}::uuid[])`;
    expect(ledger).toHaveLength(3);
  });

  it("a fit whose Redis job is lost is enqueued again by the periodic recovery pass and metered once", async () => {
    const prefix = process.env.QUEUE_PREFIX ?? "triskel";
    const datasetId = (await get("/api/v1/datasets")).body.items.find((d: { name: string }) => /LK-07/.test(d.name)).id;
    const queue = new Queue("fits", { connection: redis, prefix });
    await queue.pause();
    let id = "";
    try {
      // A short fit: one parameter, one start, a few iterations.
      const r = await post("/api/v1/fits", {
        datasetId,
        network: LK07_NETWORK,
        computation: LK07_COMPUTATION,
        sweepParameter: "fieldTesla",
        fit: [{ parameter: "node.forward", initial: 0.5, min: 0.2, max: 0.9 }],
        options: { multiStart: 1, maxIterations: 3 },
      });
      expect(r.status).toBe(202);
      id = r.body.id;
      expect(await redis.exists(`${prefix}:fits:${id}`)).toBe(1);
      const [row] = await sql`select status from fits where id = ${id}`;
      expect(row.status).toBe("queued");
      // Lose the fits queue's jobs (this one with them); the database still says queued.
      await queue.obliterate({ force: true });
      expect(await redis.exists(`${prefix}:fits:${id}`)).toBe(0);
    } finally {
      await queue.resume();
      await queue.close();
    }
    const [still] = await sql`select status, attempts from fits where id = ${id}`;
    expect(still.status).toBe("queued");
    expect(still.attempts).toBe(0);

    // The worker was not restarted: only its periodic pass can bring the job back.
    const f = await waitFor(
      "the lost fit to complete",
      async () => {
        const b = (await get(`/api/v1/fits/${id}`)).body;
        return finished(b.status) ? b : undefined;
      },
      170_000,
      500,
    );
    expect(f.status).toBe("succeeded");
    expect(f.result.parameters.map((p: { parameter: string }) => p.parameter)).toEqual(["node.forward"]);
    const ledger = await sql`select l.compute_seconds from fits f join usage_ledger l on l.run_id = f.run_id where f.id = ${id}`;
    expect(ledger).toHaveLength(1);
    expect(ledger[0].compute_seconds).toBeCloseTo(f.computeSeconds, 3);
    const companions = await sql`select count(*)::int as n from runs where kind = 'fit' and input->>'fitId' = ${id}`;
    expect(companions[0].n).toBe(1);
  });
});
