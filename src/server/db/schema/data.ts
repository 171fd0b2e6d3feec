import "../../server-only";
import { boolean, index, integer, jsonb, pgTable, real, text, timestamp, uuid } from "drizzle-orm/pg-core";
import type { ColumnMapping } from "@/shared/csv";
import type { DatasetPoints, DatasetXQuantity, FitIteration, FitResult, FitSettings, JobError } from "@/shared/api";
import { planName, users, workspaces } from "./accounts";
import { jobStatus, runs } from "./compute";

/**
 * Dataset: an uploaded measurement (CSV) with its column mapping and units. The original file is
 * kept byte for byte (as text; CSVs are text) next to the parsed curve in the engine's units.
 */
export const datasets = pgTable(
  "datasets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    name: text("name").notNull(),
    /** Made by the model, not measured (the demo dataset): shown with a mark everywhere. */
    synthetic: boolean("synthetic").notNull().default(false),
    description: text("description"),
    originalFilename: text("original_filename"),
    originalCsv: text("original_csv").notNull(),
    originalBytes: integer("original_bytes").notNull(),
    /** sha256 of the original file (hex). */
    dataHash: text("data_hash").notNull(),
    /** { xColumn, xUnit, yColumn, yUnit, sigmaColumn?, temperatureColumn? } as uploaded. */
    mapping: jsonb("mapping").$type<ColumnMapping>().notNull(),
    /** field | gateVoltage | density */
    xQuantity: text("x_quantity").$type<DatasetXQuantity>().notNull(),
    /** Unit of the stored x: T, V or m^-2. y is always conductance in e2/h. */
    xUnit: text("x_unit").notNull(),
    /** { x: number[], y: number[], sigma: number[] | null, temperatureK: number[] | null } */
    points: jsonb("points").$type<DatasetPoints>().notNull(),
    rows: integer("rows").notNull(),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
  },
  (t) => [index("datasets_workspace_created").on(t.workspaceId, t.createdAt)],
);

/**
 * Fit: model parameters adjusted to a dataset, run as a job on the `fits` queue. Its compute is
 * metered through a companion row in `runs` (kind "fit", run_id here), so the usage ledger's one
 * row per run is also exactly one row per fit.
 */
export const fits = pgTable(
  "fits",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    workspaceId: uuid("workspace_id")
      .notNull()
      .references(() => workspaces.id, { onDelete: "cascade" }),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    datasetId: uuid("dataset_id")
      .notNull()
      .references(() => datasets.id, { onDelete: "restrict" }),
    runId: uuid("run_id").references(() => runs.id, { onDelete: "set null" }),
    /** { network, computation, sweepParameter, fit, options } after validation. */
    input: jsonb("input").$type<FitSettings>().notNull(),
    status: jobStatus("status").notNull().default("queued"),
    progress: real("progress").notNull().default(0),
    /** Latest iteration report { start, iteration, chi2, values }. */
    lastIteration: jsonb("last_iteration").$type<FitIteration>(),
    result: jsonb("result").$type<FitResult>(),
    error: jsonb("error").$type<JobError>(),
    estimatedComputeSeconds: real("estimated_compute_seconds").notNull().default(0),
    computeSeconds: real("compute_seconds"),
    engineVersion: text("engine_version"),
    /** The plan the fit was accepted under; its companion run and ledger row carry it. */
    plan: planName("plan"),
    inputHash: text("input_hash").notNull(),
    dataHash: text("data_hash").notNull(),
    attempts: integer("attempts").notNull().default(0),
    createdAt: timestamp("created_at", { withTimezone: true }).notNull().defaultNow(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
    cancelRequestedAt: timestamp("cancel_requested_at", { withTimezone: true }),
  },
  (t) => [index("fits_workspace_created").on(t.workspaceId, t.createdAt), index("fits_dataset").on(t.datasetId)],
);
