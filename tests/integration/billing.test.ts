// Billing end to end through the running app, the worker's meter sender and the Stripe stand-in
// (through the real SDK): upgrade, seats bought and taken (invitations past them refused), ledger -> meter events, a sender
// killed midway, an outage, webhook replay and bad signatures, free quota and spend cap.
// Uses its own workspaces (the demo lab only to read its seeded payment account and meter one small run),
// so other test files keep their demo data.
import { spawn } from "node:child_process";
import { randomUUID } from "node:crypto";
import postgres from "postgres";
import Stripe from "stripe";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { displayPrefix, hashToken, newTokenSecret } from "@/server/auth/tokens";
import { api, appUrl, databaseUrl, failOnRateLimit } from "../support/services";
import { SMALL_RUN } from "./authz-table";

const sql = postgres(databaseUrl(), { max: 3, onnotice: () => {} });
const port = Number(process.env.STRIPE_FAKE_PORT);
const fakeUrl = `http://127.0.0.1:${port}`;
const stripe = new Stripe(process.env.STRIPE_SECRET_KEY!, { host: "127.0.0.1", port, protocol: "http", maxNetworkRetries: 0 });
const period = new Date().toISOString().slice(0, 7);
const tag = Date.now().toString(36);

afterAll(async () => {
  await fetch(`${fakeUrl}/_fake/up`, { method: "POST" });
  await fetch(`${fakeUrl}/_fake/meter_event_delay`, { method: "POST", body: JSON.stringify({ delayMs: 0 }) });
  await sql.end();
});

async function until<T>(what: string, probe: () => Promise<T | null | undefined | false>, timeoutMs = 60_000): Promise<T> {
  const started = Date.now();
  for (;;) {
    const v = await probe();
    if (v) return v;
    if (Date.now() - started > timeoutMs) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

interface TestWorkspace {
  id: string;
  tokens: { owner: string; billingAdmin: string; researcher: string };
  userIds: { owner: string; billingAdmin: string; researcher: string };
}

/** A fresh workspace with an Owner, a Billing admin and a Researcher, each with an API token. */
async function createWorkspace(name: string, plan: "free" | "lab" = "free"): Promise<TestWorkspace> {
  const slug = `billing-it-${tag}-${Math.random().toString(36).slice(2, 8)}`;
  // An organization id of its own, so invitations can be sent (they go by e-mail; nothing is asked of the sign-in service).
  const [ws] =
    await sql`insert into workspaces (name, slug, kind, plan, clerk_org_id) values (${name}, ${slug}, 'lab', ${plan}, ${`org_test_${slug}`}) returning id`;
  const tokens: Record<string, string> = {};
  const userIds: Record<string, string> = {};
  for (const [key, role] of [
    ["owner", "owner"],
    ["billingAdmin", "billing_admin"],
    ["researcher", "researcher"],
  ] as const) {
    const [u] = await sql`insert into users (email, name) values (${`${key}-${slug}@billing-test.example`}, ${`${key} of ${name}`}) returning id`;
    await sql`insert into memberships (workspace_id, user_id, role) values (${ws.id}, ${u.id}, ${role})`;
    const secret = newTokenSecret();
    await sql`insert into api_tokens (workspace_id, user_id, name, role, token_hash, prefix)
      values (${ws.id}, ${u.id}, 'billing test', ${role}, ${hashToken(secret)}, ${displayPrefix(secret)})`;
    tokens[key] = secret;
    userIds[key] = u.id;
  }
  return { id: ws.id, tokens: tokens as TestWorkspace["tokens"], userIds: userIds as TestWorkspace["userIds"] };
}

async function call(ws: TestWorkspace, as: keyof TestWorkspace["tokens"], path: string, init: { method?: string; json?: unknown } = {}) {
  const res = await fetch(new URL(path, appUrl()), {
    method: init.method ?? "GET",
    headers: { authorization: `Bearer ${ws.tokens[as]}`, ...(init.json !== undefined ? { "content-type": "application/json" } : {}) },
    body: init.json !== undefined ? JSON.stringify(init.json) : undefined,
  });
  failOnRateLimit(res, `${as} ${init.method ?? "GET"} ${path}`);
  return { status: res.status, body: await res.json() };
}

/** Ledger rows as the worker writes them (one finished run each), for a workspace we own. */
async function addLedgerRows(ws: TestWorkspace, seconds: number[], plan: "free" | "lab" = "lab"): Promise<string[]> {
  const ids: string[] = [];
  for (const s of seconds) {
    const [run] = await sql`insert into runs (workspace_id, created_by, kind, input, input_hash, status, compute_seconds, finished_at)
      values (${ws.id}, ${ws.userIds.researcher}, 'conductance', ${sql.json({ synthetic: true })}, ${randomUUID()}, 'succeeded', ${s}, now()) returning id`;
    const [row] = await sql`insert into usage_ledger (workspace_id, user_id, run_id, compute_seconds, plan, period)
      values (${ws.id}, ${ws.userIds.researcher}, ${run.id}, ${s}, ${plan}, ${period}) returning id`;
    ids.push(row.id);
  }
  return ids;
}

async function upgrade(ws: TestWorkspace) {
  const start = await call(ws, "billingAdmin", "/api/v1/billing/checkout", { method: "POST" });
  expect(start.status).toBe(201);
  const page = await fetch(start.body.url);
  expect(await page.text()).toContain("Pay and subscribe");
  const pay = await fetch(`${start.body.url}/pay`, { method: "POST", redirect: "manual" });
  expect(pay.status).toBe(303);
  expect(pay.headers.get("location")).toContain(`/billing?checkout=success&session_id=${start.body.sessionId}`);
  const [row] = await sql`select plan, plan_state, seats, stripe_customer_id, stripe_subscription_id from workspaces where id = ${ws.id}`;
  return { start: start.body, row };
}

const monthStart = () => Math.floor(Date.UTC(new Date().getUTCFullYear(), new Date().getUTCMonth(), 1) / 1000);
const monthEnd = () => Math.floor(Date.UTC(new Date().getUTCFullYear(), new Date().getUTCMonth() + 1, 1) / 1000);

async function meterSum(customer: string): Promise<number> {
  const meters = await stripe.billing.meters.list({ status: "active" });
  const m = meters.data.find((x) => x.event_name === "compute_seconds")!;
  const s = await stripe.billing.meters.listEventSummaries(m.id, { customer, start_time: monthStart(), end_time: monthEnd() });
  return s.data[0].aggregated_value;
}
async function fakeMeterEvents(customer: string): Promise<{ identifier: string; payload: Record<string, string> }[]> {
  return (await (await fetch(`${fakeUrl}/_fake/meter_events?customer=${customer}`)).json()).data;
}
async function ledgerSum(ws: TestWorkspace): Promise<number> {
  const [r] = await sql`select coalesce(sum(compute_seconds), 0)::float8 as s from usage_ledger where workspace_id = ${ws.id} and period = ${period}`;
  return Number(r.s);
}
async function allSent(ws: TestWorkspace, expected: number) {
  return until(`${expected} meter events sent`, async () => {
    const [r] = await sql`select count(*) filter (where status = 'sent')::int as sent, count(*)::int as total from meter_outbox where workspace_id = ${ws.id}`;
    return r.sent === expected && r.total === expected ? r : null;
  });
}

describe("upgrade to Lab and seats", () => {
  let ws: TestWorkspace;
  beforeAll(async () => {
    ws = await createWorkspace("Quillmere Optics Lab (billing test)");
  });

  it("refuses the upgrade to a Researcher (403) and upgrades through Checkout for a Billing admin", async () => {
    const denied = await call(ws, "researcher", "/api/v1/billing/checkout", { method: "POST" });
    expect(denied.status).toBe(403);
    expect(denied.body.error.code).toBe("forbidden");
    const { start, row } = await upgrade(ws);
    expect(start.seats).toBe(3);
    expect(row.plan).toBe("lab");
    expect(row.plan_state).toBe("active");
    expect(row.seats).toBe(3);
    const sub = await stripe.subscriptions.retrieve(row.stripe_subscription_id);
    expect(sub.customer).toBe(row.stripe_customer_id);
    const seatItem = sub.items.data.find((i) => i.price.recurring?.usage_type === "licensed")!;
    const meteredItem = sub.items.data.find((i) => i.price.recurring?.usage_type === "metered")!;
    expect(seatItem.quantity).toBe(3);
    expect(meteredItem.price.recurring?.meter).toBeTruthy();
    const again = await call(ws, "billingAdmin", "/api/v1/billing/checkout", { method: "POST" });
    expect(again.status).toBe(409);
  });

  const seatQty = async () => {
    const [row] = await sql`select stripe_subscription_id from workspaces where id = ${ws.id}`;
    return (await stripe.subscriptions.retrieve(row.stripe_subscription_id)).items.data.find((i) => i.price.recurring?.usage_type === "licensed")!.quantity;
  };
  const invite = (email: string) => call(ws, "billingAdmin", "/api/v1/workspace/members", { method: "POST", json: { email, role: "viewer" } });

  it("refuses an invitation past the seats bought, saying how to add a seat; a bought seat can then be filled", async () => {
    // 3 members on 3 seats: no seat is free.
    const refused = await invite(`past-seats-${tag}@billing-test.example`);
    expect(refused.status, JSON.stringify(refused.body)).toBe(402);
    expect(refused.body.error.code).toBe("payment_required");
    expect(refused.body.error.details).toMatchObject({ reason: "seats_full", seats: 3, members: 3, pending: 0, addSeat: "PUT /api/v1/billing/seats" });
    expect(refused.body.error.message).toContain("All 3 seats");
    expect(refused.body.error.message).toContain("adds a seat on the Billing page");
    expect(await sql`select 1 from invitations where workspace_id = ${ws.id}`).toHaveLength(0);

    // The cost is shown before charging: GET tells the price and the monthly total of the seats.
    const before = await call(ws, "billingAdmin", "/api/v1/billing/seats");
    expect(before.body).toEqual({ seats: 3, members: 3, pending: 0, minimumSeats: 3, maxSeats: 200, seatPriceUsdPerMonth: 24, monthlySeatsUsd: 72 });
    const bought = await call(ws, "billingAdmin", "/api/v1/billing/seats", { method: "PUT", json: { seats: 5 } });
    expect(bought.status, JSON.stringify(bought.body)).toBe(200);
    expect(bought.body).toMatchObject({ seats: 5, members: 3, monthlySeatsUsd: 120 });
    expect(await seatQty()).toBe(5);

    // Two free seats; five invitations at once: exactly two are accepted (the workspace row is locked).
    const many = await Promise.all([0, 1, 2, 3, 4].map((i) => invite(`edge-${i}-${tag}@billing-test.example`)));
    expect(many.map((r) => r.status).sort()).toEqual([201, 201, 402, 402, 402]);
    const [{ n }] = await sql`select count(*)::int as n from invitations where workspace_id = ${ws.id} and revoked_at is null and accepted_at is null`;
    expect(n).toBe(2);
    const full = await call(ws, "billingAdmin", "/api/v1/billing/seats");
    expect(full.body).toMatchObject({ seats: 5, members: 3, pending: 2, minimumSeats: 5 });

    // Seats cannot go below members + open invitations; the answer says the least.
    const tooFew = await call(ws, "billingAdmin", "/api/v1/billing/seats", { method: "PUT", json: { seats: 4 } });
    expect(tooFew.status).toBe(409);
    expect(tooFew.body.error.details).toMatchObject({ field: "seats", minimumSeats: 5, members: 3, pending: 2 });
    expect(tooFew.body.error.message).toContain("the least is 5");
    expect(await seatQty()).toBe(5);
    for (const bad of [{ seats: 0 }, { seats: 2.5 }, { seats: "6" }, { seats: 201 }, {}, { seats: 6, extra: true }]) {
      const r = await call(ws, "billingAdmin", "/api/v1/billing/seats", { method: "PUT", json: bad });
      expect(r.status, JSON.stringify(bad)).toBe(422);
      expect(r.body.error.message, JSON.stringify(bad)).toMatch(/seats|extra/);
    }
    expect((await call(ws, "researcher", "/api/v1/billing/seats", { method: "PUT", json: { seats: 6 } })).status).toBe(403);

    // Revoking the open invitations frees their seats; giving seats back is the Billing admin's choice.
    await sql`update invitations set revoked_at = now() where workspace_id = ${ws.id}`;
    const back = await call(ws, "billingAdmin", "/api/v1/billing/seats", { method: "PUT", json: { seats: 3 } });
    expect(back.status, JSON.stringify(back.body)).toBe(200);
    expect(back.body).toMatchObject({ seats: 3, pending: 0, monthlySeatsUsd: 72 });
    expect(await seatQty()).toBe(3);
  });

  it("raises seats to the members added outside the invitation flow, and never lowers them by itself", async () => {
    const [u] = await sql`insert into users (email, name) values (${`newcomer-${tag}@billing-test.example`}, 'Newcomer (test)') returning id`;
    await sql`insert into memberships (workspace_id, user_id, role) values (${ws.id}, ${u.id}, 'viewer')`;
    // The worker's billing pass gives every member a seat.
    await until("seats up to 4", async () => (await seatQty()) === 4);
    await until("workspace seats 4", async () => (await sql`select seats from workspaces where id = ${ws.id}`)[0].seats === 4);
    await sql`delete from memberships where workspace_id = ${ws.id} and user_id = ${u.id}`;
    // A member leaving frees a seat but does not give it back: the seats stay bought.
    await new Promise((r) => setTimeout(r, 3000));
    expect(await seatQty()).toBe(4);
    const seats = await call(ws, "owner", "/api/v1/billing/seats");
    expect(seats.body).toMatchObject({ seats: 4, members: 3, minimumSeats: 3 });
    // Sync sets the seats to what is taken.
    const synced = await call(ws, "billingAdmin", "/api/v1/billing/seats/sync", { method: "POST" });
    expect(synced.status).toBe(200);
    expect(synced.body).toEqual({ seats: 3, members: 3 });
    expect(await seatQty()).toBe(3);
  });

  it("opens the portal stand-in and lists invoices with a preview of the next one", async () => {
    const portal = await call(ws, "billingAdmin", "/api/v1/billing/portal", { method: "POST" });
    expect(portal.status).toBe(201);
    const html = await (await fetch(portal.body.url)).text();
    expect(html).toContain("Status: active");
    const inv = await call(ws, "billingAdmin", "/api/v1/billing/invoices");
    expect(inv.status).toBe(200);
    expect(inv.body.invoices.length).toBeGreaterThan(0);
    expect(inv.body.invoices[0].status).toBe("paid");
    expect(inv.body.upcoming.totalUsd).toBeCloseTo(3 * 24, 2);
  });
});

describe("the demo lab's payment account (seeded)", () => {
  it("has a customer and a Lab subscription with one seat per member; its invoices show and its runs are metered", async () => {
    const [lab] = await sql`select id, plan, seats, stripe_customer_id, stripe_subscription_id,
      (select count(*)::int from memberships m where m.workspace_id = w.id) as members
      from workspaces w where slug = 'larkspur-devices-lab'`;
    expect(lab.plan).toBe("lab");
    expect(lab.stripe_customer_id).toMatch(/^cus_/);
    const sub = await stripe.subscriptions.retrieve(lab.stripe_subscription_id);
    expect(sub.customer).toBe(lab.stripe_customer_id);
    expect(sub.status).toBe("active");
    expect(sub.metadata.workspace_id).toBe(lab.id);
    expect(sub.collection_method).toBe("send_invoice");
    const seatItem = sub.items.data.find((i) => i.price.recurring?.usage_type === "licensed")!;
    expect(seatItem.quantity).toBe(lab.seats);
    expect(lab.seats).toBeGreaterThanOrEqual(lab.members);
    expect(sub.items.data.some((i) => i.price.recurring?.usage_type === "metered")).toBe(true);

    const inv = await api("/api/v1/billing/invoices", { as: "billingAdmin" });
    expect(inv.status).toBe(200);
    const body = await inv.json();
    expect(body.invoices.length).toBeGreaterThan(0);
    const first = body.invoices[body.invoices.length - 1];
    // The first invoice bills the seats the lab started with (other tests buy more seats later): a whole number of 24 USD seats, one per seeded member at least.
    expect(first.totalUsd / 24).toBeCloseTo(Math.round(first.totalUsd / 24), 6);
    expect(first.totalUsd).toBeGreaterThanOrEqual(5 * 24);
    expect(body.upcoming).not.toBeNull();

    // A run of the demo lab becomes a ledger row and a meter event for the lab's customer.
    const run = await api("/api/v1/runs", {
      method: "POST",
      as: "researcher",
      json: { ...SMALL_RUN, computation: { ...SMALL_RUN.computation, energyMeV: 0.123 } },
    });
    expect(run.status).toBe(202);
    const runId = (await run.json()).id as string;
    const ledger = await until("the demo run's ledger row", async () => (await sql`select id from usage_ledger where run_id = ${runId}`)[0], 120_000);
    await until("its meter event sent", async () => (await sql`select status from meter_outbox where ledger_id = ${ledger.id}`)[0]?.status === "sent");
    const events = await fakeMeterEvents(lab.stripe_customer_id);
    expect(events.filter((e) => e.identifier === ledger.id)).toHaveLength(1);
  });
});

describe("metering: ledger rows become meter events", () => {
  let ws: TestWorkspace;
  let customer: string;
  beforeAll(async () => {
    ws = await createWorkspace("Brightwater Transport Group (billing test)");
    const { row } = await upgrade(ws);
    customer = row.stripe_customer_id;
  });

  it("sends one meter event per ledger row (identifier = ledger row id); summed per period they equal the ledger", async () => {
    const ids = await addLedgerRows(ws, [12.5, 30, 0.75, 118.25, 45, 3.125, 61, 9.5]);
    await allSent(ws, ids.length);
    const events = await fakeMeterEvents(customer);
    expect(events.map((e) => e.identifier).sort()).toEqual([...ids].sort());
    expect(await meterSum(customer)).toBeCloseTo(await ledgerSum(ws), 2);
    const usage = await call(ws, "researcher", "/api/v1/usage");
    expect(usage.status).toBe(200);
    expect(usage.body.period).toBe(period);
    expect(usage.body.computeSeconds).toBeCloseTo(await ledgerSum(ws), 2);
    const researcher = usage.body.members.find((m: { userId: string }) => m.userId === ws.userIds.researcher);
    expect(researcher.runs).toBe(ids.length);
    expect(researcher.costUsd).toBeCloseTo((researcher.computeSeconds / 3600) * 0.6, 6);
    expect(usage.body.days.length).toBeGreaterThan(0);
    const bad = await call(ws, "researcher", "/api/v1/usage?period=2026-13");
    expect(bad.status).toBe(422);
    expect(bad.body.error.message).toContain("period");
  });

  it("meters a real run end to end: POST /api/v1/runs -> worker -> ledger row -> meter event", async () => {
    const network = {
      lattice: "triangular",
      size: { columns: 6, rows: 6 },
      transverse: "periodic",
      twistDegrees: 0.11,
      modeVelocityMps: 1.0e6,
      channelsPerLink: 1,
      node: { forward: 0.6, left: 0.2, right: 0.2 },
    };
    const created = await call(ws, "researcher", "/api/v1/runs", { method: "POST", json: { network, computation: { kind: "conductance", energyMeV: 0.4 } } });
    expect(created.status).toBe(202);
    const runId = created.body.id as string;
    const ledger = await until(
      "the run's ledger row",
      async () => (await sql`select id, compute_seconds from usage_ledger where run_id = ${runId}`)[0],
      120_000,
    );
    await until("its meter event sent", async () => (await sql`select status from meter_outbox where ledger_id = ${ledger.id}`)[0]?.status === "sent");
    const events = await fakeMeterEvents(customer);
    const mine = events.filter((e) => e.identifier === ledger.id);
    expect(mine).toHaveLength(1);
    expect(Number(mine[0].payload.value)).toBeCloseTo(Number(ledger.compute_seconds), 2);
    expect(await meterSum(customer)).toBeCloseTo(await ledgerSum(ws), 2);
  });

  it("loses nothing and duplicates nothing when a sender is killed midway", async () => {
    const before = (await fakeMeterEvents(customer)).length;
    await fetch(`${fakeUrl}/_fake/meter_event_delay`, { method: "POST", body: JSON.stringify({ delayMs: 150 }) });
    const ids = await addLedgerRows(
      ws,
      Array.from({ length: 30 }, (_, i) => 5 + i * 0.5),
    );
    // node itself (tsx as a loader), so SIGKILL hits the sender and not a wrapper.
    const child = spawn(process.execPath, ["--import", "tsx", "worker/billing.ts"], {
      env: { ...process.env, METER_SENDER_WORKSPACE_ID: ws.id, METER_SENDER_LEASE_SECONDS: "3", METER_SENDER_INTERVAL_MS: "200" },
      stdio: "ignore",
    });
    try {
      await until(
        "a few events sent",
        async () => (await sql`select count(*)::int as n from meter_outbox where ledger_id = any(${ids}) and status = 'sent'`)[0].n >= 4,
      );
    } finally {
      child.kill("SIGKILL");
    }
    await until("the sender process gone", async () => child.exitCode !== null || child.signalCode !== null);
    expect(child.signalCode).toBe("SIGKILL");
    const [mid] = await sql`select count(*)::int as n from meter_outbox where ledger_id = any(${ids}) and status = 'sent'`;
    expect(mid.n).toBeLessThan(ids.length);
    await fetch(`${fakeUrl}/_fake/meter_event_delay`, { method: "POST", body: JSON.stringify({ delayMs: 0 }) });
    await allSent(ws, 9 + ids.length);
    const events = await fakeMeterEvents(customer);
    expect(events.length).toBe(before + ids.length);
    expect(new Set(events.map((e) => e.identifier)).size).toBe(events.length);
    expect(await meterSum(customer)).toBeCloseTo(await ledgerSum(ws), 2);
  });

  it("delays but does not lose usage while Stripe is down", async () => {
    await fetch(`${fakeUrl}/_fake/down`, { method: "POST" });
    let ids: string[] = [];
    try {
      ids = await addLedgerRows(ws, [20, 40, 60]);
      const pending = await until("a failed attempt recorded", async () => {
        const rows = await sql`select status, attempts, last_error from meter_outbox where ledger_id = any(${ids})`;
        return rows.length === 3 && rows.every((r) => r.status === "pending" && r.attempts >= 1 && r.last_error) ? rows : null;
      });
      expect(pending[0].last_error).toMatch(/Stripe|connect|socket/i);
    } finally {
      await fetch(`${fakeUrl}/_fake/up`, { method: "POST" });
    }
    await allSent(ws, 9 + 30 + 3);
    expect(await meterSum(customer)).toBeCloseTo(await ledgerSum(ws), 2);
  });
});

describe("webhooks", () => {
  it("rejects a bad signature with 400 and accepts a correctly signed event", async () => {
    const payload = JSON.stringify({
      id: `evt_test_${tag}`,
      object: "event",
      type: "product.created",
      created: Math.floor(Date.now() / 1000),
      data: { object: {} },
    });
    const bad = await fetch(new URL("/api/webhooks/stripe", appUrl()), {
      method: "POST",
      headers: { "stripe-signature": "t=1,v1=deadbeef", "content-type": "application/json" },
      body: payload,
    });
    expect(bad.status).toBe(400);
    expect((await bad.json()).error.message).toContain("signature");
    const none = await fetch(new URL("/api/webhooks/stripe", appUrl()), { method: "POST", body: payload });
    expect(none.status).toBe(400);
    const header = stripe.webhooks.generateTestHeaderString({ payload, secret: process.env.STRIPE_WEBHOOK_SECRET! });
    const good = await fetch(new URL("/api/webhooks/stripe", appUrl()), {
      method: "POST",
      headers: { "stripe-signature": header, "content-type": "application/json" },
      body: payload,
    });
    expect(good.status).toBe(200);
    expect((await good.json()).duplicate).toBe(false);
  });

  it("moves a workspace to grace on a failed payment, back on payment, and applies a replayed event once", async () => {
    const ws = await createWorkspace("Fernvale Nanostructures (billing test)");
    const { row } = await upgrade(ws);
    const customer = row.stripe_customer_id as string;
    await fetch(`${fakeUrl}/_fake/customers/${customer}/payments`, { method: "POST", body: JSON.stringify({ fail: true }) });
    const adv = await fetch(`${fakeUrl}/_fake/subscriptions/${row.stripe_subscription_id}/advance_period`, { method: "POST" });
    expect(adv.status).toBe(200);
    const [grace] = await sql`select w.plan_state, b.grace_ends_at from workspaces w join workspace_billing b on b.workspace_id = w.id where w.id = ${ws.id}`;
    expect(grace.plan_state).toBe("grace");
    expect(new Date(grace.grace_ends_at).getTime()).toBeGreaterThan(Date.now());
    const overview = await call(ws, "owner", "/api/v1/billing");
    expect(overview.body.planState).toBe("grace");
    expect(overview.body.effectivePlan).toBe("lab");
    await fetch(`${fakeUrl}/_fake/customers/${customer}/payments`, { method: "POST", body: JSON.stringify({ fail: false }) });
    expect((await sql`select plan_state from workspaces where id = ${ws.id}`)[0].plan_state).toBe("active");
    // Replay the payment-failed event: stored once, applied once, the workspace stays active.
    const events = (await (await fetch(`${fakeUrl}/_fake/events`)).json()).data as { id: string; type: string; data: { object: { customer?: string } } }[];
    const failed = events.find((e) => e.type === "invoice.payment_failed" && e.data.object.customer === customer)!;
    const replay = await (await fetch(`${fakeUrl}/_fake/deliveries/${failed.id}/resend`, { method: "POST" })).json();
    expect(replay.resent).toBe(true);
    expect((await sql`select plan_state from workspaces where id = ${ws.id}`)[0].plan_state).toBe("active");
    const [stored] = await sql`select count(*)::int as n from stripe_events where id = ${failed.id}`;
    expect(stored.n).toBe(1);
    // Past the grace period a workspace works under Free limits.
    await fetch(`${fakeUrl}/_fake/customers/${customer}/payments`, { method: "POST", body: JSON.stringify({ fail: true }) });
    await fetch(`${fakeUrl}/_fake/subscriptions/${row.stripe_subscription_id}/advance_period`, { method: "POST" });
    expect((await sql`select plan_state from workspaces where id = ${ws.id}`)[0].plan_state).toBe("grace");
    await sql`update workspace_billing set grace_ends_at = now() - interval '1 minute' where workspace_id = ${ws.id}`;
    await until("suspended after grace", async () => (await sql`select plan_state from workspaces where id = ${ws.id}`)[0].plan_state === "suspended");
    const after = await call(ws, "owner", "/api/v1/billing");
    expect(after.body.effectivePlan).toBe("free");
  });
});

let forgedCount = 0;
/** A correctly signed event whose object says whatever the sender wants (a leaked secret, a replay). */
async function sendSignedEvent(type: string, object: Record<string, unknown>) {
  const payload = JSON.stringify({
    id: `evt_forged_${tag}_${++forgedCount}`,
    object: "event",
    type,
    created: Math.floor(Date.now() / 1000),
    livemode: false,
    data: { object },
  });
  const header = stripe.webhooks.generateTestHeaderString({ payload, secret: process.env.STRIPE_WEBHOOK_SECRET! });
  const res = await fetch(new URL("/api/webhooks/stripe", appUrl()), {
    method: "POST",
    headers: { "stripe-signature": header, "content-type": "application/json" },
    body: payload,
  });
  return { status: res.status, body: await res.json() };
}
const planOf = async (ws: TestWorkspace) =>
  (await sql`select plan, plan_state, seats, stripe_customer_id, stripe_subscription_id from workspaces where id = ${ws.id}`)[0];
const seatItems = (quantity: number) => ({
  object: "list",
  data: [{ id: "si_forged", quantity, price: { id: "price_forged", lookup_key: "triskel_lab_seat_monthly", recurring: { usage_type: "licensed" } } }],
});

describe("webhooks are confirmed with Stripe before a plan changes", () => {
  it("ignores checkout and subscription events whose objects Stripe does not know (200, nothing changed)", async () => {
    const ws = await createWorkspace("Oakhollow Spin Lab (billing test)");
    const checkout = await sendSignedEvent("checkout.session.completed", {
      id: `cs_test_forged_${tag}`,
      object: "checkout.session",
      mode: "subscription",
      status: "complete",
      payment_status: "paid",
      customer: `cus_forged_${tag}`,
      subscription: `sub_forged_${tag}`,
      client_reference_id: ws.id,
      metadata: { workspace_id: ws.id },
    });
    expect(checkout.status).toBe(200);
    expect(checkout.body.outcome).toMatch(/^ignored: Stripe does not know Checkout Session cs_test_forged_/);
    const created = await sendSignedEvent("customer.subscription.created", {
      id: `sub_forged_${tag}`,
      object: "subscription",
      status: "active",
      customer: `cus_forged_${tag}`,
      metadata: { workspace_id: ws.id },
      items: seatItems(50),
    });
    expect(created.status).toBe(200);
    expect(created.body.outcome).toMatch(/^ignored: Stripe does not know subscription sub_forged_/);
    expect(await planOf(ws)).toMatchObject({ plan: "free", seats: 0, stripe_customer_id: null, stripe_subscription_id: null });
    const [stored] = await sql`select outcome from stripe_events where id = ${checkout.body.eventId}`;
    expect(stored.outcome).toMatch(/^ignored: Stripe does not know/);
  });

  it("does not take a started but unpaid checkout as paid, whatever the event says", async () => {
    const ws = await createWorkspace("Saltmarsh Interferometry (billing test)");
    const start = await call(ws, "billingAdmin", "/api/v1/billing/checkout", { method: "POST" });
    expect(start.status).toBe(201);
    const { stripe_customer_id: customer } = await planOf(ws);
    expect(customer).toMatch(/^cus_/);
    const res = await sendSignedEvent("checkout.session.completed", {
      id: start.body.sessionId,
      object: "checkout.session",
      mode: "subscription",
      status: "complete",
      payment_status: "paid",
      customer,
      subscription: `sub_forged_${tag}`,
      client_reference_id: ws.id,
      metadata: { workspace_id: ws.id },
    });
    expect(res.status).toBe(200);
    expect(res.body.outcome).toBe(`ignored: Stripe says Checkout Session ${start.body.sessionId} is open (unpaid)`);
    expect(await planOf(ws)).toMatchObject({ plan: "free", stripe_subscription_id: null });
  });

  it("does not upgrade a workspace named by a paid checkout of another customer", async () => {
    const ws = await createWorkspace("Thornbury Hall Lab (billing test)");
    // The workspace's own payment customer exists (a checkout was started, never paid).
    expect((await call(ws, "billingAdmin", "/api/v1/billing/checkout", { method: "POST" })).status).toBe(201);
    const prices = await stripe.prices.list({ lookup_keys: ["triskel_lab_seat_monthly", "triskel_compute_seconds_metered"] });
    const seat = prices.data.find((p) => p.lookup_key === "triskel_lab_seat_monthly")!;
    const stranger = await stripe.customers.create({ name: "Someone else (billing test)" });
    const session = await stripe.checkout.sessions.create({
      mode: "subscription",
      customer: stranger.id,
      client_reference_id: ws.id,
      metadata: { workspace_id: ws.id },
      subscription_data: { metadata: { workspace_id: ws.id } },
      line_items: [{ price: seat.id, quantity: 1 }],
      success_url: `${appUrl()}/billing`,
    });
    // Paid for real at the stand-in, which delivers its signed events to the app before answering.
    const pay = await fetch(`${session.url}/pay`, { method: "POST", redirect: "manual" });
    expect(pay.status).toBe(303);
    const outcomes = await sql`select type, outcome from stripe_events where workspace_id = ${ws.id} order by received_at`;
    const checkoutOutcome = outcomes.find((o) => o.type === "checkout.session.completed")?.outcome;
    expect(checkoutOutcome).toMatch(new RegExp(`^ignored: Stripe's customer ${stranger.id} is not the payment customer of workspace ${ws.id}`));
    const subOutcome = outcomes.find((o) => o.type === "customer.subscription.created")?.outcome;
    expect(subOutcome).toMatch(/^ignored: Stripe's customer/);
    expect(await planOf(ws)).toMatchObject({ plan: "free", seats: 0, stripe_subscription_id: null });
  });

  it("acts on the subscription as Stripe has it, not as the event describes it", async () => {
    const ws = await createWorkspace("Hawkridge Quantum Wires (billing test)");
    const { row } = await upgrade(ws);
    expect(row).toMatchObject({ plan: "lab", seats: 3 });
    const sub = { id: row.stripe_subscription_id, object: "subscription", customer: row.stripe_customer_id, metadata: { workspace_id: ws.id } };
    const updated = await sendSignedEvent("customer.subscription.updated", { ...sub, status: "canceled", items: seatItems(99) });
    expect(updated.status).toBe(200);
    expect(updated.body.outcome).toBe("subscription active, 3 seats");
    const deleted = await sendSignedEvent("customer.subscription.deleted", { ...sub, status: "canceled", items: seatItems(0) });
    expect(deleted.status).toBe(200);
    expect(deleted.body.outcome).toBe(`ignored: Stripe says subscription ${row.stripe_subscription_id} is active, not ended`);
    expect(await planOf(ws)).toMatchObject({ plan: "lab", plan_state: "active", seats: 3, stripe_subscription_id: row.stripe_subscription_id });
  });
});

const smallRun = {
  network: {
    lattice: "triangular",
    size: { columns: 6, rows: 6 },
    transverse: "periodic",
    twistDegrees: 0.11,
    modeVelocityMps: 1.0e6,
    channelsPerLink: 1,
    node: { forward: 0.6, left: 0.2, right: 0.2 },
  },
  computation: { kind: "conductance", energyMeV: 0.4 },
};
/** A dry run through the runs API (every check, budget included; nothing written). */
function dryRun(ws: TestWorkspace) {
  return call(ws, "owner", "/api/v1/runs?dryRun=true", { method: "POST", json: smallRun });
}

describe("free quota and spend cap", () => {
  it("refuses a job over the free quota with the documented message (402)", async () => {
    const { assertWithinBudget } = await import("@/server/billing/budget");
    const ws = await createWorkspace("Student corner (billing test)", "free");
    await addLedgerRows(ws, [1000, 790], "free");
    const err = await assertWithinBudget(ws.id, 60).catch((e) => e);
    expect(err.status).toBe(402);
    expect(err.message).toContain("only 10 compute-seconds of the Free plan's 30 compute-minutes are left this month");
    expect(err.details).toMatchObject({ limit: "free_quota", usedComputeSeconds: 1790 });
    await expect(assertWithinBudget(ws.id, 10)).resolves.toBeTruthy();
    // Through the runs API once nothing is left.
    await addLedgerRows(ws, [10], "free");
    const refused = await dryRun(ws);
    expect(refused.status).toBe(402);
    expect(refused.body.error.code).toBe("payment_required");
    expect(refused.body.error.message).toContain("only 0 compute-seconds of the Free plan's 30 compute-minutes are left this month");
  });

  it("refuses a job over the spend cap (402) and e-mails the Owner and Billing admin at 80 % and 100 %", async () => {
    const { assertWithinBudget } = await import("@/server/billing/budget");
    const ws = await createWorkspace("Cinderford Quantum Lab (billing test)", "lab");
    const set = await call(ws, "billingAdmin", "/api/v1/billing/spend-cap", { method: "PUT", json: { spendCapUsd: 1 } });
    expect(set.status).toBe(200);
    const badCap = await call(ws, "billingAdmin", "/api/v1/billing/spend-cap", { method: "PUT", json: { spendCapUsd: "lots" } });
    expect(badCap.status).toBe(422);
    expect(badCap.body.error.message).toContain("spendCapUsd");
    const researcherCap = await call(ws, "researcher", "/api/v1/billing/spend-cap", { method: "PUT", json: { spendCapUsd: 500 } });
    expect(researcherCap.status).toBe(403);
    // 5,100 compute-seconds = 0.85 USD of a 1 USD cap.
    await addLedgerRows(ws, [5100]);
    const err = await assertWithinBudget(ws.id, 1200).catch((e) => e);
    expect(err.status).toBe(402);
    expect(err.message).toContain("would take this month's compute spend from 0.85 USD past the spend cap of 1.00 USD");
    const mails = async () =>
      ((await (await fetch(`${process.env.MAIL_WEB_URL}/email`)).json()) as { subject: string; to: { address: string }[] }[]).filter((m) =>
        m.subject.startsWith("Cinderford Quantum Lab"),
      );
    const first = await until("80 % e-mail", async () => {
      const m = await mails();
      return m.length >= 1 ? m : null;
    });
    expect(first[0].subject).toContain("80 %");
    const to = first[0].to.map((t) => t.address).sort();
    expect(to).toHaveLength(2);
    expect(to[0]).toMatch(/^billingadmin-/i);
    expect(to[1]).toMatch(/^owner-/i);
    await addLedgerRows(ws, [1000]);
    const both = await until("100 % e-mail", async () => {
      const m = await mails();
      return m.length >= 2 ? m : null;
    });
    expect(both.some((m) => m.subject.includes("reached the spend cap"))).toBe(true);
    await new Promise((r) => setTimeout(r, 3000));
    expect((await mails()).length).toBe(2);
    // Past the cap, the runs API refuses even a small job, naming the cap and the spend.
    const refused = await dryRun(ws);
    expect(refused.status).toBe(402);
    expect(refused.body.error.message).toContain("past the spend cap of 1.00 USD");
    expect(refused.body.error.details).toMatchObject({ limit: "spend_cap", spendCapUsd: 1 });
  });
});
