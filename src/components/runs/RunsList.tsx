"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import { useSearchParams } from "next/navigation";
import { JOB_STATUSES, type RunSummary } from "@/shared/api";
import { computeSeconds, when } from "@/lib/units";
import { StatusBadge } from "@/components/ui/Status";
import { PageHeader } from "@/components/ui/Page";
import { DataTable } from "@/components/tables/DataTable";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { useNetworkNames } from "@/components/network/useNetworkNames";
import { KINDS } from "./computations";

const STATUS_OPTIONS = JOB_STATUSES.map((s) => ({ value: s, label: s[0].toUpperCase() + s.slice(1) }));

export function RunsList() {
  const params = useSearchParams();
  const networkId = params.get("networkId") ?? undefined;
  const names = useNetworkNames();
  const who = useMemberNames();
  const columns: ColumnDef<RunSummary, unknown>[] = [
    {
      id: "status",
      header: "Status",
      accessorFn: (r) => r.status,
      cell: ({ row }) => (
        <Link
          href={`/runs/${row.original.id}`}
          className="inline-flex items-center gap-2"
          aria-label={`Calculation ${row.original.id.slice(0, 8)}, ${row.original.status}`}
        >
          <StatusBadge status={row.original.status} />
          {row.original.status === "running" ? <span className="tk-num text-caption text-fg-faint">{Math.round(row.original.progress * 100)}%</span> : null}
        </Link>
      ),
    },
    {
      id: "kind",
      header: "Computation",
      accessorFn: (r) => r.kind,
      cell: ({ row }) => (
        <Link href={`/runs/${row.original.id}`} className="font-medium text-accent hover:underline">
          {KINDS.find((k) => k.kind === row.original.kind)?.label ?? row.original.kind}
        </Link>
      ),
    },
    {
      id: "network",
      header: "Network",
      cell: ({ row }) =>
        row.original.networkId ? (
          <Link href={`/networks/${row.original.networkId}`} className="hover:underline">
            {names.get(row.original.networkId) ?? "network"}
            {row.original.networkVersion ? ` v${row.original.networkVersion}` : ""}
          </Link>
        ) : (
          <span className="text-fg-faint">inline</span>
        ),
    },
    { id: "createdBy", header: "Who", cell: ({ row }) => who(row.original.createdBy) },
    {
      id: "cost",
      header: "Compute",
      accessorFn: (r) => r.computeSeconds ?? r.estimate.computeSeconds,
      cell: ({ row }) => (
        <span className="tk-num">
          {row.original.computeSeconds !== null ? computeSeconds(row.original.computeSeconds) : `est. ${computeSeconds(row.original.estimate.computeSeconds)}`}
        </span>
      ),
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
      <PageHeader kicker="group" title="Calculations">
        One computation on one network each, newest first. Start one from a network&apos;s page.
      </PageHeader>
      <DataTable
        route="GET /api/v1/runs"
        listKey="runs"
        columns={columns}
        fixed={{ networkId }}
        filters={[
          { id: "status", label: "Status", options: STATUS_OPTIONS },
          { id: "kind", label: "Computation", options: KINDS.map((k) => ({ value: k.kind, label: k.label })) },
        ]}
        label="calculations"
        empty={
          <>
            No calculations yet. Open a{" "}
            <Link href="/networks" className="text-accent underline">
              network
            </Link>{" "}
            and start one.
          </>
        }
      />
    </>
  );
}
