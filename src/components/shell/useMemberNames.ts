"use client";

import { useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";

/** The workspace's members (GET /api/v1/workspace/members), one cache entry for every page. */
export const membersQuery = { queryKey: qk.members, queryFn: () => api("GET /api/v1/workspace/members") };

/** Member names by user id, to show who created a network, run or sweep. */
export function useMemberNames(): (id: string | null | undefined) => string {
  const q = useQuery({ ...membersQuery, staleTime: 60_000 });
  const map = new Map((q.data?.members ?? []).map((m) => [m.userId, m.name || m.email]));
  return (id) => {
    if (!id) return "–";
    return map.get(id) ?? (/^[0-9a-f-]{36}$/i.test(id) ? "former member" : id);
  };
}
