/**
 * The PostgreSQL mirror of Clerk's users, organizations and memberships (our foreign keys point
 * at it). Kept current two ways: Clerk webhooks (src/app/api/webhooks/clerk) and this lazy sync,
 * which fills in whatever is missing on a signed-in user's first request.
 */
import "@/server/server-only";
import { and, eq } from "drizzle-orm";
import { getDb } from "@/server/db";
import { memberships, users, workspaces } from "@/server/db/schema";
import { addExampleNetwork } from "@/server/onboarding/example-network";
import type { Role } from "@/shared/permissions";

export type UserRow = typeof users.$inferSelect;
export type WorkspaceRow = typeof workspaces.$inferSelect;

export interface ClerkUserFacts {
  clerkUserId: string;
  email: string;
  name: string;
}
export interface ClerkOrgFacts {
  clerkOrgId: string;
  name: string;
  slug: string;
}

export const personalSlug = (clerkUserId: string) => `personal-${clerkUserId}`;

/**
 * The outcome of mirroring a Clerk user. `conflict`: the e-mail address belongs to another row
 * (another Clerk user, or a row no Clerk user was ever linked to); that row is left alone.
 */
export type UpsertUserResult = { user: UserRow; emailTaken: boolean } | { user: null; emailTaken: true };

/**
 * Insert or update the user by Clerk user id, the only link between a Clerk user and our row.
 * An e-mail address never links: a new Clerk id whose address is already on another row gets
 * no row (the existing row, its memberships and its work stay with whoever has them), and a
 * known Clerk user whose new address is taken keeps its old one.
 */
export async function upsertUser(facts: ClerkUserFacts): Promise<UpsertUserResult> {
  const db = getDb();
  const email = facts.email.trim().toLowerCase();
  const byClerk = await userByClerkId(facts.clerkUserId);
  if (byClerk) {
    const name = facts.name || byClerk.name;
    if (byClerk.email === email && byClerk.name === name) return { user: byClerk, emailTaken: false };
    const [holder] = byClerk.email === email ? [] : await db.select({ id: users.id }).from(users).where(eq(users.email, email));
    const emailTaken = Boolean(holder && holder.id !== byClerk.id);
    const [row] = await db
      .update(users)
      .set({ ...(emailTaken ? {} : { email }), name, updatedAt: new Date() })
      .where(eq(users.id, byClerk.id))
      .returning();
    return { user: row, emailTaken };
  }
  // Both the Clerk id and the e-mail are unique: a row is inserted only when neither is taken.
  const [row] = await db.insert(users).values({ clerkUserId: facts.clerkUserId, email, name: facts.name }).onConflictDoNothing().returning();
  if (row) return { user: row, emailTaken: false };
  // A concurrent insert for the same Clerk user (webhook and lazy sync at once) is that user.
  const again = await userByClerkId(facts.clerkUserId);
  return again ? { user: again, emailTaken: false } : { user: null, emailTaken: true };
}

/** Every user has a personal workspace on the Free plan, where they are the Owner. */
export async function ensurePersonalWorkspace(user: UserRow): Promise<WorkspaceRow> {
  const db = getDb();
  const slug = personalSlug(user.clerkUserId ?? user.id);
  let [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
  let created = false;
  if (!ws) {
    [ws] = await db
      .insert(workspaces)
      .values({ name: `${user.name || user.email} (personal)`, slug, kind: "personal", plan: "free" })
      .onConflictDoNothing({ target: workspaces.slug })
      .returning();
    created = Boolean(ws);
    if (!ws) [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
  }
  await db.insert(memberships).values({ workspaceId: ws.id, userId: user.id, role: "owner" }).onConflictDoNothing();
  // A new group starts with its example network (only the request that created the row adds it).
  if (created) await addExampleNetwork(ws.id, user.id);
  return ws;
}

export async function upsertOrgWorkspace(facts: ClerkOrgFacts): Promise<WorkspaceRow> {
  const db = getDb();
  const [existing] = await db.select().from(workspaces).where(eq(workspaces.clerkOrgId, facts.clerkOrgId));
  if (existing) {
    if (existing.name !== facts.name) {
      const [row] = await db.update(workspaces).set({ name: facts.name, updatedAt: new Date() }).where(eq(workspaces.id, existing.id)).returning();
      return row;
    }
    return existing;
  }
  // The slug is ours and unique; an organization's slug may collide with a personal one.
  let slug = facts.slug || facts.clerkOrgId.toLowerCase();
  const [taken] = await db.select({ id: workspaces.id }).from(workspaces).where(eq(workspaces.slug, slug));
  if (taken) slug = `${slug}-${facts.clerkOrgId.slice(-6).toLowerCase()}`;
  const [row] = await db
    .insert(workspaces)
    .values({ name: facts.name, slug, kind: "lab", clerkOrgId: facts.clerkOrgId, plan: "free" })
    .onConflictDoNothing()
    .returning();
  if (row) {
    await addExampleNetwork(row.id, null);
    return row;
  }
  const [again] = await db.select().from(workspaces).where(eq(workspaces.clerkOrgId, facts.clerkOrgId));
  return again;
}

export async function setMembership(workspaceId: string, userId: string, role: Role): Promise<void> {
  await getDb()
    .insert(memberships)
    .values({ workspaceId, userId, role })
    .onConflictDoUpdate({ target: [memberships.workspaceId, memberships.userId], set: { role } });
}

export async function removeMembership(workspaceId: string, userId: string): Promise<void> {
  await getDb()
    .delete(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)));
}

export async function membershipRole(workspaceId: string, userId: string): Promise<Role | null> {
  const [row] = await getDb()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)));
  return row?.role ?? null;
}

export async function userByClerkId(clerkUserId: string): Promise<UserRow | undefined> {
  const [row] = await getDb().select().from(users).where(eq(users.clerkUserId, clerkUserId));
  return row;
}

export async function workspaceByClerkOrg(clerkOrgId: string): Promise<WorkspaceRow | undefined> {
  const [row] = await getDb().select().from(workspaces).where(eq(workspaces.clerkOrgId, clerkOrgId));
  return row;
}

export function nameOf(first: string | null | undefined, last: string | null | undefined): string {
  return [first, last].filter(Boolean).join(" ").trim();
}
