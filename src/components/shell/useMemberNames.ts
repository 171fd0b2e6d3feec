"use client";

import { useQuery } from "@tanstack/react-query";
import { apiFetch } from "@/lib/api";
import { qk } from "@/lib/queryKeys";

interface Member {
  userId: string;
  name: string;
  email: string;
}

/** Member names by user id, to show who created a network, run or sweep. */
export function useMemberNames(): (id: unknown) => string {
  const q = useQuery({
    queryKey: qk.members,
    queryFn: async () => {
      const d = await apiFetch<unknown>("/api/v1/workspace/members");
      return (Array.isArray(d) ? d : ((d as { members?: Member[] }).members ?? (d as { items?: Member[] }).items ?? [])) as Member[];
    },
    staleTime: 60_000,
  });
  const map = new Map((q.data ?? []).map((m) => [m.userId, m.name || m.email]));
  return (id: unknown) => {
    if (!id) return "–";
    if (typeof id === "string") return map.get(id) ?? (/^[0-9a-f-]{36}$/i.test(id) ? "former member" : id);
    const o = id as { name?: string; email?: string; id?: string };
    return o.name || o.email || (o.id ? map.get(o.id) ?? "–" : "–");
  };
}
