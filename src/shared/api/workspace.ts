/**
 * Workspace and members (`/api/v1/workspace`).
 *
 * WorkspaceDescription is the answer of GET /api/v1/workspace (src/server/workspaces/members.ts describeWorkspace): the
 * caller's workspace, who they are in it, and what their role allows. The server's function is
 * typed with it and the browser reads it (src/components/shell/useMe.ts), so both agree.
 */
import type { Action, Role } from "../permissions";
import type { PlanId } from "../plans";

export interface WorkspaceDescription {
  workspace: {
    id: string;
    name: string;
    slug: string;
    kind: "personal" | "lab";
    plan: PlanId;
    seats: number;
    /** Id of the organization at the sign-in service; null for a personal workspace. */
    clerkOrgId: string | null;
  };
  member: { id: string; email: string | null; name: string; role: Role; roleLabel: string };
  /** How the caller signed in: the browser session or an API token. */
  via: "session" | "token";
  /** Every action of the permissions table, and whether the caller's role allows it. */
  can: Record<Action, boolean>;
}

export interface MemberView {
  userId: string;
  name: string;
  email: string;
  role: Role;
  roleLabel: string;
  joinedAt: string;
}

export interface InvitationView {
  id: string;
  email: string;
  role: Role;
  roleLabel: string;
  status: "pending" | "accepted" | "revoked" | "expired";
  createdAt: string;
  expiresAt: string;
}

/** Seats in use: members, pending invitations, seats paid for and the plan's member limit. */
export interface SeatUse {
  members: number;
  pending: number;
  seats: number;
  limit: number;
  plan: PlanId;
}

/** GET /api/v1/workspace/members: invitations and seats only for those who manage members. */
export interface MemberList {
  members: MemberView[];
  invitations?: InvitationView[];
  seats?: SeatUse;
}

/** POST /api/v1/workspace/members (201). */
export interface InvitationSent {
  invitation: InvitationView;
  /** Whether the e-mail went out. */
  delivered: boolean;
}

/** POST /api/v1/workspace/invitations/accept. */
export interface InvitationAccepted {
  workspace: { id: string; name: string; clerkOrgId: string };
  role: Role;
}
