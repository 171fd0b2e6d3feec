"use client";

import { useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useEffect, useState } from "react";
import { ApiClientError, api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { formatComputeSeconds, formatUsd } from "@/components/billing";
import type { DatasetPeriod } from "@/shared/api";
import { LK07_COMPUTATION, LK07_FIT_START, LK07_NAME, LK07_NETWORK } from "@/shared/lk07";
import { Y_MEASURES_INFO, type YMeasures } from "@/shared/csv";

/** The model a Hall-bar resistance starts from: the demo network with open edges and the default six-terminal bar. */
const HALL_BAR_NETWORK = { ...LK07_NETWORK, size: { columns: 9, rows: 6 }, transverse: "open" as const };
const HALL_BAR_COMPUTATION = { kind: "hallBar", energyMeV: 1.7, fieldTesla: 0, temperatureK: 1.5, temperaturePoints: 6 } as const;
import { FIT_PARAMETERS, type FitParameterInfo } from "@/shared/fit-parameters";
import { sig } from "./format";
import { canCreate, useMe } from "@/components/shell/useMe";
import { PLANS } from "@/shared/plans";
import { refusalReason } from "@/shared/permissions";

type Row = { on: boolean; initial: string; min: string; max: string };

const DEMO_MODEL = "demo";
const pretty = (v: unknown) => JSON.stringify(v, null, 2);

/** A bound as a short number (6 significant digits), rounded inwards so it stays inside the schema's range (2π shows as 6.28318). */
function shortBound(x: number, side: "min" | "max" | "initial"): string {
  if (x === 0 || !Number.isFinite(x)) return String(x);
  const scale = 10 ** (5 - Math.floor(Math.log10(Math.abs(x))));
  // (the 1e-7 keeps a value that is already short, such as 0.98, from moving by float noise)
  const v = x * scale;
  const r = side === "max" ? Math.floor(v + 1e-7) : side === "min" ? Math.ceil(v - 1e-7) : Math.round(v);
  return String(Number((r / scale).toPrecision(6)));
}

function initialRows(demo: boolean): Record<string, Row> {
  const start = demo ? LK07_FIT_START : [{ parameter: "node.forward", initial: 0.6, min: 0.12, max: 0.98 }];
  return Object.fromEntries(
    FIT_PARAMETERS.map((p) => {
      const s = start.find((x) => x.parameter === p.parameter);
      return [
        p.parameter,
        { on: !!s, initial: shortBound(s?.initial ?? p.initial, "initial"), min: shortBound(s?.min ?? p.min, "min"), max: shortBound(s?.max ?? p.max, "max") },
      ];
    }),
  );
}

/** The network with its scale (twist angle, or moiré period when no twist can be read) taken from the period estimate. */
function withScale(network: Record<string, unknown>, scale: { twistDegrees: number | null; periodNm: number }): Record<string, unknown> {
  const { twistDegrees: _t, periodNm: _p, ...rest } = network;
  void _t;
  void _p;
  return scale.twistDegrees !== null
    ? { ...rest, twistDegrees: Number(scale.twistDegrees.toPrecision(4)) }
    : { ...rest, periodNm: Number(scale.periodNm.toPrecision(4)) };
}

/** The value after `ms` of quiet (the estimate is asked for when the form stops changing). */
function useSettled<T>(value: T, ms: number): T {
  const [settled, setSettled] = useState(value);
  useEffect(() => {
    const t = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(t);
  }, [value, ms]);
  return settled;
}

/**
 * Set up a fit: the model network (a saved one, or the demo model, its scale taken from the period
 * estimate with one click), the parameters to fit (names in words, units and bounds from the
 * schema), the computation, the global stage and the descents; the estimate and cost (a dry run
 * of the same request) before it starts.
 */
export function FitForm({
  datasetId,
  datasetName,
  period,
  measures = "twoTerminal",
}: {
  datasetId: string;
  datasetName: string;
  period: DatasetPeriod | null;
  /** What the dataset's y measures: a Hall-bar resistance is fitted with the hallBar kind on an open-edged network. */
  measures?: YMeasures;
}) {
  const hallBar = measures !== "twoTerminal";
  const defaultNetwork = hallBar ? HALL_BAR_NETWORK : LK07_NETWORK;
  const router = useRouter();
  const queryClient = useQueryClient();
  const demo = datasetName === LK07_NAME;
  const [rows, setRows] = useState<Record<string, Row>>(() => initialRows(demo));
  const [source, setSource] = useState<string>(DEMO_MODEL);
  const [network, setNetwork] = useState(pretty(defaultNetwork));
  const [scaleNote, setScaleNote] = useState<string | null>(null);
  const [computation, setComputation] = useState(pretty(hallBar ? HALL_BAR_COMPUTATION : LK07_COMPUTATION));
  const [globalStarts, setGlobalStarts] = useState("");
  const [multiStart, setMultiStart] = useState("");
  const [profilePoints, setProfilePoints] = useState("");
  // What this member may do, from the permissions table the server enforces: a viewer reads fits
  // but does not start them (nor ask for their estimate), and sees why before any click.
  const me = useMe();
  const role = me.data?.role;
  const plan = me.data?.workspace.plan;
  const mayStart = canCreate(role);

  const saved = useQuery({ queryKey: qk.networks({ limit: 100 }), queryFn: () => api("GET /api/v1/networks", { query: { limit: 100 } }) });
  const savedNetwork = saved.data?.networks.find((n) => n.id === source);

  function chooseSource(id: string) {
    setSource(id);
    setScaleNote(null);
    const n = saved.data?.networks.find((x) => x.id === id);
    setNetwork(pretty(n ? n.network : defaultNetwork));
  }

  function applyEstimate() {
    if (!period) return;
    let current: Record<string, unknown>;
    try {
      current = JSON.parse(network) as Record<string, unknown>;
    } catch {
      current = defaultNetwork as unknown as Record<string, unknown>;
    }
    const reading = period.perTriangle;
    setNetwork(pretty(withScale(current, reading)));
    setScaleNote(
      reading.twistDegrees !== null
        ? `Twist angle ${sig(reading.twistDegrees, 4)}° from the period estimate (one flux quantum per triangle) is in the model network.`
        : `Moiré period ${sig(reading.periodNm, 4)} nm from the period estimate (one flux quantum per triangle) is in the model network.`,
    );
    // A fitted scale starts from the estimate too.
    setRows((all) => {
      const next = { ...all };
      if (reading.twistDegrees !== null) next.twistDegrees = { ...next.twistDegrees, initial: String(Number(reading.twistDegrees.toPrecision(4))) };
      next.periodNm = { ...next.periodNm, initial: String(Number(reading.periodNm.toPrecision(4))) };
      return next;
    });
  }

  /** The request as it would be sent, or what is wrong with the form. */
  const request = ((): { body: Record<string, unknown> } | { error: string } => {
    let net: unknown, comp: unknown;
    try {
      net = JSON.parse(network);
    } catch (e) {
      return { error: `network: not valid JSON (${(e as Error).message})` };
    }
    try {
      comp = JSON.parse(computation);
    } catch (e) {
      return { error: `computation: not valid JSON (${(e as Error).message})` };
    }
    const fit = FIT_PARAMETERS.filter((p) => rows[p.parameter].on).map((p) => ({
      parameter: p.parameter,
      initial: Number(rows[p.parameter].initial),
      min: Number(rows[p.parameter].min),
      max: Number(rows[p.parameter].max),
    }));
    if (!fit.length) return { error: "Choose at least one parameter to fit." };
    const bad = fit.find((f) => ![f.initial, f.min, f.max].every(Number.isFinite) || rows[f.parameter].initial.trim() === "");
    if (bad) return { error: `${FIT_PARAMETERS.find((p) => p.parameter === bad.parameter)!.short}: start, min and max must be numbers.` };
    const options: Record<string, number> = {};
    for (const [key, text] of [
      ["globalStarts", globalStarts],
      ["multiStart", multiStart],
      ["profilePoints", profilePoints],
    ] as const) {
      if (text.trim() === "") continue;
      const v = Number(text);
      const what = { globalStarts: "global starts", multiStart: "descents", profilePoints: "χ² profile points" }[key];
      if (!Number.isInteger(v)) return { error: `${what}: a whole number, or empty for the default.` };
      options[key] = v;
    }
    // An unchanged saved network is sent by its id and version, so the fit records which one it used.
    const unchanged = savedNetwork && network === pretty(savedNetwork.network);
    return {
      body: {
        datasetId,
        ...(unchanged ? { networkId: savedNetwork.id, networkVersion: savedNetwork.version } : { network: net }),
        computation: comp,
        sweepParameter: "fieldTesla",
        fit,
        ...(Object.keys(options).length ? { options } : {}),
      },
    };
  })();

  // The estimate: a dry run of the same request once the form has been quiet for 0.4 s.
  const settled = useSettled("body" in request ? JSON.stringify(request.body) : null, 400);
  const estimate = useQuery({
    queryKey: ["fit-estimate", settled],
    queryFn: () => api("POST /api/v1/fits?dryRun=true", { json: JSON.parse(settled!) }),
    enabled: settled !== null && mayStart,
    retry: false,
    staleTime: 60_000,
  });

  const m = useMutation({
    mutationFn: (body: unknown) => api("POST /api/v1/fits", { json: body }),
    onSuccess: async (r) => {
      await queryClient.invalidateQueries({ queryKey: qk.fits });
      router.push(`/fits/${r.id}`);
    },
  });

  const [submitError, setSubmitError] = useState<string | null>(null);
  function submit() {
    setSubmitError(null);
    if ("error" in request) return setSubmitError(request.error);
    m.mutate(request.body);
  }

  const issues = m.error instanceof ApiClientError ? m.error.issues : [];
  const est = estimate.data;
  const estimateError = estimate.error instanceof ApiClientError ? estimate.error : null;
  return (
    <section className="space-y-5" aria-labelledby="fit-title">
      <div>
        <h2 id="fit-title" className="text-lead font-semibold">
          Fit the model
        </h2>
        <p className="text-caption text-fg-soft">
          A global stage spreads starting points over the bounds of every fitted parameter and computes the model at each; Levenberg–Marquardt then refines the
          best few. One engine computation per data point and model curve; runs as a job, metered in compute-seconds like a calculation.
        </p>
      </div>

      <fieldset className="tk-card space-y-3">
        <legend className="px-1 text-body font-semibold">Model network</legend>
        <div className="flex flex-wrap items-end gap-4">
          <label className="block">
            <span className="tk-label">network</span>
            <select id="fit-network" className="tk-field mt-1 min-w-64" value={source} onChange={(e) => chooseSource(e.target.value)}>
              <option value={DEMO_MODEL}>Demo model: 4 × 4 triangular, periodic</option>
              {saved.data?.networks.map((n) => (
                <option key={n.id} value={n.id}>
                  Saved: {n.name} (version {n.version})
                </option>
              ))}
            </select>
          </label>
          <button type="button" className="tk-btn-quiet" onClick={applyEstimate} disabled={!period}>
            {period
              ? period.perTriangle.twistDegrees !== null
                ? `Use the estimated twist ${sig(period.perTriangle.twistDegrees, 4)}°`
                : `Use the estimated period ${sig(period.perTriangle.periodNm, 4)} nm`
              : "Use the period estimate (run the analysis above first)"}
          </button>
        </div>
        <NetworkSummary text={network} />
        {scaleNote ? (
          <p role="status" className="text-caption text-accent" data-testid="scale-note">
            {scaleNote}
          </p>
        ) : null}
        <details>
          <summary className="cursor-pointer text-caption text-fg-soft">Edit the network as JSON (engine schema; the fitted parameters override it)</summary>
          <textarea
            className="tk-field mt-1 h-56 font-mono text-caption"
            value={network}
            onChange={(e) => setNetwork(e.target.value)}
            aria-label="network JSON"
          />
        </details>
      </fieldset>

      <fieldset className="tk-card">
        <legend className="px-1 text-body font-semibold">Parameters to fit</legend>
        <table className="w-full text-body" data-testid="fit-parameters">
          <thead className="text-left text-caption text-fg-faint">
            <tr>
              <th className="py-1">fit</th>
              <th>parameter</th>
              <th>unit</th>
              <th>start</th>
              <th>min</th>
              <th>max</th>
            </tr>
          </thead>
          <tbody>
            {FIT_PARAMETERS.map((p) => (
              <ParameterRow
                key={p.parameter}
                p={p}
                row={rows[p.parameter]}
                update={(patch) => setRows((all) => ({ ...all, [p.parameter]: { ...all[p.parameter], ...patch } }))}
              />
            ))}
          </tbody>
        </table>
      </fieldset>

      <div className="grid gap-4 lg:grid-cols-2">
        <fieldset className="tk-card space-y-3">
          <legend className="px-1 text-body font-semibold">Search</legend>
          <label className="block">
            <span className="tk-label">global starts (points over the bounds; empty: 8 per parameter + 8, at most 64; 0: local only)</span>
            <input
              id="fit-global-starts"
              className="tk-field mt-1 w-28 font-mono"
              inputMode="numeric"
              value={globalStarts}
              placeholder="default"
              onChange={(e) => setGlobalStarts(e.target.value)}
            />
          </label>
          <label className="block">
            <span className="tk-label">local descents (Levenberg–Marquardt from the best global points; empty: 3, or 1 when local only)</span>
            <input
              id="fit-descents"
              className="tk-field mt-1 w-28 font-mono"
              inputMode="numeric"
              value={multiStart}
              placeholder="default"
              onChange={(e) => setMultiStart(e.target.value)}
            />
          </label>
          <label className="block">
            <span className="tk-label">χ² profile points per parameter (across its bounds, the others refitted; empty: 9; 0: no profiles)</span>
            <input
              id="fit-profile-points"
              className="tk-field mt-1 w-28 font-mono"
              inputMode="numeric"
              value={profilePoints}
              placeholder="default"
              onChange={(e) => setProfilePoints(e.target.value)}
            />
          </label>
        </fieldset>
        <details className="tk-card">
          <summary className="cursor-pointer text-body font-semibold">Computation at every point</summary>
          {hallBar ? (
            <p className="mt-2 text-caption text-fg-soft" data-testid="fit-hall-bar-note">
              This dataset holds {Y_MEASURES_INFO[measures].label}: the model is a Hall bar (kind hallBar) on a network with open edges, current from source to
              drain, with the six-terminal bar&apos;s contacts unless the computation names others.
            </p>
          ) : null}
          <label className="mt-2 block">
            <span className="tk-label">engine computation (JSON; fieldTesla is set from the data, temperatureK gives the thermal smearing)</span>
            <textarea
              className="tk-field mt-1 h-32 font-mono text-caption"
              value={computation}
              onChange={(e) => setComputation(e.target.value)}
              aria-label="computation JSON"
            />
          </label>
        </details>
      </div>

      <div className="tk-card space-y-1" data-testid="fit-estimate" aria-live="polite">
        <h3 className="text-body font-semibold">Estimate before starting</h3>
        {"error" in request ? (
          <p className="text-caption text-danger">{request.error}</p>
        ) : estimateError ? (
          <p className="text-caption text-danger" data-testid="fit-estimate-error">
            {estimateError.message}
          </p>
        ) : est && !estimate.isFetching ? (
          <>
            <p className="text-body">
              <span className="tk-num font-mono" data-testid="fit-estimate-seconds">
                {formatComputeSeconds(est.estimate.computeSeconds)}
              </span>{" "}
              · <span className="tk-num font-mono">{formatUsd(est.estimate.costUsd)}</span> on your plan
            </p>
            <p className="text-caption text-fg-soft" data-testid="fit-stages">
              {est.stages.globalStarts > 0 ? `${est.stages.globalStarts} global points, then ` : "No global stage: "}
              {est.stages.localStarts} local descent{est.stages.localStarts === 1 ? "" : "s"} (at most {est.stages.maxIterations} iterations each)
              {est.stages.profilePoints > 0 ? `, then χ² profiles of ${est.stages.profilePoints} points per parameter` : ", no χ² profiles"} · {est.modelCurves}{" "}
              model curves × {est.points} points = {est.estimate.engineEvaluations.toLocaleString("en")} engine computations.{" "}
              {plan === "free"
                ? `The compute-seconds actually used count against the ${PLANS.free.includedComputeSeconds / 60} compute-minutes the Free plan includes each month.`
                : "You are charged for the compute-seconds actually used."}
            </p>
          </>
        ) : !mayStart && role ? (
          <p className="text-caption text-fg-soft">No estimate: your role cannot start fits.</p>
        ) : (
          <p className="text-caption text-fg-faint">Estimating…</p>
        )}
      </div>

      {submitError ? (
        <p role="alert" className="text-body text-danger">
          {submitError}
        </p>
      ) : null}
      {m.error ? (
        <div role="alert" className="rounded-card border border-danger/40 bg-danger-soft p-3 text-body text-danger">
          <p>{m.error.message}</p>
          {issues.length > 1 ? (
            <ul className="mt-1 list-disc pl-5 text-caption">
              {issues.map((i, k) => (
                <li key={k}>
                  {i.field}: {i.message}
                </li>
              ))}
            </ul>
          ) : null}
        </div>
      ) : null}
      <button type="button" className="tk-btn" onClick={submit} disabled={m.isPending || !mayStart} aria-describedby={mayStart ? undefined : "fit-start-why"}>
        {m.isPending ? "Submitting…" : "Start the fit"}
      </button>
      {role && !mayStart ? (
        <p id="fit-start-why" className="text-caption text-fg-soft" data-testid="fit-start-why">
          {refusalReason(role, "work.create")}
        </p>
      ) : null}
    </section>
  );
}

function ParameterRow({ p, row, update }: { p: FitParameterInfo; row: Row; update: (patch: Partial<Row>) => void }) {
  const id = `fit-${p.parameter.replace(/\W/g, "-")}`;
  return (
    <tr className="border-t border-line" data-parameter={p.parameter}>
      <td className="py-1">
        <input id={id} type="checkbox" checked={row.on} onChange={(e) => update({ on: e.target.checked })} aria-describedby={`${id}-about`} />
      </td>
      <td>
        <label htmlFor={id}>{p.short}</label>
        <span id={`${id}-about`} className="block text-caption text-fg-faint">
          {p.label} · <span className="font-mono">{p.parameter}</span>
        </span>
      </td>
      <td className="font-mono text-caption">{p.unit || "–"}</td>
      {(["initial", "min", "max"] as const).map((k) => (
        <td key={k}>
          <input
            className="tk-field w-28 font-mono"
            aria-label={`${p.short}: ${k === "initial" ? "start" : k}${p.unit ? ` (${p.unit})` : ""}`}
            inputMode="decimal"
            value={row[k]}
            disabled={!row.on}
            onChange={(e) => update({ [k]: e.target.value })}
          />
        </td>
      ))}
    </tr>
  );
}

/** The model network in a line: lattice, size, scale, node probabilities. */
function NetworkSummary({ text }: { text: string }) {
  let n: Record<string, unknown>;
  try {
    n = JSON.parse(text) as Record<string, unknown>;
  } catch {
    return <p className="text-caption text-danger">The network JSON below is not valid.</p>;
  }
  const size = n.size as { columns?: number; rows?: number } | undefined;
  const node = n.node as { forward?: number } | undefined;
  const scale = typeof n.twistDegrees === "number" ? `twist ${n.twistDegrees}°` : typeof n.periodNm === "number" ? `period ${n.periodNm} nm` : "no scale";
  return (
    <p className="text-body" data-testid="network-summary">
      {String(n.lattice ?? "?")} · {size?.columns ?? "?"} × {size?.rows ?? "?"} · <span data-testid="network-scale">{scale}</span>
      {node?.forward !== undefined ? ` · node forward ${node.forward}` : ""}
    </p>
  );
}
