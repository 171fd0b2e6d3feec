// Seed extensions: each feature exports `seed(ctx)` from a file here and adds it to this list.
import type { Db } from "../../src/server/db";
import type { users, workspaces } from "../../src/server/db/schema";

export interface SeedContext {
  db: Db;
  lab: typeof workspaces.$inferSelect;
  people: Map<string, typeof users.$inferSelect>;
  personal: Map<string, typeof workspaces.$inferSelect>;
}

const extensions: { name: string; seed: (ctx: SeedContext) => Promise<void> }[] = [];

export async function runSeedExtensions(ctx: SeedContext): Promise<void> {
  for (const ext of extensions) {
    await ext.seed(ctx);
    console.log(`[seed] ${ext.name}`);
  }
}
