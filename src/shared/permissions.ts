/**
 * Who may do what (product.md, "Roles"): the one table every route and server action consults
 * (src/server/auth: requirePermission) and the browser reads too (src/components/shell/useMe.ts).
 * The interface disables or hides what a role cannot do and shows `refusalReason`, the very
 * sentence the API answers a 403 with; the server refuses it regardless.
 */
export const ROLES = ["owner", "billing_admin", "researcher", "viewer"] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  owner: "Owner",
  billing_admin: "Billing admin",
  researcher: "Researcher",
  viewer: "Viewer",
};

export const ACTIONS = [
  "results.view", // see networks, runs, sweeps, datasets, fits and their results
  "work.create", // create networks, runs, sweeps, datasets, fits
  "work.manageOthers", // cancel or delete another member's runs, sweeps, networks
  "members.manage", // invite or remove members, change roles
  "members.seats", // invite or remove Researchers and Viewers (a Billing admin fills and frees seats)
  "seats.manage", // change the number of seats
  "billing.manage", // plan, payment, spend cap, invoices
  "usage.view", // the group's compute use this period (totals, quota, cap) and one's own
  "usage.members", // compute use per member
  "tokens.own", // create and revoke one's own API tokens
] as const;
export type Action = (typeof ACTIONS)[number];

const TABLE: Record<Action, readonly Role[]> = {
  "results.view": ["owner", "billing_admin", "researcher", "viewer"],
  "work.create": ["owner", "researcher"],
  "work.manageOthers": ["owner"],
  "members.manage": ["owner"],
  "members.seats": ["owner", "billing_admin"],
  "seats.manage": ["owner", "billing_admin"],
  "billing.manage": ["owner", "billing_admin"],
  "usage.view": ["owner", "billing_admin", "researcher"],
  "usage.members": ["owner", "billing_admin"],
  "tokens.own": ["owner", "billing_admin", "researcher", "viewer"],
};

export function can(role: Role, action: Action): boolean {
  return TABLE[action].includes(role);
}

/** Roles a member may give to a token: no higher than their own (viewers: read-only tokens). */
const RANK: Record<Role, number> = { viewer: 0, billing_admin: 1, researcher: 1, owner: 2 };
export function tokenRolesFor(role: Role): Role[] {
  if (role === "owner") return [...ROLES];
  return ROLES.filter((r) => r === role || r === "viewer");
}

/** The roles a Billing admin fills and frees seats with (action `members.seats`): they invite and remove these only. */
export const SEAT_ROLES: readonly Role[] = ["researcher", "viewer"];

/** Roles a member may invite, remove or revoke invitations for: Owners any, Billing admins SEAT_ROLES, others none. */
export function memberRolesFor(role: Role): Role[] {
  if (can(role, "members.manage")) return [...ROLES];
  if (can(role, "members.seats")) return [...SEAT_ROLES];
  return [];
}

/** The lesser of two roles (a token can never do more than its member). */
export function lesserRole(a: Role, b: Role): Role {
  if (a === b) return a;
  if (RANK[a] !== RANK[b]) return RANK[a] < RANK[b] ? a : b;
  // researcher vs billing_admin: incomparable; the intersection of their rights is a viewer's.
  return "viewer";
}

export function describeAction(action: Action): string {
  const words: Record<Action, string> = {
    "results.view": "see this group's work",
    "work.create": "create networks, calculations, scans, datasets or fits",
    "work.manageOthers": "cancel or delete another member's work",
    "members.manage": "invite or remove members or change roles",
    "members.seats": "invite or remove Researchers and Viewers",
    "seats.manage": "change seats",
    "billing.manage": "change the plan, payment, spend cap or read invoices",
    "usage.view": "see this group's billing and compute use",
    "usage.members": "see every member's compute use",
    "tokens.own": "manage API tokens",
  };
  return words[action];
}

export function rolesAllowed(action: Action): readonly Role[] {
  return TABLE[action];
}

/**
 * Why this role may not do this action, in words, or null when it may. The API's 403 message
 * (src/server/auth: requirePermission) and the reason the interface shows beside a disabled
 * control are this one sentence.
 */
export function refusalReason(role: Role, action: Action): string | null {
  if (can(role, action)) return null;
  const allowed = rolesAllowed(action).map((r) => ROLE_LABELS[r]);
  const list = allowed.length > 1 ? `${allowed.slice(0, -1).join(", ")} or ${allowed[allowed.length - 1]}` : allowed[0];
  return `Your role (${ROLE_LABELS[role]}) cannot ${describeAction(action)}; ask the group's Owner if you need to (allowed: ${list}).`;
}
