"use client";

import type { ColumnDef } from "@tanstack/react-table";
import Link from "next/link";
import type { NetworkView } from "@/shared/api";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { num, when } from "@/lib/units";
import { PageHeader } from "@/components/ui/Page";
import { canCreate, useMe } from "@/components/shell/useMe";
import { RefusalNote, usePermission } from "@/components/ui/Permission";
import { FirstSteps } from "./FirstSteps";
import { DataTable } from "@/components/tables/DataTable";
import { linkLengthNm } from "@/engine/browser";
import { isExampleNetwork } from "@/shared/networks";

const columnsFor = (who: (id: string | null) => string): ColumnDef<NetworkView, unknown>[] => [
  {
    id: "name",
    header: "Name",
    accessorFn: (r) => r.name,
    cell: ({ row }) => (
      <>
        <Link className="font-medium text-accent hover:underline" href={`/networks/${row.original.id}`}>
          {row.original.name}
        </Link>
        {isExampleNetwork(row.original.name) ? (
          <span className="ml-2 rounded bg-surface-sunk px-1.5 py-0.5 text-micro uppercase tracking-wide text-fg-soft" data-testid="example-mark">
            example
          </span>
        ) : null}
      </>
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
  const create = usePermission("work.create");
  return (
    <>
      <PageHeader
        kicker="group"
        title="Networks"
        actions={
          canCreate(me.data?.role) ? (
            <Link href="/networks/new" className="tk-btn">
              New network
            </Link>
          ) : create.reason ? (
            <button type="button" className="tk-btn" disabled aria-describedby="new-network-refusal">
              New network
            </button>
          ) : null
        }
      >
        Saved network descriptions. Each edit is kept as a new version, and every calculation points at the version it used.
      </PageHeader>
      {create.reason ? <RefusalNote id="new-network-refusal" reason={create.reason} /> : null}
      <FirstSteps />
      <DataTable route="GET /api/v1/networks" listKey="networks" columns={columns} label="networks" empty="No networks yet. Create one to see it drawn." />
    </>
  );
}
