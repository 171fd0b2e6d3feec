// Loads the demo scenario of product.md (invented data only) into DATABASE_URL. Idempotent:
// running it again changes nothing that exists. Writes one API token per demo member to
// DEMO_TOKENS_FILE (keys owner, billingAdmin, researcher, viewer, student) for scripts and checks.
import { existsSync, mkdirSync, readFileSync, writeFileSync } from "node:fs";
import { dirname } from "node:path";
import { and, eq } from "drizzle-orm";
import { loadEnvOrExit } from "../src/env";
import { closeDb, getDb } from "../src/server/db";
import { apiTokens, memberships, networks, networkVersions, users, workspaces } from "../src/server/db/schema";
import { DEMO_LAB, DEMO_NETWORKS, DEMO_PEOPLE, type DemoPerson } from "../src/server/demo/scenario";
import { parseNetwork } from "../src/engine";
import { displayPrefix, hashToken, newTokenSecret } from "../src/server/auth/tokens";
import type { Role } from "../src/shared/permissions";
import { runSeedExtensions } from "./seed.d/index";

loadEnvOrExit();
const db = getDb();

async function upsertUser(p: DemoPerson) {
  const [existing] = await db.select().from(users).where(eq(users.email, p.email));
  if (existing) return existing;
  const [row] = await db.insert(users).values({ email: p.email, name: p.name, clerkUserId: p.clerkUserId }).returning();
  return row;
}

async function upsertWorkspace(values: typeof workspaces.$inferInsert) {
  const [existing] = await db.select().from(workspaces).where(eq(workspaces.slug, values.slug));
  if (existing) return existing;
  const [row] = await db.insert(workspaces).values(values).returning();
  return row;
}

async function ensureMember(workspaceId: string, userId: string, role: Role) {
  await db.insert(memberships).values({ workspaceId, userId, role }).onConflictDoNothing();
}

const tokensFile = process.env.DEMO_TOKENS_FILE;
const tokens: Record<string, string> = tokensFile && existsSync(tokensFile) ? JSON.parse(readFileSync(tokensFile, "utf8")) : {};

async function ensureToken(key: string, workspaceId: string, userId: string, role: Role) {
  const secret = tokens[key];
  if (secret) {
    const [row] = await db
      .select({ id: apiTokens.id })
      .from(apiTokens)
      .where(eq(apiTokens.tokenHash, hashToken(secret)));
    if (row) return;
  }
  const fresh = newTokenSecret();
  await db.insert(apiTokens).values({ workspaceId, userId, role, name: "demo script token", tokenHash: hashToken(fresh), prefix: displayPrefix(fresh) });
  tokens[key] = fresh;
}

const people = new Map<string, typeof users.$inferSelect>();
for (const p of DEMO_PEOPLE) people.set(p.key, await upsertUser(p));

const lab = await upsertWorkspace({
  name: DEMO_LAB.name,
  slug: DEMO_LAB.slug,
  kind: "lab",
  clerkOrgId: DEMO_LAB.clerkOrgId,
  plan: DEMO_LAB.plan,
  seats: DEMO_LAB.seats,
  spendCapUsd: DEMO_LAB.spendCapUsd,
});
for (const m of DEMO_LAB.members) {
  const user = people.get(m.key)!;
  await ensureMember(lab.id, user.id, m.role);
  if (m.key !== "researcher2") await ensureToken(m.key, lab.id, user.id, m.role);
}

// Every user has a personal Free workspace; the student works only there.
const personal = new Map<string, typeof workspaces.$inferSelect>();
for (const p of DEMO_PEOPLE) {
  const user = people.get(p.key)!;
  const ws = await upsertWorkspace({ name: `${p.name} (personal)`, slug: `personal-${p.clerkUserId}`, kind: "personal", plan: "free" });
  personal.set(p.key, ws);
  await ensureMember(ws.id, user.id, "owner");
}
const student = people.get("student")!;
await ensureToken("student", personal.get("student")!.id, student.id, "owner");

const researcher = people.get("researcher")!;
for (const n of DEMO_NETWORKS) {
  const [existing] = await db
    .select()
    .from(networks)
    .where(and(eq(networks.workspaceId, lab.id), eq(networks.name, n.name)));
  if (existing) continue;
  await db.transaction(async (tx) => {
    const [net] = await tx.insert(networks).values({ workspaceId: lab.id, name: n.name, createdBy: researcher.id }).returning();
    await tx.insert(networkVersions).values({ networkId: net.id, version: 1, definition: parseNetwork(n.definition), createdBy: researcher.id });
  });
}

// Later features (sweeps, datasets, billing) add their demo rows in scripts/seed.d/.
await runSeedExtensions({ db, lab, people, personal });

if (tokensFile) {
  mkdirSync(dirname(tokensFile), { recursive: true });
  writeFileSync(tokensFile, JSON.stringify(tokens, null, 2) + "\n", { mode: 0o600 });
}
console.log(
  `[seed] demo scenario ready: ${DEMO_PEOPLE.length} people, workspace "${DEMO_LAB.name}", ` +
    `${DEMO_NETWORKS.length} networks${tokensFile ? `; tokens in ${tokensFile}` : ""}`,
);
await closeDb();
