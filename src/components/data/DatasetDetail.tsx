"use client";

import { useQuery } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { api } from "@/lib/api";
import type { DatasetPeriod } from "@/shared/api";
import { XYChart } from "@/components/charts/XYChart";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { RefusalNote, usePermission } from "@/components/ui/Permission";
import { FitForm } from "./FitForm";
import { Y_MEASURES_INFO } from "@/shared/csv";
import { FitQualityMark } from "./FitQualityMark";
import { PeriodPanel } from "./PeriodPanel";
import { SyntheticMark } from "./SyntheticMark";
import { when } from "@/lib/units";

export function DatasetDetail({ id }: { id: string }) {
  const q = useQuery({ queryKey: ["dataset", id], queryFn: () => api("GET /api/v1/datasets/{id}", { params: { id } }) });
  // The latest period estimate: the fit form can put its twist angle (or period) into the model network.
  const [period, setPeriod] = useState<DatasetPeriod | null>(null);
  const fitPermission = usePermission("work.create");
  const fitsQ = useQuery({ queryKey: ["fits", { datasetId: id }], queryFn: () => api("GET /api/v1/fits", { query: { datasetId: id } }) });
  if (q.isPending) return <Skeleton lines={6} />;
  if (q.error) return <ErrorNote error={q.error} title="Dataset not available" />;
  const d = q.data;
  // What y measures: a two-terminal conductance (e2/h) or a Hall-bar resistance (ohm); older answers have no field.
  const yMeasures = d.yMeasures ?? "twoTerminal";
  const measures = Y_MEASURES_INFO[yMeasures];
  const hallBar = yMeasures !== "twoTerminal";
  const yUnitText = hallBar ? "Ω" : "e²/h";
  return (
    <>
      <PageHeader
        kicker="dataset"
        title={d.name}
        actions={
          <a className="tk-btn-quiet" href={`/api/v1/datasets/${d.id}/original`}>
            Original file
          </a>
        }
      >
        {d.synthetic ? <SyntheticMark /> : null} {d.rows} points · x: {d.xQuantity} in {d.xUnit} · y: {measures.label} in {yUnitText}
        {d.hasSigma ? " with uncertainties" : ""} · sha256 <span className="font-mono text-caption">{d.dataHash.slice(0, 12)}…</span>
        {d.description ? <p className="mt-1 text-caption">{d.description}</p> : null}
      </PageHeader>
      <div className="space-y-10">
        <XYChart
          title="Measured curve (engine units)"
          name={`dataset-${d.id.slice(0, 8)}`}
          xLabel={`${d.xQuantity} (${d.xUnit})`}
          yLabel={`${measures.label} (${yUnitText})`}
          xUnit={d.xUnit}
          yUnit={yUnitText}
          series={[{ name: d.synthetic ? "data (synthetic)" : "data", x: d.points.x, y: d.points.y, err: d.points.sigma ?? undefined, points: true }]}
          csv={{
            header: [`x_${d.xUnit}`, ...(hallBar ? [`${measures.short}_ohm`, "sigma_ohm"] : ["conductanceE2h", "sigmaE2h"])],
            rows: d.points.x.map((x, i) => [x, d.points.y[i], d.points.sigma?.[i] ?? ""]),
          }}
        />
        {d.xQuantity === "field" ? (
          <PeriodPanel datasetId={d.id} onResult={setPeriod} />
        ) : (
          <p className="text-body text-fg-soft">The period analysis and fits need a field axis; this dataset&apos;s x is {d.xQuantity}.</p>
        )}
        {d.xQuantity === "field" ? (
          fitPermission.allowed || fitPermission.loading ? (
            <FitForm datasetId={d.id} datasetName={d.name} period={period} measures={yMeasures} />
          ) : (
            <section aria-labelledby="fit-refused-h" className="tk-card space-y-3">
              <h2 id="fit-refused-h" className="text-lead font-semibold">
                Fit the model to this dataset
              </h2>
              <RefusalNote id="fit-refusal" reason={fitPermission.reason ?? ""} />
              <button type="button" className="tk-btn" disabled aria-describedby="fit-refusal">
                Start the fit
              </button>
            </section>
          )
        ) : null}
        {fitsQ.data?.items.length ? (
          <section>
            <h2 className="text-lead font-semibold">Fits of this dataset</h2>
            <ul className="mt-2 space-y-1">
              {fitsQ.data.items.map((f) => (
                <li key={f.id}>
                  <Link href={`/fits/${f.id}`} className="text-accent underline">
                    {when(f.createdAt)} · {f.status}
                    {f.result ? ` · χ²/dof ${f.result.chi2PerDof.toPrecision(3)}` : ""}
                  </Link>
                  {f.result ? <FitQualityMark quality={f.result.quality} flags={f.result.flags} /> : null}
                </li>
              ))}
            </ul>
          </section>
        ) : null}
      </div>
    </>
  );
}
