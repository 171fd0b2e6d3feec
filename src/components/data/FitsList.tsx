"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { Empty, ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { fitParameterName } from "@/shared/fit-parameters";
import { withStderr } from "./format";
import { FitQualityMark } from "./FitQualityMark";
import { when } from "@/lib/units";

export function FitsList() {
  const q = useQuery({ queryKey: qk.fits, queryFn: () => api("GET /api/v1/fits"), refetchInterval: 3000 });
  return (
    <>
      <PageHeader kicker="measured data" title="Fits">
        Model parameters adjusted to datasets, with standard errors. Start a fit from a dataset&apos;s page.
      </PageHeader>
      {q.isPending ? (
        <Skeleton />
      ) : q.error ? (
        <ErrorNote error={q.error} />
      ) : q.data.items.length === 0 ? (
        <Empty>No fits yet. Open a dataset to start one.</Empty>
      ) : (
        <table className="w-full text-body" data-testid="fits-table">
          <thead className="text-left text-caption text-fg-faint">
            <tr>
              <th className="py-2">Dataset</th>
              <th>Status</th>
              <th>Parameters</th>
              <th>χ²/dof</th>
              <th>Started</th>
            </tr>
          </thead>
          <tbody>
            {q.data.items.map((f) => (
              <tr key={f.id} className="border-t border-line">
                <td className="py-2">
                  <Link href={`/fits/${f.id}`} className="font-medium text-accent hover:underline">
                    {f.datasetName ?? f.datasetId}
                  </Link>
                </td>
                <td>
                  {f.status}
                  {f.status === "running" ? ` ${Math.round(f.progress * 100)} %` : ""}
                  {f.result ? <FitQualityMark quality={f.result.quality} flags={f.result.flags} /> : null}
                </td>
                <td className="text-caption">
                  {f.result?.parameters
                    ? f.result.parameters
                        .map((p) => {
                          const v = withStderr(p.value, p.stderr);
                          return `${fitParameterName(p.parameter)} = ${v.value} ± ${v.stderr}`;
                        })
                        .join("; ")
                    : f.settings.fit.map((p) => fitParameterName(p.parameter)).join(", ")}
                </td>
                <td className="tk-num">{f.result ? f.result.chi2PerDof.toPrecision(3) : "–"}</td>
                <td className="tk-num text-caption">{when(f.createdAt)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}
