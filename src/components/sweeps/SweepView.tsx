"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { notFound } from "next/navigation";
import { useMemo, useState } from "react";
import { api, ApiClientError } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { axisLabel, computeSeconds, PARAMETER_UNITS, when } from "@/lib/units";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { canCreate, useMe } from "@/components/shell/useMe";
import { Progress } from "@/components/runs/Progress";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { HeatMap } from "@/components/charts/HeatMap";
import { XYChart } from "@/components/charts/XYChart";
import { quantityLabel, preferredQuantity, errorQuantityFor } from "./quantities";
import { KINDS } from "@/components/runs/computations";

const LIVE = new Set(["queued", "running"]);
/** A computation kind in words (the calculation form's table, one place for the names). */
const kindLabel = (kind: string): string | undefined => KINDS.find((k) => k.kind === kind)?.label;

/** A sweep: progress, partial results drawn as they arrive (1 axis: curve; 2 axes: heat map). */
export function SweepView({ id }: { id: string }) {
  const me = useMe();
  const who = useMemberNames();
  const client = useQueryClient();
  const q = useQuery({
    queryKey: qk.sweep(id),
    queryFn: () => api("GET /api/v1/sweeps/{id}", { params: { id } }),
    refetchInterval: (query) => (query.state.data && !LIVE.has(query.state.data.status) ? false : 1000),
  });
  const cancel = useMutation({
    mutationFn: () => api("POST /api/v1/sweeps/{id}/cancel", { params: { id } }),
    onSuccess: () => client.invalidateQueries({ queryKey: qk.sweep(id) }),
  });
  const [chosen, setChosen] = useState<string | null>(null);
  const s = q.data;
  // Results worth plotting: not the echoed inputs, constants of the network or the checks.
  const names = useMemo(() => {
    const axes = new Set((s?.axes ?? []).map((a) => a.parameter));
    const skip = /stderr|\.std$|std\.|^checks\.|^channels\.|Period(MeV|Tesla)$|^(energyMeV|fieldTesla|temperatureK|contactOhms|fluxPerPlaquette)$|samples$/;
    return Object.keys(s?.grid.quantities ?? {}).filter((n) => !axes.has(n) && !skip.test(n));
  }, [s]);
  const quantity = chosen && names.includes(chosen) ? chosen : preferredQuantity(names);
  if (q.error instanceof ApiClientError && q.error.status === 404) notFound();
  if (q.error) return <ErrorNote error={q.error} title="Could not load this scan" />;
  if (!s) return <Skeleton lines={5} />;
  const live = LIVE.has(s.status);
  const values = quantity ? (s.grid.quantities[quantity] ?? []) : [];
  const errName = quantity ? errorQuantityFor(quantity, Object.keys(s.grid.quantities)) : null;
  const errs = errName ? s.grid.quantities[errName] : undefined;
  const done = values.filter((v) => v !== null).length;
  const [a0, a1] = s.axes;
  const ql = quantity ? quantityLabel(quantity) : { label: "", unit: "" };
  const csvHref = `/api/v1/sweeps/${s.id}/results.csv`;
  return (
    <>
      <PageHeader
        kicker={
          `scan · ${s.axes.length} axis${s.axes.length > 1 ? "es" : ""} · ` + `${s.pointCount} points${s.ensemble ? ` × ${s.ensemble.samples} seeds` : ""}`
        }
        title={
          `${kindLabel(s.input?.computation?.kind ?? "conductance") ?? "Scan"} ` +
          `over ${s.axes.map((a) => (PARAMETER_UNITS[a.parameter]?.label ?? a.parameter).toLowerCase()).join(" and ")}`
        }
        actions={
          <>
            {s.networkId ? (
              <Link className="tk-btn-quiet" href={`/networks/${s.networkId}`}>
                Network
              </Link>
            ) : null}
            <a className="tk-btn-quiet" href={csvHref} download data-testid="sweep-csv">
              Results CSV
            </a>
            {live && canCreate(me.data?.role) ? (
              <button type="button" className="tk-btn-quiet border-danger/50 text-danger" onClick={() => cancel.mutate()} disabled={cancel.isPending}>
                {cancel.isPending ? "Cancelling…" : "Cancel scan"}
              </button>
            ) : null}
          </>
        }
      >
        Submitted {when(s.createdAt)} by {who(s.createdBy)} · estimated {computeSeconds(s.estimate?.computeSeconds)} · used{" "}
        {computeSeconds(s.computeSeconds ?? 0)}
      </PageHeader>
      <div className="max-w-3xl space-y-2">
        <Progress status={s.status} progress={s.progress} startedAt={s.startedAt} createdAt={s.createdAt} finishedAt={s.finishedAt} label="Scan progress" />
        {s.counts ? (
          <p className="text-caption text-fg-soft tk-num" data-testid="sweep-counts">
            {s.counts.succeeded} done · {s.counts.running} running · {s.counts.queued} queued{s.counts.failed ? ` · ${s.counts.failed} failed` : ""}
            {s.counts.cancelled ? ` · ${s.counts.cancelled} cancelled` : ""}
          </p>
        ) : null}
      </div>
      {names.length > 1 ? (
        <label className="mt-5 block max-w-sm text-caption text-fg-soft">
          Quantity shown
          <select className="tk-field mt-1" value={quantity ?? ""} onChange={(e) => setChosen(e.target.value)}>
            {names.map((n) => (
              <option key={n} value={n}>
                {quantityLabel(n).label}
                {quantityLabel(n).unit ? ` (${quantityLabel(n).unit})` : ""}
              </option>
            ))}
          </select>
        </label>
      ) : null}
      <div className="mt-5 max-w-5xl" data-testid="sweep-plot" data-points-done={done}>
        {!quantity ? (
          <p className="text-body text-fg-soft">Results appear here as points finish.</p>
        ) : s.axes.length === 1 ? (
          <XYChart
            title={`${ql.label} against ${PARAMETER_UNITS[a0.parameter]?.label ?? a0.parameter}`}
            name={`sweep-${s.id}`}
            xLabel={axisLabel(a0.parameter)}
            xUnit={PARAMETER_UNITS[a0.parameter]?.unit}
            yLabel={ql.unit ? `${ql.label} (${ql.unit})` : ql.label}
            yUnit={ql.unit}
            xDomain={[Math.min(...a0.values), Math.max(...a0.values)]}
            series={[{ name: errs ? "mean ± s.e." : ql.label, x: a0.values, y: values, err: errs }]}
            csv={{
              header: [a0.parameter, quantity, ...(errName ? [errName] : [])],
              rows: a0.values.map((x, i) => [x, values[i], ...(errs ? [errs[i]] : [])]),
              comments: [`Scan ${s.id}; ${done} of ${s.pointCount} points; model prediction`],
            }}
          />
        ) : (
          <HeatMap
            title={`${ql.label} over ${PARAMETER_UNITS[a0.parameter]?.label ?? a0.parameter} and ${PARAMETER_UNITS[a1.parameter]?.label ?? a1.parameter}`}
            name={`sweep-${s.id}`}
            yValues={a0.values}
            xValues={a1.values}
            values={values}
            yLabel={axisLabel(a0.parameter)}
            xLabel={axisLabel(a1.parameter)}
            zLabel={ql.label}
            zUnit={ql.unit}
            csv={{
              header: [a0.parameter, a1.parameter, quantity],
              rows: values.map((v, i) => [a0.values[Math.floor(i / a1.values.length)], a1.values[i % a1.values.length], v]),
              comments: [`Scan ${s.id}; ${done} of ${s.pointCount} points; model prediction`],
            }}
          />
        )}
      </div>
    </>
  );
}
