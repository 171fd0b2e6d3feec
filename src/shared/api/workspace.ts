/**
 * The answer of GET /api/v1/workspace (src/server/workspaces/members.ts describeWorkspace): the
 * caller's workspace, who they are in it, and what their role allows. The server's function is
 * typed with it and the browser reads it (src/components/shell/useMe.ts), so both agree.
 */
import type { Action, Role } from "./permissions";
import type { PlanId } from "./plans";

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
