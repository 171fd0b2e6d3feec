"use client";

import { useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { can, type Role } from "@/shared/permissions";
import type { PlanId } from "@/shared/plans";
import type { WorkspaceDescription } from "@/shared/api";

export type { Role } from "@/shared/permissions";

export interface Me {
  user: { id: string; name: string | null; email: string | null };
  workspace: { id: string; name: string; plan: PlanId };
  role: Role;
}

/**
 * Who is signed in, in which workspace, with which role: from the accounts API. The UI uses it
 * only to hide what a role cannot do; the server refuses regardless.
 */
export function useMe() {
  return useQuery({
    queryKey: qk.me,
    queryFn: async (): Promise<Me> => normaliseMe(await api("GET /api/v1/workspace")),
    staleTime: 60_000,
  });
}

/** The parts of GET /api/v1/workspace the UI shows (an empty member name reads as none). */
export function normaliseMe(d: WorkspaceDescription): Me {
  return {
    user: { id: d.member.id, name: d.member.name || null, email: d.member.email },
    workspace: { id: d.workspace.id, name: d.workspace.name, plan: d.workspace.plan },
    role: d.member.role,
  };
}

// What the UI may offer, from the permissions table the server enforces (src/shared/permissions.ts).
export const canCreate = (role?: Role) => (role ? can(role, "work.create") : false);
export const canBill = (role?: Role) => (role ? can(role, "billing.manage") : false);
export const canManageOthers = (role?: Role) => (role ? can(role, "work.manageOthers") : false);
