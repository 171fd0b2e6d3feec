/**
 * A browser session (Clerk, through @clerk/nextjs) as a Caller. The active organization of the
 * session picks the workspace (by clerk_org_id); no organization means the personal workspace.
 * Whatever the mirror lacks is fetched from Clerk's Backend API once (lazy sync).
 */
import "@/server/server-only";
import { auth, clerkClient } from "@clerk/nextjs/server";
import { ApiError } from "@/server/http/errors";
import {
  ensurePersonalWorkspace,
  membershipRole,
  nameOf,
  setMembership,
  upsertOrgWorkspace,
  upsertUser,
  userByClerkId,
  workspaceByClerkOrg,
  type UserRow,
} from "./sync";
import type { Caller } from "./index";
import { roleFromClerk } from "./roles";
import { effectivePlan } from "@/shared/plans";

export interface SessionFacts {
  clerkUserId: string;
  clerkOrgId: string | null;
}

/** The signed-in session of this request, or null (signed out). Needs clerkMiddleware (src/proxy.ts). */
export async function sessionFacts(): Promise<SessionFacts | null> {
  const a = await auth();
  if (!a.userId) return null;
  return { clerkUserId: a.userId, clerkOrgId: a.orgId ?? null };
}

export async function resolveSession(): Promise<Caller | null> {
  const facts = await sessionFacts();
  return facts ? callerForSession(facts) : null;
}

async function ensureUserMirrored(clerkUserId: string): Promise<UserRow> {
  const known = await userByClerkId(clerkUserId);
  if (known) return known;
  const clerk = await clerkClient();
  const u = await clerk.users.getUser(clerkUserId);
  const email = u.emailAddresses.find((e) => e.id === u.primaryEmailAddressId)?.emailAddress ?? u.emailAddresses[0]?.emailAddress;
  if (!email) throw new ApiError("forbidden", "Your account has no e-mail address; add one to use Triskel.");
  const { user: row } = await upsertUser({ clerkUserId, email, name: nameOf(u.firstName, u.lastName) });
  // Linked by Clerk user id only: an address already on another row never takes that row over.
  if (!row)
    throw new ApiError(
      "conflict",
      `The e-mail address ${email} already belongs to another Triskel account, which stays with its owner; ` +
        "sign in with that account, or ask support to move it.",
    );
  await ensurePersonalWorkspace(row);
  return row;
}

export async function callerForSession(facts: SessionFacts): Promise<Caller> {
  const user = await ensureUserMirrored(facts.clerkUserId);
  if (!facts.clerkOrgId) {
    const ws = await ensurePersonalWorkspace(user);
    return { userId: user.id, workspaceId: ws.id, role: "owner", plan: effectivePlan(ws.plan, ws.planState), via: "session" };
  }
  let ws = await workspaceByClerkOrg(facts.clerkOrgId);
  let role = ws ? await membershipRole(ws.id, user.id) : null;
  if (!ws || !role) {
    // Not mirrored yet: ask Clerk whether this user really is a member (a stale token must not
    // bring back a membership that was removed).
    const clerk = await clerkClient();
    const list = await clerk.users.getOrganizationMembershipList({ userId: facts.clerkUserId, limit: 100 });
    const m = list.data.find((x) => x.organization.id === facts.clerkOrgId);
    if (!m) throw new ApiError("forbidden", "You are not a member of the group this session has selected; switch group or ask its Owner for an invitation.");
    ws = ws ?? (await upsertOrgWorkspace({ clerkOrgId: m.organization.id, name: m.organization.name, slug: m.organization.slug ?? "" }));
    role = roleFromClerk(m.role);
    await setMembership(ws.id, user.id, role);
  }
  return { userId: user.id, workspaceId: ws.id, role, plan: effectivePlan(ws.plan, ws.planState), via: "session" };
}
