// Budget reservations (src/server/billing/budget.ts reserveBudget): a submission reserves its
// estimate against the free quota or the spend cap in the transaction that writes its queued rows,
// under a lock on the workspace, counting every queued and running job; finishing replaces the
// reservation by the measured compute, cancelling releases it. And the plan state: a suspended
// workspace works under Free limits and priority; work accepted on Lab is billed at Lab even when
// it finishes after a suspension. Networks are synthetic.
import { afterAll, describe, expect, it } from "vitest";
import { PLANS, computeCostUsd } from "../../src/shared/plans";
import { get, post, smallNetwork, sql, waitFor, workspaceId } from "./runs-support";
import type { DemoTokenKey } from "../support/services";

const started: { id: string; as: DemoTokenKey }[] = [];

/** Cancel whatever a test left queued or running, so later files find the worker free. */
async function cancelAll(): Promise<void> {
  await Promise.all(started.splice(0).map((r) => post(`/api/v1/runs/${r.id}/cancel`, {}, r.as)));
}

afterAll(async () => {
  await cancelAll();
  await sql.end();
});

/** A heavy synthetic computation whose estimate lies in [lo, hi] compute-seconds (the cost model is the same on every plan). */
async function computationEstimated(lo: number, hi: number) {
  const network = { ...smallNetwork(40, 40), disorder: { linkPhaseWidthRad: 3, seed: 4 } };
  for (const samples of [1, 2, 3, 5, 8]) {
    for (const temperatureK of [20, 10, 5, 2]) {
      const computation = { kind: "conductance", energyMeV: 0.5, temperatureK, ensemble: { samples } };
      const r = await post("/api/v1/runs?dryRun=true", { network, computation }, "researcher");
      expect(r.status).toBe(200);
      const e = r.body.estimate.computeSeconds as number;
      if (e >= lo && e <= hi) return { network, computation, estimate: e };
    }
  }
  throw new Error(`no candidate computation has an estimate in [${lo}, ${hi}] s`);
}

async function billing(as: DemoTokenKey) {
  const r = await get("/api/v1/billing", as);
  expect(r.status).toBe(200);
  return r.body as {
    plan: string;
    usedComputeSeconds: number;
    reservedComputeSeconds: number;
    includedComputeSeconds: number;
    spendUsd: number;
    reservedUsd: number;
    spendCapUsd: number | null;
  };
}

async function burst(n: number, body: unknown, as: DemoTokenKey) {
  const answers = await Promise.all(Array.from({ length: n }, () => post("/api/v1/runs", body, as)));
  for (const a of answers) if (a.status === 202) started.push({ id: a.body.id, as });
  return answers;
}

describe("budget reservations", () => {
  it("twenty parallel Free submissions: only what fits in the quota beside the finished and reserved compute is accepted", async () => {
    const { network, computation, estimate } = await computationEstimated(120, PLANS.free.maxJobComputeSeconds * 0.9);
    const before = await billing("student");
    expect(before.plan).toBe("free");
    const left = before.includedComputeSeconds - before.usedComputeSeconds - before.reservedComputeSeconds;
    const fits = Math.floor(left / estimate);
    expect(fits).toBeGreaterThanOrEqual(1); // the test needs room for at least one
    expect(fits).toBeLessThan(20); // and less than the burst

    const answers = await burst(20, { network, computation }, "student");
    const accepted = answers.filter((a) => a.status === 202);
    const refused = answers.filter((a) => a.status === 402);
    expect(accepted.length + refused.length).toBe(20);
    expect(accepted.length).toBeGreaterThanOrEqual(1);
    expect(accepted.length).toBeLessThanOrEqual(fits);
    for (const r of refused) {
      expect(r.body.error.code).toBe("payment_required");
      expect(r.body.error.details.limit).toBe("free_quota");
      expect(r.body.error.details.reservedComputeSeconds).toBeGreaterThan(0);
      expect(r.body.error.message).toContain("held by queued and running work");
    }
    // The invariant the lock keeps: finished + reserved never passes the quota.
    const after = await billing("student");
    expect(after.usedComputeSeconds + after.reservedComputeSeconds).toBeLessThanOrEqual(after.includedComputeSeconds + 1e-6);

    // A dry run sees the reservations too, and so does a scan.
    const dry = await post("/api/v1/runs?dryRun=true", { network, computation }, "student");
    expect(dry.status).toBe(402);
    expect(dry.body.error.details.limit).toBe("free_quota");
    const sweep = await post("/api/v1/sweeps", { network, computation, axes: [{ parameter: "energyMeV", values: [0.5, 0.6] }] }, "student");
    expect(sweep.status).toBe(402);
    expect(sweep.body.error.details.limit).toBe("free_quota");

    // Cancelling releases: the reserved compute goes back to what it was (the cancelled runs'
    // spent seconds, if any, move to the ledger).
    const ids = accepted.map((a) => a.body.id as string);
    await cancelAll();
    await waitFor(
      "the cancelled runs to finish",
      async () => {
        const rows = await sql`select count(*)::int as n from runs where id in ${sql(ids)} and status in ('queued', 'running')`;
        return rows[0].n === 0;
      },
      60_000,
    );
    const released = await billing("student");
    expect(released.reservedComputeSeconds).toBeCloseTo(before.reservedComputeSeconds, 3);
    const ledger = await sql`select count(*)::int as n from usage_ledger where run_id in ${sql(ids)}`;
    const spent = await sql`select count(*)::int as n from runs where id in ${sql(ids)} and coalesce(compute_seconds, 0) > 0`;
    expect(ledger[0].n).toBe(spent[0].n); // one ledger row for each cancelled run that spent compute, none for the rest
  });

  it("twenty parallel Lab submissions under a spend cap: spend + reserved stays within the cap", async () => {
    const lab = await workspaceId();
    const [{ cap: previousCap }] = await sql`select spend_cap_usd as cap from workspaces where id = ${lab}`;
    try {
      const { network, computation, estimate } = await computationEstimated(120, 3000);
      const cost = computeCostUsd("lab", estimate);
      const before = await billing("owner");
      const cap = Math.ceil((before.spendUsd + before.reservedUsd + 3.5 * cost) * 100) / 100;
      await sql`update workspaces set spend_cap_usd = ${cap} where id = ${lab}`;
      const answers = await burst(20, { network, computation }, "researcher");
      const accepted = answers.filter((a) => a.status === 202);
      const refused = answers.filter((a) => a.status === 402);
      expect(accepted.length + refused.length).toBe(20);
      expect(accepted.length).toBeGreaterThanOrEqual(1);
      expect(accepted.length).toBeLessThanOrEqual(3);
      for (const r of refused) expect(r.body.error.details.limit).toBe("spend_cap");
      const after = await billing("owner");
      expect(after.spendUsd + after.reservedUsd).toBeLessThanOrEqual(cap + 1e-9);
    } finally {
      await cancelAll();
      await sql`update workspaces set spend_cap_usd = ${previousCap} where id = ${lab}`;
    }
  });
});

describe("plan state", () => {
  it("a suspended Lab workspace works under Free limits and Free priority; dry runs too", async () => {
    const lab = await workspaceId();
    await sql`update workspaces set plan_state = 'suspended' where id = ${lab}`;
    try {
      for (const path of ["/api/v1/runs", "/api/v1/runs?dryRun=true"]) {
        const big = await post(path, { network: smallNetwork(200, 200), computation: { kind: "conductance", energyMeV: 0.5 } });
        expect(big.status).toBe(402);
        expect(big.body.error.details.limit).toBe("maxCellsPerSide");
        const ensemble = await post(path, { network: smallNetwork(), computation: { kind: "conductance", energyMeV: 0.5, ensemble: { samples: 500 } } });
        expect(ensemble.status).toBe(402);
        expect(ensemble.body.error.details.limit).toBe("maxEnsembleSamples");
      }
      const sweep = await post("/api/v1/sweeps?dryRun=true", {
        network: smallNetwork(),
        computation: { kind: "conductance", energyMeV: 0.5 },
        axes: [{ parameter: "fieldTesla", from: 0, to: 1, points: PLANS.free.maxSweepPoints + 50 }],
      });
      expect(sweep.status).toBe(402);
      expect(sweep.body.error.details.limit).toBe("maxSweepPoints");
      const small = await post("/api/v1/runs", { network: smallNetwork(), computation: { kind: "conductance", energyMeV: 0.5 } });
      expect(small.status).toBe(202);
      const [row] = await sql`select priority, plan from runs where id = ${small.body.id}`;
      expect(row.priority).toBe(PLANS.free.queuePriority);
      expect(row.plan).toBe("free");
      const overview = await billing("owner");
      expect(overview.plan).toBe("lab");
      expect((overview as unknown as { effectivePlan: string }).effectivePlan).toBe("free");
    } finally {
      await sql`update workspaces set plan_state = 'active' where id = ${lab}`;
    }
  });

  it("work accepted on Lab and finished after a suspension is billed at Lab (its ledger row reaches the meter)", async () => {
    const lab = await workspaceId();
    const r = await post("/api/v1/runs", {
      network: { ...smallNetwork(24, 24), disorder: { linkPhaseWidthRad: 3, seed: 9 } },
      computation: { kind: "conductance", energyMeV: 0.5, ensemble: { samples: 30 } },
    });
    expect(r.status).toBe(202);
    const [{ at: suspendedAt }] = await sql`update workspaces set plan_state = 'suspended' where id = ${lab} returning now() as at`;
    try {
      const done = await waitFor("the run to finish", async () => {
        const [row] = await sql`select status, finished_at, plan from runs where id = ${r.body.id}`;
        return row.status === "succeeded" ? row : null;
      });
      expect(done.plan).toBe("lab");
      // The run must have finished after the suspension for this to prove anything.
      expect(new Date(done.finished_at).getTime()).toBeGreaterThan(new Date(suspendedAt).getTime());
      const [ledger] = await sql`select plan from usage_ledger where run_id = ${r.body.id}`;
      expect(ledger.plan).toBe("lab");
    } finally {
      await sql`update workspaces set plan_state = 'active' where id = ${lab}`;
    }
  });
});
