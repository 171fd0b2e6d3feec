"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { api } from "@/lib/api";
import { XYChart } from "@/components/charts/XYChart";
import { Provenance } from "@/components/runs/Provenance";
import { ErrorNote, PageHeader, Skeleton } from "@/components/ui/Page";
import type { FitIteration, FitResult } from "@/shared/api";
import { fitParameterInfo, fitParameterName } from "@/shared/fit-parameters";
import { sig, withStderr } from "./format";
import { FitQualityMark } from "./FitQualityMark";
import { SyntheticMark } from "./SyntheticMark";
import { Y_MEASURES_INFO } from "@/shared/csv";

const finished = (s?: string) => s === "succeeded" || s === "failed" || s === "cancelled";

/** Fit report: progress while it runs; then overlay, residuals, the table of values with uncertainties, correlations and exports. */
export function FitReport({ id }: { id: string }) {
  const queryClient = useQueryClient();
  // chi2 per iteration as the worker reports it (sampled about once a second while the fit runs).
  const [history, setHistory] = useState<FitIteration[]>([]);
  const q = useQuery({
    queryKey: ["fit", id],
    queryFn: async () => {
      const fit = await api("GET /api/v1/fits/{id}", { params: { id } });
      const last = fit.lastIteration;
      if (last) setHistory((h) => (h.some((p) => p.iteration === last.iteration) ? h : [...h, last].sort((a, b) => a.iteration - b.iteration)));
      return fit;
    },
    refetchInterval: (query) => (finished(query.state.data?.status) ? false : 1000),
  });
  const datasetId = q.data?.datasetId;
  const dq = useQuery({
    queryKey: ["dataset", datasetId],
    queryFn: () => api("GET /api/v1/datasets/{id}", { params: { id: datasetId! } }),
    enabled: !!datasetId,
  });
  const cancel = useMutation({
    mutationFn: () => api("POST /api/v1/fits/{id}/cancel", { params: { id } }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ["fit", id] }),
  });
  if (q.isPending) return <Skeleton lines={6} />;
  if (q.error) return <ErrorNote error={q.error} title="Fit not available" />;
  const f = q.data;
  const r = f.result;
  const d = dq.data;
  // What the data measure (older fits: two-terminal conductance).
  const measuredKey = f.settings.measured ?? "twoTerminal";
  const measured = Y_MEASURES_INFO[measuredKey];
  const hallBar = measuredKey !== "twoTerminal";
  const yUnitText = hallBar ? "Ω" : "e²/h";
  return (
    <>
      <PageHeader
        kicker="fit report"
        title={`Fit of ${f.datasetName ?? "dataset"}`}
        actions={
          r ? (
            <>
              <a className="tk-btn-quiet" href={`/api/v1/fits/${f.id}/export`} data-testid="export-json">
                Report JSON
              </a>
              <a className="tk-btn-quiet" href={`/api/v1/fits/${f.id}/curve.csv`}>
                Model curve CSV
              </a>
              {r.profiles?.length ? (
                <a className="tk-btn-quiet" href={`/api/v1/fits/${f.id}/profiles.csv`} data-testid="export-profiles">
                  χ² profiles CSV
                </a>
              ) : null}
            </>
          ) : null
        }
      >
        {f.datasetSynthetic ? <SyntheticMark /> : null}{" "}
        <Link className="text-accent underline" href={`/datasets/${f.datasetId}`}>
          dataset
        </Link>{" "}
        · engine {f.engineVersion ?? "–"} · data sha256 <span className="font-mono text-caption">{f.dataHash.slice(0, 12)}…</span> · estimate{" "}
        {sig(f.estimatedComputeSeconds, 3)} compute-s
        {f.computeSeconds !== null ? ` · used ${sig(f.computeSeconds, 3)} compute-s` : ""}
      </PageHeader>

      <div className="space-y-8">
        <div className="tk-card space-y-2" data-testid="fit-status">
          <p className="text-body">
            Status: <strong data-status={f.status}>{f.status}</strong>
            {r ? <FitQualityMark quality={r.quality} flags={r.flags} /> : null}
            {f.lastIteration && !finished(f.status) ? ` · iteration ${f.lastIteration.iteration} · χ² ${sig(f.lastIteration.chi2, 4)}` : ""}
          </p>
          <div
            className="h-2 w-full overflow-hidden rounded-full bg-surface-sunk"
            role="progressbar"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={Math.round(f.progress * 100)}
            aria-label="fit progress"
          >
            <div className="h-full bg-accent transition-all" style={{ width: `${Math.round(f.progress * 100)}%` }} />
          </div>
          {!finished(f.status) ? (
            <button type="button" className="tk-btn-quiet" onClick={() => cancel.mutate()} disabled={cancel.isPending}>
              Cancel the fit
            </button>
          ) : null}
          {f.error ? <ErrorNote error={f.error.message} title={f.status === "cancelled" ? "Cancelled" : "The fit failed"} /> : null}
        </div>

        {r && r.warnings.length ? (
          <section className="rounded-card border border-danger/40 bg-danger-soft p-4" aria-labelledby="fit-warnings-title" data-testid="fit-warnings">
            <h2 id="fit-warnings-title" className="text-body font-semibold text-danger">
              {r.quality === "poor" ? "Poor fit: read these before the numbers" : "Warnings"}
            </h2>
            <ul className="mt-1 list-disc space-y-0.5 pl-5 text-body text-fg">
              {r.warnings.map((w, i) => (
                <li key={i}>{w}</li>
              ))}
            </ul>
          </section>
        ) : null}

        {history.length > 0 ? (
          <XYChart
            title="χ² per iteration"
            name={`fit-${f.id.slice(0, 8)}-chi2`}
            xLabel="iteration (0: global stage; then the descents one after another)"
            yLabel="χ²"
            height={200}
            series={[{ name: "chi2", x: history.map((h) => h.iteration), y: history.map((h) => h.chi2), points: true, color: "accent" }]}
            csv={{ header: ["iteration", "chi2"], rows: history.map((h) => [h.iteration, h.chi2]) }}
          />
        ) : null}

        {r && r.curve && d ? (
          <>
            <XYChart
              title="Data and model"
              name={`fit-${f.id.slice(0, 8)}-overlay`}
              xLabel="field (T)"
              yLabel={`${measured.label} (${yUnitText})`}
              xUnit="T"
              yUnit={yUnitText}
              series={[
                {
                  name: d.synthetic ? "data (synthetic)" : "data",
                  x: d.points.x,
                  y: d.points.y,
                  err: d.points.sigma ?? undefined,
                  points: true,
                  color: "linkAlt",
                },
                { name: "model", x: r.curve.x, y: r.curve.y, color: "accent", points: false },
              ]}
              csv={{
                header: hallBar ? ["fieldTesla", `data_${measured.short}_ohm`, `model_${measured.short}_ohm`] : ["fieldTesla", "dataE2h", "modelE2h"],
                rows: r.curve.x.map((x, i) => [x, d.points.y[i], r.curve!.y[i]]),
              }}
            />
            <XYChart
              title="Residuals (data − model)"
              name={`fit-${f.id.slice(0, 8)}-residuals`}
              xLabel="field (T)"
              yLabel={`residual (${yUnitText})`}
              xUnit="T"
              yUnit={yUnitText}
              height={200}
              series={[{ name: "residual", x: r.curve.x, y: r.residuals ?? [], points: true, color: "warm" }]}
            />
          </>
        ) : null}

        {r ? (
          <section className="tk-card space-y-4">
            <h2 className="text-lead font-semibold">Best values</h2>
            <table className="w-full text-body" data-testid="fit-values">
              <thead className="text-left text-caption text-fg-faint">
                <tr>
                  <th className="py-1">parameter</th>
                  <th>value</th>
                  <th>standard error</th>
                  <th>start</th>
                  <th>bounds</th>
                </tr>
              </thead>
              <tbody>
                {r.parameters.map((p) => {
                  const v = withStderr(p.value, p.stderr);
                  return (
                    <tr key={p.parameter} className="border-t border-line" data-parameter={p.parameter}>
                      <td className="py-1">
                        {fitParameterName(p.parameter)} <span className="font-mono text-micro text-fg-faint">{p.parameter}</span>
                      </td>
                      <td className="tk-num font-mono">{v.value}</td>
                      <td className="tk-num font-mono">± {v.stderr}</td>
                      <td className="tk-num font-mono text-caption">{sig(p.initial)}</td>
                      <td className="tk-num font-mono text-caption">
                        [{sig(p.min)}, {sig(p.max)}]{p.atBound ? " · on a bound" : ""}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            <p className="text-body">
              χ²/dof ={" "}
              <span className="tk-num font-mono" data-testid="chi2-per-dof">
                {sig(r.chi2PerDof, 4)}
              </span>
              {r.dof !== undefined ? ` (dof ${r.dof})` : ""}
              {r.weighted === false ? ` · no uncertainty column: unit weights, so χ²/dof is the residual variance in (${yUnitText})²` : ""}
              {r.iterations !== undefined ? ` · ${r.iterations} iterations` : ""}
              {r.converged === false ? " · did not meet the convergence rule" : ""}
            </p>
            <p className="text-caption text-fg-soft">
              Standard errors from the Jacobian at the optimum, scaled by the residual variance (χ²/dof). Results are predictions of a phenomenological model;
              node probabilities and mode velocity are model parameters, not material constants.
            </p>
            {r.correlation && r.parameters.length > 1 ? (
              <div>
                <h3 className="text-body font-semibold">Correlation matrix</h3>
                <table className="mt-1 font-mono text-caption" data-testid="fit-correlation">
                  <thead>
                    <tr>
                      <th />
                      {r.parameters.map((p) => (
                        <th key={p.parameter} className="px-2 text-left text-fg-faint">
                          {fitParameterName(p.parameter)}
                        </th>
                      ))}
                    </tr>
                  </thead>
                  <tbody>
                    {r.correlation.map((row, i) => (
                      <tr key={i}>
                        <th className="pr-2 text-left text-fg-faint">{fitParameterName(r.parameters[i].parameter)}</th>
                        {row.map((c, j) => (
                          <td key={j} className="tk-num border border-line px-3 py-1.5 text-fg" style={correlationShade(c)} data-correlation={c.toFixed(3)}>
                            {c.toFixed(3)}
                          </td>
                        ))}
                      </tr>
                    ))}
                  </tbody>
                </table>
                <p className="mt-1 text-caption text-fg-soft">
                  Shading: green for positive, amber for negative correlation, deeper for larger |ρ|; |ρ| near 1 means the data fix only a combination of the
                  two.
                </p>
              </div>
            ) : null}
            <StartsTable starts={r.starts} />
          </section>
        ) : null}

        {r?.profiles?.length ? <Profiles result={r} fitId={f.id} /> : null}
      </div>
      <Provenance
        title={`Fit of ${f.datasetName ?? "dataset"}`}
        path={`/fits/${f.id}`}
        input={{ network: f.settings.network, computation: f.settings.computation }}
        extra={[
          { label: "Dataset", value: `${f.datasetName ?? f.datasetId}${d?.synthetic ? " (synthetic)" : ""}` },
          { label: "Data hash (sha256)", value: f.dataHash },
          { label: "Measured", value: measured.label },
          { label: "Swept along", value: fitParameterName(f.settings.sweepParameter) },
          { label: "Fitted", value: f.settings.fit.map((p) => fitParameterName(p.parameter)).join(", ") },
        ]}
        networkId={null}
        networkVersion={null}
        engineVersion={f.engineVersion}
        inputHash={f.inputHash}
        date={f.finishedAt ?? f.createdAt}
      />
    </>
  );
}

/** Cell shade of a correlation coefficient: accent for positive, warm for negative, stronger with |c| (kept light so the number stays readable). */
function correlationShade(c: number): React.CSSProperties {
  const pct = Math.round(Math.min(1, Math.abs(c)) * 35);
  return { backgroundColor: `color-mix(in srgb, var(${c >= 0 ? "--tk-accent" : "--tk-warm"}) ${pct}%, transparent)` };
}

/** The chi2 profile of every fitted parameter, with the one-standard-error level and the interval where the profile stays under it. */
function Profiles({ result, fitId }: { result: FitResult; fitId: string }) {
  const profiles = result.profiles ?? [];
  return (
    <section className="space-y-4" aria-labelledby="fit-profiles-title" data-testid="fit-profiles">
      <div>
        <h2 id="fit-profiles-title" className="text-lead font-semibold">
          χ² profiles
        </h2>
        <p className="text-caption text-fg-soft">
          Each fitted parameter held at {result.diagnostics.profilePoints ?? profiles[0]?.points.length} values across its bounds
          {profiles[0]?.refitted ? ", the other parameters refitted at each" : ""}. The dashed level is the best χ² + χ²/dof (one standard error, the scaling of
          the standard errors); where the profile stays below it is the interval shown. A profile with several dips means minima the data hardly tell apart.
          {result.diagnostics.profileImproved
            ? " A profile point lay below the first best fit: the fit was refined from there and the profiles taken again."
            : ""}
        </p>
      </div>
      {profiles.map((p) => {
        const info = fitParameterInfo(p.parameter);
        const unit = info?.unit ?? "";
        const best = result.parameters.find((q) => q.parameter === p.parameter);
        const level = result.chi2 + p.deltaChi2;
        const xs = p.points.map((pt) => pt.value);
        const lo = Math.min(...xs),
          hi = Math.max(...xs);
        const fmt = (v: number | null) => (v === null ? "beyond the bound" : `${sig(v, 4)}${unit ? ` ${unit}` : ""}`);
        return (
          <div key={p.parameter} className="space-y-1" data-parameter={p.parameter}>
            <XYChart
              title={`χ² along ${fitParameterName(p.parameter)}`}
              name={`fit-${fitId.slice(0, 8)}-profile-${p.parameter}`}
              xLabel={fitParameterName(p.parameter)}
              yLabel="χ²"
              xUnit={unit}
              height={220}
              series={[
                { name: "profile", x: xs, y: p.points.map((pt) => pt.chi2), points: true, color: "accent" },
                { name: "best + χ²/dof", x: [lo, hi], y: [level, level], color: "warm", points: false },
                ...(best ? [{ name: "best fit", x: [best.value], y: [result.chi2], points: true, color: "linkAlt" as const }] : []),
              ]}
              csv={{
                header: ["value", "chi2", ...Object.keys(p.points[0]?.others ?? {}).map((n) => `fitted:${n}`)],
                rows: p.points.map((pt) => [pt.value, pt.chi2, ...Object.values(pt.others)]),
              }}
            />
            <p className="text-caption text-fg-soft" data-testid="profile-interval">
              Below the level from {fmt(p.interval.low)} to {fmt(p.interval.high)} (as fine as the {p.points.length} points).
            </p>
          </div>
        );
      })}
    </section>
  );
}

/** Every start of the fit: the global stage's points (evaluated only) and the local descents, from where to where. */
function StartsTable({ starts }: { starts: FitResult["starts"] }) {
  if (!starts.length) return null;
  const names = Object.keys(starts[0].initial);
  const local = starts.filter((s) => s.stage !== "global");
  const global = starts.length - local.length;
  const best = Math.min(...starts.map((s) => s.chi2));
  return (
    <details className="text-caption" data-testid="fit-starts">
      <summary className="cursor-pointer text-body font-semibold">
        Starts: {global} global point{global === 1 ? "" : "s"}, {local.length} local descent{local.length === 1 ? "" : "s"}
      </summary>
      <table className="mt-2 font-mono">
        <thead className="text-left text-fg-faint">
          <tr>
            <th className="pr-3">start</th>
            <th className="pr-3">stage</th>
            {names.map((n) => (
              <th key={n} className="pr-3">
                {fitParameterName(n)}: from → to
              </th>
            ))}
            <th className="pr-3">χ²</th>
            <th className="pr-3">iterations</th>
            <th>converged</th>
          </tr>
        </thead>
        <tbody>
          {starts.map((s) => (
            <tr key={s.start} className="border-t border-line" data-stage={s.stage}>
              <td className="pr-3">{s.start}</td>
              <td className="pr-3">{s.stage}</td>
              {names.map((n) => (
                <td key={n} className="pr-3 tk-num">
                  {s.stage === "global" ? sig(s.initial[n]) : `${sig(s.initial[n])} → ${sig(s.final[n])}`}
                </td>
              ))}
              <td className="pr-3 tk-num">
                {sig(s.chi2, 5)}
                {s.chi2 === best ? " (best)" : ""}
              </td>
              <td className="pr-3 tk-num">{s.iterations}</td>
              <td>{s.stage === "global" ? "–" : s.converged ? "yes" : "no"}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </details>
  );
}
