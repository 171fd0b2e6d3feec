"use client";

import { useQuery } from "@tanstack/react-query";
import { apiFetch, asList, type NetworkRecord } from "@/lib/api";

/** Names of the workspace's networks by id (first 200), for the run and sweep tables. */
export function useNetworkNames(): Map<string, string> {
  const q = useQuery({
    queryKey: ["networks", "names"],
    queryFn: async () => asList<NetworkRecord>(await apiFetch<unknown>("/api/v1/networks?limit=200"), "networks").items,
    staleTime: 30_000,
  });
  return new Map((q.data ?? []).map((n) => [n.id, n.name]));
}
