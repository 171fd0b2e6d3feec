"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import type { NetworkView } from "@/shared/api";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { num, when } from "@/lib/units";
import { PageHeader } from "@/components/ui/Page";
import { canCreate, useMe } from "@/components/shell/useMe";
import { DataTable } from "@/components/tables/DataTable";
import { linkLengthNm } from "@/engine/browser";

const columnsFor = (who: (id: string | null) => string): ColumnDef<NetworkView, unknown>[] => [
  {
    id: "name",
    header: "Name",
    accessorFn: (r) => r.name,
    cell: ({ row }) => (
      <Link className="font-medium text-accent hover:underline" href={`/networks/${row.original.id}`}>
        {row.original.name}
      </Link>
    ),
  },
  {
    id: "lattice",
    header: "Lattice",
    cell: ({ row }) => {
      const n = row.original.network;
      return (
        <span className="font-mono text-caption">
          {n.lattice} {n.size.columns} × {n.size.rows} · {n.transverse}
        </span>
      );
    },
  },
  {
    id: "scale",
    header: "Link length",
    cell: ({ row }) => {
      const l = linkLengthNm(row.original.network);
      return <span className="tk-num">{Number.isFinite(l) ? `${num(l, 4)} nm` : "–"}</span>;
    },
  },
  { id: "version", header: "Version", cell: ({ row }) => <span className="tk-num">v{row.original.version}</span> },
  { id: "createdBy", header: "By", cell: ({ row }) => who(row.original.createdBy) },
  {
    id: "createdAt",
    header: "Created",
    accessorFn: (r) => r.createdAt,
    cell: ({ row }) => <span className="tk-num text-caption">{when(row.original.createdAt)}</span>,
  },
];

export function NetworksList() {
  const me = useMe();
  const who = useMemberNames();
  const columns = columnsFor(who);
  return (
    <>
      <PageHeader
        kicker="workspace"
        title="Networks"
        actions={
          canCreate(me.data?.role) ? (
            <Link href="/networks/new" className="tk-btn">
              New network
            </Link>
          ) : null
        }
      >
        Saved network descriptions. Each edit is kept as a new version, and every run points at the version it used.
      </PageHeader>
      <DataTable route="GET /api/v1/networks" listKey="networks" columns={columns} label="networks" empty="No networks yet. Create one to see it drawn." />
    </>
  );
}
