"use client";

import { useState } from "react";
import { api } from "@/lib/api";
import type { NetworkView, SweepAxisRequest } from "@/shared/api";
import { axisLabel, PARAMETER_UNITS } from "@/lib/units";
import { PLANS } from "@/shared/plans";
import { Field, NumberInput, Select } from "@/components/ui/Field";
import { useMe } from "@/components/shell/useMe";
import { RefusalNote, UpgradeHint, usePermission } from "@/components/ui/Permission";
import { ComputationFields, ServerError, useComputationDraft, useStartJob } from "@/components/runs/ComputationForm";
import { KINDS } from "@/components/runs/computations";
import { CostLine } from "@/components/runs/CostLine";
import { sweepParametersFor } from "./parameters";

interface AxisDraft {
  parameter: string;
  mode: "range" | "values";
  from: number | string;
  to: number | string;
  points: number | string;
  values: string;
}

export function parseValues(text: string): number[] | string {
  const parts = text.split(/[\s,;]+/).filter(Boolean);
  if (parts.length === 0) return "list at least one value, separated by commas";
  const out: number[] = [];
  for (const p of parts) {
    const n = Number(p);
    if (!Number.isFinite(n)) return `"${p}" is not a number`;
    out.push(n);
  }
  return out;
}

export function axisFromDraft(a: AxisDraft): { axis: SweepAxisRequest; count: number } | { error: string; field: keyof AxisDraft } {
  if (a.mode === "values") {
    const v = parseValues(a.values);
    if (typeof v === "string") return { error: v, field: "values" };
    return { axis: { parameter: a.parameter, values: v }, count: v.length };
  }
  const from = Number(a.from);
  const to = Number(a.to);
  const points = Number(a.points);
  if (String(a.from).trim() === "" || !Number.isFinite(from)) return { error: "from must be a number", field: "from" };
  if (String(a.to).trim() === "" || !Number.isFinite(to)) return { error: "to must be a number", field: "to" };
  if (!Number.isInteger(points) || points < 1) return { error: "points must be a whole number, at least 1", field: "points" };
  return { axis: { parameter: a.parameter, from, to, points }, count: points };
}

/**
 * A scan (API: sweep) over one or two parameters, values or ranges, with the point count, the
 * plan's limit (an over-limit scan cannot be started; the way to a larger plan is shown) and the estimate.
 */
export function SweepBuilder({ network, canSubmit }: { network: NetworkView; canSubmit: boolean }) {
  const me = useMe();
  const plan = me.data?.workspace?.plan ?? "free";
  const lattice = network.network.lattice;
  const draft = useComputationDraft(network);
  const { kind, computation, check, seconds: perPoint } = draft;
  const params = sweepParametersFor(kind, lattice);
  const [axes, setAxes] = useState<AxisDraft[]>([{ parameter: "fieldTesla", mode: "range", from: 0, to: 1, points: 11, values: "" }]);
  const [samples, setSamples] = useState<number | string>("");

  const parsed = axes.map(axisFromDraft);
  const axisOk = parsed.every((p) => "axis" in p);
  const duplicate = axes.length === 2 && axes[0].parameter === axes[1].parameter;
  const pointCount = parsed.reduce((n, p) => n * ("count" in p ? p.count : 0), 1);
  const ensembleN = samples === "" ? 1 : Number(samples);
  const ensembleError =
    samples !== "" && (!Number.isInteger(ensembleN) || ensembleN < 1) ? "ensemble size must be a whole number, at least 1 (blank: one sample)" : undefined;
  const limit = PLANS[plan].maxSweepPoints;
  const overLimit = pointCount > limit;
  const ok = check.ok && axisOk && !duplicate && !ensembleError && pointCount > 0 && !overLimit;
  const permission = usePermission("work.create");

  const { submit, serverError, onSubmit } = useStartJob(
    () =>
      api("POST /api/v1/sweeps", {
        json: {
          networkId: network.id,
          computation,
          axes: parsed.map((p) => ("axis" in p ? p.axis : null)),
          ...(samples !== "" ? { ensemble: { samples: ensembleN } } : {}),
        },
      }),
    (s) => `/sweeps/${s.id}`,
  );

  const setAxis = (i: number, patch: Partial<AxisDraft>) => setAxes((list) => list.map((a, k) => (k === i ? { ...a, ...patch } : a)));
  return (
    <form aria-label="Build a scan" className="tk-card space-y-4" onSubmit={onSubmit(ok)}>
      <div className="grid gap-3 sm:grid-cols-3">
        <Field id="sweep.kind" label="Computation at each point">
          <Select
            id="sweep.kind"
            value={kind}
            options={KINDS.filter((k) => k.kind !== "spectrum").map((k) => ({ value: k.kind, label: k.label }))}
            onChange={(v) => {
              draft.chooseKind(v);
              const allowed = sweepParametersFor(v, lattice);
              setAxes((list) => list.map((a) => (allowed.includes(a.parameter) ? a : { ...a, parameter: allowed[0] })));
            }}
          />
        </Field>
        <Field id="sweep.ensemble" label="Ensemble per point" unit="disorder seeds" hint="blank: one sample per point" error={ensembleError}>
          <NumberInput id="sweep.ensemble" integer value={samples} onChange={setSamples} error={ensembleError} />
        </Field>
      </div>
      <details className="rounded-field border border-line p-3">
        <summary className="cursor-pointer text-caption font-medium text-fg-soft">Fixed values of the other parameters</summary>
        <div className="mt-3 grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          <ComputationFields draft={draft} idPrefix="sweep.base." errorOf={(path) => (check.ok ? undefined : check.issues[path])} />
        </div>
      </details>
      {axes.map((a, i) => {
        const p = parsed[i];
        const err = "error" in p ? p : null;
        const unit = PARAMETER_UNITS[a.parameter]?.unit;
        return (
          <fieldset key={i} className="rounded-field border border-line p-3" aria-label={`Axis ${i + 1}`}>
            <legend className="px-1 text-caption font-semibold text-fg-soft">
              Axis {i + 1}
              {i === 0 && axes.length === 2 ? " (rows of the heat map: y)" : i === 1 ? " (columns: x)" : ""}
            </legend>
            <div className="grid gap-3 sm:grid-cols-[1.4fr_1fr_repeat(3,0.8fr)]">
              <Field id={`axis${i}.parameter`} label="Parameter" error={duplicate && i === 1 ? "the two axes must sweep different parameters" : undefined}>
                <Select
                  id={`axis${i}.parameter`}
                  value={a.parameter}
                  options={params.map((x) => ({ value: x, label: axisLabel(x) }))}
                  onChange={(v) => setAxis(i, { parameter: v })}
                />
              </Field>
              <Field id={`axis${i}.mode`} label="Given as">
                <Select
                  id={`axis${i}.mode`}
                  value={a.mode}
                  options={[
                    { value: "range", label: "Range" },
                    { value: "values", label: "List of values" },
                  ]}
                  onChange={(v) => setAxis(i, { mode: v as AxisDraft["mode"] })}
                />
              </Field>
              {a.mode === "range" ? (
                <>
                  <Field id={`axis${i}.from`} label="From" unit={unit || undefined} error={err?.field === "from" ? err.error : undefined}>
                    <NumberInput
                      id={`axis${i}.from`}
                      value={a.from}
                      onChange={(v) => setAxis(i, { from: v })}
                      error={err?.field === "from" ? err.error : undefined}
                    />
                  </Field>
                  <Field id={`axis${i}.to`} label="To" unit={unit || undefined} error={err?.field === "to" ? err.error : undefined}>
                    <NumberInput id={`axis${i}.to`} value={a.to} onChange={(v) => setAxis(i, { to: v })} error={err?.field === "to" ? err.error : undefined} />
                  </Field>
                  <Field id={`axis${i}.points`} label="Points" error={err?.field === "points" ? err.error : undefined}>
                    <NumberInput
                      id={`axis${i}.points`}
                      integer
                      value={a.points}
                      onChange={(v) => setAxis(i, { points: v })}
                      error={err?.field === "points" ? err.error : undefined}
                    />
                  </Field>
                </>
              ) : (
                <div className="sm:col-span-3">
                  <Field
                    id={`axis${i}.values`}
                    label="Values"
                    unit={unit || undefined}
                    hint="separated by commas or spaces"
                    error={err?.field === "values" ? err.error : undefined}
                  >
                    <input
                      id={`axis${i}.values`}
                      className="tk-field font-mono"
                      value={a.values}
                      onChange={(e) => setAxis(i, { values: e.target.value })}
                      placeholder="0, 0.5, 1, 2"
                    />
                  </Field>
                </div>
              )}
            </div>
          </fieldset>
        );
      })}
      <div className="flex flex-wrap gap-2">
        {axes.length === 1 ? (
          <button
            type="button"
            className="tk-btn-quiet"
            onClick={() =>
              setAxes((l) => [...l, { parameter: params.find((x) => x !== l[0].parameter) ?? params[0], mode: "range", from: 0, to: 1, points: 6, values: "" }])
            }
          >
            + Second axis (heat map)
          </button>
        ) : (
          <button type="button" className="tk-btn-quiet" onClick={() => setAxes((l) => l.slice(0, 1))}>
            Remove second axis
          </button>
        )}
      </div>
      <p className="text-body" data-testid="point-count">
        <strong className="tk-num">{axisOk ? pointCount.toLocaleString("en") : "–"}</strong> points
        {samples !== "" && !ensembleError ? ` × ${ensembleN} seeds` : ""}
        <span className={overLimit ? "text-danger" : "text-fg-faint"}>
          {" "}
          · the {PLANS[plan].label} plan allows up to {limit.toLocaleString("en")} points per scan
        </span>
      </p>
      {overLimit && axisOk ? (
        <p
          id="scan-limit"
          role="alert"
          className="rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger"
          data-testid="scan-limit"
        >
          {pointCount.toLocaleString("en")} points is over the {PLANS[plan].label} plan&apos;s {limit.toLocaleString("en")}; this scan would be refused. Use
          fewer points, or <UpgradeHint plan={plan} /> (up to {PLANS.lab.maxSweepPoints.toLocaleString("en")} points).
        </p>
      ) : null}
      <CostLine
        seconds={perPoint === null || !axisOk ? null : perPoint * pointCount * (ensembleError ? 1 : ensembleN)}
        plan={plan}
        points={pointCount}
        jobSeconds={perPoint === null ? null : perPoint * (ensembleError ? 1 : ensembleN)}
      />
      <ServerError message={serverError} />
      {!canSubmit && permission.reason ? <RefusalNote id="scan-refusal" reason={permission.reason} /> : null}
      <button
        type="submit"
        className="tk-btn"
        disabled={!canSubmit || !ok || submit.isPending}
        aria-describedby={!canSubmit && permission.reason ? "scan-refusal" : overLimit && axisOk ? "scan-limit" : undefined}
      >
        {submit.isPending ? "Submitting…" : `Start scan of ${axisOk ? pointCount : "–"} points`}
      </button>
    </form>
  );
}
