"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { Empty, ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { sig } from "./format";
import { SyntheticMark } from "./SyntheticMark";
import { when } from "@/lib/units";

export function DatasetsList() {
  const q = useQuery({ queryKey: qk.datasets, queryFn: () => api("GET /api/v1/datasets") });
  return (
    <>
      <PageHeader
        kicker="measured data"
        title="Datasets"
        actions={
          <Link href="/datasets/new" className="tk-btn">
            Upload a CSV
          </Link>
        }
      >
        Conductance or resistance curves with their column mapping and units. Estimate the moiré period from the oscillations, or fit model parameters with
        uncertainties.
      </PageHeader>
      {q.isPending ? (
        <Skeleton />
      ) : q.error ? (
        <ErrorNote error={q.error} />
      ) : q.data.items.length === 0 ? (
        <Empty>No datasets yet. Upload a CSV to start.</Empty>
      ) : (
        <table className="w-full text-body" data-testid="datasets-table">
          <thead className="text-left text-caption text-fg-faint">
            <tr>
              <th className="py-2">Name</th>
              <th>Points</th>
              <th>x</th>
              <th>Range</th>
              <th>Uploaded</th>
            </tr>
          </thead>
          <tbody>
            {q.data.items.map((d) => (
              <tr key={d.id} className="border-t border-line">
                <td className="py-2">
                  <Link href={`/datasets/${d.id}`} className="font-medium text-accent hover:underline">
                    {d.name}
                  </Link>
                  {d.synthetic ? <SyntheticMark /> : null}
                </td>
                <td className="tk-num">{d.rows}</td>
                <td>{d.xQuantity}</td>
                <td className="tk-num font-mono text-caption">
                  {sig(d.xRange[0])} … {sig(d.xRange[1])} {d.xUnit}
                </td>
                <td className="tk-num text-caption">{when(d.createdAt)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}
