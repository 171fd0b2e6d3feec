/**
 * Members of the caller's workspace: list, change role, remove (product.md, Roles). Clerk is the
 * system of record for organization memberships, so changes go to Clerk first, then the mirror.
 * Owners manage everyone; a Billing admin may only fill and free seats (Researchers, Viewers).
 */
import "@/server/server-only";
import { and, asc, eq, isNull, gt, sql } from "drizzle-orm";
import { clerkClient } from "@clerk/nextjs/server";
import { PLANS } from "@/shared/plans";
import { can, requirePermission, type Caller } from "@/server/auth";
import { CLERK_ROLE_FOR } from "@/server/auth/roles";
import { getDb, type Executor } from "@/server/db";
import { invitations, memberships, users, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { ACTIONS, ROLE_LABELS, ROLES, SEAT_ROLES, rolesAllowed, type Action, type Role } from "@/shared/permissions";
import type { WorkspaceDescription } from "@/shared/api";
import type { MemberView, SeatUse } from "@/shared/api";
export type { MemberView };

export async function workspaceOf(caller: Caller) {
  const [ws] = await getDb().select().from(workspaces).where(eq(workspaces.id, caller.workspaceId));
  if (!ws) throw new ApiError("not_found", "Your group no longer exists.");
  return ws;
}

export async function describeWorkspace(caller: Caller): Promise<WorkspaceDescription> {
  const ws = await workspaceOf(caller);
  const [me] = await getDb().select({ email: users.email, name: users.name, clerkUserId: users.clerkUserId }).from(users).where(eq(users.id, caller.userId));
  const actions = Object.fromEntries(ACTIONS.map((a) => [a, can(caller.role, a)])) as Record<Action, boolean>;
  return {
    workspace: { id: ws.id, name: ws.name, slug: ws.slug, kind: ws.kind, plan: ws.plan, seats: ws.seats, clerkOrgId: ws.clerkOrgId },
    member: { id: caller.userId, email: me?.email ?? null, name: me?.name ?? "", role: caller.role, roleLabel: ROLE_LABELS[caller.role] },
    via: caller.via,
    can: actions,
  };
}

export async function listMembers(caller: Caller): Promise<MemberView[]> {
  requirePermission(caller, "results.view");
  const rows = await getDb()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, caller.workspaceId))
    .orderBy(asc(memberships.createdAt), asc(users.email));
  return rows.map((r) => ({ ...r, roleLabel: ROLE_LABELS[r.role], joinedAt: r.joinedAt.toISOString() }));
}

/** Owners may do anything to members; a Billing admin only with Researcher and Viewer seats. */
export function requireMemberChange(caller: Caller, ...roles: Role[]): void {
  if (can(caller.role, "members.manage")) return;
  requirePermission(caller, "members.seats");
  const outside = roles.find((r) => !SEAT_ROLES.includes(r));
  if (outside) {
    throw new ApiError(
      "forbidden",
      `Your role (${ROLE_LABELS[caller.role]}) may invite or remove Researchers and Viewers only, not ${ROLE_LABELS[outside]}s; ask an Owner.`,
      {
        action: "members.manage",
        role: caller.role,
        allowed: rolesAllowed("members.manage"),
      },
    );
  }
}

async function memberRow(workspaceId: string, userId: string) {
  const [row] = await getDb()
    .select({ role: memberships.role, clerkUserId: users.clerkUserId, email: users.email })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId)));
  // Another workspace's member and a stranger look the same: not found.
  if (!row) throw new ApiError("not_found", `No member with id ${userId} in this group.`);
  return row;
}

async function ownerCount(workspaceId: string): Promise<number> {
  const [{ n }] = await getDb()
    .select({ n: sql<number>`count(*)::int` })
    .from(memberships)
    .where(and(eq(memberships.workspaceId, workspaceId), eq(memberships.role, "owner")));
  return n;
}

export async function changeRole(caller: Caller, userId: string, role: Role): Promise<MemberView> {
  requirePermission(caller, "members.manage");
  const ws = await workspaceOf(caller);
  const m = await memberRow(ws.id, userId);
  if (ws.kind === "personal") throw new ApiError("conflict", "A personal group has one member, its Owner; roles cannot change.");
  if (m.role === "owner" && role !== "owner" && (await ownerCount(ws.id)) <= 1)
    throw new ApiError("conflict", "This is the group's only Owner; make another member Owner first.");
  if (m.role !== role) {
    if (ws.clerkOrgId && m.clerkUserId) {
      const clerk = await clerkClient();
      await clerk.organizations.updateOrganizationMembership({ organizationId: ws.clerkOrgId, userId: m.clerkUserId, role: CLERK_ROLE_FOR[role] });
    }
    await getDb()
      .update(memberships)
      .set({ role })
      .where(and(eq(memberships.workspaceId, ws.id), eq(memberships.userId, userId)));
  }
  const all = await listMembers(caller);
  return all.find((x) => x.userId === userId)!;
}

export async function removeMember(caller: Caller, userId: string): Promise<void> {
  const ws = await workspaceOf(caller);
  const m = await memberRow(ws.id, userId);
  requireMemberChange(caller, m.role);
  if (ws.kind === "personal") throw new ApiError("conflict", "A personal group cannot lose its Owner.");
  if (m.role === "owner" && (await ownerCount(ws.id)) <= 1) throw new ApiError("conflict", "This is the group's only Owner; it cannot be removed.");
  if (ws.clerkOrgId && m.clerkUserId) {
    const clerk = await clerkClient();
    try {
      await clerk.organizations.deleteOrganizationMembership({ organizationId: ws.clerkOrgId, userId: m.clerkUserId });
    } catch (err) {
      if ((err as { status?: number }).status !== 404) throw err;
    }
  }
  await getDb()
    .delete(memberships)
    .where(and(eq(memberships.workspaceId, ws.id), eq(memberships.userId, userId)));
}

/**
 * Members plus open invitations against the plan's member limit (Free: 1; Lab: seats bought). An
 * open invitation holds a seat until it is accepted, revoked or expires. With `lock`, the
 * workspace row is locked first (inside a transaction), so two invitations or an invitation and a
 * seat change cannot both take the last seat.
 */
export async function seatUse(workspaceId: string, db: Executor = getDb(), opts: { lock?: boolean } = {}): Promise<SeatUse> {
  if (opts.lock) await db.execute(sql`select 1 from workspaces where id = ${workspaceId} for update`);
  const [ws] = await db.select({ plan: workspaces.plan, seats: workspaces.seats }).from(workspaces).where(eq(workspaces.id, workspaceId));
  if (!ws) throw new ApiError("not_found", "Group not found.");
  const [{ members }] = await db
    .select({ members: sql<number>`count(*)::int` })
    .from(memberships)
    .where(eq(memberships.workspaceId, workspaceId));
  const [{ pending }] = await db
    .select({ pending: sql<number>`count(*)::int` })
    .from(invitations)
    .where(and(eq(invitations.workspaceId, workspaceId), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())));
  const limit = PLANS[ws.plan].maxMembers ?? ws.seats;
  return { members, pending, seats: ws.seats, limit, plan: ws.plan };
}

export const ROLE_CHOICES = ROLES;
