// Seed extensions: each feature exports `seed(ctx)` from a file here and adds it to this list.
import type { Db } from "../../src/server/db";
import type { users, workspaces } from "../../src/server/db/schema";
import { seed as seedBilling } from "./billing";
import { seed as seedDataset } from "./dataset";
import { seed as seedSweep } from "./sweep";

export interface SeedContext {
  db: Db;
  lab: typeof workspaces.$inferSelect;
  people: Map<string, typeof users.$inferSelect>;
  personal: Map<string, typeof workspaces.$inferSelect>;
}

const extensions: { name: string; seed: (ctx: SeedContext) => Promise<void | string> }[] = [
  { name: "payment account of the demo lab", seed: seedBilling },
  { name: "dataset LK-07 (synthetic)", seed: seedDataset },
  { name: 'sweep "Conductance versus field" (computed by the engine)', seed: seedSweep },
];

export async function runSeedExtensions(ctx: SeedContext): Promise<void> {
  for (const ext of extensions) {
    const said = await ext.seed(ctx);
    console.log(`[seed] ${ext.name}${said ? `: ${said}` : ""}`);
  }
}
