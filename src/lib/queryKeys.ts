/** TanStack Query keys, one place so invalidation stays consistent. */
export const qk = {
  me: ["me"] as const,
  workspaces: ["workspaces"] as const,
  members: ["workspace", "members"] as const,
  networks: (params: Record<string, unknown> = {}) => ["networks", params] as const,
  network: (id: string) => ["network", id] as const,
  runs: (params: Record<string, unknown> = {}) => ["runs", params] as const,
  run: (id: string) => ["run", id] as const,
  sweeps: (params: Record<string, unknown> = {}) => ["sweeps", params] as const,
  sweep: (id: string) => ["sweep", id] as const,
  datasets: ["datasets"] as const,
  fits: ["fits"] as const,
};
