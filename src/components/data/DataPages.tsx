"use client";

import type { ColumnDef } from "@tanstack/react-table";
import { useQuery } from "@tanstack/react-query";
import { apiFetch, personName } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { computeSeconds, num, when } from "@/lib/units";
import { PageHeader, ErrorNote, Skeleton } from "@/components/ui/Page";
import { StatusBadge } from "@/components/ui/Status";
import { DataTable } from "@/components/tables/DataTable";
import { useMe } from "@/components/shell/useMe";

interface DatasetRow {
  id: string;
  name: string;
  synthetic: boolean;
  rows: number;
  xQuantity: string;
  xUnit: string;
  yUnit: string;
  xRange: [number, number];
  createdAt: string;
}

const datasetColumns: ColumnDef<DatasetRow, any>[] = [
  {
    id: "name",
    header: "Name",
    cell: ({ row }) => (
      <span className="font-medium">
        {row.original.name}
        {row.original.synthetic ? <span className="ml-2 rounded bg-warm-soft px-1.5 py-0.5 text-micro uppercase tracking-wide text-warm">synthetic</span> : null}
      </span>
    ),
  },
  { id: "rows", header: "Points", cell: ({ row }) => <span className="tk-num">{row.original.rows}</span> },
  { id: "x", header: "Swept", cell: ({ row }) => <span className="tk-num">{row.original.xQuantity} {num(row.original.xRange?.[0])} … {num(row.original.xRange?.[1])} {row.original.xUnit}</span> },
  { id: "y", header: "Measured", cell: ({ row }) => <span>conductance [{row.original.yUnit === "e2/h" ? "e²/h" : row.original.yUnit}]</span> },
  { id: "createdAt", header: "Uploaded", cell: ({ row }) => <span className="tk-num text-caption">{when(row.original.createdAt)}</span> },
];

export function DatasetsPage() {
  return (
    <>
      <PageHeader kicker="workspace" title="Datasets">
        Measured conductance or resistance curves, stored with their column mapping and units. Upload through the API (<span className="font-mono">POST /api/v1/datasets</span>, multipart CSV).
      </PageHeader>
      <DataTable<DatasetRow> path="/api/v1/datasets" listKey="datasets" cursorParam="before" columns={datasetColumns} label="datasets" empty="No datasets in this workspace yet." />
    </>
  );
}

interface FitRow {
  id: string;
  datasetName: string | null;
  status: "queued" | "running" | "succeeded" | "failed" | "cancelled";
  progress: number;
  result: { parameters?: Record<string, { value: number; uncertainty?: number } | number>; chi2PerDof?: number } | null;
  computeSeconds: number | null;
  estimatedComputeSeconds: number | null;
  createdAt: string;
}

const fitColumns: ColumnDef<FitRow, any>[] = [
  { id: "status", header: "Status", cell: ({ row }) => <StatusBadge status={row.original.status} /> },
  { id: "dataset", header: "Dataset", cell: ({ row }) => row.original.datasetName ?? "–" },
  {
    id: "parameters",
    header: "Fitted parameters",
    cell: ({ row }) => {
      const p = row.original.result?.parameters;
      if (!p) return <span className="text-fg-faint">–</span>;
      return (
        <span className="font-mono text-caption tk-num">
          {Object.entries(p)
            .map(([k, v]) => (typeof v === "number" ? `${k} = ${num(v)}` : `${k} = ${num(v.value)}${v.uncertainty !== undefined ? ` ± ${num(v.uncertainty, 2)}` : ""}`))
            .join(" · ")}
        </span>
      );
    },
  },
  { id: "chi2", header: "χ² / dof", cell: ({ row }) => <span className="tk-num">{num(row.original.result?.chi2PerDof)}</span> },
  { id: "cost", header: "Compute", cell: ({ row }) => <span className="tk-num">{computeSeconds(row.original.computeSeconds ?? row.original.estimatedComputeSeconds)}</span> },
  { id: "createdAt", header: "Created", cell: ({ row }) => <span className="tk-num text-caption">{when(row.original.createdAt)}</span> },
];

export function FitsPage() {
  return (
    <>
      <PageHeader kicker="workspace" title="Fits">
        Model parameters adjusted to a dataset, with uncertainties. Fitted node probabilities and mode velocity describe the model, not the material.
      </PageHeader>
      <DataTable<FitRow> path="/api/v1/fits" listKey="fits" cursorParam="before" columns={fitColumns} label="fits" empty="No fits yet." />
    </>
  );
}

interface Member {
  userId: string;
  name: string;
  email: string;
  role: string;
  roleLabel: string;
  joinedAt: string;
}

export function WorkspacePage() {
  const me = useMe();
  const members = useQuery({
    queryKey: qk.members,
    queryFn: async () => {
      const d = await apiFetch<unknown>("/api/v1/workspace/members");
      return (Array.isArray(d) ? d : ((d as { members?: Member[]; items?: Member[] }).members ?? (d as { items?: Member[] }).items ?? [])) as Member[];
    },
  });
  return (
    <>
      <PageHeader kicker="workspace" title={me.data?.workspace?.name ?? "Workspace"}>
        {me.data?.workspace?.plan === "lab" ? "Lab plan" : "Free plan"} · you are {me.data?.role ? me.data.role.replace("_", " ") : "…"}. API tokens for scripts are scoped to this workspace and to one role.
      </PageHeader>
      <h2 className="mb-2 text-lead font-semibold">Members</h2>
      {members.error ? <ErrorNote error={members.error} /> : null}
      {!members.data && !members.error ? <Skeleton /> : null}
      {members.data ? (
        <div className="overflow-x-auto rounded-card border border-line bg-surface">
          <table className="w-full text-left text-body" aria-label="Members">
            <thead className="border-b border-line bg-surface-sunk text-caption uppercase tracking-wide text-fg-faint">
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">Member</th>
                <th scope="col" className="px-3 py-2 font-medium">Role</th>
                <th scope="col" className="px-3 py-2 font-medium">Joined</th>
              </tr>
            </thead>
            <tbody>
              {members.data.map((m) => (
                <tr key={m.userId} className="border-b border-line last:border-0">
                  <td className="px-3 py-2">
                    {m.name || personName(m.email)} <span className="text-caption text-fg-faint">{m.email}</span>
                  </td>
                  <td className="px-3 py-2">{m.roleLabel}</td>
                  <td className="px-3 py-2 tk-num text-caption">{when(m.joinedAt)}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      ) : null}
    </>
  );
}
