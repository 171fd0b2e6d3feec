import "../../server-only";
import { sql } from "drizzle-orm";
import { index, integer, json, jsonb, pgEnum, pgTable, real, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import type { ComputeInput, Network } from "@/engine/browser";
import type { FitLedgerInput, JobError, RunDetail, SweepAxis, SweepEnsemble } from "@/shared/api";
// Relative, so drizzle-kit (which loads this file at run time) needs no path aliases.
import { JOB_STATUSES } from "../../../shared/api/common";
import { planName, users, workspaces } from "./accounts";

/** Status of a run or a sweep (issue 4 contract). */
export const jobStatus = pgEnum("job_status", JOB_STATUSES);

/** A saved network; its definitions live in network_versions (editing makes a new version). */
export const networks = pgTable(
  "networks",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    currentVersion: integer("current_version").notNull().default(1),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("networks_workspace_created").on(t.workspaceId, t.createdAt)],
);

export const networkVersions = pgTable(
  "network_versions",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    networkId: uuid("network_id")
      .notNull()
      .references(() => networks.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    /** The network description, validated by the engine's zod schema (src/engine). */
    definition: jsonb("definition").$type<Network>().notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [uniqueIndex("network_versions_network_version").on(t.networkId, t.version)],
);

/** A sweep: a grid of runs over one or two parameters, optionally each an ensemble. */
export const sweeps = pgTable(
  "sweeps",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    networkVersionId: uuid("network_version_id").references(() => networkVersions.id, { onDelete: "restrict" }),
    /** A title for lists, e.g. "conductance versus field". */
    name: text("name"),
    /** The base `{ network, computation }` every point starts from. */
    input: jsonb("input").$type<ComputeInput>().notNull(),
    axes: jsonb("axes").$type<SweepAxis[]>().notNull(),
    ensemble: jsonb("ensemble").$type<SweepEnsemble>(),
    pointCount: integer("point_count").notNull(),
    status: jobStatus("status").notNull().default("queued"),
    progress: real("progress").notNull().default(0),
    estimatedComputeSeconds: real("estimated_compute_seconds").notNull().default(0),
    computeSeconds: real("compute_seconds").notNull().default(0),
    engineVersion: text("engine_version"),
    error: jsonb("error").$type<JobError>(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    cancelRequestedAt: timestamp("cancel_requested_at", { withTimezone: true }),
  },
  (t) => [index("sweeps_workspace_created").on(t.workspaceId, t.createdAt), index("sweeps_network_version").on(t.networkVersionId)],
);

/** One computation on one network; sweep points are runs with sweep_id set. */
export const runs = pgTable(
  "runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    networkVersionId: uuid("network_version_id").references(() => networkVersions.id, { onDelete: "restrict" }),
    sweepId: uuid("sweep_id").references(() => sweeps.id, { onDelete: "cascade" }),
    sweepPointIndex: integer("sweep_point_index"),
    /** Computation kind: conductance, spectrum, dos, ldos, localization. */
    kind: text("kind").notNull(),
    /** The full `{ network, computation }` object, as the command line takes it. */
    input: jsonb("input").$type<ComputeInput | FitLedgerInput>().notNull(),
    status: jobStatus("status").notNull().default("queued"),
    progress: real("progress").notNull().default(0),
    /** Exactly the engine's result (json, not jsonb, so key order is kept as the command line prints it). */
    result: json("result").$type<NonNullable<RunDetail["result"]>>(),
    error: jsonb("error").$type<JobError>(),
    estimatedComputeSeconds: real("estimated_compute_seconds").notNull().default(0),
    computeSeconds: real("compute_seconds"),
    engineVersion: text("engine_version"),
    inputHash: text("input_hash").notNull(),
    /** The plan the run was accepted under (its price and limits); its usage-ledger row is tagged with it. */
    plan: planName("plan"),
    priority: integer("priority").notNull().default(0),
    attempts: integer("attempts").notNull().default(0),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    cancelRequestedAt: timestamp("cancel_requested_at", { withTimezone: true }),
    /** Last sign of life from the worker computing it (progress writes); recovery uses it. */
    heartbeatAt: timestamp("heartbeat_at", { withTimezone: true }),
    /** Process that last claimed it (host:pid), for operators. */
    workerId: text("worker_id"),
  },
  (t) => [
    index("runs_workspace_created").on(t.workspaceId, t.createdAt),
    index("runs_network_version").on(t.networkVersionId),
    index("runs_unfinished")
      .on(t.createdAt)
      .where(sql`status in ('queued', 'running')`),
    index("runs_workspace_status").on(t.workspaceId, t.status),
    uniqueIndex("runs_sweep_point").on(t.sweepId, t.sweepPointIndex),
  ],
);

/**
 * Usage ledger: one row per finished or cancelled run, written in the same transaction as the
 * run's result. The system of record for billing; meter events are derived from it.
 */
export const usageLedger = pgTable(
  "usage_ledger",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    userId: uuid("user_id").references(() => users.id, { onDelete: "set null" }),
    runId: uuid("run_id")
      .notNull()
      .unique()
      .references(() => runs.id, { onDelete: "restrict" }),
    computeSeconds: real("compute_seconds").notNull(),
    plan: planName("plan").notNull(),
    /** Billing period as YYYY-MM (UTC). */
    period: text("period").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("usage_ledger_workspace_period").on(t.workspaceId, t.period)],
);
