"use client";

import { useMutation } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { api, ApiClientError } from "@/lib/api";
import type { NetworkView } from "@/shared/api";
import { estimateInput, validateComputation } from "@/lib/engineClient";
import { Field, NumberInput, Select } from "@/components/ui/Field";
import { useMe } from "@/components/shell/useMe";
import { buildComputation, defaultsFor, FIELDS, isShown, KINDS, type ComputationKind, type FormValues } from "./computations";
import { CostLine } from "./CostLine";

/** Form for one run of any computation on a saved network; shows the estimate before submit. */
export function RunForm({ network, canSubmit }: { network: NetworkView; canSubmit: boolean }) {
  const router = useRouter();
  const me = useMe();
  const [kind, setKind] = useState<ComputationKind>("conductance");
  const [values, setValues] = useState<FormValues>(() => defaultsFor("conductance"));
  const [serverError, setServerError] = useState<string | null>(null);
  const computation = useMemo(() => buildComputation(kind, values), [kind, values]);
  const check = useMemo(() => validateComputation(computation), [computation]);
  const issues = check.ok ? {} : check.issues;
  const seconds = useMemo(() => (check.ok ? estimateInput({ network: network.network, computation }) : null), [check.ok, network.network, computation]);
  const submit = useMutation({
    mutationFn: () => api("POST /api/v1/runs", { json: { networkId: network.id, computation } }),
    onSuccess: (run) => router.push(`/runs/${run.id}`),
    onError: (e) => setServerError(e instanceof ApiClientError ? e.message : String(e)),
  });
  const fields = FIELDS[kind].filter((f) => isShown(f, values));
  return (
    <form
      aria-label="Run a computation"
      className="tk-card space-y-4"
      onSubmit={(e) => {
        e.preventDefault();
        setServerError(null);
        if (check.ok) submit.mutate();
      }}
    >
      <div role="radiogroup" aria-label="Computation" className="flex flex-wrap gap-2">
        {KINDS.map((k) => (
          <button
            key={k.kind}
            type="button"
            role="radio"
            aria-checked={kind === k.kind}
            onClick={() => {
              setKind(k.kind);
              setValues(defaultsFor(k.kind));
            }}
            className={`rounded-full border px-3 py-1 text-caption ${kind === k.kind ? "border-accent bg-accent text-accent-fg" : "border-line text-fg-soft hover:border-accent"}`}
          >
            {k.label}
          </button>
        ))}
      </div>
      <p className="text-caption text-fg-soft">{KINDS.find((k) => k.kind === kind)?.blurb}</p>
      <div className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
        {fields.map((f) => {
          const id = `run.${f.path}`;
          const error = issues[f.path] ?? issues[f.path.split(".")[0]];
          return (
            <Field key={f.path} id={id} label={f.label} unit={f.unit} hint={f.hint} error={error}>
              {f.options ? (
                <Select id={id} value={String(values[f.path] ?? f.default ?? "")} options={f.options} onChange={(v) => setValues((s) => ({ ...s, [f.path]: v }))} />
              ) : (
                <NumberInput id={id} integer={f.integer} value={values[f.path]} error={error} onChange={(v) => setValues((s) => ({ ...s, [f.path]: v }))} />
              )}
            </Field>
          );
        })}
      </div>
      {Object.entries(issues)
        .filter(([k]) => !FIELDS[kind].some((f) => f.path === k || f.path.split(".")[0] === k))
        .map(([k, m]) => (
          <p key={k} role="alert" className="text-caption text-danger">
            <span className="font-mono">{k}</span>: {m}
          </p>
        ))}
      <CostLine seconds={seconds} plan={me.data?.workspace?.plan} />
      {serverError ? (
        <p role="alert" className="rounded-field bg-danger-soft p-2 text-caption text-danger">
          {serverError}
        </p>
      ) : null}
      {canSubmit ? (
        <button type="submit" className="tk-btn" disabled={!check.ok || submit.isPending}>
          {submit.isPending ? "Submitting…" : `Run ${KINDS.find((k) => k.kind === kind)?.label.toLowerCase()}`}
        </button>
      ) : (
        <p className="text-caption text-fg-faint">Your role can read results but not start runs (Owner and Researcher can).</p>
      )}
    </form>
  );
}
