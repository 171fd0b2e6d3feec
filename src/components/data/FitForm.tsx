"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { ApiClientError, api } from "@/lib/api";
import { qk } from "@/lib/queryKeys";
import { LK07_COMPUTATION, LK07_FIT_START, LK07_NAME, LK07_NETWORK } from "@/shared/lk07";
import { FIT_PARAMETERS } from "@/shared/fit-parameters";

type Row = { on: boolean; initial: string; min: string; max: string };

/** Choose what to fit (with bounds and starting values), the network and the computation; submit as a job. */
export function FitForm({ datasetId, datasetName }: { datasetId: string; datasetName: string }) {
  const router = useRouter();
  const queryClient = useQueryClient();
  const demo = datasetName === LK07_NAME;
  const [rows, setRows] = useState<Record<string, Row>>(() => {
    const start = demo ? LK07_FIT_START : [{ parameter: "node.forward", initial: 0.6, min: 0.12, max: 0.98 }];
    return Object.fromEntries(
      FIT_PARAMETERS.map((p) => {
        const s = start.find((x) => x.parameter === p.parameter);
        return [p.parameter, { on: !!s, initial: String(s?.initial ?? p.initial), min: String(s?.min ?? p.min), max: String(s?.max ?? p.max) }];
      }),
    );
  });
  const [network, setNetwork] = useState(JSON.stringify(LK07_NETWORK, null, 2));
  const [computation, setComputation] = useState(JSON.stringify(LK07_COMPUTATION, null, 2));
  const [multiStart, setMultiStart] = useState("1");
  const [localError, setLocalError] = useState<string | null>(null);

  const m = useMutation({
    mutationFn: (body: unknown) => api("POST /api/v1/fits", { json: body }),
    onSuccess: async (r) => {
      await queryClient.invalidateQueries({ queryKey: qk.fits });
      router.push(`/fits/${r.id}`);
    },
  });

  function submit() {
    setLocalError(null);
    let net: unknown, comp: unknown;
    try {
      net = JSON.parse(network);
    } catch (e) {
      return setLocalError(`network: not valid JSON (${(e as Error).message})`);
    }
    try {
      comp = JSON.parse(computation);
    } catch (e) {
      return setLocalError(`computation: not valid JSON (${(e as Error).message})`);
    }
    const fit = FIT_PARAMETERS.filter((p) => rows[p.parameter].on).map((p) => ({
      parameter: p.parameter,
      initial: Number(rows[p.parameter].initial),
      min: Number(rows[p.parameter].min),
      max: Number(rows[p.parameter].max),
    }));
    if (!fit.length) return setLocalError("Choose at least one parameter to fit.");
    m.mutate({ datasetId, network: net, computation: comp, sweepParameter: "fieldTesla", fit, options: { multiStart: Number(multiStart) || 1 } });
  }

  const issues = m.error instanceof ApiClientError ? m.error.issues : [];
  return (
    <section className="space-y-4" aria-labelledby="fit-title">
      <div>
        <h2 id="fit-title" className="text-lead font-semibold">
          Fit the model
        </h2>
        <p className="text-caption text-fg-soft">
          Levenberg–Marquardt on the engine&apos;s conductance (thermal smearing at the computation&apos;s temperature), one engine computation per data point
          and iteration. Runs as a job and is metered in compute-seconds like a run; the estimate is checked against your quota and spend cap.
        </p>
      </div>
      <table className="w-full text-body" data-testid="fit-parameters">
        <thead className="text-left text-caption text-fg-faint">
          <tr>
            <th className="py-1">fit</th>
            <th>parameter</th>
            <th>start</th>
            <th>min</th>
            <th>max</th>
          </tr>
        </thead>
        <tbody>
          {FIT_PARAMETERS.map((p) => {
            const r = rows[p.parameter];
            const upd = (patch: Partial<Row>) => setRows((all) => ({ ...all, [p.parameter]: { ...all[p.parameter], ...patch } }));
            const id = p.parameter.replace(/\W/g, "-");
            return (
              <tr key={p.parameter} className="border-t border-line">
                <td className="py-1">
                  <input id={`fit-${id}`} type="checkbox" checked={r.on} onChange={(e) => upd({ on: e.target.checked })} aria-label={`fit ${p.parameter}`} />
                </td>
                <td>
                  <label htmlFor={`fit-${id}`} className="font-mono text-caption">
                    {p.parameter}
                  </label>
                  <span className="ml-2 text-caption text-fg-faint">
                    {p.label}
                    {p.unit ? ` [${p.unit}]` : ""}
                  </span>
                </td>
                {(["initial", "min", "max"] as const).map((k) => (
                  <td key={k}>
                    <input
                      className="tk-field w-28 font-mono"
                      aria-label={`${p.parameter} ${k}`}
                      value={r[k]}
                      disabled={!r.on}
                      onChange={(e) => upd({ [k]: e.target.value })}
                    />
                  </td>
                ))}
              </tr>
            );
          })}
        </tbody>
      </table>
      <div className="grid gap-4 lg:grid-cols-2">
        <label className="block">
          <span className="tk-label">network (engine schema; the fitted parameters override it)</span>
          <textarea
            className="tk-field mt-1 h-56 font-mono text-caption"
            value={network}
            onChange={(e) => setNetwork(e.target.value)}
            aria-label="network JSON"
          />
        </label>
        <div className="space-y-3">
          <label className="block">
            <span className="tk-label">computation at every point (fieldTesla is set from the data)</span>
            <textarea
              className="tk-field mt-1 h-32 font-mono text-caption"
              value={computation}
              onChange={(e) => setComputation(e.target.value)}
              aria-label="computation JSON"
            />
          </label>
          <label className="block">
            <span className="tk-label">starts (multi-start against local minima)</span>
            <input className="tk-field mt-1 w-24 font-mono" value={multiStart} onChange={(e) => setMultiStart(e.target.value)} aria-label="starts" />
          </label>
        </div>
      </div>
      {localError ? (
        <p role="alert" className="text-body text-danger">
          {localError}
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
      <button type="button" className="tk-btn" onClick={submit} disabled={m.isPending}>
        {m.isPending ? "Submitting…" : "Start the fit"}
      </button>
    </section>
  );
}
