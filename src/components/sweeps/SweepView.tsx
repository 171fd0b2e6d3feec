"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { notFound } from "next/navigation";
import { useMemo, useState } from "react";
import { api, ApiClientError } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { computeSeconds, when } from "@/lib/units";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import { canCreate, useMe } from "@/components/shell/useMe";
import { Progress } from "@/components/runs/Progress";
import { Provenance } from "@/components/runs/Provenance";
import { useMemberNames } from "@/components/shell/useMemberNames";
import { HeatMap } from "@/components/charts/HeatMap";
import { XYChart } from "@/components/charts/XYChart";
import type { SweepDetail } from "@/shared/api";
import { axisLine } from "@/shared/exports";
import { countOf, kindLabel, scanName } from "@/shared/kinds";
import { errorQuantityFor, messageInWords, preferredQuantity, quantity, quantityText, reasonPattern } from "@/shared/quantities";
import { DosScan, pointName } from "./DosScan";

const LIVE = new Set(["queued", "running"]);
/** Echoed inputs, constants of the network and the checks: in the table and the CSV, not offered as the plotted quantity. */
const NOT_PLOTTED =
  /stderr|\.std$|std\.|^checks\.|^channels\.|Period(MeV|Tesla)$|^(energyMeV|fieldTesla|temperatureK|contactOhms|fluxPerPlaquette|broadeningMeV|cellAreaNm2|carrierDensityFromMeV|rows|widthNm|fitFromNm)$|samples$|^thermal\.|^flux\.|PrimitiveCell/;

/** The failed points grouped by their reason, in words, with a link to each point. */
function Failures({ s }: { s: SweepDetail }) {
  const groups = useMemo(() => {
    const by = new Map<string, { reasons: string[]; points: SweepDetail["points"] }>();
    for (const p of s.points) {
      if (p.status !== "failed") continue;
      const reason = messageInWords(p.error?.message?.trim() || "The worker gave no reason.");
      const key = reasonPattern(reason);
      const g = by.get(key) ?? { reasons: [], points: [] };
      if (!g.reasons.includes(reason)) g.reasons.push(reason);
      g.points.push(p);
      by.set(key, g);
    }
    return [...by.values()].sort((a, b) => b.points.length - a.points.length);
  }, [s.points]);
  if (groups.length === 0) return null;
  const failed = groups.reduce((n, g) => n + g.points.length, 0);
  return (
    <section role="alert" className="mt-5 max-w-5xl rounded-card border border-danger/40 bg-danger-soft p-4 text-body" data-testid="sweep-failures">
      <h2 className="font-semibold text-danger">
        {failed} of {countOf(s.pointCount, "point", "points")} failed
        {groups.length > 1 ? `, for ${groups.length} reasons` : ""}
      </h2>
      <ul className="mt-2 space-y-3">
        {groups.map(({ reasons, points: ps }) => (
          <li key={reasons[0]} data-testid="sweep-failure-reason">
            <p className="text-fg">
              <span className="font-semibold tk-num">{countOf(ps.length, "point", "points")}:</span> {reasons[0]}
            </p>
            {reasons.length > 1 ? (
              <ul className="mt-1 list-disc pl-5 text-caption text-fg-soft">
                {reasons.slice(1, 6).map((r) => (
                  <li key={r}>{r}</li>
                ))}
                {reasons.length > 6 ? <li>and {reasons.length - 6} more with other values</li> : null}
              </ul>
            ) : null}
            <p className="mt-1 text-caption text-fg-soft">
              {ps.slice(0, 12).map((p, i) => (
                <span key={p.runId}>
                  {i > 0 ? " · " : ""}
                  <Link className="underline" href={`/runs/${p.runId}`}>
                    {pointName(s.axes, p.coordinates)}
                  </Link>
                </span>
              ))}
              {ps.length > 12 ? ` · and ${ps.length - 12} more (the results CSV lists every reason)` : ""}
            </p>
          </li>
        ))}
      </ul>
    </section>
  );
}

/** A sweep: progress, partial results drawn as they arrive (1 axis: curve; 2 axes: heat map; DOS: curves per point), failures, inputs and citation. */
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
  const names = useMemo(() => {
    const axes = new Set((s?.axes ?? []).map((a) => a.parameter));
    return Object.keys(s?.grid.quantities ?? {}).filter((n) => !axes.has(n) && !NOT_PLOTTED.test(n));
  }, [s]);
  const quantityKey = chosen && names.includes(chosen) ? chosen : preferredQuantity(names);
  if (q.error instanceof ApiClientError && q.error.status === 404) notFound();
  if (q.error) return <ErrorNote error={q.error} title="Could not load this scan" />;
  if (!s) return <Skeleton lines={5} />;
  const live = LIVE.has(s.status);
  const kind = s.input?.computation?.kind ?? "conductance";
  const parameters = s.axes.map((a) => a.parameter);
  const title = scanName(s.name, parameters, kind);
  const values = quantityKey ? (s.grid.quantities[quantityKey] ?? []) : [];
  const errName = quantityKey ? errorQuantityFor(quantityKey, Object.keys(s.grid.quantities)) : null;
  const errs = errName ? s.grid.quantities[errName] : undefined;
  const done = values.filter((v) => v !== null).length;
  const [a0, a1] = s.axes;
  const ql = quantityKey ? quantity(quantityKey) : null;
  const csvHref = `/api/v1/sweeps/${s.id}/results.csv`;
  const comment = `Scan ${s.id} (${title}); ${done} of ${s.pointCount} points; engine ${s.engineVersion ?? "?"}; input hash ${s.inputHash}; model prediction`;
  return (
    <>
      <PageHeader
        kicker={
          `scan · ${kindLabel(kind)} · ${countOf(s.axes.length, "axis", "axes")} · ` +
          `${countOf(s.pointCount, "point", "points")}${s.ensemble ? ` × ${countOf(s.ensemble.samples, "seed", "seeds")}` : ""}`
        }
        title={title}
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
        <Progress
          status={s.status}
          progress={s.progress}
          startedAt={s.startedAt}
          createdAt={s.createdAt}
          finishedAt={s.finishedAt}
          label="Scan progress"
          counts={s.counts}
        />
      </div>
      {cancel.error ? (
        <p role="alert" className="mt-2 text-caption text-danger">
          {(cancel.error as Error).message}
        </p>
      ) : null}
      <Failures s={s} />
      {kind === "dos" ? (
        <div className="mt-5 max-w-5xl">
          <DosScan s={s} />
        </div>
      ) : (
        <>
          {names.length > 1 ? (
            <label className="mt-5 block max-w-sm text-caption text-fg-soft">
              Quantity shown
              <select className="tk-field mt-1" value={quantityKey ?? ""} onChange={(e) => setChosen(e.target.value)} data-testid="sweep-quantity">
                {names.map((n) => (
                  <option key={n} value={n}>
                    {quantityText(n)}
                  </option>
                ))}
              </select>
            </label>
          ) : null}
          <div className="mt-5 max-w-5xl" data-testid="sweep-plot" data-points-done={done}>
            {!quantityKey || !ql ? (
              <p className="text-body text-fg-soft">
                {live
                  ? "Results appear here as points finish."
                  : `This ${kindLabel(kind).toLowerCase()} scan has no single figure per point to draw; each point's page shows its result.`}
              </p>
            ) : s.axes.length === 1 ? (
              <XYChart
                title={`${ql.label} against ${quantity(a0.parameter).label.toLowerCase()}`}
                name={`sweep-${s.id}`}
                xLabel={quantityText(a0.parameter)}
                xUnit={quantity(a0.parameter).unit}
                yLabel={quantityText(quantityKey)}
                yUnit={ql.unit}
                xDomain={[Math.min(...a0.values), Math.max(...a0.values)]}
                series={[{ name: errs ? "mean ± s.e." : ql.label, x: a0.values, y: values, err: errs }]}
                csv={{
                  header: [quantity(a0.parameter).column, ql.column, ...(errName ? [quantity(errName).column] : [])],
                  rows: a0.values.map((x, i) => [x, values[i], ...(errs ? [errs[i]] : [])]),
                  comments: [comment],
                }}
              />
            ) : (
              <HeatMap
                title={`${ql.label} over ${quantity(a0.parameter).label.toLowerCase()} and ${quantity(a1.parameter).label.toLowerCase()}`}
                name={`sweep-${s.id}`}
                yValues={a0.values}
                xValues={a1.values}
                values={values}
                yLabel={quantityText(a0.parameter)}
                xLabel={quantityText(a1.parameter)}
                zLabel={quantityText(quantityKey).replace(/ \([^)]*\)$/, "")}
                zUnit={ql.unit}
                csv={{
                  header: [quantity(a0.parameter).column, quantity(a1.parameter).column, ql.column],
                  rows: values.map((v, i) => [a0.values[Math.floor(i / a1.values.length)], a1.values[i % a1.values.length], v]),
                  comments: [comment],
                }}
              />
            )}
          </div>
        </>
      )}
      <Provenance
        title={title}
        path={`/sweeps/${s.id}`}
        input={s.input}
        skip={parameters}
        extra={[
          {
            label: "Computation",
            value: `${kindLabel(kind)}${s.ensemble ? `, each point averages ${countOf(s.ensemble.samples, "disorder seed", "disorder seeds")}` : ""}`,
          },
          ...s.axes.map((a, k) => ({ label: `Axis ${k + 1}`, value: axisLine(a) })),
        ]}
        networkId={s.networkId}
        networkVersion={s.networkVersion}
        networkName={s.networkName}
        engineVersion={s.engineVersion}
        inputHash={s.inputHash}
        date={s.finishedAt ?? s.createdAt}
      />
    </>
  );
}
