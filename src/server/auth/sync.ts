/**
 * The PostgreSQL mirror of Clerk's users, organizations and memberships (our foreign keys point
 * at it). Kept current two ways: Clerk webhooks (src/app/api/webhooks/clerk) and this lazy sync,
 * which fills in whatever is missing on a signed-in user's first request.
 */
import "@/server/server-only";
import { and, eq } from "drizzle-orm";
import { getDb } from "@/server/db";
import { memberships, users, workspaces } from "@/server/db/schema";
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

/** Insert or update the user by Clerk id (or link an existing row with the same e-mail). */
export async function upsertUser(facts: ClerkUserFacts): Promise<UserRow> {
  const db = getDb();
  const email = facts.email.trim().toLowerCase();
  const [byClerk] = await db.select().from(users).where(eq(users.clerkUserId, facts.clerkUserId));
  if (byClerk) {
    if (byClerk.email !== email || (facts.name && byClerk.name !== facts.name)) {
      const [row] = await db
        .update(users)
        .set({ email, name: facts.name || byClerk.name, updatedAt: new Date() })
        .where(eq(users.id, byClerk.id))
        .returning();
      return row;
    }
    return byClerk;
  }
  const [row] = await db
    .insert(users)
    .values({ clerkUserId: facts.clerkUserId, email, name: facts.name })
    .onConflictDoUpdate({ target: users.email, set: { clerkUserId: facts.clerkUserId, updatedAt: new Date() } })
    .returning();
  return row;
}

/** Every user has a personal workspace on the Free plan, where they are the Owner. */
export async function ensurePersonalWorkspace(user: UserRow): Promise<WorkspaceRow> {
  const db = getDb();
  const slug = personalSlug(user.clerkUserId ?? user.id);
  let [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
  if (!ws) {
    [ws] = await db
      .insert(workspaces)
      .values({ name: `${user.name || user.email} (personal)`, slug, kind: "personal", plan: "free" })
      .onConflictDoNothing({ target: workspaces.slug })
      .returning();
    if (!ws) [ws] = await db.select().from(workspaces).where(eq(workspaces.slug, slug));
  }
  await db.insert(memberships).values({ workspaceId: ws.id, userId: user.id, role: "owner" }).onConflictDoNothing();
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
  if (row) return row;
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
