"use client";

import { useQuery } from "@tanstack/react-query";
import { apiFetch } from "@/lib/api";
import { qk } from "@/lib/queryKeys";

export type Role = "owner" | "billing_admin" | "researcher" | "viewer";

export interface Me {
  user?: { id?: string; name?: string | null; email?: string | null };
  workspace?: { id: string; name: string; plan?: "free" | "lab" };
  role?: Role;
  workspaces?: { id: string; name: string; role?: Role; plan?: string }[];
}

/**
 * Who is signed in, in which workspace, with which role: from the accounts API. The UI uses it
 * only to hide what a role cannot do; the server refuses regardless.
 */
export function useMe() {
  return useQuery({
    queryKey: qk.me,
    queryFn: async (): Promise<Me> => {
      const raw = await apiFetch<Record<string, unknown>>("/api/v1/workspace");
      return normaliseMe(raw);
    },
    staleTime: 60_000,
  });
}

export function normaliseMe(raw: Record<string, unknown>): Me {
  const r = raw as Record<string, any>;
  // GET /api/v1/workspace: { workspace: { id, name, plan, kind }, member: { id, email, name, role }, can }
  if (r.member && r.workspace) {
    return {
      user: { id: r.member.id, name: r.member.name || null, email: r.member.email },
      workspace: { id: r.workspace.id, name: r.workspace.name, plan: r.workspace.plan },
      role: r.member.role,
      workspaces: [],
    };
  }
  const workspace = r.workspace ?? (r.workspaceId ? { id: r.workspaceId, name: r.workspaceName ?? "Workspace", plan: r.plan } : undefined);
  const role = (r.role ?? r.membership?.role ?? workspace?.role) as Role | undefined;
  const list = (r.workspaces ?? r.memberships ?? []) as any[];
  return {
    user: r.user ?? (r.email || r.name ? { id: r.userId, name: r.name, email: r.email } : undefined),
    workspace: workspace ? { id: workspace.id, name: workspace.name, plan: workspace.plan ?? r.plan } : undefined,
    role,
    workspaces: list.map((w) => ({ id: w.id ?? w.workspaceId, name: w.name ?? w.workspaceName ?? w.workspace?.name, role: w.role, plan: w.plan ?? w.workspace?.plan })),
  };
}

const CREATE: Role[] = ["owner", "researcher"];
export const canCreate = (role?: Role) => (role ? CREATE.includes(role) : false);
export const canBill = (role?: Role) => role === "owner" || role === "billing_admin";
export const canManageOthers = (role?: Role) => role === "owner";
