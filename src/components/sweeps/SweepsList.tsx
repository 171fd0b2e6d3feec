"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import { JOB_STATUSES, type SweepSummary } from "@/shared/api";
import { computeSeconds, when } from "@/lib/units";
import { scanName } from "@/shared/kinds";
import { StatusBadge } from "@/components/ui/Status";
import { PageHeader } from "@/components/ui/Page";
import { DataTable } from "@/components/tables/DataTable";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { useNetworkNames } from "@/components/network/useNetworkNames";

const STATUS_OPTIONS = JOB_STATUSES.map((s) => ({ value: s, label: s[0].toUpperCase() + s.slice(1) }));

export function SweepsList() {
  const names = useNetworkNames();
  const who = useMemberNames();
  const columns: ColumnDef<SweepSummary, unknown>[] = [
    {
      id: "status",
      header: "Status",
      accessorFn: (r) => r.status,
      cell: ({ row }) => (
        <span className="inline-flex items-center gap-2">
          <StatusBadge status={row.original.status} />
          <span className="tk-num text-caption text-fg-faint">{Math.round(row.original.progress * 100)}%</span>
        </span>
      ),
    },
    {
      id: "axes",
      header: "Scan",
      cell: ({ row }) => (
        <Link href={`/sweeps/${row.original.id}`} className="font-medium text-accent hover:underline">
          {scanName(
            row.original.name,
            row.original.axes.map((a) => a.parameter),
          )}
        </Link>
      ),
    },
    {
      id: "points",
      header: "Points",
      accessorFn: (r) => r.pointCount,
      cell: ({ row }) => (
        <span className="tk-num">
          {row.original.pointCount}
          {row.original.ensemble ? ` × ${row.original.ensemble.samples}` : ""}
        </span>
      ),
    },
    {
      id: "network",
      header: "Network",
      cell: ({ row }) =>
        row.original.networkId ? (
          <Link className="hover:underline" href={`/networks/${row.original.networkId}`}>
            {names.get(row.original.networkId) ?? "network"}
          </Link>
        ) : (
          <span className="text-fg-faint">inline</span>
        ),
    },
    { id: "createdBy", header: "Who", cell: ({ row }) => who(row.original.createdBy) },
    {
      id: "cost",
      header: "Compute",
      accessorFn: (r) => r.computeSeconds,
      cell: ({ row }) => <span className="tk-num">{computeSeconds(row.original.computeSeconds)}</span>,
    },
    {
      id: "createdAt",
      header: "Created",
      accessorFn: (r) => r.createdAt,
      cell: ({ row }) => <span className="tk-num text-caption">{when(row.original.createdAt)}</span>,
    },
  ];
  return (
    <>
      <PageHeader kicker="group" title="Scans">
        Grids of calculations over one or two parameters, each point optionally an ensemble of disorder seeds. Build one from a network&apos;s page.
      </PageHeader>
      <DataTable
        route="GET /api/v1/sweeps"
        listKey="sweeps"
        columns={columns}
        filters={[{ id: "status", label: "Status", options: STATUS_OPTIONS }]}
        label="scans"
        empty={
          <>
            No scans yet. Open a{" "}
            <Link href="/networks" className="text-accent underline">
              network
            </Link>{" "}
            and build one.
          </>
        }
      />
    </>
  );
}
