"use client";

import { useMemo, useState } from "react";
import { EngineInputError, parseComputeInput, type ComputeInput } from "@/engine/browser";
import { api } from "@/lib/api";
import type { NetworkView, SweepAxisRequest } from "@/shared/api";
import { axisLabel, PARAMETER_UNITS } from "@/lib/units";
import { PLANS, type PlanId } from "@/shared/plans";
import { checkSweepAxes, type AxisFix, type AxisProblem } from "@/shared/sweep-checks";
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

/** The axis draft that a check's nearest valid axis stands for. */
export function draftOfFix(fix: AxisFix): Partial<AxisDraft> {
  return "values" in fix ? { mode: "values", values: fix.values.join(", ") } : { mode: "range", from: fix.from, to: fix.to, points: fix.points };
}

/** The scan's base input as the server builds it (the network, the computation, the ensemble), or the engine's reason it is refused. */
function baseInput(network: unknown, computation: object, samples: number | null): { input: ComputeInput } | { error: string } {
  try {
    return { input: parseComputeInput({ network, computation: samples === null ? computation : { ...computation, ensemble: { samples } } }) };
  } catch (err) {
    if (err instanceof EngineInputError) return { error: err.message };
    throw err;
  }
}

interface PlanProblem {
  key: string;
  /** What is over which limit, with the numbers. */
  text: string;
  /** What to do instead on this plan. */
  instead: string;
  /** The Lab plan's figure, when it allows more. */
  labAllows: string | null;
}

/** The plan's limits a scan would be refused by (src/shared/plans.ts; the server's checks: src/server/billing/limits.ts). */
function planProblems(
  plan: PlanId,
  pointCount: number,
  samples: number,
  size: { columns: number; rows: number },
  sizeAxes: { axis: number; parameter: string; max: number }[],
): PlanProblem[] {
  const p = PLANS[plan];
  const lab = PLANS.lab;
  const more = (ours: number, theirs: number, what: string) => (plan === "free" && theirs > ours ? `${theirs.toLocaleString("en")} ${what}` : null);
  const out: PlanProblem[] = [];
  if (pointCount > p.maxSweepPoints)
    out.push({
      key: "points",
      text: `${pointCount.toLocaleString("en")} points is over the ${p.label} plan's ${p.maxSweepPoints.toLocaleString("en")} points per scan`,
      instead: "Use fewer points",
      labAllows: more(p.maxSweepPoints, lab.maxSweepPoints, "points"),
    });
  if (samples > p.maxEnsembleSamples)
    out.push({
      key: "ensemble",
      text: `${samples.toLocaleString("en")} disorder seeds per point is over the ${p.label} plan's ${p.maxEnsembleSamples.toLocaleString("en")} seeds per ensemble`,
      instead: "Use fewer seeds",
      labAllows: more(p.maxEnsembleSamples, lab.maxEnsembleSamples, "seeds"),
    });
  if (size.columns > p.maxCellsPerSide || size.rows > p.maxCellsPerSide)
    out.push({
      key: "size",
      text: `the network is ${size.columns} × ${size.rows} cells, over the ${p.label} plan's ${p.maxCellsPerSide} cells per side`,
      instead: "Scan a smaller network",
      labAllows: more(p.maxCellsPerSide, lab.maxCellsPerSide, "cells per side"),
    });
  for (const a of sizeAxes)
    if (a.max > p.maxCellsPerSide)
      out.push({
        key: `axis${a.axis}`,
        text: `axis ${a.axis + 1} reaches ${a.max} ${a.parameter === "size.columns" ? "columns" : "rows"}, over the ${p.label} plan's ${p.maxCellsPerSide} cells per side`,
        instead: `Keep axis ${a.axis + 1} at or below ${p.maxCellsPerSide}`,
        labAllows: more(p.maxCellsPerSide, lab.maxCellsPerSide, "cells per side"),
      });
  return out;
}

/** What an axis asks that the engine refuses, in words, and the nearest valid axis as a button. */
function AxisWarning({ index, problem, onFix }: { index: number; problem: AxisProblem; onFix: (fix: AxisFix) => void }) {
  return (
    <div
      role="alert"
      id={`axis${index}-problem`}
      className="mt-3 rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger"
      data-testid={`axis${index}-problem`}
      data-reason={problem.reason}
    >
      <p>{problem.message}</p>
      {problem.reason === "torusField" && problem.allowedFields.length > 0 ? (
        <p className="mt-1" data-testid={`axis${index}-allowed`}>
          Allowed fields near the chosen range:{" "}
          <span className="font-mono tk-num">{problem.allowedFields.map((f) => `${Number(f.toPrecision(6))} T`).join(", ")}</span>
        </p>
      ) : null}
      {problem.fix && problem.fixLabel ? (
        <button
          type="button"
          className="mt-2 rounded-full border border-danger/50 px-2.5 py-0.5 font-medium hover:bg-surface"
          data-testid={`axis${index}-fix`}
          onClick={() => onFix(problem.fix!)}
        >
          {problem.fixLabel}
        </button>
      ) : null}
    </div>
  );
}

/**
 * A scan (API: sweep) over one or two parameters, values or ranges, with the point count, the
 * plan's limits (an over-limit scan cannot be started; the way to a larger plan is shown) and the
 * estimate. Before submitting it checks every axis value with the engine's own rules (reachable
 * node probabilities, the field steps of a torus, every bound: src/shared/sweep-checks.ts) and says
 * in words what is refused, with the nearest valid axis one click away; the server's dry run is the
 * final word before the scan is created.
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

  const parsed = useMemo(() => axes.map(axisFromDraft), [axes]);
  const axisOk = parsed.every((p) => "axis" in p);
  const duplicate = axes.length === 2 && axes[0].parameter === axes[1].parameter;
  const pointCount = parsed.reduce((n, p) => n * ("count" in p ? p.count : 0), 1);
  const ensembleN = samples === "" ? 1 : Number(samples);
  const ensembleError =
    samples !== "" && (!Number.isInteger(ensembleN) || ensembleN < 1) ? "ensemble size must be a whole number, at least 1 (blank: one sample)" : undefined;
  const limit = PLANS[plan].maxSweepPoints;
  const requestAxes = useMemo(() => parsed.flatMap((p) => ("axis" in p ? [p.axis] : [])), [parsed]);
  const samplesOk = samples !== "" && !ensembleError ? ensembleN : null;
  const base = useMemo(() => (check.ok ? baseInput(network.network, computation, samplesOk) : null), [check.ok, network.network, computation, samplesOk]);
  // Every axis value through the engine's own rules, once the axes and the base input are valid.
  const axisProblems = useMemo(
    () => (base && "input" in base && axisOk && !duplicate ? checkSweepAxes(base.input, requestAxes) : []),
    [base, axisOk, duplicate, requestAxes],
  );
  const limits = planProblems(
    plan,
    pointCount,
    samplesOk ?? 1,
    network.network.size,
    requestAxes.flatMap((a, axis) =>
      a.parameter === "size.columns" || a.parameter === "size.rows"
        ? [{ axis, parameter: a.parameter, max: Math.max(...("values" in a ? a.values : [a.from, a.to])) }]
        : [],
    ),
  );
  const overLimit = limits.length > 0;
  const ok =
    check.ok && axisOk && !duplicate && !ensembleError && pointCount > 0 && !overLimit && base !== null && "input" in base && axisProblems.length === 0;
  const permission = usePermission("work.create");

  const body = () => ({
    networkId: network.id,
    computation,
    axes: requestAxes,
    ...(samples !== "" ? { ensemble: { samples: ensembleN } } : {}),
  });
  // The server's dry run checks every point (and the budget) first: a refusal shows in words and nothing is created.
  const [checking, setChecking] = useState(false);
  const { submit, serverError, onSubmit } = useStartJob(
    async () => {
      setChecking(true);
      try {
        await api("POST /api/v1/sweeps?dryRun=true", { json: body() });
      } finally {
        setChecking(false);
      }
      return api("POST /api/v1/sweeps", { json: body() });
    },
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
            {axisProblems
              .filter((x) => x.axis === i)
              .map((x) => (
                <AxisWarning key={x.parameter} index={i} problem={x} onFix={(fix) => setAxis(i, draftOfFix(fix))} />
              ))}
          </fieldset>
        );
      })}
      {!check.ok ? (
        <div role="alert" className="rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger" data-testid="scan-fixed-problem">
          {Object.entries(check.issues).map(([path, message]) => (
            <p key={path}>
              Fixed value {PARAMETER_UNITS[path]?.label.toLowerCase() ?? path}: {message}
            </p>
          ))}
        </div>
      ) : null}
      {base && "error" in base ? (
        <p role="alert" className="rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger" data-testid="scan-base-problem">
          The fixed values are refused: {base.error}
        </p>
      ) : null}
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
        <div
          id="scan-limit"
          role="alert"
          className="space-y-1 rounded-field border border-danger/40 bg-danger-soft p-2.5 text-caption text-danger"
          data-testid="scan-limit"
        >
          {limits.map((l) => (
            <p key={l.key} data-testid={`scan-limit-${l.key}`}>
              {l.text[0].toUpperCase() + l.text.slice(1)}; this scan would be refused. {l.instead}
              {l.labAllows ? (
                <>
                  , or <UpgradeHint plan={plan} /> (up to {l.labAllows})
                </>
              ) : null}
              .
            </p>
          ))}
        </div>
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
        aria-describedby={
          !canSubmit && permission.reason
            ? "scan-refusal"
            : overLimit && axisOk
              ? "scan-limit"
              : axisProblems.length > 0
                ? axisProblems.map((x) => `axis${x.axis}-problem`).join(" ")
                : undefined
        }
      >
        {checking ? "Checking every point…" : submit.isPending ? "Submitting…" : `Start scan of ${axisOk ? pointCount : "–"} points`}
      </button>
    </form>
  );
}
