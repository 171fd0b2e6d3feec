// Demo sweep (product.md demo scenario): "Conductance versus field" on the lab's clean 0.11°
// triangular network, computed here by the real engine at seed time (a small, quick grid), stored
// exactly as the worker would store it: one child run per point, results, compute-seconds,
// engine version, input hash and one usage-ledger row per point. Idempotent.
import { and, eq } from "drizzle-orm";
import { ENGINE_VERSION, applyParameter, compute, estimateCost, inputHash, parseComputeInput, type ComputeInput } from "../../src/engine/index";
import { billingPeriod } from "../../src/server/billing/budget";
import { networks, networkVersions, runs, sweeps, usageLedger } from "../../src/server/db/schema";
import type { SeedContext } from "./index";

export const DEMO_SWEEP_NAME = "Conductance versus field";
const NETWORK_NAME = "Clean 0.11° triangular network";
const FIELDS_TESLA = Array.from({ length: 21 }, (_, i) => Math.round(i * 0.01 * 1e6) / 1e6);

export async function seed({ db, lab, people }: SeedContext): Promise<void> {
  const [existing] = await db
    .select({ id: sweeps.id })
    .from(sweeps)
    .where(and(eq(sweeps.workspaceId, lab.id), eq(sweeps.name, DEMO_SWEEP_NAME)));
  if (existing) return;
  const [net] = await db
    .select({ versionId: networkVersions.id, definition: networkVersions.definition })
    .from(networks)
    .innerJoin(networkVersions, and(eq(networkVersions.networkId, networks.id), eq(networkVersions.version, networks.currentVersion)))
    .where(and(eq(networks.workspaceId, lab.id), eq(networks.name, NETWORK_NAME)));
  if (!net) throw new Error(`demo sweep: network "${NETWORK_NAME}" is missing`);
  const researcher = people.get("researcher")!;
  const base = parseComputeInput({ network: net.definition, computation: { kind: "conductance", energyMeV: 0.5 } });
  const axes = [{ parameter: "fieldTesla", values: FIELDS_TESLA }];

  const points = FIELDS_TESLA.map((fieldTesla) => {
    const input = parseComputeInput(applyParameter(base, "fieldTesla", fieldTesla)) as ComputeInput;
    const estimate = Number(estimateCost(input).computeSeconds) || 0;
    const started = process.cpuUsage();
    const t0 = new Date();
    const result = compute(input, {});
    const used = process.cpuUsage(started);
    return { input, estimate, result, seconds: (used.user + used.system) / 1e6, startedAt: t0, finishedAt: new Date() };
  });
  const total = points.reduce((s, p) => s + p.seconds, 0);

  await db.transaction(async (tx) => {
    const [sweep] = await tx
      .insert(sweeps)
      .values({
        workspaceId: lab.id,
        createdBy: researcher.id,
        networkVersionId: net.versionId,
        name: DEMO_SWEEP_NAME,
        input: base,
        axes,
        pointCount: points.length,
        status: "succeeded",
        progress: 1,
        estimatedComputeSeconds: points.reduce((s, p) => s + p.estimate, 0),
        computeSeconds: total,
        engineVersion: ENGINE_VERSION,
        startedAt: points[0].startedAt,
        finishedAt: points[points.length - 1].finishedAt,
      })
      .returning();
    const rows = await tx
      .insert(runs)
      .values(
        points.map((p, i) => ({
          workspaceId: lab.id,
          createdBy: researcher.id,
          networkVersionId: net.versionId,
          sweepId: sweep.id,
          sweepPointIndex: i,
          kind: "conductance",
          input: p.input,
          status: "succeeded" as const,
          progress: 1,
          result: p.result,
          estimatedComputeSeconds: p.estimate,
          computeSeconds: p.seconds,
          engineVersion: ENGINE_VERSION,
          inputHash: inputHash(p.input),
          attempts: 1,
          createdAt: p.startedAt,
          startedAt: p.startedAt,
          finishedAt: p.finishedAt,
        })),
      )
      .returning({ id: runs.id, computeSeconds: runs.computeSeconds });
    await tx.insert(usageLedger).values(
      rows.map((r) => ({
        workspaceId: lab.id,
        userId: researcher.id,
        runId: r.id,
        computeSeconds: r.computeSeconds ?? 0,
        plan: lab.plan,
        period: billingPeriod(),
      })),
    );
  });
}
