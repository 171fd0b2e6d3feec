/**
 * Mapping between Clerk organization roles and Triskel roles (docs/accounts.md). Create these
 * four roles in the Clerk dashboard (Organizations → Roles) with exactly these keys.
 * Clerk's built-in `org:admin` and `org:member` are understood too (as Owner and Viewer), so an
 * instance that still has the defaults works, with the least rights for plain members.
 */
import type { Role } from "@/shared/permissions";

export const CLERK_ROLE_FOR: Record<Role, string> = {
  owner: "org:owner",
  billing_admin: "org:billing_admin",
  researcher: "org:researcher",
  viewer: "org:viewer",
};

const FROM_CLERK: Record<string, Role> = {
  "org:owner": "owner",
  "org:admin": "owner",
  "org:billing_admin": "billing_admin",
  "org:researcher": "researcher",
  "org:viewer": "viewer",
  "org:member": "viewer",
};

/** Triskel role of a Clerk organization role; unknown custom roles get the Viewer's rights. */
export function roleFromClerk(clerkRole: string | null | undefined): Role {
  if (!clerkRole) return "viewer";
  const key = clerkRole.startsWith("org:") ? clerkRole : `org:${clerkRole}`;
  return FROM_CLERK[key] ?? "viewer";
}
