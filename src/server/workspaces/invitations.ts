/**
 * Invitations by e-mail: an Owner (or a Billing admin, for Researcher and Viewer seats) invites;
 * the invitee opens the link, signs in or signs up with that address, accepts, and becomes a
 * member of the workspace's Clerk organization with the role given (and of our mirror).
 */
import "@/server/server-only";
import { createHash, randomBytes } from "node:crypto";
import { and, desc, eq, gt, isNull } from "drizzle-orm";
import { clerkClient } from "@clerk/nextjs/server";
import { env } from "@/env";
import type { Caller } from "@/server/auth";
import { CLERK_ROLE_FOR } from "@/server/auth/roles";
import { membershipRole, setMembership } from "@/server/auth/sync";
import { getDb } from "@/server/db";
import { invitations, users, workspaces } from "@/server/db/schema";
import { ApiError } from "@/server/http/errors";
import { sendMail } from "@/server/mail";
import { invitationMail } from "@/server/mail/invitation";
import { ROLE_LABELS, type Role } from "@/shared/permissions";
import { PLANS } from "@/shared/plans";
import { requireMemberChange, seatUse, workspaceOf } from "./members";
import type { InvitationAccepted, InvitationView } from "@/shared/api";
export type { InvitationView };

const SECRET_PREFIX = "inv_";
const hashSecret = (s: string) => createHash("sha256").update(s, "utf8").digest("hex");

function statusOf(row: typeof invitations.$inferSelect): InvitationView["status"] {
  if (row.acceptedAt) return "accepted";
  if (row.revokedAt) return "revoked";
  if (row.expiresAt.getTime() <= Date.now()) return "expired";
  return "pending";
}

function view(row: typeof invitations.$inferSelect): InvitationView {
  return {
    id: row.id,
    email: row.email,
    role: row.role,
    roleLabel: ROLE_LABELS[row.role],
    status: statusOf(row),
    createdAt: row.createdAt.toISOString(),
    expiresAt: row.expiresAt.toISOString(),
  };
}

export async function listInvitations(caller: Caller): Promise<InvitationView[]> {
  requireMemberChange(caller, "viewer");
  const rows = await getDb().select().from(invitations).where(eq(invitations.workspaceId, caller.workspaceId)).orderBy(desc(invitations.createdAt)).limit(200);
  return rows.map(view);
}

export async function invite(caller: Caller, input: { email: string; role: Role }): Promise<{ invitation: InvitationView; delivered: boolean }> {
  requireMemberChange(caller, input.role);
  const ws = await workspaceOf(caller);
  const email = input.email.trim().toLowerCase();
  if (ws.kind === "personal" || !ws.clerkOrgId)
    throw new ApiError("conflict", "A personal group has a single member; invite people to a lab's group instead.", { field: "workspace" });
  const db = getDb();
  const [already] = await db.select({ id: users.id }).from(users).where(eq(users.email, email));
  if (already && (await membershipRole(ws.id, already.id))) throw new ApiError("conflict", `${email} is already a member of ${ws.name}.`, { field: "email" });
  const secret = SECRET_PREFIX + randomBytes(24).toString("base64url");
  const expiresAt = new Date(Date.now() + env().INVITATION_TTL_DAYS * 24 * 3600 * 1000);
  // The seat check and the insert in one transaction with the workspace row locked: two
  // invitations at once cannot both take the last seat, nor race a seat change.
  const row = await db.transaction(async (tx) => {
    // One open invitation per address: a new one replaces the old link (and its seat).
    await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.workspaceId, ws.id), eq(invitations.email, email), isNull(invitations.acceptedAt), isNull(invitations.revokedAt)));
    const seats = await seatUse(ws.id, tx, { lock: true });
    const taken = seats.members + seats.pending;
    if (seats.plan === "free" && taken >= seats.limit)
      throw new ApiError("payment_required", `The Free plan allows ${seats.limit} member; move this group to the Lab plan to invite people.`, seats);
    if (taken >= seats.limit)
      throw new ApiError(
        "payment_required",
        `All ${seats.seats} seats of ${ws.name} are taken (${seats.members} members, ${seats.pending} open invitations). ` +
          `An Owner or Billing admin adds a seat on the Billing page (${PLANS.lab.seatPriceUsdPerMonth} USD per seat per month, prorated; ` +
          `PUT /api/v1/billing/seats), or revokes an open invitation; then invite again.`,
        { ...seats, reason: "seats_full", addSeat: "PUT /api/v1/billing/seats" },
      );
    const [inserted] = await tx
      .insert(invitations)
      .values({ workspaceId: ws.id, email, role: input.role, invitedBy: caller.userId, secretHash: hashSecret(secret), expiresAt })
      .returning();
    return inserted;
  });
  const [inviter] = await db.select({ name: users.name, email: users.email }).from(users).where(eq(users.id, caller.userId));
  const link = `${env().APP_URL.replace(/\/$/, "")}/accept-invitation?token=${encodeURIComponent(secret)}`;
  await sendMail(
    invitationMail({
      to: email,
      inviterName: inviter?.name || inviter?.email || "A colleague",
      workspaceName: ws.name,
      roleLabel: ROLE_LABELS[input.role],
      link,
      expiresAt,
    }),
  );
  return { invitation: view(row), delivered: true };
}

export async function revokeInvitation(caller: Caller, id: string): Promise<InvitationView> {
  const db = getDb();
  const [row] = await db
    .select()
    .from(invitations)
    .where(and(eq(invitations.id, id), eq(invitations.workspaceId, caller.workspaceId)));
  if (!row) throw new ApiError("not_found", `No invitation with id ${id} in this group.`);
  requireMemberChange(caller, row.role);
  if (row.acceptedAt) throw new ApiError("conflict", "This invitation was already accepted; remove the member instead.");
  const [updated] = await db
    .update(invitations)
    .set({ revokedAt: row.revokedAt ?? new Date() })
    .where(eq(invitations.id, id))
    .returning();
  return view(updated);
}

/** What the accept page shows before anyone signs in (no secrets, no member list). */
export async function previewInvitation(secret: string) {
  const row = await findBySecret(secret);
  if (!row) return null;
  const [ws] = await getDb().select({ name: workspaces.name }).from(workspaces).where(eq(workspaces.id, row.workspaceId));
  return { email: row.email, role: row.role, roleLabel: ROLE_LABELS[row.role], workspaceName: ws?.name ?? "", status: statusOf(row) };
}

async function findBySecret(secret: string) {
  if (!secret.startsWith(SECRET_PREFIX) || secret.length > 200) return undefined;
  const [row] = await getDb()
    .select()
    .from(invitations)
    .where(eq(invitations.secretHash, hashSecret(secret)));
  return row;
}

/**
 * The signed-in user accepts: the invitation must be pending and addressed to their e-mail.
 * Returns the Clerk organization id, so the browser can make it the session's active one.
 */
export async function acceptInvitation(user: { userId: string }, secret: string): Promise<InvitationAccepted> {
  const db = getDb();
  const row = await findBySecret(secret);
  if (!row) throw new ApiError("not_found", "This invitation link is not valid; ask for a new invitation.", { field: "token" });
  const status = statusOf(row);
  if (status !== "pending") throw new ApiError("conflict", `This invitation is ${status}; ask the group's Owner for a new one.`, { status });
  const [me] = await db.select().from(users).where(eq(users.id, user.userId));
  if (!me || me.email.toLowerCase() !== row.email.toLowerCase())
    throw new ApiError("forbidden", `This invitation is for ${row.email}; sign in with that address to accept it.`, { field: "email" });
  const [ws] = await db.select().from(workspaces).where(eq(workspaces.id, row.workspaceId));
  if (!ws?.clerkOrgId || !me.clerkUserId) throw new ApiError("conflict", "This group cannot take members right now.");
  const clerk = await clerkClient();
  try {
    await clerk.organizations.createOrganizationMembership({ organizationId: ws.clerkOrgId, userId: me.clerkUserId, role: CLERK_ROLE_FOR[row.role] });
  } catch (err) {
    const code = (err as { errors?: { code?: string }[] }).errors?.[0]?.code;
    if (code !== "already_a_member_in_organization") throw err;
    await clerk.organizations.updateOrganizationMembership({ organizationId: ws.clerkOrgId, userId: me.clerkUserId, role: CLERK_ROLE_FOR[row.role] });
  }
  await setMembership(ws.id, me.id, row.role);
  // Mark used only if still pending (two tabs accepting at once: the second one sees "accepted").
  await db
    .update(invitations)
    .set({ acceptedAt: new Date(), acceptedBy: me.id })
    .where(and(eq(invitations.id, row.id), isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date())));
  return { workspace: { id: ws.id, name: ws.name, clerkOrgId: ws.clerkOrgId }, role: row.role };
}
