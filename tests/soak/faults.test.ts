// Fault drills (npm run test:soak): the worker SIGKILLed mid-sweep, Redis restarted, PostgreSQL
// restarted, the Stripe stand-in down for a minute, the mail stand-in down. For each: no run lost,
// no duplicate ledger row or meter event, 503 with a message while a dependency is down, recovery
// without a hand. Outcomes and recovery times go to .data/soak-<base>/faults.json.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { killWorker, startWorker } from "../integration/runs-support";
import { api, ensureFreeSeats } from "../support/services";
import type { Json } from "../support/json";
import { billingOnce, call, createLabWorkspace, ctl, health, record, sleep, SMALL_RUN, sql, stripeFake, until, type SoakWorkspace } from "./support";

let w: SoakWorkspace;
const finished = (s: string) => ["succeeded", "failed", "cancelled"].includes(s);

beforeAll(async () => {
  w = await createLabWorkspace("Soak drills lab");
});
afterAll(async () => {
  await fetch(`${stripeFake()}/_fake/up`, { method: "POST" }).catch(() => {});
  await sql`delete from invitations where email like '%@soak.example'`.catch(() => {});
  await sql.end();
});

async function submitRuns(n: number, seed: number): Promise<string[]> {
  const ids: string[] = [];
  for (let i = 0; i < n; i++) {
    const r = await call(w, "researcher", "POST", "/api/v1/runs", {
      ...SMALL_RUN,
      computation: { ...SMALL_RUN.computation, energyMeV: 0.1 + 0.01 * (seed + i) },
    });
    expect(r.status, JSON.stringify(r.body)).toBe(202);
    ids.push(r.body.id);
  }
  return ids;
}
async function allSucceeded(ids: string[], timeoutMs = 180_000) {
  return until(
    `${ids.length} runs to succeed`,
    async () => {
      const rows = await sql`select status from runs where id in ${sql(ids)}`;
      if (rows.some((r) => r.status === "failed" || r.status === "cancelled")) throw new Error(`a run ended ${rows.map((r) => r.status).join(",")}`);
      return rows.length === ids.length && rows.every((r) => r.status === "succeeded");
    },
    timeoutMs,
    500,
  );
}
/** Polls health until 200; returns the seconds it took. */
async function recovered(since: number, timeoutMs = 90_000) {
  await until("health 200", async () => (await health()).status === 200, timeoutMs, 250);
  return Math.round((Date.now() - since) / 100) / 10;
}

/** Invitations need a workspace with a sign-in organization: the demo lab (its Owner's token); each takes a seat, bought first. */
async function inviteToDemoLab(email: string) {
  await ensureFreeSeats(1);
  const res = await api("/api/v1/workspace/members", { method: "POST", as: "owner", json: { email, role: "viewer" }, signal: AbortSignal.timeout(60_000) });
  const text = await res.text();
  let body: Json = text;
  try {
    body = JSON.parse(text);
  } catch {
    // not JSON: the body is the text
  }
  return { status: res.status, body };
}

describe("fault drills", () => {
  it("worker SIGKILL mid-sweep: the sweep completes, every point once, one ledger row and one meter event per point", async () => {
    const POINTS = 24;
    const created = await call(w, "researcher", "POST", "/api/v1/sweeps", {
      name: "soak kill drill",
      network: { ...SMALL_RUN.network, size: { columns: 10, rows: 10 }, disorder: { linkPhaseWidthRad: 3.0, seed: 11 } },
      computation: { kind: "conductance", energyMeV: 0.3, ensemble: { samples: 8 } },
      axes: [{ parameter: "fieldTesla", from: 0, to: 0.2, points: POINTS }],
    });
    expect(created.status, JSON.stringify(created.body)).toBe(202);
    const id = created.body.id;
    await until(
      "the sweep to get going",
      async () => {
        const s = (await call(w, "researcher", "GET", `/api/v1/sweeps/${id}`)).body;
        if (finished(s.status)) throw new Error("the sweep finished before the kill");
        return s.counts.succeeded >= 2 && s.counts.running > 0;
      },
      120_000,
      200,
    );
    const killedAt = Date.now();
    await killWorker();
    startWorker();
    const s = await until(
      "the sweep to finish after the kill",
      async () => {
        const b = (await call(w, "researcher", "GET", `/api/v1/sweeps/${id}`)).body;
        return finished(b.status) ? b : undefined;
      },
      300_000,
      500,
    );
    expect(s.status).toBe("succeeded");
    const runs = await sql`select id, attempts from runs where sweep_id = ${id}`;
    expect(runs).toHaveLength(POINTS);
    const billing = await billingOnce(
      w,
      runs.map((r) => r.id as string),
    );
    expect(billing).toMatchObject({ runs: POINTS, ledgerRows: POINTS, distinctLedgerRuns: POINTS, meterEvents: POINTS, distinctMeterEvents: POINTS });
    record("faults.json", "workerKill", {
      points: POINTS,
      retriedPoints: runs.filter((r) => r.attempts >= 2).length,
      secondsToFinishAfterKill: Math.round((Date.now() - killedAt) / 1000),
      ...billing,
      lost: 0,
    });
  });

  it("Redis restarted (its data gone): 503 while down, queued runs still complete, nothing twice", async () => {
    const before = await submitRuns(3, 0);
    const downAt = Date.now();
    await ctl("redis-stop");
    let h: { status: number; body: Json } = { status: 0, body: null };
    let during: { status: number; body: Json };
    try {
      h = await until(
        "health to report the queue down",
        async () => {
          const x = await health();
          return x.status === 503 ? x : undefined;
        },
        30_000,
        250,
      );
      // A submission while the queue is down: accepted into the database (202, queued when Redis
      // is back or by the worker's recovery pass) or 503 with a message; never a hang or a 500.
      during = await call(w, "researcher", "POST", "/api/v1/runs", { ...SMALL_RUN, computation: { ...SMALL_RUN.computation, energyMeV: 0.77 } }, 20_000).catch(
        (e) => ({ status: 0, body: { error: { message: String(e) } }, headers: new Headers() }),
      );
      await sleep(2000);
    } finally {
      await ctl("redis-start");
    }
    expect(h.body.queue.status).toBe("down");
    expect([202, 503], JSON.stringify(during.body)).toContain(during.status);
    if (during.status === 503) expect(during.body.error.message).toBeTruthy();
    const upAt = Date.now();
    const secondsToHealthy = await recovered(upAt);
    const after = await submitRuns(2, 10);
    const all = [...before, ...after, ...(during.status === 202 ? [during.body.id] : [])];
    await allSucceeded(all, 240_000);
    const billing = await billingOnce(w, all);
    expect(billing.ledgerRows).toBe(all.length);
    expect(billing.distinctMeterEvents).toBe(billing.meterEvents);
    expect(billing.meterEvents).toBe(all.length);
    record("faults.json", "redisRestart", {
      downSeconds: Math.round((upAt - downAt) / 100) / 10,
      submitWhileDown: during.status,
      healthWhileDown: h.status,
      secondsToHealthy,
      ...billing,
      lost: 0,
    });
  });

  it("PostgreSQL restarted: health and API answer 503 with a message while it is down, then recover by themselves", async () => {
    const before = await submitRuns(3, 20);
    const downAt = Date.now();
    await ctl("pg-stop");
    let h: { status: number; body: Json } = { status: 0, body: null };
    let read: Awaited<ReturnType<typeof call>> | undefined;
    let write: Awaited<ReturnType<typeof call>> | undefined;
    try {
      h = await until(
        "health to report the database down",
        async () => {
          const x = await health();
          return x.status === 503 ? x : undefined;
        },
        30_000,
        250,
      );
      read = await call(w, "researcher", "GET", "/api/v1/runs?limit=5", undefined, 30_000);
      write = await call(w, "researcher", "POST", "/api/v1/runs", SMALL_RUN, 30_000);
      await sleep(2000);
    } finally {
      await ctl("pg-start");
    }
    expect(h.body.database.status).toBe("down");
    expect(read!.status, JSON.stringify(read!.body)).toBe(503);
    expect(read!.body.error.code).toBe("unavailable");
    expect(read!.body.error.message).toMatch(/unreachable/);
    expect(write!.status, JSON.stringify(write!.body)).toBe(503);
    const upAt = Date.now();
    const secondsToHealthy = await recovered(upAt);
    await until("the API to read runs again", async () => (await call(w, "researcher", "GET", "/api/v1/runs?limit=5")).status === 200, 60_000, 500);
    const after = await submitRuns(2, 30);
    const all = [...before, ...after];
    await allSucceeded(all, 240_000);
    const billing = await billingOnce(w, all);
    expect(billing).toMatchObject({ ledgerRows: all.length, distinctLedgerRuns: all.length, meterEvents: all.length, distinctMeterEvents: all.length });
    record("faults.json", "postgresRestart", {
      downSeconds: Math.round((upAt - downAt) / 100) / 10,
      healthWhileDown: h.status,
      readWhileDown: read!.status,
      writeWhileDown: write!.status,
      secondsToHealthy,
      ...billing,
      lost: 0,
    });
  });

  it("Stripe stand-in down for a minute: runs go on, meter events wait in the outbox and are delivered once after", async () => {
    const downAt = Date.now();
    expect((await fetch(`${stripeFake()}/_fake/down`, { method: "POST" })).status).toBe(200);
    const ids = await submitRuns(5, 40);
    await allSucceeded(ids);
    const ledger = await sql`select id from usage_ledger where run_id in ${sql(ids)}`;
    expect(ledger).toHaveLength(5);
    // While Stripe is down the events stay pending with the error noted (none lost, none failed for good).
    const pending = await until(
      "the outbox to hold the events with an error",
      async () => {
        const rows = await sql`select status, attempts, last_error from meter_outbox where ledger_id in ${sql(ledger.map((l) => l.id))}`;
        return rows.length === 5 && rows.every((r) => r.status === "pending") && rows.some((r) => r.attempts >= 1 && r.last_error) ? rows : undefined;
      },
      50_000,
      1000,
    );
    expect((await health()).status).toBe(200);
    await sleep(Math.max(0, 60_000 - (Date.now() - downAt)));
    expect((await fetch(`${stripeFake()}/_fake/up`, { method: "POST" })).status).toBe(200);
    const upAt = Date.now();
    const billing = await billingOnce(w, ids, 180_000);
    expect(billing).toMatchObject({ ledgerRows: 5, meterEvents: 5, distinctMeterEvents: 5 });
    record("faults.json", "stripeDown", {
      downSeconds: Math.round((upAt - downAt) / 1000),
      attemptsWhileDown: Math.max(...pending.map((r) => r.attempts)),
      secondsToDeliverAfterUp: Math.round((Date.now() - upAt) / 1000),
      ...billing,
      lost: 0,
    });
  });

  it("mail stand-in down: an invitation answers without a 500 and is kept; mail flows again when it is back", async () => {
    await ctl("mail-stop");
    const email = `soak-invitee-${Date.now().toString(36)}@soak.example`;
    const during = await inviteToDemoLab(email);
    expect(during.status, JSON.stringify(during.body)).not.toBe(500);
    expect(during.status).toBeLessThan(600);
    if (during.status >= 400) expect(during.body.error.message).toBeTruthy();
    const kept = await sql`select id from invitations where email = ${email} and revoked_at is null`;
    // The app stays healthy (mail is not a dependency of health).
    expect((await health()).status).toBe(200);
    await ctl("mail-start");
    const upAt = Date.now();
    const email2 = `soak-invitee-after-${Date.now().toString(36)}@soak.example`;
    const after = await inviteToDemoLab(email2);
    expect(after.status, JSON.stringify(after.body)).toBe(201);
    const mailUrl = process.env.MAIL_WEB_URL!;
    await until(
      "the invitation e-mail after the stand-in is back",
      async () => {
        const mails = (await (await fetch(`${mailUrl}/email`)).json()) as { to: { address: string }[] }[];
        return mails.some((m) => m.to.some((t) => t.address === email2));
      },
      60_000,
      500,
    );
    record("faults.json", "mailDown", {
      inviteWhileDown: during.status,
      deliveredWhileDown: during.body?.delivered ?? null,
      invitationKept: kept.length === 1,
      secondsToMailAfterUp: Math.round((Date.now() - upAt) / 1000),
    });
  });
});
