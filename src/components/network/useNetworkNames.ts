"use client";

import { useQuery } from "@tanstack/react-query";
import { api } from "@/lib/api";

/** Names of the workspace's networks by id (first 200), for the run and sweep tables. */
export function useNetworkNames(): Map<string, string> {
  const q = useQuery({
    queryKey: ["networks", "names"],
    queryFn: async () => (await api("GET /api/v1/networks", { query: { limit: 200 } })).networks,
    staleTime: 30_000,
  });
  return new Map((q.data ?? []).map((n) => [n.id, n.name]));
}
