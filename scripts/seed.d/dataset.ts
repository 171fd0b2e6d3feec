// Demo dataset "LK-07 magnetoconductance (synthetic)" (product.md demo scenario): the committed
// CSV made by the engine with known parameters and seeded noise (src/server/demo/lk07.csv, see
// its header), loaded into the lab workspace, marked synthetic. Idempotent (by name).
import { readFileSync } from "node:fs";
import { join } from "node:path";
import { and, eq } from "drizzle-orm";
import { datasets } from "../../src/server/db/schema";
import { insertDataset } from "../../src/server/datasets/service";
import { LK07_DESCRIPTION } from "../../src/server/demo/lk07";
import { LK07_NAME } from "../../src/shared/lk07";
import type { SeedContext } from "./index";

export const LK07_MAPPING = { xColumn: "B (T)", xUnit: "T", yColumn: "G (e2/h)", yUnit: "e2/h", sigmaColumn: "sigma (e2/h)" } as const;

export async function seed(ctx: SeedContext): Promise<void> {
  const [existing] = await ctx.db
    .select({ id: datasets.id })
    .from(datasets)
    .where(and(eq(datasets.workspaceId, ctx.lab.id), eq(datasets.name, LK07_NAME)));
  if (existing) return;
  const csv = readFileSync(join(import.meta.dirname, "..", "..", "src", "server", "demo", "lk07.csv"), "utf8");
  const researcher = ctx.people.get("researcher");
  await insertDataset(ctx.lab.id, researcher?.id ?? null, {
    name: LK07_NAME,
    csv,
    filename: "lk07.csv",
    mapping: { ...LK07_MAPPING },
    description: LK07_DESCRIPTION,
    synthetic: true,
  });
}
