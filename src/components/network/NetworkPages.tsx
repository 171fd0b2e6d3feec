"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { notFound } from "next/navigation";
import { api, ApiClientError } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { when } from "@/lib/units";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { canCreate, useMe } from "@/components/shell/useMe";
import { RunForm } from "@/components/runs/RunForm";
import { SweepBuilder } from "@/components/sweeps/SweepBuilder";
import { NetworkEditor } from "./NetworkEditor";

export function NewNetwork() {
  const me = useMe();
  return (
    <>
      <PageHeader kicker="new network" title="Describe a network">
        Choose the lattice, its size and boundary, the scale and the node. The drawing follows as you type; values the model cannot take are explained under the
        field.
      </PageHeader>
      <NetworkEditor canEdit={me.isPending ? true : canCreate(me.data?.role)} />
    </>
  );
}

export function NetworkDetail({ id }: { id: string }) {
  const me = useMe();
  const q = useQuery({ queryKey: qk.network(id), queryFn: () => api("GET /api/v1/networks/{id}", { params: { id } }) });
  if (q.error instanceof ApiClientError && q.error.status === 404) notFound();
  if (q.error) return <ErrorNote error={q.error} title="Could not load this network" />;
  if (!q.data) return <Skeleton lines={6} />;
  const n = q.data;
  const editable = canCreate(me.data?.role);
  return (
    <>
      <PageHeader
        kicker={`network · version ${n.version ?? 1}`}
        title={n.name}
        actions={
          <>
            <Link className="tk-btn-quiet" href={`/runs?networkId=${n.id}`}>
              Calculations of this network
            </Link>
            <a className="tk-btn-quiet" href="#run">
              Calculate
            </a>
            <a className="tk-btn-quiet" href="#sweep">
              Scan
            </a>
          </>
        }
      >
        Last changed {when(n.updatedAt ?? n.createdAt)}. Saving makes a new version; calculations keep the version they used.
      </PageHeader>
      <NetworkEditor key={`${n.id}-${n.version}`} initial={n} canEdit={editable} />
      <section id="run" className="mt-10 scroll-mt-6">
        <h2 className="mb-3 text-title font-semibold">Start a calculation</h2>
        <RunForm network={n} canSubmit={editable} />
      </section>
      <section id="sweep" className="mt-10 scroll-mt-6">
        <h2 className="mb-3 text-title font-semibold">Build a scan</h2>
        <SweepBuilder network={n} canSubmit={editable} />
      </section>
    </>
  );
}
